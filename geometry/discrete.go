// Package geometry is cvdeck's outline model: segments with boundary tags,
// loops (one outer, any number inner), their validation, discretisation by
// spacing laws, and readers for sketch formats.
package geometry

import "github.com/paulmach/orb"

// Chain is a discretised open piece of boundary: nodes in order and one
// boundary tag per edge (Tags[k] tags the edge Points[k]→Points[k+1]).
type Chain struct {
	Points []orb.Point
	Tags   []string
}

// DiscreteLoop is a discretised closed loop: the closing edge from the last
// point back to the first is implied, so len(Tags) == len(Points) and
// Tags[k] tags the edge Points[k]→Points[(k+1)%n].
type DiscreteLoop struct {
	Points []orb.Point
	Tags   []string
}

// DiscreteOutline is a discretised outline: Loops[0] is the outer loop,
// counter-clockwise; the others are inner loops (bodies or holes),
// clockwise. This is what the unstructured mesher consumes.
type DiscreteOutline struct {
	Loops []DiscreteLoop
}
