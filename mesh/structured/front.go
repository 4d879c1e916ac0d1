package structured

import (
	"github.com/paulmach/orb"

	"cvdeck/geometry"
)

// frontCrossing looks for a place where the line (x1, y1) just marched
// from (x0, y0) runs into itself or into the line below it: an edge of the
// new line that crosses or touches another edge of the new line, other
// than its neighbours along it, or any edge of the old line. Every cell of
// the layer can be strictly convex while this happens, when two parts of
// the front that lie far apart along it meet across a gap (the lips of a
// narrow cavity): the cells there would overlap. The old line is not
// checked against itself (a C-grid starts from a line whose wake halves
// coincide). It returns the index of the new line's edge, that of the
// other edge, and a point where they meet, or ok false.
func frontCrossing(x0, y0, x1, y1 []float64, periodic bool) (i, j int, px, py float64, ok bool) {
	n := len(x0)
	ne := n - 1
	if periodic {
		ne = n
	}
	// Edges 0 … ne−1 are the new line's, ne … 2ne−1 the old line's.
	segs := make([]geometry.Piece, 0, 2*ne)
	for _, line := range [2][2][]float64{{x1, y1}, {x0, y0}} {
		x, y := line[0], line[1]
		for k := 0; k < ne; k++ {
			k1 := (k + 1) % n
			segs = append(segs, geometry.Piece{A: orb.Point{x[k], y[k]}, B: orb.Point{x[k1], y[k1]}})
		}
	}
	neighbours := func(a, b int) bool { // new edges sharing a node
		return (a+1)%n == b && (periodic || a+1 < n)
	}
	a, b, p, hit := geometry.FirstCrossing(segs, func(a, b int) bool {
		switch {
		case a >= ne && b >= ne:
			return true // old against old
		case a < ne && b < ne:
			return neighbours(a, b) || neighbours(b, a)
		}
		return false
	})
	if !hit {
		return 0, 0, 0, 0, false
	}
	if a >= ne {
		a, b = b, a // the new line's edge first
	}
	return a, b % ne, p[0], p[1], true
}
