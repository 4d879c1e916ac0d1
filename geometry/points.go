package geometry

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// SegmentDistance returns the distance from p to the segment from a to b:
// to the foot of the perpendicular when it falls on the segment, else to
// the nearer end (elementary geometry).
func SegmentDistance(p, a, b orb.Point) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	t := 0.0
	if l2 := dx*dx + dy*dy; l2 > 0 {
		t = math.Max(0, math.Min(1, ((p[0]-a[0])*dx+(p[1]-a[1])*dy)/l2))
	}
	return math.Hypot(p[0]-a[0]-t*dx, p[1]-a[1]-t*dy)
}

// DistinctDigits returns the number of significant digits, 4 or more,
// that print two different points differently, so that a message about a
// small gap or offset does not show the same coordinates twice.
func DistinctDigits(a, b orb.Point) int {
	for d := 4; d < 17; d++ {
		if fmt.Sprintf("%.*g %.*g", d, a[0], d, a[1]) != fmt.Sprintf("%.*g %.*g", d, b[0], d, b[1]) {
			return d
		}
	}
	return 17
}
