package unstructured

import (
	"errors"
	"fmt"
	"math"

	"cvdeck/geometry"
	"github.com/paulmach/orb"
)

// pslg is the outline flattened for the mesher: all loop points in one
// slice, and for each point the index of the next point of its loop, so
// the input edge k runs from point k to point nextPt[k] (edge index ==
// index of its first point).
type pslg struct {
	pts     []orb.Point
	nextPt  []int32
	prevPt  []int32
	loopOf  []int32 // loop index of each point
	edgeTag []int16 // tag index of each input edge
	tags    []string
	// user, when not nil, numbers the points as the caller's outline
	// does: user[i] ≥ 0 is point i's index in the flattened outline, and
	// −1−k marks a point the corner grading added after outline point k
	// (see gradeCorners).
	user []int32
}

// flatten validates the outline and flattens it: at least one loop, each
// with three or more distinct finite points and one tag per edge, loop 0
// counter-clockwise and the others clockwise.
func flatten(out geometry.DiscreteOutline) (*pslg, error) {
	if len(out.Loops) == 0 {
		return nil, errors.New("the outline has no loops; it needs an outer loop")
	}
	g := &pslg{}
	tagIndex := map[string]int16{}
	for li, l := range out.Loops {
		n := len(l.Points)
		if n < 3 {
			return nil, fmt.Errorf("loop %d has %d points; a loop needs at least 3 (its spacing is too coarse for its length)", li, n)
		}
		if len(l.Tags) != n {
			return nil, fmt.Errorf("loop %d has %d points and %d tags; a closed loop needs one tag per edge (%d)", li, n, len(l.Tags), n)
		}
		area := 0.0
		o := l.Points[0]
		for k, p := range l.Points {
			if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
				return nil, fmt.Errorf("loop %d point %d is (%v, %v); coordinates must be finite", li, k, p[0], p[1])
			}
			q := l.Points[(k+1)%n]
			if p == q {
				return nil, fmt.Errorf("loop %d points %d and %d coincide at (%v, %v); consecutive points must differ", li, k, (k+1)%n, p[0], p[1])
			}
			area += (p[0]-o[0])*(q[1]-o[1]) - (q[0]-o[0])*(p[1]-o[1])
		}
		if area == 0 {
			return nil, fmt.Errorf("loop %d encloses no area (its points are collinear); a loop must enclose a region", li)
		}
		if li == 0 && area < 0 {
			return nil, fmt.Errorf("loop 0 (the outer loop) runs clockwise; it must run counter-clockwise")
		}
		if li > 0 && area > 0 {
			return nil, fmt.Errorf("loop %d (an inner loop) runs counter-clockwise; inner loops must run clockwise", li)
		}
		base := int32(len(g.pts))
		for k, p := range l.Points {
			g.pts = append(g.pts, p)
			g.nextPt = append(g.nextPt, base+int32((k+1)%n))
			g.prevPt = append(g.prevPt, base+int32((k+n-1)%n))
			g.loopOf = append(g.loopOf, int32(li))
			tag := l.Tags[k]
			ti, ok := tagIndex[tag]
			if !ok {
				if len(g.tags) >= math.MaxInt16 {
					return nil, fmt.Errorf("loop %d edge %d: more than %d distinct tags", li, k, math.MaxInt16)
				}
				ti = int16(len(g.tags))
				tagIndex[tag] = ti
				g.tags = append(g.tags, tag)
			}
			g.edgeTag = append(g.edgeTag, ti)
		}
	}
	return g, nil
}

// where names input point i as "loop L point K", K counting the
// caller's points (see pslg.user).
func (g *pslg) where(i int32) string {
	l := g.loopOf[i]
	first := i
	for first > 0 && g.loopOf[first-1] == l {
		first--
	}
	if g.user == nil {
		return fmt.Sprintf("loop %d point %d", l, i-first)
	}
	if u := g.user[i]; u < 0 {
		return fmt.Sprintf("the point the corner grading added after loop %d point %d", l, -1-u-g.user[first])
	}
	return fmt.Sprintf("loop %d point %d", l, g.user[i]-g.user[first])
}

// constrainedTriangulation builds the constrained Delaunay triangulation
// of the outline: the Delaunay triangulation of its points, every input
// edge recovered as a segment carrying its tag, then Lawson flips of the
// unconstrained edges until each is locally Delaunay (Lee and Lin 1986;
// Chew 1989), and the triangles inside the domain marked.
func constrainedTriangulation(g *pslg, capTri int) (*triangulation, error) {
	tr, dup, err := triangulatePoints(g.pts, capTri, false)
	if err != nil {
		return nil, err
	}
	for i, d := range dup {
		if d != int32(i) {
			return nil, fmt.Errorf("%s and %s coincide at (%v, %v); loops may not touch", g.where(d), g.where(int32(i)), g.pts[i][0], g.pts[i][1])
		}
	}
	for e := range g.pts {
		if err := tr.recoverSegment(g, int32(e)); err != nil {
			return nil, err
		}
	}
	tr.legalizeAll()
	tr.markInside()
	return tr, nil
}

// recoverSegment makes the input edge k (point k to nextPt[k]) an edge of
// the triangulation by flipping the edges that cross it (Sloan 1993, "A
// fast algorithm for generating constrained Delaunay triangulations"), and
// tags both of its half-edges.
func (tr *triangulation) recoverSegment(g *pslg, k int32) error {
	a, b := k, g.nextPt[k]
	tag := g.edgeTag[k]
	pa, pb := tr.pts[a], tr.pts[b]
	// crossing edges, as vertex pairs (right of a→b, left of a→b).
	var queue [][2]int32
	crosses := func(x, y int32) bool {
		if x == a || x == b || y == a || y == b || x == ghost || y == ghost {
			return false
		}
		ox, oy := tr.orient(a, b, tr.pts[x]), tr.orient(a, b, tr.pts[y])
		return (ox < 0 && oy > 0) || (ox > 0 && oy < 0)
	}
	onSegment := func(x int32) error {
		return fmt.Errorf("input edge from %s to %s passes through %s at (%v, %v); loops may not touch or cross",
			g.where(a), g.where(b), g.where(x), tr.pts[x][0], tr.pts[x][1])
	}
	if e := tr.findEdge(a, b); e >= 0 {
		tr.seg[e], tr.seg[tr.adj[e]] = tag, tag
		return nil
	}
	// Find the triangle at a that the segment leaves a through.
	e0 := tr.vedge[a]
	e := e0
	h := int32(-1)
	for {
		x, y := tr.v[next(e)], tr.v[prev(e)]
		if x != ghost && y != ghost {
			ox, oy := tr.orient(a, b, tr.pts[x]), tr.orient(a, b, tr.pts[y])
			if ox == 0 && strictlyBetween(pa, pb, tr.pts[x]) {
				return onSegment(x)
			}
			if ox < 0 && oy > 0 {
				h = next(e)
				break
			}
		}
		e = tr.adj[prev(e)]
		if e == e0 {
			return fmt.Errorf("input edge from %s to %s: no triangle at its start lies along it (internal error)", g.where(a), g.where(b))
		}
	}
	// Walk along the segment, collecting the crossed edges.
	for steps := 0; ; steps++ {
		if steps > len(tr.v) {
			return fmt.Errorf("input edge from %s to %s: walk along it did not end (internal error)", g.where(a), g.where(b))
		}
		if tr.seg[h] != noSeg {
			return fmt.Errorf("input edge from %s to %s crosses another input edge near (%v, %v); loops may not touch or cross",
				g.where(a), g.where(b), tr.pts[tr.v[h]][0], tr.pts[tr.v[h]][1])
		}
		queue = append(queue, [2]int32{tr.v[h], tr.v[next(h)]})
		f := tr.adj[h]
		z := tr.v[prev(f)]
		if z == b {
			break
		}
		if z == ghost {
			return fmt.Errorf("input edge from %s to %s leaves the convex hull (internal error)", g.where(a), g.where(b))
		}
		oz := tr.orient(a, b, tr.pts[z])
		if oz == 0 {
			return onSegment(z)
		}
		if oz < 0 {
			h = prev(f)
		} else {
			h = next(f)
		}
	}
	// Flip crossing edges whose quadrilateral is convex; an edge that still
	// crosses goes back in the queue (Sloan's loop; it ends because each
	// flip removes a crossing or moves it).
	limit := 100 * (len(queue) + 10) * (len(queue) + 10)
	for it := 0; len(queue) > 0; it++ {
		if it > limit {
			return fmt.Errorf("input edge from %s to %s could not be recovered (internal error)", g.where(a), g.where(b))
		}
		xy := queue[0]
		queue = queue[1:]
		e := tr.findEdge(xy[0], xy[1])
		if e < 0 {
			continue
		}
		f := tr.adj[e]
		c, d := tr.v[prev(e)], tr.v[prev(f)]
		// Convex quadrilateral x d y c: c and d on opposite sides of x–y
		// (always) and x and y strictly on opposite sides of c–d.
		ox := tr.orient(c, d, tr.pts[xy[0]])
		oy := tr.orient(c, d, tr.pts[xy[1]])
		if !((ox < 0 && oy > 0) || (ox > 0 && oy < 0)) {
			queue = append(queue, xy)
			continue
		}
		tr.flip(e)
		if crosses(c, d) {
			queue = append(queue, [2]int32{c, d})
		}
	}
	e = tr.findEdge(a, b)
	if e < 0 {
		return fmt.Errorf("input edge from %s to %s missing after recovery (internal error)", g.where(a), g.where(b))
	}
	tr.seg[e], tr.seg[tr.adj[e]] = tag, tag
	return nil
}

// legalizeAll flips every unconstrained interior edge that is not locally
// Delaunay until none is left; with the segments fixed this yields the
// constrained Delaunay triangulation (Lawson 1977).
func (tr *triangulation) legalizeAll() {
	nt := tr.numTri()
	stack := make([]int32, 0, 3*nt)
	for e := int32(0); e < 3*nt; e++ {
		if e < tr.adj[e] {
			stack = append(stack, e)
		}
	}
	for len(stack) > 0 {
		e := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if !tr.illegal(e) {
			continue
		}
		tr.flip(e)
		f := tr.adj[e]
		stack = append(stack, next(e), prev(e), next(f), prev(f))
	}
}

// illegal reports whether the unconstrained edge e between two real
// triangles has the far vertex inside the near triangle's circumcircle.
func (tr *triangulation) illegal(e int32) bool {
	if tr.seg[e] != noSeg {
		return false
	}
	t, u := e/3, tr.adj[e]/3
	if tr.isGhost(t) || tr.isGhost(u) {
		return false
	}
	d := tr.v[prev(tr.adj[e])]
	return tr.inCircum(t, tr.pts[d])
}

// markInside sets flagInside on the triangles inside the domain: a flood
// fill from the ghost triangles in which crossing a segment toggles
// inside and outside (so holes are outside and the outer loop's interior
// inside).
func (tr *triangulation) markInside() {
	nt := tr.numTri()
	depth := make([]int8, nt)
	for t := range depth {
		depth[t] = -1
	}
	var stack []int32
	for t := int32(0); t < nt; t++ {
		if tr.isGhost(t) {
			depth[t] = 0
			stack = append(stack, t)
		}
	}
	for len(stack) > 0 {
		t := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		for k := int32(0); k < 3; k++ {
			e := 3*t + k
			u := tr.adj[e] / 3
			if depth[u] >= 0 {
				continue
			}
			d := depth[t]
			if tr.seg[e] != noSeg {
				d ^= 1
			}
			depth[u] = d
			stack = append(stack, u)
		}
	}
	for t := int32(0); t < nt; t++ {
		tr.flag[t] &^= flagInside
		if depth[t] == 1 {
			tr.flag[t] |= flagInside
		}
	}
}
