package vtk

import (
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// python is the Debian interpreter that has the VTK library (python3-vtk9);
// the python3 on PATH may be another one without it.
const python = "/usr/bin/python3"

// needVTK skips the test when the VTK library's Python module is missing,
// or fails it under CI=true, where a missing reference tool is an error.
func needVTK(t testing.TB) {
	t.Helper()
	out, err := exec.Command(python, "-c", "import vtk; print(vtk.vtkVersion.GetVTKVersion())").CombinedOutput()
	if err == nil {
		return
	}
	msg := "the VTK library's Python module (Debian python3-vtk9) is missing: " + strings.TrimSpace(string(out))
	if os.Getenv("CI") == "true" {
		t.Fatal(msg)
	}
	t.Skip(msg)
}

// runPython runs script with the VTK interpreter and decodes its JSON
// output into v.
func runPython(t testing.TB, script string, v any, args ...string) {
	t.Helper()
	needVTK(t)
	p := filepath.Join(t.TempDir(), "check.py")
	if err := os.WriteFile(p, []byte(script), 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(python, append([]string{p}, args...)...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("python: %v\n%s", err, stderr.String())
	}
	if err := json.Unmarshal(out, v); err != nil {
		t.Fatalf("python output: %v\n%s\n%s", err, out, stderr.String())
	}
}

// mixedMesh is an nx × ny grid of perturbed quadrilaterals over
// [x0, x0+nx] × [0, ny] in which rows j%3 == 0 are split into triangles
// and rows j%3 == 2 join pairs of quads into hexagons; south, east and
// north are tagged, west is left untagged. Every cell is convex, because
// vtkCellSizeFilter sums unsigned triangle areas of a fan, which is the
// polygon area only for convex cells.
func mixedMesh(t testing.TB, nx, ny int, x0 float64) *mesh.Mesh {
	in := mesh.Input{CellStart: []int32{0}, Tags: []string{"floor", "exit", "roof & top"}}
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			dx, dy := 0.0, 0.0
			switch {
			case i == 0 || i == nx || j == 0 || j == ny:
			case j%3 == 2 || j%3 == 0:
				// The hexagons' rims: middle nodes bulge outward so
				// the hexagons stay convex.
				if i%2 == 1 {
					dy = map[bool]float64{true: -0.15, false: 0.15}[j%3 == 2]
				}
			default:
				dx, dy = 0.2*math.Sin(float64(3*i+7*j)), 0.2*math.Cos(float64(5*i+2*j))
			}
			in.Nodes = append(in.Nodes, orb.Point{x0 + float64(i) + dx, float64(j) + dy})
		}
	}
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	add := func(v ...int32) {
		in.CellNodes = append(in.CellNodes, v...)
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			switch {
			case j%3 == 0:
				add(id(i, j), id(i+1, j), id(i+1, j+1))
				add(id(i, j), id(i+1, j+1), id(i, j+1))
			case j%3 == 2 && i%2 == 0 && i+1 < nx:
				add(id(i, j), id(i+1, j), id(i+2, j), id(i+2, j+1), id(i+1, j+1), id(i, j+1))
				i++
			default:
				add(id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
			}
		}
	}
	for i := 0; i < nx; i++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: id(i, 0), B: id(i+1, 0), Tag: 0}, mesh.TaggedEdge{A: id(i+1, ny), B: id(i, ny), Tag: 2})
	}
	for j := 0; j < ny; j++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: id(nx, j), B: id(nx, j+1), Tag: 1})
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// relErr is |a-b| / max(|a|, |b|), 0 when both are 0.
func relErr(a, b float64) float64 {
	d := math.Max(math.Abs(a), math.Abs(b))
	if d == 0 {
		return 0
	}
	return math.Abs(a-b) / d
}

// squareField is a test field: the squared cell index.
func squareField(n int) Field {
	v := make([]float64, n)
	for i := range v {
		v[i] = float64(i*i) + 0.25
	}
	return Field{Name: "index squared", Values: v}
}
