package unstructured

import (
	"testing"
	"time"
)

// BenchmarkDelaunay1M triangulates 1 000 000 uniform random points and,
// in the same run, times scipy.spatial.Delaunay (Debian python3-scipy)
// on the same points; it reports both and their ratio.
func BenchmarkDelaunay1M(b *testing.B) {
	pts := randomPoints(1_000_000, 2026)
	_, scipySecs := scipyDelaunay(b, pts, false)
	b.ResetTimer()
	start := time.Now()
	for b.Loop() {
		if _, err := Delaunay(pts); err != nil {
			b.Fatal(err)
		}
	}
	per := time.Since(start).Seconds() / float64(b.N)
	b.ReportMetric(scipySecs, "scipy-s")
	b.ReportMetric(per, "cvdeck-s")
	b.ReportMetric(scipySecs/per, "speedup")
}
