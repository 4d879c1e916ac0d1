package cgns

import (
	"fmt"
	"math"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// Test meshes of our own: a rectangle [0, 2] × [0, 1] on an nx × ny grid of
// slightly perturbed nodes, tagged "wall" (south), "outlet" (east) and
// "farfield" (north and west).

func gridNodes(nx, ny int) []orb.Point {
	pts := make([]orb.Point, 0, (nx+1)*(ny+1))
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			x, y := 2*float64(i)/float64(nx), float64(j)/float64(ny)
			if i > 0 && i < nx && j > 0 && j < ny {
				x += 0.1 / float64(nx) * math.Sin(float64(3*i+7*j))
				y += 0.1 / float64(ny) * math.Cos(float64(5*i+2*j))
			}
			pts = append(pts, orb.Point{x, y})
		}
	}
	return pts
}

func gridEdges(nx, ny int) []mesh.TaggedEdge {
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	var e []mesh.TaggedEdge
	for i := 0; i < nx; i++ {
		e = append(e, mesh.TaggedEdge{A: id(i, 0), B: id(i+1, 0), Tag: 0})
		e = append(e, mesh.TaggedEdge{A: id(i, ny), B: id(i+1, ny), Tag: 2})
	}
	for j := 0; j < ny; j++ {
		e = append(e, mesh.TaggedEdge{A: id(nx, j), B: id(nx, j+1), Tag: 1})
		e = append(e, mesh.TaggedEdge{A: id(0, j), B: id(0, j+1), Tag: 2})
	}
	return e
}

var gridTags = []string{"wall", "outlet", "farfield"}

// kind selects the cells of square (i, j): 'q' quad, 't' two triangles.
func gridMesh(tb testing.TB, nx, ny int, kind func(i, j int) byte) *mesh.Mesh {
	tb.Helper()
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	start := []int32{0}
	var cn []int32
	add := func(v ...int32) {
		cn = append(cn, v...)
		start = append(start, int32(len(cn)))
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, b, c, d := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			if kind(i, j) == 'q' {
				add(a, b, c, d)
			} else {
				add(a, b, c)
				add(a, c, d)
			}
		}
	}
	m, err := mesh.Build(mesh.Input{Nodes: gridNodes(nx, ny), CellStart: start, CellNodes: cn, Tags: gridTags, Edges: gridEdges(nx, ny)})
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

func triMesh(tb testing.TB, nx, ny int) *mesh.Mesh {
	return gridMesh(tb, nx, ny, func(i, j int) byte { return 't' })
}

func quadMesh(tb testing.TB, nx, ny int) *mesh.Mesh {
	return gridMesh(tb, nx, ny, func(i, j int) byte { return 'q' })
}

func mixedMesh(tb testing.TB, nx, ny int) *mesh.Mesh {
	return gridMesh(tb, nx, ny, func(i, j int) byte {
		if (i+j)%3 == 0 {
			return 't'
		}
		return 'q'
	})
}

// polyMesh is a quad grid whose first row of squares is merged in pairs
// into hexagons (6 nodes: the pair's 4 bottom/top nodes... counted along
// the boundary of the merged pair), giving NGON_n runs between quad runs.
func polyMesh(tb testing.TB, nx, ny int) *mesh.Mesh {
	tb.Helper()
	if nx%2 != 0 {
		tb.Fatal("polyMesh needs an even nx")
	}
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	start := []int32{0}
	var cn []int32
	add := func(v ...int32) {
		cn = append(cn, v...)
		start = append(start, int32(len(cn)))
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			if j == 1 && i%2 == 0 {
				add(id(i, j), id(i+1, j), id(i+2, j), id(i+2, j+1), id(i+1, j+1), id(i, j+1))
				i++
				continue
			}
			add(id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
		}
	}
	m, err := mesh.Build(mesh.Input{Nodes: gridNodes(nx, ny), CellStart: start, CellNodes: cn, Tags: gridTags, Edges: gridEdges(nx, ny)})
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// twoBlockMesh is the rectangle split at x = 1 into two structured blocks
// of nx/2 × ny cells, the second block's i running right to left and its j
// downward-free (i reversed), so the join needs a non-identity transform.
func twoBlockMesh(tb testing.TB, nx, ny int, reverse bool) *mesh.Mesh {
	tb.Helper()
	nodes := gridNodes(nx, ny)
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	h := nx / 2
	var blocks []mesh.Block
	start := []int32{0}
	var cn []int32
	for b := 0; b < 2; b++ {
		ni, nj := h+1, ny+1
		blk := mesh.Block{Name: fmt.Sprintf("block%d", b+1), NI: ni, NJ: nj, Node: make([]int32, ni*nj), FirstCell: int32(len(start) - 1)}
		// grid (i, j) of block b is global node gi(i, j).
		gi := func(i, j int) int32 {
			if b == 0 {
				return id(i, j)
			}
			if reverse {
				// i runs right to left, j top to bottom: still right-handed.
				return id(nx-i, ny-j)
			}
			return id(h+i, j)
		}
		for j := 0; j < nj; j++ {
			for i := 0; i < ni; i++ {
				blk.Node[j*ni+i] = gi(i, j)
			}
		}
		for j := 0; j+1 < nj; j++ {
			for i := 0; i+1 < ni; i++ {
				cn = append(cn, gi(i, j), gi(i+1, j), gi(i+1, j+1), gi(i, j+1))
				start = append(start, int32(len(cn)))
			}
		}
		blocks = append(blocks, blk)
	}
	m, err := mesh.Build(mesh.Input{Nodes: nodes, CellStart: start, CellNodes: cn, Tags: gridTags, Edges: gridEdges(nx, ny), Blocks: blocks})
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// testDeck wraps a mesh with boundary conditions, an air free stream and
// two cell fields.
func testDeck(m *mesh.Mesh) *Deck {
	area := make([]float64, m.NumCells())
	nodes := make([]float64, m.NumCells())
	for c := range area {
		area[c] = m.Geo.CellArea[c]
		nodes[c] = float64(len(m.Cell(c)))
	}
	// Air at sea level, U.S. Standard Atmosphere 1976 (from memory):
	// p = 101325 Pa, T = 288.15 K, ρ = 1.225 kg/m³, a = 340.294 m/s,
	// μ = 1.7894e-5 Pa s; Mach 0.5 at 2° incidence.
	a := 340.294
	u := 0.5 * a
	return &Deck{
		Mesh: m,
		Name: "TestDeck",
		BCs: []BC{
			{Tag: "wall", BCType: "BCWallViscousHeatFlux"},
			{Tag: "outlet", BCType: "BCOutflowSubsonic"},
			{Tag: "farfield", BCType: "BCFarfield"},
		},
		Flow: &FlowState{
			Gamma: 1.4, GasConstant: 287.05, Mach: 0.5,
			Pressure: 101325, Temperature: 288.15, Density: 1.225,
			Velocity:     [2]float64{u * math.Cos(2*math.Pi/180), u * math.Sin(2*math.Pi/180)},
			SpeedOfSound: a, Viscosity: 1.7894e-5, Reynolds: 1.165e7, ReynoldsLength: 1,
			Viscous:    true,
			Sutherland: &Sutherland{ViscosityRef: 1.716e-5, TemperatureRef: 273.15, Constant: 110.4},
			Prandtl:    0.72,
		},
		CellFields: []Field{{Name: "CellArea", Values: area, Exponents: [5]float64{0, 2, 0, 0, 0}}, {Name: "NodeCount", Values: nodes}},
	}
}
