package main

import (
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/export/cgns"
	"cvdeck/export/vtk"
	"cvdeck/samples"
)

// tool finds a reference program; it skips the test when the program is
// missing, except under CI=true, where a missing tool is a failure.
func tool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("reference tool %s is missing (install it with scripts/setup.sh)", name)
		}
		t.Skipf("reference tool %s is missing", name)
	}
	return p
}

// pythonVTK returns /usr/bin/python3 when it can import the VTK library
// (Debian python3-vtk9).
func pythonVTK(t *testing.T) string {
	t.Helper()
	py := "/usr/bin/python3"
	if err := exec.Command(py, "-c", "import vtk").Run(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("the VTK library's Python bindings are missing: %v", err)
		}
		t.Skip("the VTK library's Python bindings are missing")
	}
	return py
}

// vtkSummary is what the VTK library reports of one file.
type vtkSummary struct {
	Points, Cells int
	Arrays        []string
	AreaSum       float64
	Blocks        int
}

// readWithVTK opens a file with the VTK library's own reader for its
// extension and reports its counts, cell arrays and the summed cell area
// of vtkCellSizeFilter.
const readWithVTK = `
import json, sys, vtk
path = sys.argv[1]
ext = path.rsplit('.', 1)[1]
readers = {'vtu': vtk.vtkXMLUnstructuredGridReader, 'vtp': vtk.vtkXMLPolyDataReader,
           'vts': vtk.vtkXMLStructuredGridReader, 'vtm': vtk.vtkXMLMultiBlockDataReader,
           'vtk': vtk.vtkUnstructuredGridReader}
r = readers[ext]()
r.SetFileName(path)
if ext == 'vtk':
    r.ReadAllScalarsOn(); r.ReadAllFieldsOn()
r.Update()
out = r.GetOutput()
res = {'Blocks': 0, 'AreaSum': 0.0}
if ext == 'vtm':
    res['Blocks'] = out.GetNumberOfBlocks()
    res['Points'] = sum(out.GetBlock(i).GetNumberOfPoints() for i in range(out.GetNumberOfBlocks()))
    res['Cells'] = sum(out.GetBlock(i).GetNumberOfCells() for i in range(out.GetNumberOfBlocks()))
    res['Arrays'] = []
else:
    res['Points'] = out.GetNumberOfPoints()
    res['Cells'] = out.GetNumberOfCells()
    cd = out.GetCellData()
    res['Arrays'] = [cd.GetArrayName(i) for i in range(cd.GetNumberOfArrays())]
    if ext in ('vtu', 'vtk', 'vts'):
        f = vtk.vtkCellSizeFilter(); f.SetInputData(out); f.ComputeAreaOn(); f.Update()
        a = f.GetOutput().GetCellData().GetArray('Area')
        res['AreaSum'] = sum(a.GetValue(i) for i in range(a.GetNumberOfTuples()))
print(json.dumps(res))
`

// TestSampleDecksPassReferenceTools writes every output format of every
// sample and opens each file with the standards' own tools: the CGNS
// checker (cgnscheck, Debian cgns-convert) must report no error and no
// warning, h5dump (Debian hdf5-tools) must read the file, the CGNS library
// must read back the node and cell counts, and the VTK library (Debian
// python3-vtk9) must read every VTK file with cvdeck's counts and arrays,
// its cell-size filter summing to cvdeck's area within 1e-12 relative.
func TestSampleDecksPassReferenceTools(t *testing.T) {
	check := tool(t, "cgnscheck")
	h5 := tool(t, "h5dump")
	py := pythonVTK(t)
	for _, s := range samples.List() {
		t.Run(s.Name, func(t *testing.T) {
			dir := t.TempDir()
			_, out, _ := cvdeck(t, "init", s.Name, dir)
			deckDir := filepath.Join(dir, "deck")
			formats := "cgns,vtu,vtk,vtk-binary,preview,png,manifest"
			if text, err := os.ReadFile(strings.TrimSpace(out)); err != nil {
				t.Fatal(err)
			} else if !strings.Contains(string(text), "\n  unstructured:") {
				formats += ",vts" // block files are for structured meshes only
			}
			code, _, errs := cvdeck(t, "mesh", strings.TrimSpace(out), "-o", deckDir, "--quiet", "--format", formats)
			if code != 0 {
				t.Fatalf("mesh: exit %d: %s", code, errs)
			}
			m, err := vtk.ReadFile(filepath.Join(deckDir, "mesh.vtu"))
			if err != nil {
				t.Fatal(err)
			}
			area := 0.0
			for _, a := range m.Geo.CellArea {
				area += a
			}

			cg := filepath.Join(deckDir, "mesh.cgns")
			text, err := exec.Command(check, "-w3", cg).CombinedOutput()
			if err != nil || !strings.Contains(string(text), "checking complete") ||
				strings.Contains(string(text), "WARNING") || strings.Contains(string(text), "ERROR") {
				t.Errorf("cgnscheck: %v\n%s", err, text)
			}
			if out, err := exec.Command(h5, "-H", cg).CombinedOutput(); err != nil || !strings.Contains(string(out), "GridCoordinates") {
				t.Errorf("h5dump -H: %v\n%.400s", err, out)
			}
			back, err := cgns.Read(cg)
			if err != nil {
				t.Fatal(err)
			}
			if len(back.Nodes) != len(m.Nodes) || back.NumCells() != m.NumCells() || back.NumFaces() != m.NumFaces() {
				t.Errorf("CGNS read back %d nodes, %d cells, %d faces; the VTU has %d, %d, %d",
					len(back.Nodes), back.NumCells(), back.NumFaces(), len(m.Nodes), m.NumCells(), m.NumFaces())
			}

			files := []string{"mesh.vtu", "mesh.vtk", "mesh-binary.vtk", "boundary.vtp"}
			if len(m.Blocks) > 0 {
				files = append(files, "blocks.vtm")
			}
			for _, f := range files {
				raw, err := exec.Command(py, "-c", readWithVTK, filepath.Join(deckDir, f)).CombinedOutput()
				if err != nil {
					t.Fatalf("VTK reading %s: %v\n%s", f, err, raw)
				}
				var got vtkSummary
				if err := json.Unmarshal(raw, &got); err != nil {
					t.Fatalf("%s: %v: %s", f, err, raw)
				}
				switch f {
				case "boundary.vtp":
					if got.Cells != m.NumBoundary() {
						t.Errorf("%s: VTK reads %d lines, the mesh has %d boundary faces", f, got.Cells, m.NumBoundary())
					}
				case "blocks.vtm":
					if got.Blocks != len(m.Blocks) || got.Cells != m.NumCells() {
						t.Errorf("%s: VTK reads %d blocks of %d cells, the mesh has %d blocks of %d", f, got.Blocks, got.Cells, len(m.Blocks), m.NumCells())
					}
				default:
					if got.Points != len(m.Nodes) || got.Cells != m.NumCells() {
						t.Errorf("%s: VTK reads %d points and %d cells, cvdeck wrote %d and %d", f, got.Points, got.Cells, len(m.Nodes), m.NumCells())
					}
					if math.Abs(got.AreaSum-area) > 1e-12*area {
						t.Errorf("%s: vtkCellSizeFilter sums to %.17g m², cvdeck to %.17g", f, got.AreaSum, area)
					}
					for _, want := range []string{"area", "non_orthogonality", "skewness", "status"} {
						if !contains(got.Arrays, want) {
							t.Errorf("%s: VTK finds cell arrays %v, not %q", f, got.Arrays, want)
						}
					}
				}
			}
		})
	}
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}
