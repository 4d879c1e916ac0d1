package vtk

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// twoBlocks is a two-block structured mesh: block "inlet" of 4 × 3 nodes
// on [0, 3] × [0, 2] and block "duct" of 3 × 3 nodes on [3, 5] × [0, 2],
// sharing the line x = 3, with curved j-lines so cells are not all equal.
func twoBlocks(t testing.TB) *mesh.Mesh {
	var in mesh.Input
	at := func(x, y float64) orb.Point { return orb.Point{x, y + 0.1*y*math.Sin(x)} }
	a := make([]int32, 12)
	for j := 0; j < 3; j++ {
		for i := 0; i < 4; i++ {
			a[j*4+i] = int32(len(in.Nodes))
			in.Nodes = append(in.Nodes, at(float64(i), float64(j)))
		}
	}
	b := make([]int32, 9)
	for j := 0; j < 3; j++ {
		b[j*3] = a[j*4+3]
		for i := 1; i < 3; i++ {
			b[j*3+i] = int32(len(in.Nodes))
			in.Nodes = append(in.Nodes, at(3+float64(i), float64(j)))
		}
	}
	in.CellStart = []int32{0}
	cells := func(node []int32, ni, nj int) {
		for j := 0; j < nj-1; j++ {
			for i := 0; i < ni-1; i++ {
				in.CellNodes = append(in.CellNodes, node[j*ni+i], node[j*ni+i+1], node[(j+1)*ni+i+1], node[(j+1)*ni+i])
				in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
			}
		}
	}
	cells(a, 4, 3)
	cells(b, 3, 3)
	in.Blocks = []mesh.Block{{Name: "inlet", NI: 4, NJ: 3, Node: a, FirstCell: 0}, {Name: "duct", NI: 3, NJ: 3, Node: b, FirstCell: 6}}
	in.Interfaces = []mesh.BlockInterface{{A: 0, B: 1, SideA: mesh.East, SideB: mesh.West}}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// multiblockScript reads a .vtm with vtkXMLMultiBlockDataReader and prints,
// per block, its name, class, dimensions, points, cell arrays and the
// vtkCellSizeFilter areas.
const multiblockScript = `
import sys, json, vtk
from vtk.util.numpy_support import vtk_to_numpy
r = vtk.vtkXMLMultiBlockDataReader(); r.SetFileName(sys.argv[1]); r.Update()
mb = r.GetOutput()
out = []
for b in range(mb.GetNumberOfBlocks()):
    g = mb.GetBlock(b)
    f = vtk.vtkCellSizeFilter(); f.SetInputData(g); f.ComputeAreaOn(); f.Update()
    cd = g.GetCellData()
    out.append({'name': mb.GetMetaData(b).Get(vtk.vtkCompositeDataSet.NAME()),
                'class': g.GetClassName(), 'dims': list(g.GetDimensions()),
                'xyz': vtk_to_numpy(g.GetPoints().GetData()).reshape(-1).tolist(),
                'arrays': {cd.GetArrayName(i): vtk_to_numpy(cd.GetArray(i)).tolist() for i in range(cd.GetNumberOfArrays())},
                'size_area': vtk_to_numpy(f.GetOutput().GetCellData().GetArray('Area')).tolist()})
print(json.dumps(out))
`

func TestStructuredReadByVTK(t *testing.T) {
	m := twoBlocks(t)
	fields := []Field{squareField(m.NumCells())}
	dir := t.TempDir()
	names, err := WriteStructured(dir, "mesh", m, fields)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(names, " ") != "mesh_0.vts mesh_1.vts mesh.vtm" {
		t.Fatalf("wrote %v", names)
	}
	var got []struct {
		Name     string               `json:"name"`
		Class    string               `json:"class"`
		Dims     []int                `json:"dims"`
		XYZ      []float64            `json:"xyz"`
		Arrays   map[string][]float64 `json:"arrays"`
		SizeArea []float64            `json:"size_area"`
	}
	runPython(t, multiblockScript, &got, dir+"/mesh.vtm")
	if len(got) != 2 {
		t.Fatalf("VTK read %d blocks, want 2", len(got))
	}
	for b, blk := range m.Blocks {
		g := got[b]
		if g.Name != blk.Name || g.Class != "vtkStructuredGrid" || g.Dims[0] != blk.NI || g.Dims[1] != blk.NJ || g.Dims[2] != 1 {
			t.Fatalf("block %d read as %q %s %v, want %q vtkStructuredGrid %d×%d×1", b, g.Name, g.Class, g.Dims, blk.Name, blk.NI, blk.NJ)
		}
		for k, v := range blk.Node {
			if g.XYZ[3*k] != m.Nodes[v][0] || g.XYZ[3*k+1] != m.Nodes[v][1] || g.XYZ[3*k+2] != 0 {
				t.Fatalf("block %d point %d = %v, want %v", b, k, g.XYZ[3*k:3*k+3], m.Nodes[v])
			}
		}
		n := (blk.NI - 1) * (blk.NJ - 1)
		for k := 0; k < n; k++ {
			c := int(blk.FirstCell) + k
			if g.Arrays[AreaName][k] != m.Geo.CellArea[c] || g.Arrays[fields[0].Name][k] != fields[0].Values[c] {
				t.Fatalf("block %d cell %d arrays %v / %v, want %v / %v", b, k, g.Arrays[AreaName][k], g.Arrays[fields[0].Name][k], m.Geo.CellArea[c], fields[0].Values[c])
			}
			if e := relErr(g.SizeArea[k], m.Geo.CellArea[c]); e > 1e-12 {
				t.Fatalf("block %d cell %d: vtkCellSizeFilter area %v, ours %v", b, k, g.SizeArea[k], m.Geo.CellArea[c])
			}
		}
	}
}

func TestStructuredErrors(t *testing.T) {
	m := twoBlocks(t)
	if err := WriteVTS(&bytes.Buffer{}, m, 2, nil); err == nil || !strings.Contains(err.Error(), "block 2 does not exist") {
		t.Fatalf("got %v", err)
	}
	m.Blocks[1].FirstCell = 8
	if err := WriteVTS(&bytes.Buffer{}, m, 1, nil); err == nil || !strings.Contains(err.Error(), "outside the mesh") {
		t.Fatalf("got %v", err)
	}
	u := mixedMesh(t, 2, 2, 0)
	if _, err := WriteStructured(t.TempDir(), "mesh", u, nil); err == nil || !strings.Contains(err.Error(), "no structured blocks") {
		t.Fatalf("got %v", err)
	}
}
