package geometry

import (
	"math"
	"testing"

	"github.com/paulmach/orb"
)

// BenchmarkDiscretiseLongSpline places 10 000 Vinokur-clustered nodes on
// a spline through 1 000 points (construction included).
func BenchmarkDiscretiseLongSpline(b *testing.B) {
	pts := make([]orb.Point, 1000)
	for i := range pts {
		x := float64(i) / 10
		pts[i] = orb.Point{x, math.Sin(x) + 0.3*math.Sin(3.1*x)}
	}
	sp, err := Clustered(1e-3, 1e-3, 10000)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		s, err := NewSpline(pts, Attr{Spacing: sp})
		if err != nil {
			b.Fatal(err)
		}
		if _, err := DiscretiseSegment(s); err != nil {
			b.Fatal(err)
		}
	}
}
