package vtk

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"cvdeck/mesh"
)

// readBackScript reads a VTK file with the VTK library's own reader for its
// extension and prints counts, cell types, every cell-data and point-data
// array, the
// field-data strings and the cell sizes of vtkCellSizeFilter.
const readBackScript = `
import sys, json, vtk
from vtk.util.numpy_support import vtk_to_numpy
path = sys.argv[1]
if path.endswith('.vtu'):
    r = vtk.vtkXMLUnstructuredGridReader()
elif path.endswith('.vtp'):
    r = vtk.vtkXMLPolyDataReader()
elif path.endswith('.vts'):
    r = vtk.vtkXMLStructuredGridReader()
else:
    r = vtk.vtkUnstructuredGridReader()
r.SetFileName(path)
r.Update()
d = r.GetOutput()
out = {'points': d.GetNumberOfPoints(), 'cells': d.GetNumberOfCells()}
out['types'] = [d.GetCellType(i) for i in range(d.GetNumberOfCells())]
out['xyz'] = vtk_to_numpy(d.GetPoints().GetData()).reshape(-1).tolist() if d.GetNumberOfPoints() else []
cd = d.GetCellData()
out['arrays'] = {}
for i in range(cd.GetNumberOfArrays()):
    a = cd.GetAbstractArray(i)
    if isinstance(a, vtk.vtkStringArray):
        out['arrays'][a.GetName()] = [a.GetValue(k) for k in range(a.GetNumberOfValues())]
    else:
        out['arrays'][a.GetName()] = vtk_to_numpy(a).tolist()
pd = d.GetPointData()
out['pointarrays'] = {pd.GetArrayName(i): vtk_to_numpy(pd.GetArray(i)).tolist() for i in range(pd.GetNumberOfArrays())}
fd = d.GetFieldData()
out['fieldstrings'] = {}
for i in range(fd.GetNumberOfArrays()):
    a = fd.GetAbstractArray(i)
    if isinstance(a, vtk.vtkStringArray):
        out['fieldstrings'][a.GetName()] = [a.GetValue(k) for k in range(a.GetNumberOfValues())]
out['conn'] = []
for i in range(d.GetNumberOfCells()):
    ids = d.GetCell(i).GetPointIds()
    out['conn'].append([ids.GetId(k) for k in range(ids.GetNumberOfIds())])
if d.GetNumberOfCells():
    f = vtk.vtkCellSizeFilter()
    f.SetInputData(d)
    f.ComputeAreaOn(); f.ComputeLengthOn(); f.ComputeVolumeOff(); f.ComputeVertexCountOff(); f.ComputeSumOff()
    f.Update()
    o = f.GetOutput()
    out['size_area'] = vtk_to_numpy(o.GetCellData().GetArray('Area')).tolist()
    out['size_length'] = vtk_to_numpy(o.GetCellData().GetArray('Length')).tolist()
print(json.dumps(out))
`

// readBack is what readBackScript prints.
type readBack struct {
	Points       int                  `json:"points"`
	Cells        int                  `json:"cells"`
	Types        []int                `json:"types"`
	XYZ          []float64            `json:"xyz"`
	Arrays       map[string]any       `json:"arrays"`
	PointArrays  map[string][]float64 `json:"pointarrays"`
	FieldStrings map[string][]string  `json:"fieldstrings"`
	Conn         [][]int              `json:"conn"`
	SizeArea     []float64            `json:"size_area"`
	SizeLength   []float64            `json:"size_length"`
}

// floats returns the cell array name as float64s, failing if absent.
func (r *readBack) floats(t *testing.T, name string) []float64 {
	t.Helper()
	raw, ok := r.Arrays[name].([]any)
	if !ok {
		t.Fatalf("VTK reader found no cell array %q (arrays: %v)", name, keys(r.Arrays))
	}
	v := make([]float64, len(raw))
	for i, x := range raw {
		f, ok := x.(float64)
		if !ok {
			t.Fatalf("array %q value %d is %T", name, i, x)
		}
		v[i] = f
	}
	return v
}

func keys(m map[string]any) []string {
	var k []string
	for n := range m {
		k = append(k, n)
	}
	return k
}

func writeTemp(t *testing.T, name string, write func(*bytes.Buffer) error) string {
	t.Helper()
	var b bytes.Buffer
	if err := write(&b); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// checkUnstructured compares what the VTK library read from a mesh file
// against the mesh: counts, point coordinates, connectivity, cell types
// (VTK file-format document: 5 triangle, 9 quad, 7 polygon), the arrays,
// and the cell areas of vtkCellSizeFilter against ours to 1e-12 relative.
func checkUnstructured(t *testing.T, got readBack, m *mesh.Mesh, fields []Field) {
	t.Helper()
	if got.Points != len(m.Nodes) || got.Cells != m.NumCells() {
		t.Fatalf("VTK read %d points %d cells, want %d and %d", got.Points, got.Cells, len(m.Nodes), m.NumCells())
	}
	for i, p := range m.Nodes {
		if got.XYZ[3*i] != p[0] || got.XYZ[3*i+1] != p[1] || got.XYZ[3*i+2] != 0 {
			t.Fatalf("point %d read as %v, want %v", i, got.XYZ[3*i:3*i+3], p)
		}
	}
	for c := 0; c < m.NumCells(); c++ {
		nodes := m.Cell(c)
		want := map[int]int{3: 5, 4: 9}[len(nodes)]
		if want == 0 {
			want = 7
		}
		if got.Types[c] != want {
			t.Fatalf("cell %d (%d nodes) has VTK type %d, want %d", c, len(nodes), got.Types[c], want)
		}
		for k, v := range nodes {
			if got.Conn[c][k] != int(v) {
				t.Fatalf("cell %d nodes %v, want %v", c, got.Conn[c], nodes)
			}
		}
	}
	area := got.floats(t, AreaName)
	for c, a := range m.Geo.CellArea {
		if area[c] != a {
			t.Fatalf("area array cell %d = %v, want %v", c, area[c], a)
		}
		if e := relErr(got.SizeArea[c], a); e > 1e-12 {
			t.Fatalf("cell %d: vtkCellSizeFilter area %.17g, ours %.17g (rel %.3g > 1e-12)", c, got.SizeArea[c], a, e)
		}
	}
	for _, f := range fields {
		v := got.floats(t, f.Name)
		for c := range f.Values {
			if v[c] != f.Values[c] {
				t.Fatalf("field %q cell %d = %v, want %v", f.Name, c, v[c], f.Values[c])
			}
		}
	}
	if len(got.Arrays) != 1+len(fields) {
		t.Fatalf("VTK found arrays %v, want area and %d fields", keys(got.Arrays), len(fields))
	}
}

func TestVTUReadByVTK(t *testing.T) {
	m := mixedMesh(t, 7, 6, 250)
	fields := []Field{squareField(m.NumCells()), {Name: "zero", Values: make([]float64, m.NumCells())}}
	p := writeTemp(t, "mesh.vtu", func(b *bytes.Buffer) error { return WriteVTU(b, m, fields) })
	var got readBack
	runPython(t, readBackScript, &got, p)
	checkUnstructured(t, got, m, fields)
}

// A point field is written as point data, which the VTK library's reader
// gives back node for node, beside the cell data; the legacy writer, which
// takes cell data only, refuses it.
func TestVTUPointData(t *testing.T) {
	m := mixedMesh(t, 5, 4, 10)
	x := make([]float64, len(m.Nodes))
	for i, p := range m.Nodes {
		x[i] = p[0] + 0.5*p[1]
	}
	fields := []Field{squareField(m.NumCells()), {Name: "node_x", Values: x, Point: true}}
	p := writeTemp(t, "mesh.vtu", func(b *bytes.Buffer) error { return WriteVTU(b, m, fields) })
	var got readBack
	runPython(t, readBackScript, &got, p)
	checkUnstructured(t, got, m, fields[:1])
	if v := got.PointArrays["node_x"]; len(v) != len(x) {
		t.Fatalf("VTK read point arrays %v, want node_x with %d values", got.PointArrays, len(x))
	} else {
		for i := range x {
			if v[i] != x[i] {
				t.Fatalf("node %d: VTK read %g, wrote %g", i, v[i], x[i])
			}
		}
	}
	if err := WriteLegacy(&bytes.Buffer{}, m, fields, false); err == nil || !bytes.Contains([]byte(err.Error()), []byte("only the VTU writer")) {
		t.Errorf("legacy writer with a point field: %v", err)
	}
	short := []Field{{Name: "node_x", Values: x[1:], Point: true}}
	if err := WriteVTU(&bytes.Buffer{}, m, short); err == nil || !bytes.Contains([]byte(err.Error()), []byte("nodes")) {
		t.Errorf("short point field: %v", err)
	}
}

func TestVTUFieldErrors(t *testing.T) {
	m := mixedMesh(t, 3, 3, 0)
	nc := m.NumCells()
	for _, tc := range []struct {
		f    []Field
		want string
	}{
		{[]Field{{Name: "q", Values: make([]float64, nc-1)}}, `field "q" has`},
		{[]Field{{Name: "area", Values: make([]float64, nc)}}, "used twice"},
		{[]Field{{Name: "", Values: make([]float64, nc)}}, "no name"},
		{[]Field{{Name: `a"b`, Values: make([]float64, nc)}}, "quote"},
	} {
		err := WriteVTU(&bytes.Buffer{}, m, tc.f)
		if err == nil || !bytes.Contains([]byte(err.Error()), []byte(tc.want)) {
			t.Errorf("fields %v: error %v, want %q", tc.f[0].Name, err, tc.want)
		}
	}
}

func TestVTUDeterministic(t *testing.T) {
	m := mixedMesh(t, 9, 5, 0)
	var a, b bytes.Buffer
	if err := WriteVTU(&a, m, nil); err != nil {
		t.Fatal(err)
	}
	if err := WriteVTU(&b, m, nil); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("two writes of one mesh differ")
	}
}
