package vtk

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"testing"

	"cvdeck/mesh"
)

// vtkWriteScript builds a vtkUnstructuredGrid from a JSON description
// (points, cells, boundary lines with tag names), with the lines placed
// before and after the 2D cells, and writes it with the VTK library's own
// writers in every encoding they offer, default settings first. It prints
// the files and, for each, the vtkCellSizeFilter area of every 2D cell of
// the grid the library reads back from that file (its legacy ASCII writer
// rounds coordinates, so each file is its own reference).
const vtkWriteScript = `
import sys, json, vtk
from vtk.util.numpy_support import vtk_to_numpy
d = json.load(open(sys.argv[1])); out = sys.argv[2]
def build(float_points, string_tags):
    pts = vtk.vtkPoints()
    pts.SetDataTypeToFloat() if float_points else pts.SetDataTypeToDouble()
    for x, y in d['points']: pts.InsertNextPoint(x, y, 0.0)
    g = vtk.vtkUnstructuredGrid(); g.SetPoints(pts)
    if string_tags:
        tag = vtk.vtkStringArray(); tag.SetName('boundary_tag')
    else:
        tag = vtk.vtkIntArray(); tag.SetName('tag')
        names = vtk.vtkStringArray(); names.SetName('tag_names')
        for n in d['tags']: names.InsertNextValue(n)
        g.GetFieldData().AddArray(names)
    def line(k):
        a, b, t = d['lines'][k]
        g.InsertNextCell(vtk.VTK_LINE, 2, [a, b])
        tag.InsertNextValue(d['tags'][t] if string_tags else t)
    half = len(d['lines']) // 2
    for k in range(half): line(k)
    for c in d['cells']:
        g.InsertNextCell({3: vtk.VTK_TRIANGLE, 4: vtk.VTK_QUAD}.get(len(c), vtk.VTK_POLYGON), len(c), c)
        tag.InsertNextValue('' if string_tags else -1)
    for k in range(half, len(d['lines'])): line(k)
    g.GetCellData().AddArray(tag)
    return g
files = []
def xml(name, g, setup):
    w = vtk.vtkXMLUnstructuredGridWriter(); w.SetInputData(g); w.SetFileName(out + '/' + name)
    setup(w)
    if not w.Write(): raise SystemExit('write failed: ' + name)
    files.append(name)
def legacy(name, g, binary, version):
    w = vtk.vtkUnstructuredGridWriter(); w.SetInputData(g); w.SetFileName(out + '/' + name)
    if binary: w.SetFileTypeToBinary()
    if version: w.SetFileVersion(version)
    if not w.Write(): raise SystemExit('write failed: ' + name)
    files.append(name)
g = build(False, True)
xml('default.vtu', g, lambda w: None)
xml('ascii.vtu', g, lambda w: w.SetDataModeToAscii())
xml('binary-zlib.vtu', g, lambda w: w.SetDataModeToBinary())
xml('binary-none.vtu', g, lambda w: (w.SetDataModeToBinary(), w.SetCompressorTypeToNone()))
xml('raw-zlib-u64.vtu', g, lambda w: (w.EncodeAppendedDataOff(), w.SetHeaderTypeToUInt64()))
xml('raw-none.vtu', g, lambda w: (w.EncodeAppendedDataOff(), w.SetCompressorTypeToNone()))
xml('base64-none-u64.vtu', g, lambda w: (w.SetCompressorTypeToNone(), w.SetHeaderTypeToUInt64()))
xml('zlib-small-blocks.vtu', g, lambda w: w.SetBlockSize(64))
gi = build(False, False)
xml('int-tags.vtu', gi, lambda w: None)
legacy('legacy-ascii.vtk', g, False, 0)
legacy('legacy-binary.vtk', g, True, 0)
legacy('legacy42-ascii.vtk', gi, False, 42)
legacy('legacy42-binary.vtk', gi, True, 42)
legacy('legacy-int-binary.vtk', gi, True, 0)
gf = build(True, True)
xml('float32-points.vtu', gf, lambda w: None)
def areas(name):
    r = vtk.vtkXMLUnstructuredGridReader() if name.endswith('.vtu') else vtk.vtkUnstructuredGridReader()
    r.SetFileName(out + '/' + name); r.Update()
    g = r.GetOutput()
    f = vtk.vtkCellSizeFilter(); f.SetInputData(g); f.ComputeAreaOn(); f.Update()
    a = vtk_to_numpy(f.GetOutput().GetCellData().GetArray('Area')).tolist()
    return [a[i] for i in range(g.GetNumberOfCells()) if g.GetCellType(i) != vtk.VTK_LINE]
print(json.dumps({'files': files, 'area': {n: areas(n) for n in files}}))
`

// meshJSON is the description vtkWriteScript builds its grid from.
func meshJSON(m *mesh.Mesh) []byte {
	var d struct {
		Points [][2]float64 `json:"points"`
		Cells  [][]int32    `json:"cells"`
		Lines  [][3]int     `json:"lines"`
		Tags   []string     `json:"tags"`
	}
	for _, p := range m.Nodes {
		d.Points = append(d.Points, [2]float64{p[0], p[1]})
	}
	for c := 0; c < m.NumCells(); c++ {
		d.Cells = append(d.Cells, m.Cell(c))
	}
	lo, _ := m.UntaggedRange()
	for f := m.NumInterior; f < lo; f++ {
		d.Lines = append(d.Lines, [3]int{int(m.FaceNodes[f][0]), int(m.FaceNodes[f][1]), int(m.FaceTag[f])})
	}
	d.Tags = m.Tags
	b, _ := json.Marshal(d)
	return b
}

// tagCounts is "name:count" for each tag of m, sorted, plus the untagged
// count.
func tagCounts(m *mesh.Mesh) string {
	var s []string
	for t, n := range m.Tags {
		s = append(s, n+":"+itoa(int(m.TagStart[t+1]-m.TagStart[t])))
	}
	sort.Strings(s)
	lo, hi := m.UntaggedRange()
	return strings.Join(s, " ") + " untagged:" + itoa(hi-lo)
}

func itoa(i int) string { b, _ := json.Marshal(i); return string(b) }

// TestReadFilesWrittenByVTK reads every encoding the VTK library writes and
// checks cells, boundary tags and, for each cell, our area against the
// library's vtkCellSizeFilter to 1e-12 relative.
func TestReadFilesWrittenByVTK(t *testing.T) {
	src := mixedMesh(t, 9, 7, 12.5)
	dir := t.TempDir()
	desc := filepath.Join(dir, "mesh.json")
	if err := os.WriteFile(desc, meshJSON(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var got struct {
		Files []string             `json:"files"`
		Area  map[string][]float64 `json:"area"`
	}
	runPython(t, vtkWriteScript, &got, desc, dir)
	if len(got.Files) != 15 {
		t.Fatalf("VTK wrote %d files", len(got.Files))
	}
	want := tagCounts(src)
	for _, name := range got.Files {
		m, err := ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if m.NumCells() != src.NumCells() || len(m.Nodes) != len(src.Nodes) || m.NumFaces() != src.NumFaces() {
			t.Errorf("%s: %d cells %d nodes %d faces, want %d, %d, %d", name, m.NumCells(), len(m.Nodes), m.NumFaces(), src.NumCells(), len(src.Nodes), src.NumFaces())
			continue
		}
		if g := tagCounts(m); g != want {
			t.Errorf("%s: tags %s, want %s", name, g, want)
		}
		ref := got.Area[name]
		lossless := !strings.HasPrefix(name, "float32") && !strings.Contains(name, "ascii.vtk")
		for c, a := range m.Geo.CellArea {
			if e := relErr(a, ref[c]); e > 1e-12 {
				t.Errorf("%s: cell %d area %.17g, vtkCellSizeFilter %.17g (rel %.2g)", name, c, a, ref[c], e)
				break
			}
			if lossless && a != src.Geo.CellArea[c] {
				t.Errorf("%s: cell %d area %v differs from the source mesh's %v", name, c, a, src.Geo.CellArea[c])
				break
			}
		}
	}
}

// TestReadOwnFiles reads back what WriteVTU and WriteLegacy write: the
// same cells and areas, the whole boundary untagged (those files carry no
// lines).
func TestReadOwnFiles(t *testing.T) {
	src := mixedMesh(t, 5, 4, -3)
	for _, tc := range []struct {
		name  string
		write func(*bytes.Buffer) error
	}{
		{"own.vtu", func(b *bytes.Buffer) error { return WriteVTU(b, src, nil) }},
		{"own-ascii.vtk", func(b *bytes.Buffer) error { return WriteLegacy(b, src, nil, false) }},
		{"own-binary.vtk", func(b *bytes.Buffer) error { return WriteLegacy(b, src, nil, true) }},
	} {
		m, err := ReadFile(writeTemp(t, tc.name, tc.write))
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if lo, hi := m.UntaggedRange(); len(m.Tags) != 0 || lo != m.NumInterior || hi-lo != src.NumBoundary() {
			t.Fatalf("%s: tags %v, untagged %d..%d", tc.name, m.Tags, lo, hi)
		}
		for c, a := range m.Geo.CellArea {
			if a != src.Geo.CellArea[c] {
				t.Fatalf("%s: cell %d area %v, want %v", tc.name, c, a, src.Geo.CellArea[c])
			}
		}
	}
}

func TestReadErrors(t *testing.T) {
	const head = `<?xml version="1.0"?><VTKFile type="UnstructuredGrid" version="0.1" byte_order="LittleEndian">`
	piece := func(conn, offs, types string, extra string) string {
		return head + `<UnstructuredGrid><Piece NumberOfPoints="4" NumberOfCells="2"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0 1 0 0 1 1 0 0 1 0</DataArray></Points>` +
			`<Cells><DataArray type="Int32" Name="connectivity" format="ascii">` + conn + `</DataArray><DataArray type="Int32" Name="offsets" format="ascii">` + offs +
			`</DataArray><DataArray type="UInt8" Name="types" format="ascii">` + types + `</DataArray></Cells>` + extra + `</Piece></UnstructuredGrid></VTKFile>`
	}
	for _, tc := range []struct{ file, want string }{
		{piece("0 1 2 0 1 2 3", "3 7", "5 10", ""), "cell 1 has VTK type 10 (tetra)"},
		{piece("0 1 2 0 1 2 9", "3 7", "5 9", ""), "cell 1 refers to point 9"},
		{piece("0 1 2 0 1", "3 5", "5 9", ""), "cell 1 is a quad with 2 points"},
		{piece("0 1 2 0 1", "3 5", "5 3", `<CellData><DataArray type="Float32" Name="tag" format="ascii">0 1</DataArray></CellData>`), `tag array "tag" holds floating-point values`},
		{piece("0 1 2 0 3", "3 5", "5 3", `<CellData><DataArray type="Int32" Name="tag" format="ascii">-1 0</DataArray></CellData>`), "is not an edge of any cell"},
		{piece("0 1 2 0 2 3 0 2", "3 6 8", "5 5 3", `<CellData><DataArray type="Int32" Name="tag" format="ascii">-1 -1 0</DataArray></CellData>`), "Cells/types has 3 values for NumberOfCells=2"},
		{strings.Replace(piece("0 1 2 0 1 2 3", "3 7", "5 9", ""), "1 1 0 0 1 0", "1 1 0 0 1 0.5", 1), "the points' z runs from 0 (point 0) to 0.5 (point 3)"},
		{strings.Replace(head, "VTKFile type", `VTKFile compressor="vtkLZ4DataCompressor" type`, 1) + "</VTKFile>", `compressor "vtkLZ4DataCompressor" is not supported`},
		{strings.Replace(piece("0 1 2 0 1 2 3", "3 7", "5 9", ""), `format="ascii">0 1 2 0`, `format="binary">AAAA`, 1), "Cells/connectivity"},
	} {
		_, err := ReadVTU([]byte(tc.file), "bad.vtu")
		if err == nil || !strings.Contains(err.Error(), tc.want) || !strings.HasPrefix(err.Error(), "bad.vtu") {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
	for _, tc := range []struct{ file, want string }{
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET STRUCTURED_POINTS\n", "cvdeck reads UNSTRUCTURED_GRID and POLYDATA"},
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET POLYDATA\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\nTRIANGLE_STRIPS 1 4\n3 0 1 2\n", "split the strips into triangles"},
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET POLYDATA\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\nCELLS 1 4\n3 0 1 2\n", "CELLS in a POLYDATA file"},
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\nPOLYGONS 1 4\n3 0 1 2\n", "POLYGONS in an UNSTRUCTURED_GRID file"},
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET POLYDATA\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\nPOLYGONS 1 4\n3 0 1 2\nPOLYGONS 1 4\n3 0 1 2\n", "a second POLYGONS section"},
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET POLYDATA\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\nPOLYGONS 1 4\n3 0 1 2\nCELL_DATA 2\n", "CELL_DATA 2 for 1 cells"},
		{"# vtk DataFile Version 5.1\nt\nASCII\nDATASET POLYDATA\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\nLINES 2 2\nOFFSETS vtktypeint64\n0 3\nCONNECTIVITY vtktypeint64\n0 1\nPOLYGONS 2 3\nOFFSETS vtktypeint64\n0 3\nCONNECTIVITY vtktypeint64\n0 1 2\n", "LINES cell 0: offset 3 is out of order or past the section's 2 connectivity entries"},
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 3 double\n0 0 0 1 0 0 1 x 0\n", "bad.vtk:6: POINTS: value 7 of 9: \"x\""},
		{"# vtk DataFile Version 4.2\nt\nBINARY\nDATASET UNSTRUCTURED_GRID\nPOINTS 3 double\n\x00\x00", "need 72 bytes"},
		{"# vtk DataFile Version 4.2\nt\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 3 double\n0 0 0 1 0 0 1 1 0\nCELLS 1 5\n4 0 1 2\n", "CELLS: the file ends after 4 of 5 values"},
		{"hello\n", "not a legacy VTK header"},
	} {
		_, err := ReadLegacy([]byte(tc.file), "bad.vtk")
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
	if _, err := ReadFile("mesh.stl"); err == nil {
		t.Error("reading a missing .stl gave no error")
	}
}

// TestReadLinesWithoutTags: line cells but no tag array leave the whole
// boundary untagged; a pixel (VTK type 8, points in (i, j) order) becomes a
// counter-clockwise quad of area 1.
func TestReadLinesWithoutTags(t *testing.T) {
	file := `<VTKFile type="UnstructuredGrid"><UnstructuredGrid><Piece NumberOfPoints="4" NumberOfCells="2"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0 1 0 0 0 1 0 1 1 0</DataArray></Points>` +
		`<Cells><DataArray type="Int32" Name="connectivity" format="ascii">0 1 2 3 0 1</DataArray><DataArray type="Int32" Name="offsets" format="ascii">4 6</DataArray><DataArray type="UInt8" Name="types" format="ascii">8 3</DataArray></Cells></Piece></UnstructuredGrid></VTKFile>`
	m, err := ReadVTU([]byte(file), "pixel.vtu")
	if err != nil {
		t.Fatal(err)
	}
	if m.NumCells() != 1 || m.Geo.CellArea[0] != 1 {
		t.Fatalf("%d cells, area %v; want one cell of area 1", m.NumCells(), m.Geo.CellArea)
	}
	if lo, hi := m.UntaggedRange(); len(m.Tags) != 0 || hi-lo != 4 {
		t.Fatalf("tags %v, %d untagged faces; want none and 4", m.Tags, hi-lo)
	}
}

// A plane mesh off z = 0 reads as 2D with a note giving its z; one on
// z = 0 reads without notes.
func TestReadPlaneNotes(t *testing.T) {
	dir := t.TempDir()
	for z, want := range map[string][]string{"0": nil, "-3.5": {"a plane mesh on z = -3.5, read as 2D (z dropped)"}} {
		path := filepath.Join(dir, "plane"+z+".vtk")
		file := "# vtk DataFile Version 4.2\nt\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 3 double\n0 0 Z 1 0 Z 0 1 Z\nCELLS 1 4\n3 0 1 2\nCELL_TYPES 1\n5\n"
		if err := os.WriteFile(path, []byte(strings.ReplaceAll(file, "Z", z)), 0o644); err != nil {
			t.Fatal(err)
		}
		m, notes, err := ReadFileNotes(path)
		if err != nil {
			t.Fatal(err)
		}
		if m.NumCells() != 1 || !slices.Equal(notes, want) {
			t.Errorf("z = %s: %d cells, notes %q; want 1 and %q", z, m.NumCells(), notes, want)
		}
	}
}
