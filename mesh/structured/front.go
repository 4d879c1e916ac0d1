package structured

import (
	"math"
	"slices"

	"cvdeck/mesh/unstructured/predicates"
)

// frontEdge is an edge of a marching front: the new line's edge i (from
// node i to i+1) when new is true, else the old line's.
type frontEdge struct {
	i              int
	new            bool
	x0, x1, y0, y1 float64 // bounding box
}

// frontCrossing looks for a place where the line (x1, y1) just marched
// from (x0, y0) runs into itself or into the line below it: an edge of the
// new line that crosses or touches another edge of the new line, other
// than its neighbours along it, or any edge of the old line. Every cell of
// the layer can be strictly convex while this happens, when two parts of
// the front that lie far apart along it meet across a gap (the lips of a
// narrow cavity): the cells there would overlap. The old line is not
// checked against itself (a C-grid starts from a line whose wake halves
// coincide). It returns the two edges' indices and a point where they
// meet, or ok false. The test is exact (Shewchuk's orientation predicate);
// a sweep along x keeps only edges whose x ranges overlap.
func frontCrossing(x0, y0, x1, y1 []float64, periodic bool) (i, j int, px, py float64, ok bool) {
	n := len(x0)
	ne := n - 1
	if periodic {
		ne = n
	}
	edges := make([]frontEdge, 0, 2*ne)
	for _, line := range []struct {
		x, y []float64
		new  bool
	}{{x1, y1, true}, {x0, y0, false}} {
		for k := 0; k < ne; k++ {
			k1 := (k + 1) % n
			edges = append(edges, frontEdge{k, line.new,
				math.Min(line.x[k], line.x[k1]), math.Max(line.x[k], line.x[k1]),
				math.Min(line.y[k], line.y[k1]), math.Max(line.y[k], line.y[k1])})
		}
	}
	// Sweep order: by the left end of the box, new edges first, then by
	// index, so that the answer is deterministic. Sorting the indices
	// moves 4 bytes where sorting the edges would move 48.
	order := make([]int32, len(edges))
	for k := range order {
		order[k] = int32(k)
	}
	slices.SortFunc(order, func(a, b int32) int {
		ea, eb := &edges[a], &edges[b]
		if ea.x0 != eb.x0 {
			if ea.x0 < eb.x0 {
				return -1
			}
			return 1
		}
		return int(a - b) // new edges come first in edges, each line by index
	})
	point := func(e frontEdge, end int) (float64, float64) {
		k := (e.i + end) % n
		if e.new {
			return x1[k], y1[k]
		}
		return x0[k], y0[k]
	}
	var active []frontEdge
	for _, k := range order {
		e := edges[k]
		keep := active[:0]
		for _, f := range active {
			if f.x1 >= e.x0 {
				keep = append(keep, f)
			}
		}
		active = keep
		for _, f := range active {
			if !e.new && !f.new || f.y1 < e.y0 || e.y1 < f.y0 {
				continue
			}
			if e.new && f.new && (e.i == f.i || (e.i+1)%n == f.i && (periodic || e.i+1 < n) || (f.i+1)%n == e.i && (periodic || f.i+1 < n)) {
				continue // the same edge, or neighbours sharing a node
			}
			ax, ay := point(e, 0)
			bx, by := point(e, 1)
			cx, cy := point(f, 0)
			dx, dy := point(f, 1)
			if x, y, hit := segmentsTouch(ax, ay, bx, by, cx, cy, dx, dy); hit {
				a, b := e.i, f.i
				if !e.new {
					a, b = b, a // the new line's edge first
				}
				return a, b, x, y, true
			}
		}
		active = append(active, e)
	}
	return 0, 0, 0, 0, false
}

// segmentsTouch reports whether the closed segments ab and cd share a
// point, and one such point (exactly: the signs come from Orient2d).
func segmentsTouch(ax, ay, bx, by, cx, cy, dx, dy float64) (float64, float64, bool) {
	d1 := predicates.Orient2d(cx, cy, dx, dy, ax, ay)
	d2 := predicates.Orient2d(cx, cy, dx, dy, bx, by)
	d3 := predicates.Orient2d(ax, ay, bx, by, cx, cy)
	d4 := predicates.Orient2d(ax, ay, bx, by, dx, dy)
	if d1*d2 < 0 && d3*d4 < 0 {
		t := d1 / (d1 - d2)
		return ax + t*(bx-ax), ay + t*(by-ay), true
	}
	within := func(px, py, qx, qy, rx, ry float64) bool { // r on segment pq, given collinear
		return math.Min(px, qx) <= rx && rx <= math.Max(px, qx) && math.Min(py, qy) <= ry && ry <= math.Max(py, qy)
	}
	switch {
	case d1 == 0 && within(cx, cy, dx, dy, ax, ay):
		return ax, ay, true
	case d2 == 0 && within(cx, cy, dx, dy, bx, by):
		return bx, by, true
	case d3 == 0 && within(ax, ay, bx, by, cx, cy):
		return cx, cy, true
	case d4 == 0 && within(ax, ay, bx, by, dx, dy):
		return dx, dy, true
	}
	return 0, 0, false
}
