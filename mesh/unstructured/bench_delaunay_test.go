package unstructured

import (
	"testing"
	"time"
)

// BenchmarkDelaunay1M triangulates 1 000 000 uniform random points and,
// in the same run, times scipy.spatial.Delaunay (Debian python3-scipy)
// on the same points; it reports both, wall and CPU time, and their
// ratios. On a machine shared with other jobs the CPU ratio is the fairer
// one.
func BenchmarkDelaunay1M(b *testing.B) {
	pts := randomPoints(1_000_000, 2026)
	_, scipyWall, scipyCPU := scipyDelaunay(b, pts, false)
	b.ResetTimer()
	start, cpu0 := time.Now(), cpuTime()
	for b.Loop() {
		if _, err := Delaunay(pts); err != nil {
			b.Fatal(err)
		}
	}
	wall := time.Since(start).Seconds() / float64(b.N)
	cpu := (cpuTime() - cpu0).Seconds() / float64(b.N)
	b.ReportMetric(scipyWall, "scipy-s")
	b.ReportMetric(scipyCPU, "scipy-cpu-s")
	b.ReportMetric(wall, "cvdeck-s")
	b.ReportMetric(cpu, "cvdeck-cpu-s")
	b.ReportMetric(scipyWall/wall, "speedup")
	b.ReportMetric(scipyCPU/cpu, "cpu-speedup")
}
