package vtk

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// vtkStructuredScript has the VTK library build 2D structured grids of our
// own (jittered, curved quads, every one convex so that vtkCellSizeFilter's
// triangle-split area is the quad's area) and write each with
// vtkXMLStructuredGridWriter in ascii, binary, appended base64 (the
// library's defaults, zlib) and appended raw uncompressed modes: a plane
// grid in (i, j); one in (i, k) on z = 3; one whose (i, j) run clockwise;
// one with Float32 points; slabs one cell thick along k (k up, and k
// down) and along i. For each file it prints, from the grid the library's
// reader reads back, the cell count, the first cell's VTK type and
// vtkCellSizeFilter's area of every cell (its volume over the thickness
// for a slab), in VTK's cell order.
const vtkStructuredScript = `import sys, json, math, vtk
from vtk.util.numpy_support import vtk_to_numpy
out = sys.argv[1]
def grid(dims, at, float_points=False):
    pts = vtk.vtkPoints()
    pts.SetDataTypeToFloat() if float_points else pts.SetDataTypeToDouble()
    for k in range(dims[2]):
        for j in range(dims[1]):
            for i in range(dims[0]):
                pts.InsertNextPoint(*at(i, j, k))
    g = vtk.vtkStructuredGrid(); g.SetDimensions(*dims); g.SetPoints(pts)
    return g
def jit(a, b, na, nb):
    if a in (0, na - 1) or b in (0, nb - 1): return 0.0, 0.0
    return 0.2 * math.sin(3 * a + 7 * b), 0.2 * math.cos(5 * a + 2 * b)
def plane(a, b, na, nb):
    dx, dy = jit(a, b, na, nb)
    return 10 + a * (1 + 0.1 * b) + dx, -5 + b + 0.05 * a * a + dy
grids = {
  'ij': (grid((6, 5, 1), lambda i, j, k: (*plane(i, j, 6, 5), 0.0)), None),
  'ik-z3': (grid((6, 1, 4), lambda i, j, k: (*plane(i, k, 6, 4), 3.0)), None),
  'left-handed': (grid((5, 4, 1), lambda i, j, k: (-plane(i, j, 5, 4)[0], plane(i, j, 5, 4)[1], 0.0)), None),
  'float32': (grid((6, 5, 1), lambda i, j, k: (*plane(i, j, 6, 5), 0.0), True), None),
  'slab-k': (grid((6, 5, 2), lambda i, j, k: (*plane(i, j, 6, 5), 1.0 + 0.5 * k)), 0.5),
  'slab-k-down': (grid((6, 5, 2), lambda i, j, k: (*plane(i, j, 6, 5), 1.0 - 0.5 * k)), 0.5),
  'slab-i': (grid((2, 5, 4), lambda i, j, k: (*plane(j, k, 5, 4), 0.25 * i)), 0.25),
}
res = {}
modes = {'ascii': lambda w: w.SetDataModeToAscii(), 'binary': lambda w: w.SetDataModeToBinary(),
         'appended': lambda w: w.SetDataModeToAppended(),
         'appended-raw': lambda w: (w.SetDataModeToAppended(), w.EncodeAppendedDataOff(), w.SetCompressorTypeToNone())}
for gname, (g, dz) in grids.items():
    for mname, setup in modes.items():
        name = gname + '-' + mname + '.vts'
        w = vtk.vtkXMLStructuredGridWriter(); w.SetInputData(g); w.SetFileName(out + '/' + name); setup(w)
        if not w.Write(): raise SystemExit('write failed: ' + name)
        r = vtk.vtkXMLStructuredGridReader(); r.SetFileName(out + '/' + name); r.Update()
        f = vtk.vtkCellSizeFilter(); f.SetInputData(r.GetOutput())
        f.ComputeAreaOn(); f.ComputeVolumeOn(); f.Update()
        key = 'Volume' if dz else 'Area'
        a = vtk_to_numpy(f.GetOutput().GetCellData().GetArray(key)).tolist()
        if dz: a = [v / dz for v in a]
        res[name] = {'area': a, 'cells': r.GetOutput().GetNumberOfCells(), 'type': r.GetOutput().GetCellType(0)}
print(json.dumps(res))
`

// TestReadVTSWrittenByVTK: structured grids written by the VTK library
// read as meshes of the same cells, in the same order, with the areas the
// VTK library gives (vtkCellSizeFilter, to 1e-12 relative), every cell
// counter-clockwise and the whole boundary untagged (a StructuredGrid
// names no tags), with notes for a plane off z = 0, a slab and a grid
// turning clockwise.
func TestReadVTSWrittenByVTK(t *testing.T) {
	dir := t.TempDir()
	var got map[string]struct {
		Area  []float64 `json:"area"`
		Cells int       `json:"cells"`
		Type  int       `json:"type"`
	}
	runPython(t, vtkStructuredScript, &got, dir)
	if len(got) != 28 {
		t.Fatalf("the VTK library wrote %d files, want 7 grids × 4 modes", len(got))
	}
	notes := map[string]string{
		"ik-z3":       "a plane mesh on z = 3, read as 2D (z dropped)",
		"left-handed": "its cells run clockwise seen from +z in the grid's index order; their node order is reversed",
		"slab-k":      "a slab one cell thick between z = 1 and z = 1.5, read as its lower plane",
		"slab-k-down": "a slab one cell thick between z = 0.5 and z = 1, read as its lower plane",
		"slab-i":      "a slab one cell thick between z = 0 and z = 0.25, read as its lower plane",
	}
	for name, ref := range got {
		m, n, err := ReadFileNotes(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		grid := strings.TrimSuffix(name, ".vts")
		for _, mode := range []string{"-ascii", "-binary", "-appended-raw", "-appended"} {
			grid = strings.TrimSuffix(grid, mode)
		}
		if want := notes[grid]; want == "" && len(n) != 0 || want != "" && (len(n) != 1 || n[0] != want) {
			t.Errorf("%s: notes %q, want %q", name, n, want)
		}
		// VTK library as reference: vtkXMLStructuredGridReader's cell count
		// and type (quads; hexahedra for a slab), and vtkCellSizeFilter's
		// areas. The slab whose k runs down is left-handed in (i, j, k), so
		// its volumes are negative; read as its lower plane it is
		// counter-clockwise all the same (see joinBlocks).
		slab := strings.HasPrefix(grid, "slab")
		if want := map[bool]int{false: cellQuad, true: cellHex}[slab]; ref.Type != want {
			t.Errorf("%s: the VTK library reads cells of type %d, want %d", name, ref.Type, want)
		}
		if grid == "slab-k-down" {
			for c, a := range ref.Area {
				if !(a < 0) {
					t.Fatalf("%s: cell %d: vtkCellSizeFilter volume %g, want < 0 (left-handed)", name, c, a)
				}
				ref.Area[c] = -a
			}
		}
		if m.NumCells() != ref.Cells || len(ref.Area) != ref.Cells {
			t.Errorf("%s: %d cells, the VTK library reads %d", name, m.NumCells(), ref.Cells)
			continue
		}
		for c, a := range m.Geo.CellArea {
			if !(a > 0) || relErr(a, ref.Area[c]) > 1e-12 {
				t.Errorf("%s: cell %d area %.17g, vtkCellSizeFilter %.17g", name, c, a, ref.Area[c])
			}
		}
		if lo, hi := m.UntaggedRange(); len(m.Tags) != 0 || hi-lo != m.NumBoundary() {
			t.Errorf("%s: tags %v, %d of %d boundary faces untagged; want none tagged", name, m.Tags, hi-lo, m.NumBoundary())
		}
	}
}

// vtkMultiblockScript has the VTK library write, with
// vtkXMLMultiBlockDataWriter, a vtkMultiBlockDataSet of three structured
// grids of our own that meet on conforming interfaces (the third running
// backwards in i, so clockwise), then read it back, append the blocks
// with vtkAppendFilter merging coincident points, and print the merged
// grid's point and cell counts and vtkCellSizeFilter's area per cell.
const vtkMultiblockScript = `import sys, json, math, os, vtk
from vtk.util.numpy_support import vtk_to_numpy
out = sys.argv[1]
def block(n0, n1, at):
    pts = vtk.vtkPoints(); pts.SetDataTypeToDouble()
    for j in range(n1):
        for i in range(n0):
            pts.InsertNextPoint(*at(i, j), 0.0)
    g = vtk.vtkStructuredGrid(); g.SetDimensions(n0, n1, 1); g.SetPoints(pts)
    return g
y = lambda x, j: j * (1 + 0.1 * math.sin(x))
mb = vtk.vtkMultiBlockDataSet(); mb.SetNumberOfBlocks(3)
mb.SetBlock(0, block(5, 4, lambda i, j: (i * 0.5, y(i * 0.5, j))))
mb.SetBlock(1, block(4, 4, lambda i, j: (2 + i * 0.75, y(2 + i * 0.75, j))))
# The third block runs backwards in i, so its cells turn clockwise.
mb.SetBlock(2, block(3, 3, lambda i, j: (2 - i * 0.5, 3 * (1 + 0.1 * math.sin(2 - i * 0.5)) + j * 0.5)))
w = vtk.vtkXMLMultiBlockDataWriter(); w.SetInputData(mb); w.SetFileName(out + '/joined.vtm')
if not w.Write(): raise SystemExit('write failed')
r = vtk.vtkXMLMultiBlockDataReader(); r.SetFileName(out + '/joined.vtm'); r.Update()
a = vtk.vtkAppendFilter(); a.MergePointsOn()
it = r.GetOutput().NewIterator(); it.InitTraversal()
blocks = []
while not it.IsDoneWithTraversal():
    d = it.GetCurrentDataObject(); blocks.append(d.GetNumberOfCells())
    a.AddInputData(d); it.GoToNextItem()
a.Update()
f = vtk.vtkCellSizeFilter(); f.SetInputData(a.GetOutput()); f.ComputeAreaOn(); f.Update()
area = vtk_to_numpy(f.GetOutput().GetCellData().GetArray('Area')).tolist()
print(json.dumps({'points': a.GetOutput().GetNumberOfPoints(), 'cells': a.GetOutput().GetNumberOfCells(), 'area': area, 'blocks': blocks}))
`

// TestReadVTMWrittenByVTK: a multiblock file the VTK library wrote (its
// blocks in a folder beside the index) reads as one mesh with the VTK
// library's merged point count (vtkAppendFilter, MergePoints), its cell
// count and its total area (vtkCellSizeFilter, 1e-12 relative); the
// interfaces become interior faces, so the boundary is the outline of the
// union alone. The cells are numbered on block after block as the VTK
// library appends them: cell k has the area of the library's cell k (to
// 1e-12 relative), and the note on the cell ranges gives each block the
// cell count the library reads from it.
func TestReadVTMWrittenByVTK(t *testing.T) {
	dir := t.TempDir()
	var got struct {
		Points int       `json:"points"`
		Cells  int       `json:"cells"`
		Area   []float64 `json:"area"`
		Blocks []int     `json:"blocks"`
	}
	runPython(t, vtkMultiblockScript, &got, dir)
	m, notes, err := ReadFileNotes(filepath.Join(dir, "joined.vtm"))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Nodes) != got.Points || m.NumCells() != got.Cells {
		t.Errorf("%d nodes, %d cells; the VTK library merges to %d points, %d cells", len(m.Nodes), m.NumCells(), got.Points, got.Cells)
	}
	ref, area := 0.0, 0.0
	for _, a := range got.Area {
		ref += a
	}
	for _, a := range m.Geo.CellArea {
		if !(a > 0) {
			t.Errorf("a cell of area %g: not counter-clockwise", a)
		}
		area += a
	}
	if relErr(area, ref) > 1e-12 {
		t.Errorf("total area %.17g, vtkCellSizeFilter %.17g", area, ref)
	}
	// By construction (closed form): blocks 0 and 1 side by side have
	// 4 + 3 faces south and north, 3 west and 3 east; block 2 sits on 2
	// of their north faces and adds its 2 + 2 + 2 others.
	if nb := m.NumBoundary(); nb != 7+3+3+(7-2)+6 {
		t.Errorf("%d boundary faces, want 24", nb)
	}
	for c, a := range m.Geo.CellArea {
		if c < len(got.Area) && relErr(a, got.Area[c]) > 1e-12 {
			t.Errorf("cell %d has area %.17g, the VTK library's cell %d %.17g", c, a, c, got.Area[c])
		}
	}
	// The block files as the VTK library's writer names them, and the
	// sizes of the script's blocks (5 × 4, 4 × 4 and 3 × 3 nodes).
	var ranges []string
	first := 0
	for b, n := range got.Blocks {
		size := [3]string{"4 × 3", "3 × 3", "2 × 2"}[b]
		ranges = append(ranges, fmt.Sprintf("%d–%d joined/joined_%d.vts (%s cells)", first, first+n-1, b, size))
		first += n
	}
	want := []string{
		"its cells run clockwise seen from +z in the grid's index order; their node order is reversed (" + filepath.Join(dir, "joined", "joined_2.vts") + ")",
		"3 blocks joined into one mesh: 7 coincident nodes merged (within 1e-06 of the local face length)",
		"the blocks' cells are numbered on, block after block, each its first grid index fastest: cells " + strings.Join(ranges, ", "),
	}
	if strings.Join(notes, "\n") != strings.Join(want, "\n") {
		t.Errorf("notes %q, want %q", notes, want)
	}
}

// TestReadVTMOwnFiles: WriteStructured's blocks and index read back as the
// mesh they were written from: its nodes, cells, faces and areas.
func TestReadVTMOwnFiles(t *testing.T) {
	m := twoBlocks(t)
	dir := t.TempDir()
	if _, err := WriteStructured(dir, "blocks", m, []Field{squareField(m.NumCells())}); err != nil {
		t.Fatal(err)
	}
	r, err := ReadFile(filepath.Join(dir, "blocks.vtm"))
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Nodes) != len(m.Nodes) || r.NumCells() != m.NumCells() || r.NumInterior != m.NumInterior || r.NumBoundary() != m.NumBoundary() {
		t.Fatalf("read %d nodes, %d cells, %d + %d faces; wrote %d, %d, %d + %d", len(r.Nodes), r.NumCells(), r.NumInterior, r.NumBoundary(), len(m.Nodes), m.NumCells(), m.NumInterior, m.NumBoundary())
	}
	for c, a := range r.Geo.CellArea {
		if a != m.Geo.CellArea[c] {
			t.Errorf("cell %d area %v, written %v", c, a, m.Geo.CellArea[c])
		}
	}
	vts, err := ReadFile(filepath.Join(dir, "blocks_1.vts"))
	if err != nil {
		t.Fatal(err)
	}
	if vts.NumCells() != 4 || len(vts.Nodes) != 9 {
		t.Errorf("blocks_1.vts: %d cells, %d nodes; want 4, 9", vts.NumCells(), len(vts.Nodes))
	}
}

// TestMergeTolerance: nodes of two blocks merge when they lie within
// mergeTolerance of the local face length of each other, and not when
// they lie farther apart, where the interface stays two boundaries.
func TestMergeTolerance(t *testing.T) {
	// Two blocks of 3 × 3 nodes on [0, 2] × [0, 1] and [2, 4] × [0, 1],
	// the second's west side moved by shift; the local face length on the
	// interface is 0.5 (the j spacing).
	blocks := func(shift float64) []*nodePlane {
		mk := func(x0, dx float64) *nodePlane {
			pl := &nodePlane{file: "b.vts", nu: 3, nv: 3}
			for j := range 3 {
				for i := range 3 {
					x := x0 + float64(i)
					if i == 0 {
						x += dx
					}
					pl.xy = append(pl.xy, orb.Point{x, 0.5 * float64(j)})
				}
			}
			return pl
		}
		return []*nodePlane{mk(0, 0), mk(2, shift)}
	}
	for _, c := range []struct {
		shift  float64
		merged int
	}{{0, 3}, {0.5 * mergeTolerance * 0.99, 3}, {0.5 * mergeTolerance * 1.01, 0}, {1e-3, 0}} {
		m, merged, err := joinBlocks(blocks(c.shift), "b.vtm")
		if err != nil {
			t.Fatal(err)
		}
		// Apart, each block has 8 boundary faces; merged, the interface's
		// 2 faces of each become 2 interior faces.
		wantBoundary := map[int]int{3: 12, 0: 16}[c.merged]
		if merged != c.merged || len(m.Nodes) != 18-c.merged || m.NumBoundary() != wantBoundary {
			t.Errorf("shift %g: %d merged, %d nodes, %d boundary faces; want %d merged, %d boundary faces", c.shift, merged, len(m.Nodes), m.NumBoundary(), c.merged, wantBoundary)
		}
	}
}

// TestReadVTSErrors: grids that are not 2D, or whose extent and points
// disagree, are refused with the file and the fault named.
func TestReadVTSErrors(t *testing.T) {
	vts := func(whole, ext, pts string) string {
		return `<?xml version="1.0"?><VTKFile type="StructuredGrid" version="0.1"><StructuredGrid WholeExtent="` + whole + `"><Piece Extent="` + ext +
			`"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">` + pts + `</DataArray></Points></Piece></StructuredGrid></VTKFile>`
	}
	square := "0 0 0 1 0 0 0 1 0 1 1 0"
	cube := func(z [8]float64) string {
		var b strings.Builder
		for k, p := range [8][2]float64{{0, 0}, {1, 0}, {0, 1}, {1, 1}, {0, 0}, {1, 0}, {0, 1}, {1, 1}} {
			fmt.Fprintf(&b, "%g %g %g ", p[0], p[1], z[k])
		}
		return b.String()
	}
	up := [8]float64{0, 0, 0, 0, 1, 1, 1, 1}
	for _, c := range []struct{ name, file, want string }{
		{"count", vts("0 2 0 1 0 0", "0 2 0 1 0 0", square), `Points has 12 values in 3 components; want 3 components for 6 points (Piece Extent "0 2 0 1 0 0" makes 3 × 2 × 1 nodes)`},
		{"whole", vts("0 2 0 1 0 0", "0 1 0 1 0 0", square), `Piece Extent "0 1 0 1 0 0" is not the WholeExtent "0 2 0 1 0 0"`},
		{"downward", vts("1 0 0 1 0 0", "1 0 0 1 0 0", square), "runs from 1 down to 0"},
		{"five", vts("0 1 0 1 0", "0 1 0 1 0", square), `Piece Extent "0 1 0 1 0" is not six integers`},
		{"line", vts("0 3 0 0 0 0", "0 3 0 0 0 0", square), "a line or a point of nodes: no cells"},
		{"3D", vts("0 1 0 1 0 2", "0 1 0 1 0 2", cube(up)+"0 0 2 1 0 2 0 1 2 1 1 2"), "points lie on z = 0, 1 and 2: a 3D grid"},
		{"flat", vts("0 1 0 1 0 1", "0 1 0 1 0 1", cube([8]float64{})), "a 3D grid of 2 × 2 × 2 nodes with every point on z = 0: its cells have no thickness"},
		{"tilted", vts("0 1 0 1 0 1", "0 1 0 1 0 1", cube([8]float64{0, 1, 0, 1, 1, 2, 1, 2})), "points lie on z = 0, 1 and 2"},
		{"twisted", vts("0 1 0 1 0 1", "0 1 0 1 0 1", cube([8]float64{0, 1, 0, 1, 1, 0, 1, 0})), "not on the two node planes of a grid direction two nodes deep"},
		{"skewed", vts("0 1 0 1 0 1", "0 1 0 1 0 1", strings.Replace(cube(up), "1 1 1", "1.1 1 1", 1)), "is not straight below its partner on z = 1"},
		{"polydata", strings.ReplaceAll(vts("", "", ""), "StructuredGrid", "PolyData"), `VTKFile type is "PolyData"; cvdeck reads StructuredGrid files here`},
	} {
		_, err := ReadVTS([]byte(c.file), c.name+".vts")
		if err == nil || !strings.HasPrefix(err.Error(), c.name+".vts: ") || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want an error naming the file and saying %q", c.name, err, c.want)
		}
	}
}

// TestReadVTMErrors: an index naming a missing file, a file of another
// kind or no file at all, or blocks in two planes, is refused with the
// index and the DataSet named.
func TestReadVTMErrors(t *testing.T) {
	dir := t.TempDir()
	m := twoBlocks(t)
	if _, err := WriteStructured(dir, "blocks", m, nil); err != nil {
		t.Fatal(err)
	}
	var b1 bytes.Buffer
	if err := WriteVTS(&b1, m, 1, nil); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "raised.vts"), planeMoved(t, b1.Bytes(), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	index := func(sets string) string {
		return `<?xml version="1.0"?><VTKFile type="vtkMultiBlockDataSet" version="1.0"><vtkMultiBlockDataSet>` + sets + `</vtkMultiBlockDataSet></VTKFile>`
	}
	for _, c := range []struct{ name, file, want string }{
		{"missing", index(`<DataSet index="0" file="blocks_0.vts"/><DataSet index="1" name="duct" file="gone/blocks_9.vts"/>`), `DataSet index="1" name="duct" names the file gone/blocks_9.vts, which cannot be read: open ` + filepath.Join(dir, "gone", "blocks_9.vts")},
		{"vtu", index(`<Block index="0"><DataSet index="0" file="mesh.vtu"/></Block>`), `DataSet index="0" names mesh.vtu, a ".vtu" file; cvdeck reads .vtm files whose blocks are structured grids (.vts)`},
		{"empty", index(`<DataSet index="0"/>`), "lists no structured grid files; nothing to check"},
		{"planes", index(`<DataSet index="0" file="blocks_0.vts"/><DataSet index="1" file="raised.vts"/>`), "lies on z = 1 but block " + filepath.Join(dir, "blocks_0.vts") + " on z = 0"},
		{"type", strings.ReplaceAll(index(""), "vtkMultiBlockDataSet", "vtkMultiPieceDataSet"), `VTKFile type is "vtkMultiPieceDataSet"`},
		{"cut", index(`<DataSet index="0" file="blocks_0.vts"/>`)[:90], "cut short"},
	} {
		p := filepath.Join(dir, c.name+".vtm")
		if err := os.WriteFile(p, []byte(c.file), 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := ReadFile(p)
		if err == nil || !strings.HasPrefix(err.Error(), p+": ") || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want an error naming %s and saying %q", c.name, err, p, c.want)
		}
	}
}

// planeMoved returns a file WriteVTS wrote with every point's z set to z:
// its first appended array holds the points, (x, y, 0) as Float64 after a
// UInt64 byte count, little-endian (WriteVTS's layout).
func planeMoved(t *testing.T, file []byte, z float64) []byte {
	t.Helper()
	out := bytes.Clone(file)
	at := bytes.Index(out, []byte(`<AppendedData encoding="raw">`))
	if at < 0 {
		t.Fatal("no raw appended data")
	}
	at += bytes.IndexByte(out[at:], '_') + 1
	n := int(binary.LittleEndian.Uint64(out[at:]))
	for k := at + 8 + 16; k < at+8+n; k += 24 {
		binary.LittleEndian.PutUint64(out[k:], math.Float64bits(z))
	}
	return out
}

// TestCutVTS: a structured grid cut short anywhere is refused, as the
// other XML files are (see cutTest).
func TestCutVTS(t *testing.T) {
	m := twoBlocks(t)
	var b bytes.Buffer
	if err := WriteVTS(&b, m, 0, []Field{squareField(m.NumCells())}); err != nil {
		t.Fatal(err)
	}
	cutTest(t, "blocks_0.vts", b.Bytes())
}
