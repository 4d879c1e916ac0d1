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
	// Smooth[k] reports whether the boundary runs smoothly through point
	// k: both its edges are chords of one curved segment (an arc, a
	// spline, a NACA surface), whose curve goes on between the points.
	// It is false at the chain's ends, at the joints between segments
	// and along lines and polylines, whose vertices are corners; nil
	// means false everywhere.
	Smooth []bool
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
