package vtk

import (
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// vtkTriangulationScript triangulates, with the VTK library's
// vtkDelaunay2D, a 13 × 9 point grid of our own over [0, 3] × [0, 2] whose
// interior points are jittered, and stores it as a 2D mesh of the kind the
// library hands on: a PolyData with the triangles as polys, the boundary
// edges as lines tagged inlet (x = 0), outlet (x = 3) or walls, one vertex
// cell marking a probe point, and a String cell array boundary_tag in the
// library's cell order (verts, lines, polys). It writes the PolyData with
// vtkXMLPolyDataWriter in its default (appended, zlib-compressed) and
// ASCII forms and with vtkPolyDataWriter as legacy ASCII and binary, and
// prints, for each, the triangle areas vtkCellSizeFilter gives the file as
// read back, and the line count per tag.
const vtkTriangulationScript = `
import sys, json, math, vtk
from vtk.util.numpy_support import vtk_to_numpy
out = sys.argv[1]
nx, ny = 12, 8
pts = vtk.vtkPoints(); pts.SetDataTypeToDouble()
for j in range(ny + 1):
    for i in range(nx + 1):
        dx = dy = 0.0
        if 0 < i < nx and 0 < j < ny:
            dx, dy = 0.07 * math.sin(3 * i + 5 * j), 0.07 * math.cos(7 * i + 2 * j)
        pts.InsertNextPoint(3.0 * i / nx + dx, 2.0 * j / ny + dy, 0.0)
src = vtk.vtkPolyData(); src.SetPoints(pts)
d = vtk.vtkDelaunay2D(); d.SetInputData(src); d.Update()
tri = d.GetOutput()
count = {}
polys = []
for c in range(tri.GetNumberOfCells()):
    ids = tri.GetCell(c).GetPointIds()
    p = [ids.GetId(k) for k in range(ids.GetNumberOfIds())]
    polys.append(p)
    for k in range(3):
        e = tuple(sorted((p[k], p[(k + 1) % 3])))
        count[e] = count.get(e, 0) + 1
mesh = vtk.vtkPolyData(); mesh.SetPoints(tri.GetPoints())
tag = vtk.vtkStringArray(); tag.SetName('boundary_tag')
verts = vtk.vtkCellArray(); verts.InsertNextCell(1); verts.InsertCellPoint(nx // 2)
tag.InsertNextValue('')
lines = vtk.vtkCellArray(); sides = {}
for e, n in sorted(count.items()):
    if n != 1: continue
    (x0, y0, _), (x1, y1, _) = mesh.GetPoint(e[0]), mesh.GetPoint(e[1])
    name = 'inlet' if x0 == x1 == 0 else 'outlet' if x0 == x1 == 3 else 'walls'
    lines.InsertNextCell(2); lines.InsertCellPoint(e[0]); lines.InsertCellPoint(e[1])
    tag.InsertNextValue(name); sides[name] = sides.get(name, 0) + 1
cells = vtk.vtkCellArray()
for p in polys:
    cells.InsertNextCell(3)
    for v in p: cells.InsertCellPoint(v)
    tag.InsertNextValue('')
mesh.SetVerts(verts); mesh.SetLines(lines); mesh.SetPolys(cells)
mesh.GetCellData().AddArray(tag)
res = {}
for name, ascii in (('tri.vtp', False), ('tri-ascii.vtp', True), ('tri.vtk', True), ('tri-binary.vtk', False)):
    xml = name.endswith('.vtp')
    w = vtk.vtkXMLPolyDataWriter() if xml else vtk.vtkPolyDataWriter()
    w.SetInputData(mesh); w.SetFileName(out + '/' + name)
    if xml and ascii: w.SetDataModeToAscii()
    if not xml and not ascii: w.SetFileTypeToBinary()
    if not w.Write(): raise SystemExit('write failed: ' + name)
    r = vtk.vtkXMLPolyDataReader() if xml else vtk.vtkPolyDataReader()
    r.SetFileName(out + '/' + name); r.Update()
    f = vtk.vtkCellSizeFilter(); f.SetInputData(r.GetOutput()); f.ComputeAreaOn(); f.Update()
    area = vtk_to_numpy(f.GetOutput().GetCellData().GetArray('Area')).tolist()
    g = r.GetOutput()
    res[name] = [a for c, a in enumerate(area) if g.GetCellType(c) == vtk.VTK_TRIANGLE]
print(json.dumps({'files': res, 'sides': sides, 'nodes': mesh.GetNumberOfPoints()}))
`

// TestReadVTPWrittenByVTK: a triangulation the VTK library made and wrote
// as PolyData, XML or legacy, reads as a mesh of its triangles, each with the area
// vtkCellSizeFilter gives it (to 1e-12 relative), counter-clockwise, the
// boundary lines tagged as written and the vertex cell skipped with a
// note.
func TestReadVTPWrittenByVTK(t *testing.T) {
	dir := t.TempDir()
	var got struct {
		Files map[string][]float64 `json:"files"`
		Sides map[string]int       `json:"sides"`
		Nodes int                  `json:"nodes"`
	}
	runPython(t, vtkTriangulationScript, &got, dir)
	if len(got.Files) != 4 {
		t.Fatalf("the script wrote %d files", len(got.Files))
	}
	for name, ref := range got.Files {
		m, notes, err := ReadFileNotes(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		// VTK numbers a polygon mesh's vertices and lines before its
		// polygons (vtkPolyData's cell order).
		if !slices.Equal(notes, []string{"the file lists 41 line and vertex cells before its 192 area cells: cell k of this report is the file's cell k + 41", "1 vertex cell skipped"}) {
			t.Errorf("%s: notes %q", name, notes)
		}
		if m.NumCells() != len(ref) || len(m.Nodes) != got.Nodes {
			t.Errorf("%s: %d cells, %d nodes; want %d, %d", name, m.NumCells(), len(m.Nodes), len(ref), got.Nodes)
			continue
		}
		for c, a := range m.Geo.CellArea {
			if !(a > 0) || math.Abs(a-ref[c]) > 1e-12*ref[c] {
				t.Errorf("%s: cell %d area %.17g, vtkCellSizeFilter %.17g", name, c, a, ref[c])
			}
		}
		if lo, hi := m.UntaggedRange(); hi > lo {
			t.Errorf("%s: %d boundary faces untagged", name, hi-lo)
		}
		for tag, n := range got.Sides {
			if lo, hi, _ := m.TagRange(tag); hi-lo != n {
				t.Errorf("%s: tag %s has %d faces, want %d", name, tag, hi-lo, n)
			}
		}
	}
}

// TestReadVTPErrors: PolyData that is not a 2D polygon mesh is refused
// with the part at fault named.
func TestReadVTPErrors(t *testing.T) {
	piece := func(attrs, body string) []byte {
		return []byte(`<VTKFile type="PolyData"><PolyData><Piece NumberOfPoints="3" ` + attrs + `><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0 1 0 0 0 1 0</DataArray></Points>` + body + `</Piece></PolyData></VTKFile>`)
	}
	cells := func(elem, conn, offsets string) string {
		return `<` + elem + `><DataArray type="Int32" Name="connectivity" format="ascii">` + conn + `</DataArray><DataArray type="Int32" Name="offsets" format="ascii">` + offsets + `</DataArray></` + elem + `>`
	}
	for _, c := range []struct {
		name string
		file []byte
		want string
	}{
		{"strips", piece(`NumberOfStrips="1"`, cells("Strips", "0 1 2", "3")), "split the strips into triangles"},
		{"lines only", piece(`NumberOfLines="1"`, cells("Lines", "0 1", "2")), "no triangle, quad, pixel or polygon cells"},
		{"missing polys", piece(`NumberOfPolys="1"`, ""), "the Piece has no Polys element"},
		{"short offsets", piece(`NumberOfPolys="2"`, cells("Polys", "0 1 2", "3")), "Polys/offsets has 1 values for NumberOfPolys=2"},
		{"two-point polygon", piece(`NumberOfPolys="1"`, cells("Polys", "0 1", "2")), "cell 0 is a polygon with 2 points"},
		{"point out of range", piece(`NumberOfPolys="1"`, cells("Polys", "0 1 5", "3")), "cell 0 refers to point 5"},
		{"grid", []byte(`<VTKFile type="UnstructuredGrid"></VTKFile>`), `VTKFile type is "UnstructuredGrid"`},
	} {
		_, err := ReadVTP(c.file, c.name+".vtp")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want an error saying %q", c.name, err, c.want)
		}
	}
}

// A legacy POLYDATA file in the count-prefixed layout, its sections out of
// the usual order: the cells still number verts, lines, polys, as the VTK
// library numbers a PolyData's cells whatever the file order, so the tag
// array's second value (0) tags the line.
func TestReadLegacyPolyDataOrder(t *testing.T) {
	file := "# vtk DataFile Version 4.2\nt\nASCII\nDATASET POLYDATA\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\n" +
		"POLYGONS 1 4\n3 0 1 2\nLINES 1 3\n2 0 1\nVERTICES 1 2\n1 2\n" +
		"CELL_DATA 3\nSCALARS tag int 1\nLOOKUP_TABLE default\n-1 0 -1\n"
	path := filepath.Join(t.TempDir(), "order.vtk")
	if err := os.WriteFile(path, []byte(file), 0o644); err != nil {
		t.Fatal(err)
	}
	m, notes, err := ReadFileNotes(path)
	if err != nil {
		t.Fatal(err)
	}
	if lo, hi, ok := m.TagRange("0"); !ok || hi-lo != 1 || m.NumCells() != 1 || !slices.Equal(notes, []string{"the file lists 2 line and vertex cells before its 1 area cells: cell k of this report is the file's cell k + 2", "1 vertex cell skipped"}) {
		t.Errorf("tags %v, %d cells, notes %q; want the line tagged 0, 1 cell, the vertex skipped, the polygon numbered after both", m.Tags, m.NumCells(), notes)
	}
	if f := m.NumInterior; m.FaceNodes[f] != [2]int32{0, 1} {
		t.Errorf("tagged face joins %v, want 0-1", m.FaceNodes[f])
	}
}
