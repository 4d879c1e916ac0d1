package vtk

import (
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// vtkSlabScript builds, with the VTK library, a 2D case of our own stored
// the way 3D solvers take one: a 4 × 3 grid of jittered squares on the
// plane z = 2, extruded to z = 2.25, the even columns as hexahedra (one of
// them written upside down, its first face on the upper plane, so its
// volume stays positive), the odd columns split into wedges, one unit
// square as a voxel; side quads on the boundary tagged
// inlet, outlet and walls; front and back patches (triangles and quads on
// both planes) tagged symmetry; and lines on the upper plane. It writes
// the slab as XML and legacy files and prints, for each, the cell volumes
// of vtkCellSizeFilter over the thickness (the cells' areas), the number
// of 3D cells, of lower-plane points and of side faces per tag.
const vtkSlabScript = `
import sys, json, math, vtk
from vtk.util.numpy_support import vtk_to_numpy
out = sys.argv[1]
nx, ny, z0, dz = 4, 3, 2.0, 0.25
pts = vtk.vtkPoints(); pts.SetDataTypeToDouble()
def jit(i, j):
    if i in (0, nx) or j in (0, ny) or (i, j) == (1, 1): return 0.0, 0.0
    return 0.15 * math.sin(3 * i + 7 * j), 0.15 * math.cos(5 * i + 2 * j)
for k in range(2):
    for j in range(ny + 1):
        for i in range(nx + 1):
            dx, dy = jit(i, j)
            pts.InsertNextPoint(i + dx, j + dy, z0 + k * dz)
n2 = (nx + 1) * (ny + 1)
def p(i, j, k=0): return j * (nx + 1) + i + k * n2
g = vtk.vtkUnstructuredGrid(); g.SetPoints(pts)
tag = vtk.vtkStringArray(); tag.SetName('boundary_tag')
def cell(t, ids, name=''):
    g.InsertNextCell(t, len(ids), ids); tag.InsertNextValue(name)
cells3d = 0
for j in range(ny):
    for i in range(nx):
        q = [p(i, j), p(i + 1, j), p(i + 1, j + 1), p(i, j + 1)]
        up = [v + n2 for v in q]
        if (i, j) == (0, 0):
            # A voxel: points in (i, j, k) order; this square is a unit square.
            cell(vtk.VTK_VOXEL, [q[0], q[1], q[3], q[2], up[0], up[1], up[3], up[2]]); cells3d += 1
        elif (i, j) == (2, 1):
            cell(vtk.VTK_HEXAHEDRON, up[::-1] + q[::-1]); cells3d += 1  # upside down
        elif i % 2 == 0:
            cell(vtk.VTK_HEXAHEDRON, q + up); cells3d += 1
        else:
            # A wedge's first face turns clockwise seen from its second.
            for t3 in ([2, 1, 0], [3, 2, 0]):
                cell(vtk.VTK_WEDGE, [q[a] for a in t3] + [up[a] for a in t3]); cells3d += 1
        # Front and back patches.
        cell(vtk.VTK_QUAD, q, 'symmetry'); cell(vtk.VTK_TRIANGLE, [up[0], up[1], up[2]], 'symmetry')
sides = {}
def side(a, b, name):
    cell(vtk.VTK_QUAD, [a, b, b + n2, a + n2], name); sides[name] = sides.get(name, 0) + 1
for i in range(nx):
    side(p(i, 0), p(i + 1, 0), 'walls'); side(p(i + 1, ny), p(i, ny), 'walls')
for j in range(ny):
    side(p(nx, j), p(nx, j + 1), 'outlet'); side(p(0, j + 1), p(0, j), 'inlet')
cell(vtk.VTK_LINE, [p(0, 0, 1), p(1, 0, 1)], 'walls')
g.GetCellData().AddArray(tag)
res = {}
def check(name, w):
    w.SetInputData(g); w.SetFileName(out + '/' + name)
    if not w.Write(): raise SystemExit('write failed: ' + name)
    r = vtk.vtkXMLUnstructuredGridReader() if name.endswith('.vtu') else vtk.vtkUnstructuredGridReader()
    r.SetFileName(out + '/' + name); r.Update()
    f = vtk.vtkCellSizeFilter(); f.SetInputData(r.GetOutput()); f.ComputeVolumeOn(); f.Update()
    vol = vtk_to_numpy(f.GetOutput().GetCellData().GetArray('Volume')).tolist()
    types = [r.GetOutput().GetCellType(c) for c in range(r.GetOutput().GetNumberOfCells())]
    res[name] = {'area': [v / dz for v, t in zip(vol, types) if t in (vtk.VTK_HEXAHEDRON, vtk.VTK_WEDGE, vtk.VTK_VOXEL)]}
check('slab.vtu', vtk.vtkXMLUnstructuredGridWriter())
check('slab.vtk', vtk.vtkUnstructuredGridWriter())
print(json.dumps({'files': res, 'cells': cells3d, 'nodes': n2, 'sides': sides}))
`

// TestReadSlabWrittenByVTK: a one-cell-thick slab written by the VTK
// library reads as the 2D mesh of its lower plane: one cell per 3D cell,
// with the area vtkCellSizeFilter's volume over the thickness gives (to
// 1e-12), every cell counter-clockwise (the upside-down hexahedron
// included), the lower plane's points only, the side faces as boundary
// faces with their tags, and the front and back patches and upper lines
// left out, which a note says.
func TestReadSlabWrittenByVTK(t *testing.T) {
	dir := t.TempDir()
	var got struct {
		Files map[string]struct {
			Area []float64 `json:"area"`
		} `json:"files"`
		Cells int            `json:"cells"`
		Nodes int            `json:"nodes"`
		Sides map[string]int `json:"sides"`
	}
	runPython(t, vtkSlabScript, &got, dir)
	for name, ref := range got.Files {
		m, notes, err := ReadFileNotes(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		// The script writes a quad below and a triangle above each of the
		// 4 × 3 squares, and one line on the upper plane.
		want := "a slab one cell thick between z = 2 and z = 2.25, read as its lower plane; left out: " +
			"24 cells in the front and back planes (tag symmetry) and 1 line on the upper plane (tag walls)"
		// Its side faces and lines come between the 3D cells.
		order := "the file lists 22 boundary face and line cells among its 18 3D cells: the cell numbers of this report count the 3D cells only, from 0 in file order"
		if len(notes) != 2 || notes[0] != order || notes[1] != want {
			t.Errorf("%s: notes %q, want %q and %q", name, notes, order, want)
		}
		if m.NumCells() != got.Cells || len(m.Nodes) != got.Nodes || len(ref.Area) != got.Cells {
			t.Errorf("%s: %d cells, %d nodes; want %d, %d", name, m.NumCells(), len(m.Nodes), got.Cells, got.Nodes)
			continue
		}
		for c, a := range m.Geo.CellArea {
			if !(a > 0) || math.Abs(a-ref.Area[c]) > 1e-12*ref.Area[c] {
				t.Errorf("%s: cell %d area %.17g, vtkCellSizeFilter volume/thickness %.17g", name, c, a, ref.Area[c])
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
		if len(m.Tags) != len(got.Sides) {
			t.Errorf("%s: tags %v, want those of %v only", name, m.Tags, got.Sides)
		}
	}
}

// TestReadSlabErrors: slabs that are not 2D cases stored one cell thick
// are refused with the cell or the planes named.
func TestReadSlabErrors(t *testing.T) {
	hex := func(points string, cellType int) string {
		return "# vtk DataFile Version 3.0\nslab\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 8 double\n" + points +
			"\nCELLS 1 9\n8 0 1 2 3 4 5 6 7\nCELL_TYPES 1\n" + strconv.Itoa(cellType) + "\n"
	}
	for _, c := range []struct{ name, file, want string }{
		{"skewed", hex("0 0 0 1 0 0 1 1 0 0 1 0 0.1 0 1 1.1 0 1 1.1 1 1 0.1 1 1", 12), "not straight above each other"},
		{"three planes", hex("0 0 0 1 0 0 1 1 0 0 1 0 0 0 1 1 0 1 1 1 2 0 1 1", 12), "z = 0, 1 and 2"},
		{"tilted", hex("0 0 0 1 0 1 1 1 0 0 1 0 0 0 1 1 0 0 1 1 1 0 1 1", 12), "does not stand between the planes"},
		{"flat", hex("0 0 0 1 0 0 1 1 0 0 1 0 0 0 0 1 0 0 1 1 0 0 1 0", 12), "no thickness"},
		{"pyramid", "# vtk DataFile Version 3.0\nslab\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 5 double\n0 0 0 1 0 0 1 1 0 0 1 0 0.5 0.5 1\nCELLS 1 6\n5 0 1 2 3 4\nCELL_TYPES 1\n14\n", "slabs one cell thick of hexahedra, voxels or wedges"},
	} {
		_, err := ReadLegacy([]byte(c.file), c.name+".vtk")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want an error saying %q", c.name, err, c.want)
		}
	}
}
