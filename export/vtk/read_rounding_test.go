package vtk

import (
	"fmt"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// vtkRoundingScript writes, with the VTK library, meshes of our own whose
// plane coordinate spreads by rounding, or whose cells mostly run the
// wrong way round, and prints for each its cell areas (vtkCellSizeFilter,
// unsigned), the sign of each cell's normal along the axis it is seen
// from (vtkPolygon.ComputeNormal: +1 counter-clockwise, −1 clockwise) and
// the spread (max − min) and mean of the plane coordinate, computed in
// Python from the very doubles written:
//
//   - zround.vtu, zround.vtk (legacy binary) and zround.vts: a 4 × 3 grid
//     of unit quads whose nodes' z is +1e-16 or −1e-16 by turns;
//   - xround.vtu: the same grid on the plane x = 5 in (y, z), x off by
//     1e-15·(k mod 3);
//   - ztilt.vtu: the grid tilted, z = 1e-9·i, which is not rounding;
//   - mostly.vtu: the grid on z = 0 with every cell listed clockwise but
//     cell 5; tie.vtu: two quads side by side, the first listed
//     clockwise, the second counter-clockwise.
const vtkRoundingScript = `
import sys, json, vtk
from vtk.util.numpy_support import vtk_to_numpy
out = sys.argv[1]
nx, ny = 4, 3
n = lambda i, j: j * (nx + 1) + i
ccw = [[n(i, j), n(i + 1, j), n(i + 1, j + 1), n(i, j + 1)] for j in range(ny) for i in range(nx)]
def grid(pts, cells):
    P = vtk.vtkPoints(); P.SetDataTypeToDouble()
    for p in pts: P.InsertNextPoint(*p)
    g = vtk.vtkUnstructuredGrid(); g.SetPoints(P)
    for c in cells: g.InsertNextCell(vtk.VTK_QUAD, len(c), c)
    return g
def write(g, name):
    if name.endswith('.vtk'):
        w = vtk.vtkUnstructuredGridWriter(); w.SetFileTypeToBinary()
    else:
        w = vtk.vtkXMLUnstructuredGridWriter()
    w.SetFileName(out + '/' + name); w.SetInputData(g); w.Write()
def describe(g, axis):
    f = vtk.vtkCellSizeFilter(); f.SetInputData(g); f.Update()
    area = [float(a) for a in vtk_to_numpy(f.GetOutput().GetCellData().GetArray('Area'))]
    sign = []
    for c in range(g.GetNumberOfCells()):
        nrm = [0.0, 0.0, 0.0]
        vtk.vtkPolygon.ComputeNormal(g.GetCell(c).GetPoints(), nrm)
        sign.append(1 if nrm[axis] > 0 else -1)
    v = [g.GetPoint(k)[axis] for k in range(g.GetNumberOfPoints())]
    return {'area': area, 'sign': sign, 'spread': max(v) - min(v), 'mean': sum(v) / len(v)}
flat = [(i, j) for j in range(ny + 1) for i in range(nx + 1)]
res = {}
pts = [(x, y, 1e-16 if (x + y) % 2 else -1e-16) for x, y in flat]
g = grid(pts, ccw); write(g, 'zround.vtu'); write(g, 'zround.vtk'); res['zround'] = describe(g, 2)
sg = vtk.vtkStructuredGrid(); sg.SetDimensions(nx + 1, ny + 1, 1); P = vtk.vtkPoints(); P.SetDataTypeToDouble()
for p in pts: P.InsertNextPoint(*p)
sg.SetPoints(P)
w = vtk.vtkXMLStructuredGridWriter(); w.SetFileName(out + '/zround.vts'); w.SetInputData(sg); w.Write()
g = grid([(5 + 1e-15 * (k % 3), x, y) for k, (x, y) in enumerate(flat)], ccw); write(g, 'xround.vtu'); res['xround'] = describe(g, 0)
g = grid([(x, y, 1e-9 * x) for x, y in flat], ccw); write(g, 'ztilt.vtu'); res['ztilt'] = describe(g, 2)
cw = [c[::-1] for c in ccw]; cw[5] = ccw[5]
g = grid([(x, y, 0) for x, y in flat], cw); write(g, 'mostly.vtu'); res['mostly'] = describe(g, 2)
g = grid([(0, 0, 0), (1, 0, 0), (2, 0, 0), (0, 1, 0), (1, 1, 0), (2, 1, 0)], [[0, 3, 4, 1], [1, 2, 5, 4]]); write(g, 'tie.vtu'); res['tie'] = describe(g, 2)
print(json.dumps(res))
`

// TestReadPlaneRounding: a plane mesh whose constant coordinate spreads by
// rounding (±1e-16 in z; 1e-15 steps in x) is read, as XML, legacy binary
// and structured grid, with a note giving the spread and the mean as the
// VTK library's doubles give them, against a tolerance of 1e-12 of the
// largest coordinate (4 for the z grid, 5 for the x one: hand-computed);
// its cells have the VTK library's areas (vtkCellSizeFilter, to 1e-12)
// and all run counter-clockwise. A tilt of 1e-9 per unit is refused,
// naming its spread and the points of least and greatest z.
func TestReadPlaneRounding(t *testing.T) {
	dir := t.TempDir()
	type described struct {
		Area   []float64 `json:"area"`
		Sign   []int     `json:"sign"`
		Spread float64   `json:"spread"`
		Mean   float64   `json:"mean"`
	}
	var ref map[string]described
	runPython(t, vtkRoundingScript, &ref, dir)
	spread := func(d described, axis string, tol string) string {
		return fmt.Sprintf("the points' %s spread over %.3g, within the %s that rounding gives: taken as one plane at their mean", axis, d.Spread, tol)
	}
	z := ref["zround"]
	if z.Spread != 2e-16 {
		t.Fatalf("the script's z spread is %g; the test expects the 2e-16 of ±1e-16", z.Spread)
	}
	for _, name := range []string{"zround.vtu", "zround.vtk", "zround.vts"} {
		m, notes, err := ReadFileNotes(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		want := fmt.Sprintf("a plane mesh on z = %.9g (%s), read as 2D (z dropped)", z.Mean, spread(z, "z", "4e-12"))
		if !slices.Contains(notes, want) {
			t.Errorf("%s: notes %q, want %q", name, notes, want)
		}
		for c, a := range m.Geo.CellArea {
			if relErr(a, z.Area[c]) > 1e-12 {
				t.Errorf("%s: cell %d area %g, vtkCellSizeFilter %g", name, c, a, z.Area[c])
			}
		}
	}
	x := ref["xround"]
	m, notes, err := ReadFileNotes(filepath.Join(dir, "xround.vtu"))
	if err != nil {
		t.Fatal(err)
	}
	want := fmt.Sprintf("a plane mesh on x = %.9g (%s), read as 2D with (y, z) taken as (x, y), seen from +x", x.Mean, spread(x, "x", "5e-12"))
	if len(notes) == 0 || !strings.HasPrefix(notes[0], want) {
		t.Errorf("xround.vtu: notes %q, want one starting %q", notes, want)
	}
	for c, a := range m.Geo.CellArea {
		if relErr(a, x.Area[c]) > 1e-12 {
			t.Errorf("xround.vtu: cell %d area %g, vtkCellSizeFilter %g", c, a, x.Area[c])
		}
	}
	_, err = ReadFile(filepath.Join(dir, "ztilt.vtu"))
	if tilt := ref["ztilt"]; err == nil || !strings.Contains(err.Error(), fmt.Sprintf("a spread of %.3g, more than the 4e-12 that rounding gives", tilt.Spread)) ||
		!strings.Contains(err.Error(), "to 4e-09 (point 4)") || !strings.Contains(err.Error(), "lie on no plane") {
		t.Errorf("ztilt.vtu: %v; want it refused, naming the spread %g and point 4 at z = 4e-09", err, tilt.Spread)
	}
}

// TestReadMostlyClockwise: a mesh whose cells the file lists clockwise,
// all but one (the VTK library's polygon normal points −z for 11 of the
// 12 and +z for cell 5), is read turned round, with a note that says so
// and how many ran the other way: the one cell that ran counter-clockwise
// in the file is the one of negative area, each area the VTK library's
// (vtkCellSizeFilter) with the sign turned round. Two cells one each way
// (a tie) are left as the file lists them, with no note.
func TestReadMostlyClockwise(t *testing.T) {
	dir := t.TempDir()
	var ref map[string]struct {
		Area []float64 `json:"area"`
		Sign []int     `json:"sign"`
	}
	runPython(t, vtkRoundingScript, &ref, dir)
	for name, c := range map[string]struct {
		turned int
		note   string
	}{
		"mostly.vtu": {-1, "11 of the 12 cells run clockwise seen from +z (negative signed area) as the file lists them, 1 the other way: the mesh is read turned round (every cell's node order reversed), so the 1 that ran the other way are the cells the checks name"},
		"tie.vtu":    {1, ""},
	} {
		r := ref[strings.TrimSuffix(name, ".vtu")]
		m, notes, err := ReadFileNotes(filepath.Join(dir, name))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if c.note == "" && len(notes) > 0 || c.note != "" && !slices.Contains(notes, c.note) {
			t.Errorf("%s: notes %q, want %q", name, notes, c.note)
		}
		for k, a := range m.Geo.CellArea {
			want := float64(c.turned*r.Sign[k]) * r.Area[k]
			if relErr(a, want) > 1e-12 {
				t.Errorf("%s: cell %d has signed area %g, want %g (file normal %+d, turned %+d)", name, k, a, want, r.Sign[k], c.turned)
			}
		}
	}
	if s := ref["mostly"].Sign; slices.Index(s, 1) != 5 || slices.Index(s[6:], 1) >= 0 {
		t.Errorf("the script's normals %v: want +z for cell 5 only", s)
	}
}
