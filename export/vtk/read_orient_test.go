package vtk

import (
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"cvdeck/mesh"
)

// vtkOrientScript writes, with the VTK library, files of our own whose
// cells run the wrong way round, sit in other planes or carry their
// numbers and tags in ways cvdeck must explain, and prints for each the
// cell sizes vtkCellSizeFilter gives (areas; for a slab, volumes over the
// thickness), which are unsigned:
//
//   - one_cw.vtu: three unit quads in a strip, the middle one listed
//     clockwise, boundary lines tagged "wall" all round;
//   - all_cw.vtu: a 3 × 2 grid of quads, every one clockwise;
//   - xz.vtu: the same grid counter-clockwise in (x, z) on the plane
//     y = 0.5, and yz.vtu in (y, z) on x = -2;
//   - rot.vtu: a 3 × 2 slab of hexahedra between z = 0 and 0.1, every
//     other one numbered from a side face (VTK gives each a positive
//     volume);
//   - wedge.vtu: the same slab as wedges whose first face turns
//     counter-clockwise seen from the second (the order opposite to
//     VTK's, so every VTK volume is negative);
//   - legacy.vtu: all_cw's grid counter-clockwise, as a legacy file under
//     an XML name;
//   - bc.vtu: that grid with its boundary lines first and tagged by an
//     integer array named "bc".
const vtkOrientScript = `
import sys, json, vtk
from vtk.util.numpy_support import vtk_to_numpy
out = sys.argv[1]
def grid(pts, cells, lines=(), tagname='boundary_tag', linesfirst=False, kinds=None):
    P = vtk.vtkPoints(); P.SetDataTypeToDouble()
    for p in pts: P.InsertNextPoint(*p)
    g = vtk.vtkUnstructuredGrid(); g.SetPoints(P)
    tag = vtk.vtkIntArray(); tag.SetName(tagname)
    items = [(t, c, -1) for t, c in zip(kinds or [vtk.VTK_QUAD] * len(cells), cells)]
    ls = [(vtk.VTK_LINE, l, 0) for l in lines]
    for t, c, v in (ls + items if linesfirst else items + ls):
        g.InsertNextCell(t, len(c), c); tag.InsertNextValue(v)
    g.GetCellData().AddArray(tag)
    return g
def write(g, name, legacy=False):
    w = vtk.vtkUnstructuredGridWriter() if legacy else vtk.vtkXMLUnstructuredGridWriter()
    w.SetFileName(out + '/' + name); w.SetInputData(g); w.Write()
def sizes(g, volume=False):
    f = vtk.vtkCellSizeFilter(); f.SetInputData(g); f.Update()
    a = vtk_to_numpy(f.GetOutput().GetCellData().GetArray('Volume' if volume else 'Area'))
    return [float(x) for x in a]
res = {}
# one_cw: nodes 0-3 along y = 0, 4-7 along y = 1.
pts = [(i, j, 0) for j in range(2) for i in range(4)]
cells = [[0, 1, 5, 4], [1, 5, 6, 2], [2, 3, 7, 6]]
loop = [[0, 1], [1, 2], [2, 3], [3, 7], [7, 6], [6, 5], [5, 4], [4, 0]]
g = grid(pts, cells, loop); write(g, 'one_cw.vtu'); res['one_cw'] = sizes(g)[:3]
# A 3 x 2 grid of 0.5 x 0.25 quads.
nx, ny = 3, 2
n = lambda i, j: j * (nx + 1) + i
ccw = [[n(i, j), n(i + 1, j), n(i + 1, j + 1), n(i, j + 1)] for j in range(ny) for i in range(nx)]
bnd = [[n(i, 0), n(i + 1, 0)] for i in range(nx)] + [[n(nx, j), n(nx, j + 1)] for j in range(ny)] + \
      [[n(i + 1, ny), n(i, ny)] for i in range(nx)] + [[n(0, j + 1), n(0, j)] for j in range(ny)]
flat = [(0.5 * i, 0.25 * j) for j in range(ny + 1) for i in range(nx + 1)]
g = grid([(x, y, 0) for x, y in flat], [c[::-1] for c in ccw], bnd); write(g, 'all_cw.vtu'); res['all_cw'] = sizes(g)[:len(ccw)]
g = grid([(x, 0.5, y) for x, y in flat], ccw, bnd); write(g, 'xz.vtu'); res['xz'] = sizes(g)[:len(ccw)]
g = grid([(-2, x, y) for x, y in flat], ccw, bnd); write(g, 'yz.vtu'); res['yz'] = sizes(g)[:len(ccw)]
g = grid([(x, y, 0) for x, y in flat], ccw, bnd); write(g, 'legacy.vtu', legacy=True)
g = grid([(x, y, 0) for x, y in flat], ccw, bnd, tagname='bc', linesfirst=True); write(g, 'bc.vtu')
# Slabs: the lower plane's nodes, then the upper plane's.
m = (nx + 1) * (ny + 1)
spts = [(x, y, 0) for x, y in flat] + [(x, y, 0.1) for x, y in flat]
hexes = []
for k, b in enumerate(ccw):
    t = [v + m for v in b]
    hexes.append([b[0], t[0], t[1], b[1], b[3], t[3], t[2], b[2]] if k % 2 else b + t)
g = grid(spts, hexes, kinds=[vtk.VTK_HEXAHEDRON] * len(hexes)); write(g, 'rot.vtu'); res['rot'] = [v / 0.1 for v in sizes(g, True)]
wedges = []
for b in ccw:
    for tri in ([b[0], b[1], b[2]], [b[0], b[2], b[3]]):
        wedges.append(tri + [v + m for v in tri])
g = grid(spts, wedges, kinds=[vtk.VTK_WEDGE] * len(wedges)); write(g, 'wedge.vtu'); res['wedge'] = [v / 0.1 for v in sizes(g, True)]
print(json.dumps(res))
`

// TestReadOrientation reads the files of vtkOrientScript: one clockwise
// cell stays the only one of negative area, its faces set by its
// neighbours and the boundary loop; files whose cells all run clockwise,
// consistently, are turned counter-clockwise with a note; rotated
// hexahedra, planes x = c and y = c, a legacy file under an XML name, tags
// under another name and lines numbered first are read, each with its
// note. Areas are checked against vtkCellSizeFilter's (to 1e-12).
func TestReadOrientation(t *testing.T) {
	dir := t.TempDir()
	var want map[string][]float64
	runPython(t, vtkOrientScript, &want, dir)
	read := func(name string) (*mesh.Mesh, []string) {
		t.Helper()
		m, notes, err := ReadFileNotes(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		return m, notes
	}
	sameAreas := func(name string, m *mesh.Mesh, signs func(c int) float64) {
		t.Helper()
		w := want[strings.TrimSuffix(name, ".vtu")]
		if len(w) != m.NumCells() {
			t.Fatalf("%s: %d cells, VTK has %d", name, m.NumCells(), len(w))
		}
		for c, a := range m.Geo.CellArea {
			if math.Abs(a-signs(c)*w[c]) > 1e-12 {
				t.Errorf("%s: cell %d area %g, want %g", name, c, a, signs(c)*w[c])
			}
		}
	}
	hasNote := func(name string, notes []string, part string) {
		t.Helper()
		if !slices.ContainsFunc(notes, func(n string) bool { return strings.Contains(n, part) }) {
			t.Errorf("%s: notes %q, want one saying %q", name, notes, part)
		}
	}
	positive := func(int) float64 { return 1 }

	m, notes := read("one_cw.vtu")
	sameAreas("one_cw.vtu", m, func(c int) float64 { return map[bool]float64{true: -1, false: 1}[c == 1] })
	if len(notes) != 0 {
		t.Errorf("one_cw.vtu: notes %q; a mix of orientations is left for the checks", notes)
	}
	// Every boundary face's normal points out of the strip, and every node
	// starts as many boundary faces as it ends: the loop is closed.
	balance := map[int32]int{}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		fn, mid, nrm := m.FaceNodes[f], m.Geo.FaceMid[f], m.Geo.FaceNormal[f]
		balance[fn[0]]++
		balance[fn[1]]--
		if d := (mid[0]-1.5)*nrm[0] + (mid[1]-0.5)*nrm[1]; d <= 0 {
			t.Errorf("one_cw.vtu: boundary face %d (%v) of cell %d has its normal %v pointing into the mesh", f, fn, m.Owner[f], nrm)
		}
	}
	for v, b := range balance {
		if b != 0 {
			t.Errorf("one_cw.vtu: node %d starts %d more boundary faces than it ends", v, b)
		}
	}
	// The interior faces are owned by the cells of positive area.
	for f := range m.NumInterior {
		if m.Owner[f] == 1 {
			t.Errorf("one_cw.vtu: interior face %d is owned by the clockwise cell 1", f)
		}
	}

	m, notes = read("all_cw.vtu")
	sameAreas("all_cw.vtu", m, positive)
	hasNote("all_cw.vtu", notes, "all 6 cells run clockwise seen from +z")

	for name, note := range map[string]string{
		"xz.vtu": "a plane mesh on y = 0.5, read as 2D with (x, z) taken as (x, y), seen from −y",
		"yz.vtu": "a plane mesh on x = -2, read as 2D with (y, z) taken as (x, y), seen from +x",
	} {
		m, notes = read(name)
		hasNote(name, notes, note)
		// Counter-clockwise in (x, z) or (y, z) is counter-clockwise in
		// the (x, y) they are taken as: nothing is reversed.
		if len(notes) != 1 {
			t.Errorf("%s: notes %q, want only the plane's", name, notes)
		}
		sameAreas(name, m, positive)
	}

	m, notes = read("rot.vtu")
	sameAreas("rot.vtu", m, positive)
	hasNote("rot.vtu", notes, "a slab one cell thick")
	m, notes = read("wedge.vtu")
	// vtkCellSizeFilter gives these wedges negative volumes, by VTK's
	// convention; read as cells of the lower plane they all turn
	// counter-clockwise.
	sameAreas("wedge.vtu", m, func(int) float64 { return -1 })
	hasNote("wedge.vtu", notes, "all 12 cells have negative volume by the VTK node-order conventions")

	m, notes = read("legacy.vtu")
	sameAreas("all_cw.vtu", m, positive) // the same grid
	hasNote("legacy.vtu", notes, "a legacy VTK file")
	if len(m.Tags) != 1 {
		t.Errorf("legacy.vtu: tags %q, want the one tag of its lines", m.Tags)
	}

	m, notes = read("bc.vtu")
	hasNote("bc.vtu", notes, "a cell-data array named boundary_tag or tag, and its cell-data arrays are bc")
	hasNote("bc.vtu", notes, "the file lists 10 line and vertex cells before its 6 area cells: cell k of this report is the file's cell k + 10")
	if lo, hi := m.UntaggedRange(); hi-lo != 10 {
		t.Errorf("bc.vtu: %d untagged boundary faces, want all 10", hi-lo)
	}
}
