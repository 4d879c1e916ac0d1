package unstructured

import (
	"errors"
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// Vertex kinds of the refinement.
const (
	vFree    uint8 = iota // inserted inside the domain
	vInput                // a point of the outline
	vSegment              // inserted on an input edge
)

// sizeFactor: a triangle is too large when its circumradius exceeds
// sizeFactor·h, with h the mean size at its vertices. An equilateral triangle of edge h has
// circumradius h/√3 ≈ 0.577h; the factor leaves room above that so the
// mean edge comes out near h.
const sizeFactor = 0.75

// refiner runs Delaunay refinement (Ruppert 1995, "A Delaunay refinement
// algorithm for quality 2-dimensional mesh generation", J. Algorithms 18;
// in the form of Shewchuk 2002, "Delaunay refinement algorithms for
// triangular mesh generation", Comput. Geom. 22):
//
//   - a segment whose diametral circle holds a vertex is encroached and is
//     split, before any triangle;
//   - a triangle inside the domain whose smallest angle is below the target,
//     or whose circumradius is above sizeFactor·h, gets its circumcentre
//     inserted, unless that point would encroach segments: then those are
//     split instead and the triangle waits;
//   - small input angles: a segment with one end at an outline point and
//     the other inserted is split at a distance from the outline point
//     that is a power of two (Ruppert's "concentric shells", as in
//     Shewchuk 2002 §4), so the splits on two segments of a sharp corner
//     line up; and a skinny triangle whose shortest edge joins two points
//     on the two input edges of a corner sharper than 60° (points inserted
//     on them, or their outline end points) at the same distance from the
//     corner is left alone, since no insertion could fix the corner's
//     angle (Shewchuk 2002 §4; Miller, Pav and Walkington 2003 give the
//     proof of termination for this kind of rule). Triangles of a sharp
//     corner's fan, within about one boundary spacing of it, may therefore
//     stay below the target.
//
// Every triangle count is bounded by maxTri, so refinement stops with an
// error rather than running away.
type refiner struct {
	tr     *triangulation
	g      *pslg
	size   *sizeField
	sin2   float64 // sin² of the minimum-angle target
	kind   []uint8 // per vertex
	onEdge []int32 // per vertex: input edge of a segment vertex, else -1
	// vh is the size field at each vertex, evaluated once on insertion
	// (float32: sizes need no more digits, and it saves memory).
	vh []float32
	// sharp[i] is true at outline point i when its interior angle is below
	// 60°.
	sharp []bool
	// sharpest is the smallest interior angle of the outline (radians)
	// and sharpestAt where it is, for the message when the cells run out.
	sharpest   float64
	sharpestAt orb.Point
	triQ       []int32
	segQ       []segRef
	maxTri     int
	minLen     float64 // segments shorter than this are not split
	// frozen is the tag index of segments that may not be split (the
	// boundary layers' front), or noSeg.
	frozen int16
	tmp    [2]int32
}

// segRef is a queued segment: half-edge e from a to b (stale entries are
// skipped when e no longer runs a→b along a segment).
type segRef struct{ e, a, b int32 }

var errTooMany = errors.New("too many cells")

func newRefiner(tr *triangulation, g *pslg, size *sizeField, minAngle float64, maxTri int) *refiner {
	n := len(tr.pts)
	r := &refiner{tr: tr, g: g, size: size, maxTri: maxTri, frozen: noSeg}
	s := math.Sin(minAngle * math.Pi / 180)
	r.sin2 = s * s
	r.kind = make([]uint8, n, cap(tr.pts))
	r.onEdge = make([]int32, n, cap(tr.pts))
	r.vh = make([]float32, n, cap(tr.pts))
	for i := range r.kind {
		r.kind[i] = vInput
		r.onEdge[i] = -1
		r.vh[i] = float32(size.at(tr.pts[i]))
	}
	r.sharp = make([]bool, n)
	r.sharpest = math.Inf(1)
	b := orb.MultiPoint(g.pts).Bound()
	r.minLen = 1e-12 * math.Max(b.Max[0]-b.Min[0], b.Max[1]-b.Min[1])
	for i := range g.pts {
		p, a, c := g.pts[i], g.pts[g.prevPt[i]], g.pts[g.nextPt[i]]
		// Interior angle at p between the edge to the next point and the
		// edge to the previous one, measured counter-clockwise (the domain
		// is on the left of every loop).
		u := orb.Point{c[0] - p[0], c[1] - p[1]}
		w := orb.Point{a[0] - p[0], a[1] - p[1]}
		ang := math.Atan2(u[0]*w[1]-u[1]*w[0], u[0]*w[0]+u[1]*w[1])
		if ang < 0 {
			ang += 2 * math.Pi
		}
		r.sharp[i] = ang < math.Pi/3
		if ang < r.sharpest {
			r.sharpest, r.sharpestAt = ang, p
		}
	}
	return r
}

// run refines until no segment is encroached and no triangle is bad.
func (r *refiner) run() error {
	tr := r.tr
	nt := tr.numTri()
	for t := int32(0); t < nt; t++ {
		r.checkNew(t)
	}
	for {
		if tr.numTri() > int32(r.maxTri) {
			return &tooManyError{r.sharpest, r.sharpestAt}
		}
		if n := len(r.segQ); n > 0 {
			s := r.segQ[n-1]
			r.segQ = r.segQ[:n-1]
			if tr.v[s.e] == s.a && tr.v[next(s.e)] == s.b && tr.seg[s.e] != noSeg {
				r.splitSegment(s.e)
			}
			continue
		}
		if len(r.triQ) == 0 {
			return nil
		}
		t := r.triQ[0]
		r.triQ = r.triQ[1:]
		if len(r.triQ) == 0 {
			r.triQ = r.triQ[:0:0]
		}
		if r.bad(t) {
			r.splitTriangle(t)
		}
	}
}

// checkNew queues triangle t if it is bad and its segments if the
// opposite vertex encroaches them.
func (r *refiner) checkNew(t int32) {
	tr := r.tr
	if tr.flag[t]&flagInside == 0 {
		return
	}
	for k := int32(0); k < 3; k++ {
		e := 3*t + k
		if tr.seg[e] == noSeg || tr.seg[e] == r.frozen {
			continue
		}
		a, b, c := tr.pts[tr.v[e]], tr.pts[tr.v[next(e)]], tr.pts[tr.v[prev(e)]]
		if (a[0]-c[0])*(b[0]-c[0])+(a[1]-c[1])*(b[1]-c[1]) < 0 {
			r.segQ = append(r.segQ, segRef{e, tr.v[e], tr.v[next(e)]})
		}
	}
	if r.bad(t) {
		r.triQ = append(r.triQ, t)
	}
}

// bad reports whether inside triangle t is below the angle target (and
// not held by a sharp corner) or above the size target.
//
// With squared edge lengths l₁ ≤ l₂, l₃ and twice the area D, the
// circumradius is R² = l₁l₂l₃ / (4D²) and the smallest angle θ, opposite
// the shortest edge, has sin θ = √l₁ / (2R) (law of sines), so
// sin²θ = D² / (l₂l₃) and θ < θ_min ⟺ D² < sin²θ_min · l₂l₃.
func (r *refiner) bad(t int32) bool {
	tr := r.tr
	if tr.flag[t]&flagInside == 0 {
		return false
	}
	ia, ib, ic := tr.v[3*t], tr.v[3*t+1], tr.v[3*t+2]
	a, b, c := tr.pts[ia], tr.pts[ib], tr.pts[ic]
	abx, aby := b[0]-a[0], b[1]-a[1]
	bcx, bcy := c[0]-b[0], c[1]-b[1]
	cax, cay := a[0]-c[0], a[1]-c[1]
	lab, lbc, lca := abx*abx+aby*aby, bcx*bcx+bcy*bcy, cax*cax+cay*cay
	d := abx*(-cay) - aby*(-cax)
	d2 := d * d
	// Size: R > sizeFactor·h, h the mean of the vertices' sizes.
	h := float64(r.vh[ia]+r.vh[ib]+r.vh[ic]) / 3
	if lab*lbc*lca > 4*d2*sizeFactor*sizeFactor*h*h {
		return true
	}
	// Angle: the two longer edges multiply against D².
	var l2l3 float64
	var p, q int32
	switch {
	case lab <= lbc && lab <= lca:
		l2l3, p, q = lbc*lca, ia, ib
	case lbc <= lca:
		l2l3, p, q = lab*lca, ib, ic
	default:
		l2l3, p, q = lab*lbc, ic, ia
	}
	if d2 >= r.sin2*l2l3 {
		return false
	}
	return !r.heldByCorner(p, q)
}

// heldByCorner reports whether p and q lie on the two input edges of a
// sharp corner (inserted points, or the edges' far outline points) at the
// same distance from it, within 5%.
func (r *refiner) heldByCorner(p, q int32) bool {
	fp, bp := r.cornerEnds(p)
	fq, bq := r.cornerEnds(q)
	var o int32 = -1
	switch {
	case fp >= 0 && fp == bq:
		o = fp
	case bp >= 0 && bp == fq:
		o = bp
	default:
		return false
	}
	po, pp, pq := r.tr.pts[o], r.tr.pts[p], r.tr.pts[q]
	dp := math.Hypot(pp[0]-po[0], pp[1]-po[1])
	dq := math.Hypot(pq[0]-po[0], pq[1]-po[1])
	return math.Abs(dp-dq) <= 0.05*math.Max(dp, dq)
}

// cornerEnds returns the sharp corners at the forward and backward ends
// (in loop order) of the input edges boundary vertex v lies on, -1 where
// the end is not sharp or v is not on the boundary.
func (r *refiner) cornerEnds(v int32) (fwd, bwd int32) {
	fwd, bwd = -1, -1
	var a, b int32
	switch r.kind[v] {
	case vSegment:
		a, b = r.onEdge[v], r.g.nextPt[r.onEdge[v]]
	case vInput:
		a, b = r.g.prevPt[v], r.g.nextPt[v]
	default:
		return
	}
	if r.sharp[b] {
		fwd = b
	}
	if r.sharp[a] {
		bwd = a
	}
	return
}

// addVertex appends a vertex and returns its index.
func (r *refiner) addVertex(p orb.Point, kind uint8, edge int32) int32 {
	tr := r.tr
	tr.pts = append(tr.pts, p)
	tr.vedge = append(tr.vedge, -1)
	r.kind = append(r.kind, kind)
	r.onEdge = append(r.onEdge, edge)
	r.vh = append(r.vh, float32(r.size.at(p)))
	return int32(len(tr.pts) - 1)
}

// inputEdge returns the input edge the segment a–b lies on.
func (r *refiner) inputEdge(a, b int32) int32 {
	switch {
	case r.kind[a] == vSegment:
		return r.onEdge[a]
	case r.kind[b] == vSegment:
		return r.onEdge[b]
	case r.g.nextPt[a] == b:
		return a
	}
	return b
}

// splitSegment splits the segment of half-edge e: at its midpoint, or,
// when exactly one end is an outline point, at the power-of-two distance
// from that end nearest to half the length (concentric shells).
func (r *refiner) splitSegment(e int32) bool {
	tr := r.tr
	a, b := tr.v[e], tr.v[next(e)]
	pa, pb := tr.pts[a], tr.pts[b]
	l := math.Hypot(pb[0]-pa[0], pb[1]-pa[1])
	if l < r.minLen || tr.seg[e] == r.frozen {
		return false
	}
	t := 0.5
	if (r.kind[a] == vInput) != (r.kind[b] == vInput) {
		d := math.Exp2(math.Round(math.Log2(l / 2)))
		if r.kind[a] == vInput {
			t = d / l
		} else {
			t = 1 - d/l
		}
	}
	m := orb.Point{pa[0] + t*(pb[0]-pa[0]), pa[1] + t*(pb[1]-pa[1])}
	if m == pa || m == pb {
		return false
	}
	r.tmp = [2]int32{e / 3, tr.adj[e] / 3}
	if err := tr.digCavity(m, r.tmp[:], e); err != nil {
		return false
	}
	mi := r.addVertex(m, vSegment, r.inputEdge(a, b))
	tr.fillCavity(mi, tr.seg[e], a, b)
	r.queueCavity()
	return true
}

// queueCavity checks the triangles just made by fillCavity.
func (r *refiner) queueCavity() {
	for k := range r.tr.border {
		r.checkNew(r.tr.cavity[k])
	}
}

// circumcentre returns the circumcentre of triangle t, computed relative
// to its first vertex for accuracy.
func (tr *triangulation) circumcentre(t int32) orb.Point {
	a, b, c := tr.pts[tr.v[3*t]], tr.pts[tr.v[3*t+1]], tr.pts[tr.v[3*t+2]]
	bx, by := b[0]-a[0], b[1]-a[1]
	cx, cy := c[0]-a[0], c[1]-a[1]
	d := 2 * (bx*cy - by*cx)
	bl, cl := bx*bx+by*by, cx*cx+cy*cy
	return orb.Point{a[0] + (cy*bl-by*cl)/d, a[1] + (bx*cl-cx*bl)/d}
}

// splitTriangle inserts the circumcentre of bad triangle t, or splits the
// segments it would encroach.
func (r *refiner) splitTriangle(t int32) {
	c := r.tr.circumcentre(t)
	if math.IsNaN(c[0]) || math.IsNaN(c[1]) || math.IsInf(c[0], 0) || math.IsInf(c[1], 0) {
		return
	}
	r.insertFor(t, c, false, 0)
}

// insertFor inserts point c on behalf of bad triangle t, following
// Ruppert's rule: a segment that c encroaches, or that the way from t to c
// crosses, is split instead and t waits.
//
// Frozen segments (the layers' front) cannot be split. A point beyond one,
// or so close to one (a, b) that the angle acb exceeds 180° − 2θ_min, would
// leave a triangle on it with a base angle below the target that nothing
// could fix; so the apex of the equilateral triangle on that segment,
// inside the domain, is tried in its place (apex mode). An apex is inserted
// only where it needs nothing else: no segment split, no frozen segment
// spoiled, and at least clear (half the segment's length) from every vertex
// of its cavity. Each frozen segment has one apex, so this cannot run away.
func (r *refiner) insertFor(t int32, c orb.Point, apexMode bool, clear float64) {
	tr := r.tr
	toApex := func(e int32) {
		if apexMode {
			return
		}
		pa, pb := tr.pts[tr.v[e]], tr.pts[tr.v[next(e)]]
		h := math.Sqrt(3) / 2
		apex := orb.Point{(pa[0]+pb[0])/2 - h*(pb[1]-pa[1]), (pa[1]+pb[1])/2 + h*(pb[0]-pa[0])}
		r.insertFor(t, apex, true, 0.5*math.Hypot(pb[0]-pa[0], pb[1]-pa[1]))
	}
	split := func(e int32) {
		if !apexMode && r.splitSegment(e) {
			r.triQ = append(r.triQ, t)
		}
	}
	loc, hit := tr.walkTo(t, c)
	if hit >= 0 {
		if tr.seg[hit] == r.frozen {
			toApex(hit)
		} else {
			split(hit)
		}
		return
	}
	if loc < 0 {
		return
	}
	for k := int32(0); k < 3; k++ {
		e := 3*loc + k
		w := tr.v[e]
		if tr.pts[w] == c {
			return
		}
		if tr.seg[e] != noSeg && tr.orient(w, tr.v[next(e)], c) == 0 {
			if tr.seg[e] == r.frozen {
				toApex(e)
			} else {
				split(e)
			}
			return
		}
	}
	r.tmp[0] = loc
	if err := tr.digCavity(c, r.tmp[:1], -1); err != nil {
		return
	}
	if clear > 0 {
		for _, be := range tr.border {
			if be.a != ghost && math.Hypot(tr.pts[be.a][0]-c[0], tr.pts[be.a][1]-c[1]) < clear {
				return
			}
		}
	}
	encroached := false
	spoilCos := -math.Cos(2 * math.Asin(math.Sqrt(r.sin2)))
	for _, be := range tr.border {
		if be.seg == noSeg || be.flag&flagInside == 0 {
			continue
		}
		pa, pb := tr.pts[be.a], tr.pts[be.b]
		ax, ay, bx, by := pa[0]-c[0], pa[1]-c[1], pb[0]-c[0], pb[1]-c[1]
		dot := ax*bx + ay*by
		// The half-edge of the segment inside the cavity is the twin of
		// its outer half-edge.
		e := tr.adj[be.outer]
		if be.seg == r.frozen {
			if dot < spoilCos*math.Sqrt((ax*ax+ay*ay)*(bx*bx+by*by)) {
				toApex(e)
				return
			}
			continue
		}
		if dot < 0 {
			if apexMode {
				return
			}
			r.segQ = append(r.segQ, segRef{e, be.a, be.b})
			encroached = true
		}
	}
	if encroached {
		r.triQ = append(r.triQ, t)
		return
	}
	ci := r.addVertex(c, vFree, -1)
	tr.fillCavity(ci, noSeg, -1, -1)
	r.queueCavity()
}

// walkTo walks from inside triangle t in a straight line towards p. It
// returns the triangle containing p, or the first segment half-edge the
// line meets (hit ≥ 0), or loc = -1 if the walk fails on a degenerate
// triangle.
func (tr *triangulation) walkTo(t int32, p orb.Point) (loc, hit int32) {
	a, b, c := tr.pts[tr.v[3*t]], tr.pts[tr.v[3*t+1]], tr.pts[tr.v[3*t+2]]
	o := orb.Point{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3}
	inside := true
	for k := int32(0); k < 3; k++ {
		e := 3*t + k
		if tr.orient(tr.v[e], tr.v[next(e)], p) < 0 {
			inside = false
		}
	}
	if inside {
		return t, -1
	}
	ray := func(i int32) float64 {
		q := tr.pts[i]
		return orient2d(o, p, q)
	}
	h := int32(-1)
	for k := int32(0); k < 3; k++ {
		e := 3*t + k
		if ray(tr.v[e]) <= 0 && ray(tr.v[next(e)]) > 0 {
			h = e
			break
		}
	}
	if h < 0 {
		return -1, -1
	}
	for steps := 0; steps < len(tr.v); steps++ {
		if tr.seg[h] != noSeg {
			return -1, h
		}
		f := tr.adj[h]
		u := f / 3
		if tr.isGhost(u) {
			return -1, -1
		}
		l, rr, w := tr.v[f], tr.v[next(f)], tr.v[prev(f)]
		if tr.orient(rr, w, p) >= 0 && tr.orient(w, l, p) >= 0 {
			return u, -1
		}
		if ray(w) > 0 {
			h = next(f)
		} else {
			h = prev(f)
		}
	}
	return -1, -1
}

// tooManyError is errTooMany with the outline's sharpest corner: the
// refinement shrinks cells toward the tip of a corner (Shewchuk 2002,
// "Delaunay refinement algorithms for triangular mesh generation", on
// small input angles; from memory), so a corner of a fraction of a degree,
// often a slip of the drawing, can take any number of cells.
type tooManyError struct {
	angle float64 // radians
	at    orb.Point
}

func (e *tooManyError) Error() string        { return errTooMany.Error() }
func (e *tooManyError) Is(target error) bool { return target == errTooMany }

// sharpSuspect is the corner angle (degrees) below which the message on
// running out of cells names the outline's sharpest corner as a likely
// cause: corners from 5° down are rare by design and leave triangles of
// angles no better than the corner's at their tip (common practice).
const sharpSuspect = 5

// refineError wraps a refinement failure with the limit that stopped it,
// and the outline's sharpest corner when it is below sharpSuspect.
func refineError(err error, maxTri int) error {
	if !errors.Is(err, errTooMany) {
		return err
	}
	var tm *tooManyError
	if errors.As(err, &tm) && tm.angle*180/math.Pi < sharpSuspect {
		return fmt.Errorf("refinement would exceed %d cells; the outline's sharpest corner, %.3g° at (%.9g, %.9g), may be why, since cells shrink toward its tip: round the corner off or cut it square, or raise the cell limit or the sizes: %w",
			maxTri, tm.angle*180/math.Pi, tm.at[0], tm.at[1], errTooMany)
	}
	return fmt.Errorf("refinement would exceed %d cells; raise the cell limit or the sizes: %w", maxTri, errTooMany)
}
