package quality

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"

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
// audit and the connectivity checks) on the 2-million-triangle mesh beside
// the VTK library's mesh-quality filter computing one metric (see vsVTK),
// three ways: fresh, Evaluate in fresh memory each time, as a one-shot
// program that wants the fields; reused, one Evaluator from call to call,
// as a sweep worker runs it; no-fields, a fresh Evaluator with NoFields,
// as `cvdeck check` runs it.
func BenchmarkEvaluate2MTriangles(b *testing.B) {
	needVTK(b)
	m := benchMesh(b)
	vtk := startVTKQuality(b, m)
	defer vtk.close(b)
	lim := everyday(b)
	var reused Evaluator
	modes := []struct {
		name string
		run  func() error
	}{
		{"fresh", func() error { _, err := Evaluate(m, lim); return err }},
		{"reused", func() error { _, err := reused.Evaluate(m, lim); return err }},
		{"no-fields", func() error { _, err := (&Evaluator{NoFields: true}).Evaluate(m, lim); return err }},
	}
	for _, mode := range modes {
		b.Run(mode.name, func(b *testing.B) { vsVTK(b, vtk, mode.run) })
	}
}

// vsVTK times evaluate on the 2-million-triangle mesh and in step with it
// the VTK library's mesh-quality filter computing one metric (triangle
// aspect ratio) on the same mesh, already read into memory by a VTK
// process that waits for requests (vtkQualityServer). Each iteration runs
// one filter Update, then one evaluate, so that both meet the same machine
// load; the filter's time is kept out of ns/op. It reports the medians
// over the iterations: vtk-s (VTK wall seconds), cvdeck-s, ratio (cvdeck
// wall time / VTK wall time; the target is ≤ 1) and, since the machine may
// be shared, cpu-ratio (cvdeck process CPU time, all goroutines, over
// VTK's), and sys-s, the part of cvdeck's CPU time spent in the operating
// system (mostly page faults on fresh memory). For scale it also times VTK
// on the four triangle metrics both compute (aspect ratio, minimum and
// maximum angle, area): vtk4-s, the median of their summed wall times, and
// ratio4 = cvdeck-s / vtk4-s. Run it with -benchtime=5x or more for stable
// medians.
func vsVTK(b *testing.B, vtk *vtkQuality, evaluate func() error) {
	four := []string{"Triangle:AspectRatio", "Triangle:MinAngle", "Triangle:MaxAngle", "Triangle:Area"}
	var vtkWall, vtkCPU, vtk4, wall, cpu, sys []float64
	for b.Loop() {
		b.StopTimer()
		t := vtk.update(b, four[0])
		vtkWall, vtkCPU = append(vtkWall, t.wall), append(vtkCPU, t.cpu)
		sum := t.wall
		for _, measure := range four[1:] {
			sum += vtk.update(b, measure).wall
		}
		vtk4 = append(vtk4, sum)
		b.StartTimer()
		c0, t0 := cpuTime(), time.Now()
		if err := evaluate(); err != nil {
			b.Fatal(err)
		}
		c1 := cpuTime()
		wall, cpu, sys = append(wall, time.Since(t0).Seconds()), append(cpu, c1.total-c0.total), append(sys, c1.sys-c0.sys)
	}
	b.ReportMetric(median(vtkWall), "vtk-s")
	b.ReportMetric(median(wall), "cvdeck-s")
	b.ReportMetric(median(wall)/median(vtkWall), "ratio")
	b.ReportMetric(median(cpu)/median(vtkCPU), "cpu-ratio")
	b.ReportMetric(median(sys), "sys-s")
	b.ReportMetric(median(vtk4), "vtk4-s")
	b.ReportMetric(median(wall)/median(vtk4), "ratio4")
}

// vtkQualityServer reads a legacy VTK file with the VTK library, says
// "ready", then for each line "Kind:Name" on its input runs a fresh
// mesh-quality filter with that measure on the grid in memory and prints
// the wall-clock and process CPU seconds of the filter's Update and the
// number of cell values it produced.
const vtkQualityServer = `
import sys, time, vtk
r = vtk.vtkUnstructuredGridReader()
r.SetFileName(sys.argv[1])
r.Update()
grid = r.GetOutput()
print('ready', flush=True)
for line in sys.stdin:
    kind, name = line.strip().split(':')
    q = vtk.vtkMeshQuality()
    q.SetInputData(grid)
    getattr(q, 'Set%sQualityMeasureTo%s' % (kind, name))()
    t0, c0 = time.perf_counter(), time.process_time()
    q.Update()
    dt, dc = time.perf_counter() - t0, time.process_time() - c0
    print(dt, dc, q.GetOutput().GetCellData().GetArray('Quality').GetNumberOfTuples(), flush=True)
`

// vtkQuality is a running vtkQualityServer.
type vtkQuality struct {
	cmd   *exec.Cmd
	in    io.WriteCloser
	out   *bufio.Scanner
	cells int
}

// vtkTime is the wall-clock and CPU time of one filter run, in seconds.
type vtkTime struct{ wall, cpu float64 }

// startVTKQuality writes m to a legacy VTK file and starts a
// vtkQualityServer on it, returning once the grid is read.
func startVTKQuality(b *testing.B, m *mesh.Mesh) *vtkQuality {
	path := filepath.Join(b.TempDir(), "mesh.vtk")
	writeLegacyVTK(b, path, m)
	v := &vtkQuality{cmd: exec.Command(python, "-c", vtkQualityServer, path), cells: m.NumCells()}
	var stderr strings.Builder
	v.cmd.Stderr = &stderr
	var err error
	if v.in, err = v.cmd.StdinPipe(); err != nil {
		b.Fatal(err)
	}
	out, err := v.cmd.StdoutPipe()
	if err != nil {
		b.Fatal(err)
	}
	v.out = bufio.NewScanner(out)
	if err := v.cmd.Start(); err != nil {
		b.Fatal(err)
	}
	if !v.out.Scan() || v.out.Text() != "ready" {
		b.Fatalf("VTK quality server did not start: %q %v\n%s", v.out.Text(), v.out.Err(), stderr.String())
	}
	return v
}

// update runs the filter once with the given measure and returns its time.
func (v *vtkQuality) update(b *testing.B, measure string) vtkTime {
	if _, err := fmt.Fprintln(v.in, measure); err != nil {
		b.Fatal(err)
	}
	if !v.out.Scan() {
		b.Fatalf("VTK quality server stopped: %v", v.out.Err())
	}
	var t vtkTime
	var n int
	if _, err := fmt.Sscan(v.out.Text(), &t.wall, &t.cpu, &n); err != nil {
		b.Fatalf("VTK quality server printed %q: %v", v.out.Text(), err)
	}
	if n != v.cells {
		b.Fatalf("VTK %s gave %d values for %d cells", measure, n, v.cells)
	}
	return t
}

// close ends the server and waits for it.
func (v *vtkQuality) close(b *testing.B) {
	v.in.Close()
	if err := v.cmd.Wait(); err != nil {
		b.Fatalf("VTK quality server: %v", err)
	}
}

// median returns the median of xs (the mean of the middle two for an even
// count).
func median(xs []float64) float64 {
	s := slices.Sorted(slices.Values(xs))
	n := len(s)
	if n == 0 {
		return math.NaN()
	}
	return (s[(n-1)/2] + s[n/2]) / 2
}

// processTime is the CPU time a process has used, in seconds: in all and
// in the operating system on its behalf.
type processTime struct{ total, sys float64 }

// cpuTime returns the CPU time used by this process so far.
func cpuTime() processTime {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return processTime{math.NaN(), math.NaN()}
	}
	return processTime{float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9, float64(ru.Stime.Nano()) / 1e9}
}
