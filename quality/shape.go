package quality

import (
	"math"

	"github.com/paulmach/orb"
)

const rad2deg = 180 / math.Pi

// cellShape is the shape of one cell.
//
// Interior angles. At corner k, with u = p_{k−1} − p_k and v = p_{k+1} − p_k,
// the interior angle of a counter-clockwise cell is
// θ_k = atan2(v × u, v · u) taken in [0°, 360°): a reflex corner gives more
// than 180°, an inverted cell gives angles above 180° at its corners. atan2
// of the cross and dot products keeps its accuracy at angles near 0° and
// 180°, where acos of a cosine loses half the digits (common practice, see
// Kahan, "How futile are mindless assessments of roundoff", 2006, on
// needle-like triangles; from memory). Corners are ranked by a monotone key
// of the cosine, so atan2 is evaluated only for the smallest and largest.
// A corner with a zero-length edge counts as 0°.
//
// Equiangle skewness: max((θmax − θe)/(180° − θe), (θe − θmin)/θe), with
// θe = 180°(n − 2)/n the angle of the regular n-gon (60° triangles, 90°
// quadrilaterals); 0 for a regular cell, 1 for a degenerate one, above 1
// for a reflex corner (common practice).
//
// Aspect ratio. Triangles: l_max (l_0 + l_1 + l_2) / (4√3 A), the longest
// edge over 2√3 times the inradius r = 2A/(l_0+l_1+l_2), which is 1 for the
// equilateral triangle and grows without bound for needles and slivers
// (Pébay and Baker 2003, Math. Comp. 72, "Analysis of triangle quality
// measures"; from memory). Quadrilaterals: the ratio of the larger to the
// smaller sum of opposite edges, max(l_0+l_2, l_1+l_3)/min(l_0+l_2, l_1+l_3),
// the cell's extent in its two grid directions (common practice). Other
// polygons: longest over shortest edge (common practice). A cell with zero
// or negative area, or a zero-length edge, has aspect ratio +Inf.
//
// Scaled Jacobian (quadrilaterals only, NaN for other cells): at each
// corner (v × u)/(|v||u|), the sine of the corner angle, which is the
// Jacobian of the bilinear map at that corner divided by the lengths of its
// two edges; the minimum over the four corners. 1 for a rectangle, 0 for a
// degenerate corner, negative for an inverted or reflex one (Knupp 2000,
// "Achieving finite element mesh quality via optimization of the Jacobian
// matrix norm and associated quantities", Int. J. Numer. Meth. Engng 48;
// from memory).
//
// Straight corners. A node of a polygon that lies on the straight line
// between its two neighbours, within straight × the distance between them,
// is not a corner of the cell's shape but a node on one of its sides, as
// hanging-node refinement leaves it: a square beside two half-size squares
// is a pentagon with one such node, an ordinary finite-volume cell with two
// collinear faces. The shape metrics above are taken over the true corners
// only, with the cell measured as the polygon they span (a square with a
// node on one side is measured as a square: angles 90°, equiangle skewness
// 0, aspect ratio 1, scaled Jacobian 1), so that the fix the hanging-node
// check advises is not graded as a 180° corner (common practice). Only
// polygons of five or more nodes are measured so: a quadrilateral with a
// 180° corner is a degenerate quadrilateral (its bilinear map has a zero
// Jacobian there, which a solver working on the quadrilateral's mapping
// would meet), and stays graded as one; a polygon whose nodes are nearly
// all on one line, leaving fewer than three corners, keeps them all, as
// the degenerate cell it is. straight is the limits' hanging-node
// tolerance, so that a node the hanging-node check would see on a face
// counts as on the side here.
//
// All edge vectors are differences of node positions, so every quantity is
// invariant to a shift of the mesh and keeps its digits far from the origin.
type cellShape struct {
	aspect, minAngle, maxAngle, equiangle, jacobian float64
	// straight is the relative tolerance of a straight corner (see above).
	straight float64
	// corners is scratch space for the true corners of a polygon.
	corners []int32
}

// compute fills s for the cell with nodes idx and signed area area. buf is
// scratch space, returned (perhaps grown) for reuse.
func (s *cellShape) compute(nodes []orb.Point, idx []int32, area float64, buf []float64) []float64 {
	if len(idx) > 4 {
		idx = s.trueCorners(nodes, idx)
	}
	n := len(idx)
	if n == 3 {
		s.triangle(nodes[idx[0]], nodes[idx[1]], nodes[idx[2]], area)
		return buf
	}
	if cap(buf) < 3*n {
		buf = make([]float64, 3*n)
	}
	ex, ey, el := buf[:n], buf[n:2*n], buf[2*n:3*n]
	lmin, lmax := math.Inf(1), 0.0
	perim := 0.0
	for k := 0; k < n; k++ {
		a, b := nodes[idx[k]], nodes[idx[(k+1)%n]]
		dx, dy := b[0]-a[0], b[1]-a[1]
		l := math.Sqrt(dx*dx + dy*dy)
		ex[k], ey[k], el[k] = dx, dy, l
		lmin, lmax = min(lmin, l), max(lmax, l)
		perim += l
	}

	// Rank corners by key: 1 − cos θ on [0°, 180°], 3 + cos θ beyond.
	kmin, kmax := math.Inf(1), math.Inf(-1)
	var cmin, cmax [2]float64 // (cross, dot) of the extreme corners
	jac := math.Inf(1)
	for k := 0; k < n; k++ {
		p := (k + n - 1) % n
		vx, vy := ex[k], ey[k]
		ux, uy := -ex[p], -ey[p]
		cr := vx*uy - vy*ux
		dt := vx*ux + vy*uy
		ll := el[k] * el[p]
		key := angleKey(cr, dt, ll)
		if ll == 0 {
			cr, dt = 0, 1
		}
		if key < kmin {
			kmin, cmin = key, [2]float64{cr, dt}
		}
		if key > kmax {
			kmax, cmax = key, [2]float64{cr, dt}
		}
		if n == 4 {
			if ll == 0 {
				jac = min(jac, 0)
			} else {
				jac = min(jac, cr/ll)
			}
		}
	}
	s.minAngle = cornerAngle(cmin)
	s.maxAngle = cornerAngle(cmax)
	te := 180 * float64(n-2) / float64(n)
	s.equiangle = max((s.maxAngle-te)/(180-te), (te-s.minAngle)/te)
	if n == 4 {
		s.jacobian = jac
	} else {
		s.jacobian = math.NaN()
	}

	switch {
	case area <= 0 || lmin == 0:
		s.aspect = math.Inf(1)
	case n == 3:
		s.aspect = lmax * perim / (4 * math.Sqrt(3) * area)
	case n == 4:
		a, b := el[0]+el[2], el[1]+el[3]
		s.aspect = max(a, b) / min(a, b)
	default:
		s.aspect = lmax / lmin
	}
	return buf
}

// trueCorners returns idx without its straight corners (see cellShape),
// in s.corners, or idx itself when every node is a corner or fewer than
// three would be left.
func (s *cellShape) trueCorners(nodes []orb.Point, idx []int32) []int32 {
	n := len(idx)
	straight := func(k int) bool {
		p, q, r := nodes[idx[(k+n-1)%n]], nodes[idx[k]], nodes[idx[(k+1)%n]]
		ux, uy := p[0]-q[0], p[1]-q[1]
		vx, vy := r[0]-q[0], r[1]-q[1]
		// The node's distance to the chord p r is |u × v| / |v − u|; the
		// neighbours must lie on either side of it (u · v < 0).
		cx, cy := vx-ux, vy-uy
		return ux*vx+uy*vy < 0 && math.Abs(ux*vy-uy*vx) <= s.straight*(cx*cx+cy*cy)
	}
	kept := s.corners[:0]
	for k := range n {
		if !straight(k) {
			kept = append(kept, idx[k])
		}
	}
	s.corners = kept
	if len(kept) == n || len(kept) < 3 {
		return idx
	}
	return kept
}

// triangle is compute for a triangle p0 p1 p2, unrolled. By the law of
// sines the smallest angle lies opposite the shortest edge and the largest
// opposite the longest, so only those two corners are evaluated (for an
// inverted triangle, whose interior angles are reflex, the two swap, which
// the final min/max takes care of).
func (s *cellShape) triangle(p0, p1, p2 orb.Point, area float64) {
	e0x, e0y := p1[0]-p0[0], p1[1]-p0[1]
	e1x, e1y := p2[0]-p1[0], p2[1]-p1[1]
	e2x, e2y := p0[0]-p2[0], p0[1]-p2[1]
	q0, q1, q2 := e0x*e0x+e0y*e0y, e1x*e1x+e1y*e1y, e2x*e2x+e2y*e2y
	// Edge k runs from p_k to p_{k+1}; the corner opposite it is p_{k+2}.
	// Corner p_j lies between incoming edge e_{j−1} and outgoing edge e_j:
	// with v = e_j and u = −e_{j−1}, v × u = e_{j−1} × e_j and
	// v · u = −e_{j−1} · e_j. corners[k] is the (cross, dot) pair of the
	// corner opposite edge k.
	corners := [3][2]float64{
		{e1x*e2y - e1y*e2x, -(e1x*e2x + e1y*e2y)}, // corner p2, between e1 and e2
		{e2x*e0y - e2y*e0x, -(e2x*e0x + e2y*e0y)}, // corner p0, between e2 and e0
		{e0x*e1y - e0y*e1x, -(e0x*e1x + e0y*e1y)}, // corner p1, between e0 and e1
	}
	// The shortest and longest edges, the first of equals, chosen by
	// index arithmetic rather than branches, which the random shapes of a
	// mesh would mispredict.
	q := [3]float64{q0, q1, q2}
	kmin := b2i(q1 < q0)
	kmin += (2 - kmin) * b2i(q2 < q[kmin])
	kmax := b2i(q1 > q0)
	kmax += (2 - kmax) * b2i(q2 > q[kmax])
	qmin := q[kmin]
	a, b := cornerAngle(corners[kmin]), cornerAngle(corners[kmax])
	if qmin == 0 {
		a = 0 // a zero-length edge: a 0° corner
	}
	s.minAngle, s.maxAngle = min(a, b), max(a, b)
	s.equiangle = max((s.maxAngle-60)*(1.0/120), (60-s.minAngle)*(1.0/60))
	s.jacobian = math.NaN()
	if area <= 0 || qmin == 0 {
		s.aspect = math.Inf(1)
	} else {
		// √ is monotone and correctly rounded, so the longest edge is
		// exactly √qmax: max(l0, l1, l2) gives it without a fourth root.
		l0, l1, l2 := math.Sqrt(q0), math.Sqrt(q1), math.Sqrt(q2)
		s.aspect = max(l0, l1, l2) * (l0 + l1 + l2) / (4 * math.Sqrt(3) * area)
	}
}

// angleKey ranks a corner with cross product cr, dot product dt and edge
// length product ll by its angle: 1 − cos θ on [0°, 180°], 3 + cos θ
// beyond, 0 when an edge has zero length.
func angleKey(cr, dt, ll float64) float64 {
	switch {
	case ll == 0:
		return 0
	case cr >= 0:
		return 1 - dt/ll
	}
	return 3 + dt/ll
}

// cornerAngle returns the interior angle in degrees, in [0, 360), of a
// corner given its (cross, dot) pair.
func cornerAngle(cd [2]float64) float64 {
	a := atan2(cd[0], cd[1]) * rad2deg
	if a < 0 {
		a += 360
	}
	return a
}
