package quality

import (
	"math"
	"syscall"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// benchMesh is a 1000 × 1000 quad grid on the unit square, interior nodes
// perturbed by up to a quarter spacing, each quad split into two triangles:
// 2 million triangles, 3 million faces, about 1 million nodes.
func benchMesh(b *testing.B) *mesh.Mesh {
	const n = 1000
	in := mesh.Input{Nodes: gridNodes(n, n, orb.Point{0, 0}, orb.Point{1.0 / n, 0}, orb.Point{0, 1.0 / n}, 0.25), Tags: []string{"side"}}
	cells := quadCells(n, n, true)
	in.CellStart = make([]int32, 0, len(cells)+1)
	in.CellStart = append(in.CellStart, 0)
	in.CellNodes = make([]int32, 0, 3*len(cells))
	for _, c := range cells {
		in.CellNodes = append(in.CellNodes, c...)
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	id := func(i, j int) int32 { return int32(j*(n+1) + i) }
	for i := 0; i < n; i++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: id(i, 0), B: id(i+1, 0)}, mesh.TaggedEdge{A: id(i, n), B: id(i+1, n)},
			mesh.TaggedEdge{A: id(0, i), B: id(0, i+1)}, mesh.TaggedEdge{A: id(n, i), B: id(n, i+1)})
	}
	m, err := mesh.Build(in)
	if err != nil {
		b.Fatal(err)
	}
	return m
}

// BenchmarkEvaluate2MTriangles times the full suite (every metric, the
// audit and the connectivity checks) on the 2-million-triangle mesh, and
// beside it the VTK library's mesh-quality filter computing one metric
// (triangle aspect ratio) on the same mesh, best of three runs of its
// Update. It reports vtk-s (VTK wall seconds), ratio (cvdeck wall time /
// VTK wall time; the target is ≤ 1) and, since the machine may be shared,
// cpu-ratio (cvdeck process CPU time, all goroutines, over VTK's). For
// scale it also times VTK on the four triangle metrics both compute
// (aspect ratio, minimum and maximum angle, area): vtk4-s, and ratio4 =
// cvdeck wall time over that sum.
func BenchmarkEvaluate2MTriangles(b *testing.B) {
	needVTK(b)
	m := benchMesh(b)
	_, times := runVTKQuality(b, m, []string{"Triangle:AspectRatio", "Triangle:MinAngle", "Triangle:MaxAngle", "Triangle:Area"}, 3)
	vtk4 := 0.0
	for _, t := range times {
		vtk4 += t.wall
	}
	lim := everyday(b)
	c0 := cpuTime()
	for b.Loop() {
		if _, err := Evaluate(m, lim); err != nil {
			b.Fatal(err)
		}
	}
	cpu := (cpuTime() - c0) / float64(b.N)
	per := b.Elapsed().Seconds() / float64(b.N)
	b.ReportMetric(times[0].wall, "vtk-s")
	b.ReportMetric(per/times[0].wall, "ratio")
	b.ReportMetric(cpu/times[0].cpu, "cpu-ratio")
	b.ReportMetric(vtk4, "vtk4-s")
	b.ReportMetric(per/vtk4, "ratio4")
}

// cpuTime returns the CPU time used by this process so far, in seconds.
func cpuTime() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}
