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

// BenchmarkValidateLargePolygon validates and orients a 100 000-edge
// polygon read from a file (a wavy ring with a hole), as a GeoJSON or
// point-file outline would arrive.
func BenchmarkValidateLargePolygon(b *testing.B) {
	const n = 100_000
	outer := make([]orb.Point, n+1)
	for i := range n {
		a := 2 * math.Pi * float64(i) / n
		r := 10 + 0.5*math.Sin(40*a)
		outer[i] = orb.Point{r * math.Cos(a), r * math.Sin(a)}
	}
	outer[n] = outer[0]
	pl, err := NewPolyline(outer, Attr{})
	if err != nil {
		b.Fatal(err)
	}
	hole, _ := NewCircle(0, 0, 2, Attr{})
	o := Outline{Outer: Loop{Segments: []Segment{pl}}, Inner: []Loop{hole}}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := o.Normalise(); err != nil {
			b.Fatal(err)
		}
	}
}
