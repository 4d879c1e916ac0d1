package quality

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/mesh"
)

// python is the Debian interpreter that has the VTK library (python3-vtk9).
const python = "/usr/bin/python3"

// needVTK skips the test when the VTK library is missing, except under CI
// (CI=true), where a missing reference tool is a failure.
func needVTK(t testing.TB) {
	t.Helper()
	if err := exec.Command(python, "-c", "import vtk, numpy").Run(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("VTK library not available through %s: %v", python, err)
		}
		t.Skipf("VTK library not available through %s: %v", python, err)
	}
}

// writeLegacyVTK writes m as a binary legacy VTK unstructured grid
// (VTK file formats, "Simple Legacy Formats": big-endian binary data, cell
// types 5 triangle, 9 quad, 7 polygon). It is a small writer for these
// tests; the project's writers live in export.
func writeLegacyVTK(t testing.TB, path string, m *mesh.Mesh) {
	t.Helper()
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	w := bufio.NewWriterSize(f, 1<<20)
	nn, nc := len(m.Nodes), m.NumCells()
	fmt.Fprintf(w, "# vtk DataFile Version 3.0\ncvdeck quality test mesh\nBINARY\nDATASET UNSTRUCTURED_GRID\nPOINTS %d double\n", nn)
	var buf [8]byte
	put64 := func(x float64) { binary.BigEndian.PutUint64(buf[:], math.Float64bits(x)); w.Write(buf[:]) }
	put32 := func(x int32) { binary.BigEndian.PutUint32(buf[:4], uint32(x)); w.Write(buf[:4]) }
	for _, p := range m.Nodes {
		put64(p[0])
		put64(p[1])
		put64(0)
	}
	fmt.Fprintf(w, "\nCELLS %d %d\n", nc, nc+len(m.CellNodes))
	for c := 0; c < nc; c++ {
		cell := m.Cell(c)
		put32(int32(len(cell)))
		for _, v := range cell {
			put32(v)
		}
	}
	fmt.Fprintf(w, "\nCELL_TYPES %d\n", nc)
	for c := 0; c < nc; c++ {
		switch len(m.Cell(c)) {
		case 3:
			put32(5)
		case 4:
			put32(9)
		default:
			put32(7)
		}
	}
	w.WriteString("\n")
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
}

// vtkQualityScript runs the VTK library's mesh-quality filter for each
// measure "Kind:Name" given (Kind Triangle or Quad) and writes the per-cell
// values as little-endian float64 to the output file, measure after
// measure.
const vtkQualityScript = `
import sys, numpy, vtk
from vtk.util.numpy_support import vtk_to_numpy
path, out, measures = sys.argv[1], sys.argv[2], sys.argv[3].split(',')
r = vtk.vtkUnstructuredGridReader()
r.SetFileName(path)
r.Update()
grid = r.GetOutput()
arrays = []
for m in measures:
    kind, name = m.split(':')
    q = vtk.vtkMeshQuality()
    q.SetInputData(grid)
    getattr(q, 'Set%sQualityMeasureTo%s' % (kind, name))()
    q.Update()
    arrays.append(vtk_to_numpy(q.GetOutput().GetCellData().GetArray('Quality')).astype('<f8'))
numpy.concatenate(arrays).tofile(out)
`

// runVTKQuality runs vtkQualityScript on m and returns the per-cell values
// of each measure.
func runVTKQuality(t testing.TB, m *mesh.Mesh, measures []string) [][]float64 {
	t.Helper()
	dir := t.TempDir()
	in, out := filepath.Join(dir, "mesh.vtk"), filepath.Join(dir, "quality.f64")
	writeLegacyVTK(t, in, m)
	cmd := exec.Command(python, "-c", vtkQualityScript, in, out, strings.Join(measures, ","))
	if _, err := cmd.Output(); err != nil {
		t.Fatalf("VTK mesh quality: %v\n%s", err, stderrOf(err))
	}
	raw, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	nc := m.NumCells()
	if len(raw) != 8*nc*len(measures) {
		t.Fatalf("VTK wrote %d bytes for %d cells × %d measures", len(raw), nc, len(measures))
	}
	vals := make([][]float64, len(measures))
	for k := range measures {
		vals[k] = make([]float64, nc)
		for c := range vals[k] {
			vals[k][c] = math.Float64frombits(binary.LittleEndian.Uint64(raw[8*(k*nc+c):]))
		}
	}
	return vals
}

func stderrOf(err error) string {
	if e, ok := err.(*exec.ExitError); ok {
		return string(e.Stderr)
	}
	return ""
}

// Our per-cell shape metrics agree with the VTK library's mesh-quality
// filter (Debian python3-vtk9) on perturbed triangle and quad meshes: the
// triangle aspect ratio l_max·P/(4√3 A), the minimum and maximum angles
// and the quadrilateral scaled Jacobian are the same definitions there.
func TestShapeAgainstVTK(t *testing.T) {
	needVTK(t)
	cases := []struct {
		tri      bool
		measures []string
		fields   []string
	}{
		{true, []string{"Triangle:AspectRatio", "Triangle:MinAngle", "Triangle:MaxAngle"}, []string{"aspect_ratio", "min_angle", "max_angle"}},
		{false, []string{"Quad:ScaledJacobian", "Quad:MinAngle", "Quad:MaxAngle"}, []string{"scaled_jacobian", "min_angle", "max_angle"}},
	}
	for _, tc := range cases {
		m := build(t, gridNodes(40, 30, [2]float64{3, -1}, [2]float64{0.05, 0.01}, [2]float64{-0.01, 0.04}, 0.3), quadCells(40, 30, tc.tri), true)
		r := evaluate(t, m)
		vals := runVTKQuality(t, m, tc.measures)
		for k, name := range tc.fields {
			ours := field(t, r, name)
			worst := 0.0
			for c := range ours {
				worst = max(worst, math.Abs(ours[c]-vals[k][c])/math.Abs(vals[k][c]))
			}
			if !(worst < 1e-12) {
				t.Errorf("%s vs VTK %s: worst relative difference %g", name, tc.measures[k], worst)
			}
		}
	}
}
