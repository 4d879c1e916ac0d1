package unstructured

import (
	"errors"

	"cvdeck/internal/hugepage"
	"cvdeck/mesh/unstructured/predicates"
	"github.com/paulmach/orb"
)

// ghost is the vertex index of the point at infinity. Every edge of the
// convex hull carries a ghost triangle (b, a, ghost) outside it, so every
// half-edge has a twin and point location, insertion and flips need no
// special cases at the hull (Bowyer–Watson insertion with a vertex at
// infinity, common practice).
const ghost int32 = -1

// noSeg marks a half-edge that is not part of a boundary segment.
const noSeg = -1

// Triangle flag bits.
const (
	flagInside  uint8 = 1 << iota // the triangle is in the meshed region
	flagVisited                   // scratch mark of the cavity search
)

// triangulation is a triangulation in flat half-edge arrays. Triangle t
// owns half-edges 3t, 3t+1, 3t+2 in counter-clockwise order; half-edge e
// runs from v[e] to v[next(e)] and adj[e] is its twin in the neighbouring
// triangle. No pointers: two int32 and one int16 per half-edge, one byte
// per triangle.
type triangulation struct {
	pts  []orb.Point
	v    []int32 // origin vertex of each half-edge
	adj  []int32 // twin half-edge
	seg  []int16 // boundary tag index of a segment half-edge, or noSeg
	flag []uint8 // per triangle
	// vedge[i] is some half-edge leaving vertex i, or -1 before insertion.
	vedge []int32
	// last is a real triangle near the last insertion, where walks start.
	last int32
	rng  uint32

	cavity []int32    // scratch: triangles of the current cavity
	border []borderEd // scratch: cavity boundary in counter-clockwise order
}

// borderEd is one edge of a cavity boundary: from a to b, its twin outside
// the cavity, its segment tag and the flags of the cavity triangle it came
// from.
type borderEd struct {
	a, b  int32
	outer int32
	seg   int16
	flag  uint8
}

var errCavity = errors.New("cavity is not simply connected")

func next(e int32) int32 {
	if e%3 == 2 {
		return e - 2
	}
	return e + 1
}

func prev(e int32) int32 {
	if e%3 == 0 {
		return e + 2
	}
	return e - 1
}

func (tr *triangulation) numTri() int32 { return int32(len(tr.v) / 3) }

func (tr *triangulation) isGhost(t int32) bool {
	return tr.v[3*t] == ghost || tr.v[3*t+1] == ghost || tr.v[3*t+2] == ghost
}

func (tr *triangulation) orient(a, b int32, p orb.Point) float64 {
	pa, pb := tr.pts[a], tr.pts[b]
	return predicates.Orient2d(pa[0], pa[1], pb[0], pb[1], p[0], p[1])
}

func orient2d(a, b, c orb.Point) float64 {
	return predicates.Orient2d(a[0], a[1], b[0], b[1], c[0], c[1])
}

func (tr *triangulation) link(e, f int32) {
	tr.adj[e] = f
	if f >= 0 {
		tr.adj[f] = e
	}
}

// random returns a cheap deterministic pseudo-random number (xorshift32),
// used to vary the first edge a walk tries.
func (tr *triangulation) random() uint32 {
	x := tr.rng
	x ^= x << 13
	x ^= x >> 17
	x ^= x << 5
	tr.rng = x
	return x
}

// newTriangulation starts a triangulation of pts with the triangle a, b, c
// (not collinear) and its three ghost triangles.
func newTriangulation(pts []orb.Point, a, b, c int32, capTri int) *triangulation {
	tr := &triangulation{pts: pts, rng: 2463534242}
	tr.v = hugepage.Make[int32](3 * capTri)[:0]
	tr.adj = hugepage.Make[int32](3 * capTri)[:0]
	tr.seg = hugepage.Make[int16](3 * capTri)[:0]
	tr.flag = make([]uint8, 0, capTri)
	tr.vedge = make([]int32, len(pts))
	for i := range tr.vedge {
		tr.vedge[i] = -1
	}
	if tr.orient(a, b, pts[c]) < 0 {
		b, c = c, b
	}
	tr.v = append(tr.v, a, b, c, b, a, ghost, c, b, ghost, a, c, ghost)
	for range 12 {
		tr.adj = append(tr.adj, -1)
		tr.seg = append(tr.seg, noSeg)
	}
	tr.flag = append(tr.flag, 0, 0, 0, 0)
	// Pair every half-edge with the one running the other way.
	for e := int32(0); e < 12; e++ {
		for f := e + 1; f < 12; f++ {
			if tr.v[e] == tr.v[next(f)] && tr.v[next(e)] == tr.v[f] {
				tr.link(e, f)
			}
		}
	}
	for e := int32(0); e < 12; e++ {
		if tr.v[e] != ghost {
			tr.vedge[tr.v[e]] = e
		}
	}
	tr.last = 0
	return tr
}

// locate finds a triangle containing p (on its boundary or inside), or a
// ghost triangle whose hull edge sees p strictly from outside, by a
// stochastic visibility walk (Devillers, Pion and Teillaud 2002: it ends
// in any triangulation) from triangle start.
func (tr *triangulation) locate(p orb.Point, start int32) int32 {
	t := start
	for steps := 0; ; steps++ {
		if tr.isGhost(t) {
			return t
		}
		r := int32(tr.random() % 3)
		moved := false
		for k := int32(0); k < 3; k++ {
			e := 3*t + (r+k)%3
			if tr.orient(tr.v[e], tr.v[next(e)], p) < 0 {
				t = tr.adj[e] / 3
				moved = true
				break
			}
		}
		if !moved {
			return t
		}
	}
}

// inCircum reports whether p lies strictly inside the circumcircle of
// triangle t. For a ghost triangle (a, b, ghost) the "circle" is the open
// half-plane left of a→b together with the open segment ab, the limit of
// circles through a and b as the third point goes to infinity.
func (tr *triangulation) inCircum(t int32, p orb.Point) bool {
	a, b, c := tr.v[3*t], tr.v[3*t+1], tr.v[3*t+2]
	switch ghost {
	case c:
		return tr.outsideHullEdge(a, b, p)
	case a:
		return tr.outsideHullEdge(b, c, p)
	case b:
		return tr.outsideHullEdge(c, a, p)
	}
	pa, pb, pc := tr.pts[a], tr.pts[b], tr.pts[c]
	return predicates.Incircle(pa[0], pa[1], pb[0], pb[1], pc[0], pc[1], p[0], p[1]) > 0
}

func (tr *triangulation) outsideHullEdge(a, b int32, p orb.Point) bool {
	o := tr.orient(a, b, p)
	if o != 0 {
		return o > 0
	}
	return strictlyBetween(tr.pts[a], tr.pts[b], p)
}

// strictlyBetween reports whether p, collinear with a and b, lies strictly
// inside the segment ab. Along a collinear line the order of x (or of y on
// a vertical line) is exact.
func strictlyBetween(a, b, p orb.Point) bool {
	if a[0] != b[0] {
		return (a[0] < p[0] && p[0] < b[0]) || (b[0] < p[0] && p[0] < a[0])
	}
	return (a[1] < p[1] && p[1] < b[1]) || (b[1] < p[1] && p[1] < a[1])
}

// digCavity collects the Bowyer–Watson cavity of p: the triangles whose
// circumcircle contains p, connected to the seed triangles without crossing
// a segment. The seeds are taken whatever the test says; when skip ≥ 0 it
// is a half-edge between the two seeds that lies inside the cavity (a
// segment being split at p). The boundary is left in tr.border, counter-
// clockwise. Nothing is changed but the visited marks, which are cleared.
func (tr *triangulation) digCavity(p orb.Point, seeds []int32, skip int32) error {
	tr.cavity = tr.cavity[:0]
	tr.border = tr.border[:0]
	var stack [64]int32
	st := stack[:0]
	var err error
	for _, s := range seeds {
		tr.flag[s] |= flagVisited
		tr.cavity = append(tr.cavity, s)
	}
	for _, s := range seeds {
		// Push the three edges so that they pop in counter-clockwise order,
		// starting after the skipped edge when there is one.
		switch {
		case skip >= 0 && skip/3 == s:
			st = append(st, prev(skip), next(skip))
		case skip >= 0 && tr.adj[skip]/3 == s:
			st = append(st, prev(tr.adj[skip]), next(tr.adj[skip]))
		default:
			st = append(st, 3*s+2, 3*s+1, 3*s)
		}
		for len(st) > 0 {
			e := st[len(st)-1]
			st = st[:len(st)-1]
			f := tr.adj[e]
			nt := f / 3
			if tr.seg[e] == noSeg && tr.flag[nt]&flagVisited == 0 && tr.inCircum(nt, p) {
				tr.flag[nt] |= flagVisited
				tr.cavity = append(tr.cavity, nt)
				st = append(st, prev(f), next(f))
				continue
			}
			if tr.seg[e] == noSeg && tr.flag[nt]&flagVisited != 0 {
				err = errCavity
			}
			tr.border = append(tr.border, borderEd{a: tr.v[e], b: tr.v[next(e)], outer: f, seg: tr.seg[e], flag: tr.flag[e/3] &^ flagVisited})
		}
	}
	for _, t := range tr.cavity {
		tr.flag[t] &^= flagVisited
	}
	return err
}

// fillCavity replaces the cavity found by digCavity with the fan of
// triangles (a, b, pi) over its boundary edges, reusing the cavity's
// triangle slots and appending two. Radial edges to the end points of a
// split segment get the tag splitSeg (noSeg otherwise), for splitA and
// splitB the segment's end points.
func (tr *triangulation) fillCavity(pi int32, splitSeg int16, splitA, splitB int32) {
	nb := len(tr.border)
	for len(tr.cavity) < nb {
		t := tr.numTri()
		tr.v = append(tr.v, 0, 0, 0)
		tr.adj = append(tr.adj, -1, -1, -1)
		tr.seg = append(tr.seg, noSeg, noSeg, noSeg)
		tr.flag = append(tr.flag, 0)
		tr.cavity = append(tr.cavity, t)
	}
	for k, be := range tr.border {
		t := tr.cavity[k]
		e := 3 * t
		tr.v[e], tr.v[e+1], tr.v[e+2] = be.a, be.b, pi
		tr.link(e, be.outer)
		tr.seg[e] = be.seg
		tr.seg[e+1], tr.seg[e+2] = noSeg, noSeg
		tr.flag[t] = be.flag
		if be.a != ghost {
			tr.vedge[be.a] = e
		}
	}
	for k := range tr.border {
		t := tr.cavity[k]
		tn := tr.cavity[(k+1)%nb]
		tr.link(3*t+1, 3*tn+2)
	}
	tr.vedge[pi] = 3*tr.cavity[0] + 2
	if splitSeg != noSeg {
		for k, be := range tr.border {
			t := tr.cavity[k]
			if be.b == splitA || be.b == splitB {
				tr.seg[3*t+1] = splitSeg
				tr.seg[tr.adj[3*t+1]] = splitSeg
			}
		}
	}
	for k, be := range tr.border {
		if be.a != ghost && be.b != ghost {
			tr.last = tr.cavity[k]
			break
		}
	}
}

// findEdge returns the half-edge a→b, or -1 if a and b are not joined.
func (tr *triangulation) findEdge(a, b int32) int32 {
	e0 := tr.vedge[a]
	if e0 < 0 {
		return -1
	}
	e := e0
	for {
		if tr.v[next(e)] == b {
			return e
		}
		e = tr.adj[prev(e)]
		if e == e0 {
			return -1
		}
	}
}

// flip replaces the edge e (a→b, shared by triangles a b c and b a d) by
// the edge d→c, giving triangles d c a and c d b in the same two slots.
func (tr *triangulation) flip(e int32) {
	f := tr.adj[e]
	e1, e2, f1, f2 := next(e), prev(e), next(f), prev(f)
	a, b, c, d := tr.v[e], tr.v[f], tr.v[e2], tr.v[f2]
	ae1, ae2, af1, af2 := tr.adj[e1], tr.adj[e2], tr.adj[f1], tr.adj[f2]
	se1, se2, sf1, sf2 := tr.seg[e1], tr.seg[e2], tr.seg[f1], tr.seg[f2]
	tr.v[e], tr.v[e1], tr.v[e2] = d, c, a
	tr.v[f], tr.v[f1], tr.v[f2] = c, d, b
	tr.link(e, f)
	tr.link(e1, ae2)
	tr.link(e2, af1)
	tr.link(f1, af2)
	tr.link(f2, ae1)
	tr.seg[e], tr.seg[f] = noSeg, noSeg
	tr.seg[e1], tr.seg[e2], tr.seg[f1], tr.seg[f2] = se2, sf1, sf2, se1
	for _, x := range [...]int32{e, e1, e2, f, f1, f2} {
		if tr.v[x] != ghost {
			tr.vedge[tr.v[x]] = x
		}
	}
}
