package unstructured

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// hilbertOrder returns the indices of pts sorted along a Hilbert curve over
// their bounding box, quantised to a 2¹⁶ × 2¹⁶ grid (Hilbert 1891; the
// index computation is the usual bit-by-bit rotation). Inserting points in
// this order keeps consecutive points close, so each walk is a few steps
// (the spatial sort of Amenta, Choi and Rote 2003, without their random
// rounds: on the inputs a mesher meets, curve order alone gives short walks).
// Ties keep input order, so the result is deterministic.
func hilbertOrder(pts []orb.Point) []int32 {
	n := len(pts)
	b := orb.MultiPoint(pts).Bound()
	w := math.Max(b.Max[0]-b.Min[0], b.Max[1]-b.Min[1])
	scale := 0.0
	if w > 0 {
		scale = 65535 / w
	}
	keys := make([]uint64, n)
	for i, p := range pts {
		x := uint32((p[0] - b.Min[0]) * scale)
		y := uint32((p[1] - b.Min[1]) * scale)
		keys[i] = uint64(hilbertIndex(x, y))<<32 | uint64(i)
	}
	radixSortHigh32(keys)
	order := make([]int32, n)
	for i, k := range keys {
		order[i] = int32(uint32(k))
	}
	return order
}

// hilbertIndex returns the distance along the order-16 Hilbert curve of
// the grid cell (x, y), 0 ≤ x, y < 2¹⁶.
func hilbertIndex(x, y uint32) uint32 {
	const n = 1 << 16
	var d uint32
	for s := uint32(n / 2); s > 0; s >>= 1 {
		var rx, ry uint32
		if x&s != 0 {
			rx = 1
		}
		if y&s != 0 {
			ry = 1
		}
		d += s * s * ((3 * rx) ^ ry)
		if ry == 0 {
			if rx == 1 {
				x, y = n-1-x, n-1-y
			}
			x, y = y, x
		}
	}
	return d
}

// radixSortHigh32 sorts keys by their upper 32 bits, stably (four passes of
// a byte-wise LSD radix sort).
func radixSortHigh32(keys []uint64) {
	tmp := make([]uint64, len(keys))
	src, dst := keys, tmp
	for shift := uint(32); shift < 64; shift += 8 {
		var count [257]int
		for _, k := range src {
			count[(k>>shift)&0xff+1]++
		}
		for i := 1; i < 257; i++ {
			count[i] += count[i-1]
		}
		for _, k := range src {
			d := (k >> shift) & 0xff
			dst[count[d]] = k
			count[d]++
		}
		src, dst = dst, src
	}
}

// insertResult says what insertPoint did.
type insertResult int

const (
	inserted insertResult = iota
	duplicate
)

// insertPoint adds vertex i to the triangulation (Bowyer–Watson: locate,
// dig the cavity, fill it with a fan). It returns duplicate, and the
// existing vertex, when a vertex already sits at the same position.
func (tr *triangulation) insertPoint(i int32) (insertResult, int32, error) {
	p := tr.pts[i]
	t := tr.locate(p, tr.last)
	for k := int32(0); k < 3; k++ {
		if w := tr.v[3*t+k]; w != ghost && tr.pts[w] == p {
			return duplicate, w, nil
		}
	}
	seeds := [1]int32{t}
	if err := tr.digCavity(p, seeds[:], -1); err != nil {
		return inserted, -1, err
	}
	tr.fillCavity(i, noSeg, -1, -1)
	return inserted, i, nil
}

// triangulatePoints builds the Delaunay triangulation of pts, inserting in
// Hilbert order (or in the given order when inOrder is true). dup[i] is the
// vertex that point i coincides with, or i.
func triangulatePoints(pts []orb.Point, extraTri int, inOrder bool) (*triangulation, []int32, error) {
	n := len(pts)
	for i, p := range pts {
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return nil, nil, fmt.Errorf("point %d is (%v, %v); coordinates must be finite", i, p[0], p[1])
		}
	}
	if n < 3 {
		return nil, nil, fmt.Errorf("%d points; a triangulation needs at least 3 that are not collinear", n)
	}
	var order []int32
	if inOrder {
		order = make([]int32, n)
		for i := range order {
			order[i] = int32(i)
		}
	} else {
		order = hilbertOrder(pts)
	}
	// The first triangle: the first point in curve order, the next distinct
	// one and the next one off their line.
	a := order[0]
	bk := -1
	for k := 1; k < n; k++ {
		if pts[order[k]] != pts[a] {
			bk = k
			break
		}
	}
	if bk < 0 {
		return nil, nil, fmt.Errorf("all %d points coincide at (%v, %v); a triangulation needs 3 that are not collinear", n, pts[a][0], pts[a][1])
	}
	b := order[bk]
	ck := -1
	probe := &triangulation{pts: pts}
	for k := bk + 1; k < n; k++ {
		if probe.orient(a, b, pts[order[k]]) != 0 {
			ck = k
			break
		}
	}
	if ck < 0 {
		return nil, nil, fmt.Errorf("all %d points lie on one line through (%v, %v) and (%v, %v); a triangulation needs 3 that are not collinear",
			n, pts[a][0], pts[a][1], pts[b][0], pts[b][1])
	}
	c := order[ck]
	tr := newTriangulation(pts, a, b, c, 2*n+extraTri)
	dup := make([]int32, n)
	for i := range dup {
		dup[i] = int32(i)
	}
	for _, i := range order {
		if i == a || i == b || i == c {
			continue
		}
		res, w, err := tr.insertPoint(i)
		if err != nil {
			return nil, nil, fmt.Errorf("inserting point %d at (%v, %v): %w", i, pts[i][0], pts[i][1], err)
		}
		if res == duplicate {
			dup[i] = w
		}
	}
	return tr, dup, nil
}

// Delaunay returns the Delaunay triangulation of pts as a flat slice of
// vertex indices, three per triangle, each triangle counter-clockwise.
//
// Points are inserted one at a time in Hilbert-curve order (Bowyer 1981,
// Watson 1981), each located by a visibility walk from the previous one,
// with Shewchuk's robust orient2d and incircle deciding every test, so the
// result is exact for any float64 input: O(n log n) for the sort and O(n)
// expected for the insertions. Where four or more points are cocircular
// the triangulation of their polygon is one of the valid choices. A point
// equal to an earlier one is left out of every triangle. An error is
// returned when fewer than three points are not collinear or a coordinate
// is not finite.
func Delaunay(pts []orb.Point) ([]int32, error) {
	if len(pts) >= math.MaxInt32/3 {
		return nil, fmt.Errorf("unstructured: Delaunay: %d points; at most %d fit int32 triangle indices", len(pts), math.MaxInt32/3)
	}
	for i, p := range pts {
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return nil, fmt.Errorf("unstructured: Delaunay: point %d is (%v, %v); coordinates must be finite", i, p[0], p[1])
		}
	}
	// Triangulate a copy in curve order, so that the coordinates of
	// neighbouring vertices are neighbours in memory too, then map the
	// vertex numbers back.
	order := hilbertOrder(pts)
	sorted := make([]orb.Point, len(pts))
	for k, i := range order {
		sorted[k] = pts[i]
	}
	tr, _, err := triangulatePoints(sorted, 0, true)
	if err != nil {
		return nil, fmt.Errorf("unstructured: Delaunay: %w", err)
	}
	tris := tr.realTriangles()
	for k, v := range tris {
		tris[k] = order[v]
	}
	return tris, nil
}

// realTriangles returns the vertices of every non-ghost triangle.
func (tr *triangulation) realTriangles() []int32 {
	nt := tr.numTri()
	out := make([]int32, 0, 3*nt)
	for t := int32(0); t < nt; t++ {
		if !tr.isGhost(t) {
			out = append(out, tr.v[3*t:3*t+3]...)
		}
	}
	return out
}
