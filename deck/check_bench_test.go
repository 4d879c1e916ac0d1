package deck

import (
	"bufio"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"
)

// vtkCheckServer has the VTK library write a 2-million-triangle grid (a
// 1000 × 1000 square of quads split in two, interior points moved by up to
// a quarter spacing, fixed seed) as a VTU file with raw appended data, says
// "ready", then for each line on its input reads that file afresh and runs
// the mesh-quality filter on it for one metric (triangle aspect ratio),
// printing the wall seconds of the read and of the filter.
const vtkCheckServer = `
import sys, time, vtk, numpy as np
from vtk.util.numpy_support import vtk_to_numpy, numpy_to_vtk
n, path = 1000, sys.argv[1]
p = vtk.vtkPlaneSource(); p.SetResolution(n, n); p.SetOrigin(0, 0, 0); p.SetPoint1(1, 0, 0); p.SetPoint2(0, 1, 0)
t = vtk.vtkTriangleFilter(); t.SetInputConnection(p.GetOutputPort())
a = vtk.vtkAppendFilter(); a.AddInputConnection(t.GetOutputPort()); a.Update()
g = a.GetOutput()
pts = vtk_to_numpy(g.GetPoints().GetData()).copy()
inner = (pts[:, 0] > 1e-9) & (pts[:, 0] < 1 - 1e-9) & (pts[:, 1] > 1e-9) & (pts[:, 1] < 1 - 1e-9)
pts[inner, :2] += (np.random.default_rng(1).random((inner.sum(), 2)) * 2 - 1) * 0.25 / n
g.GetPoints().SetData(numpy_to_vtk(pts, deep=True))
w = vtk.vtkXMLUnstructuredGridWriter(); w.SetFileName(path); w.SetInputData(g)
w.SetDataModeToAppended(); w.EncodeAppendedDataOff(); w.SetCompressorTypeToNone(); w.Write()
print('ready', g.GetNumberOfCells(), flush=True)
for line in sys.stdin:
    t0 = time.perf_counter()
    r = vtk.vtkXMLUnstructuredGridReader(); r.SetFileName(path); r.Update()
    t1 = time.perf_counter()
    q = vtk.vtkMeshQuality(); q.SetInputData(r.GetOutput()); q.SetTriangleQualityMeasureToAspectRatio(); q.Update()
    t2 = time.perf_counter()
    print(t1 - t0, t2 - t1, flush=True)
`

// BenchmarkCheckVTU2M times what a user waits for: Check of a
// 2-million-triangle VTU file written by the VTK library (read, faces and
// geometry built, untagged boundary tagged, every metric, the audit and
// the connectivity checks), and in step with it the VTK library reading
// the same file and computing one metric with its mesh-quality filter.
// Neither side counts starting its process. It reports the medians:
// vtk-read-s and vtk-quality-s, vtk-s (their sum), cvdeck-s and ratio
// (cvdeck-s / vtk-s). Run it with -benchtime=5x or more.
func BenchmarkCheckVTU2M(b *testing.B) {
	const python = "/usr/bin/python3"
	if err := exec.Command(python, "-c", "import vtk, numpy").Run(); err != nil {
		if os.Getenv("CI") == "true" {
			b.Fatalf("VTK library not available through %s: %v", python, err)
		}
		b.Skipf("VTK library not available through %s: %v", python, err)
	}
	path := filepath.Join(b.TempDir(), "grid.vtu")
	cmd := exec.Command(python, "-c", vtkCheckServer, path)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	in, err := cmd.StdinPipe()
	if err != nil {
		b.Fatal(err)
	}
	pipe, err := cmd.StdoutPipe()
	if err != nil {
		b.Fatal(err)
	}
	out := bufio.NewScanner(pipe)
	if err := cmd.Start(); err != nil {
		b.Fatal(err)
	}
	if !out.Scan() || out.Text() != "ready 2000000" {
		b.Fatalf("VTK server did not start: %q\n%s", out.Text(), stderr.String())
	}
	var read, qual, vtkTotal, wall []float64
	for b.Loop() {
		b.StopTimer()
		fmt.Fprintln(in, "go")
		var r, q float64
		if !out.Scan() {
			b.Fatalf("VTK server stopped: %s", stderr.String())
		}
		if _, err := fmt.Sscan(out.Text(), &r, &q); err != nil {
			b.Fatalf("VTK server printed %q: %v", out.Text(), err)
		}
		read, qual, vtkTotal = append(read, r), append(qual, q), append(vtkTotal, r+q)
		b.StartTimer()
		t0 := time.Now()
		res, err := Check(path)
		if err != nil {
			b.Fatal(err)
		}
		wall = append(wall, time.Since(t0).Seconds())
		if res.Report.Cells != 2000000 {
			b.Fatalf("checked %d cells", res.Report.Cells)
		}
	}
	in.Close()
	if err := cmd.Wait(); err != nil {
		b.Fatalf("VTK server: %v\n%s", err, stderr.String())
	}
	med := func(xs []float64) float64 {
		s := slices.Sorted(slices.Values(xs))
		return (s[(len(s)-1)/2] + s[len(s)/2]) / 2
	}
	b.ReportMetric(med(read), "vtk-read-s")
	b.ReportMetric(med(qual), "vtk-quality-s")
	b.ReportMetric(med(vtkTotal), "vtk-s")
	b.ReportMetric(med(wall), "cvdeck-s")
	b.ReportMetric(med(wall)/med(vtkTotal), "ratio")
}
