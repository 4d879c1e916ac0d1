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

// gridTags are the tags of the test meshes, a new slice each time as the
// mesh keeps it.
func gridTags() []string { return []string{"wall", "outlet", "farfield"} }

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
	m, err := mesh.Build(mesh.Input{Nodes: gridNodes(nx, ny), CellStart: start, CellNodes: cn, Tags: gridTags(), Edges: gridEdges(nx, ny)})
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

// polygonMesh is a quad grid whose first row of squares is merged in pairs
// into hexagons (6 nodes: the pair's 4 bottom/top nodes... counted along
// the boundary of the merged pair), giving NGON_n runs between quad runs.
func polygonMesh(tb testing.TB, nx, ny int) *mesh.Mesh {
	tb.Helper()
	if nx%2 != 0 {
		tb.Fatal("polygonMesh needs an even nx")
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
	m, err := mesh.Build(mesh.Input{Nodes: gridNodes(nx, ny), CellStart: start, CellNodes: cn, Tags: gridTags(), Edges: gridEdges(nx, ny)})
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// splitRectangle is the rectangle split at x = 1 into two structured blocks
// of nx/2 × ny cells, the second block's i running right to left and its j
// downward-free (i reversed), so the join needs a non-identity transform.
func splitRectangle(tb testing.TB, nx, ny int, reverse bool) *mesh.Mesh {
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
	m, err := mesh.Build(mesh.Input{Nodes: nodes, CellStart: start, CellNodes: cn, Tags: gridTags(), Edges: gridEdges(nx, ny), Blocks: blocks})
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

// structuredMesh builds a one-block mesh from node positions pos(i, j) on
// an ni × nj grid, where node(i, j) gives the mesh node of grid node
// (i, j) (several grid nodes may share one mesh node, which makes
// self-joins) and tag(i, j, side) the tag index of the boundary edge from
// grid node (i, j) along side, or -1.
func structuredMesh(tb testing.TB, name string, ni, nj, nn int, node func(i, j int) int32, pos func(i, j int) orb.Point, edges []mesh.TaggedEdge) *mesh.Mesh {
	tb.Helper()
	nodes := make([]orb.Point, nn)
	blk := mesh.Block{Name: name, NI: ni, NJ: nj, Node: make([]int32, ni*nj)}
	for j := 0; j < nj; j++ {
		for i := 0; i < ni; i++ {
			blk.Node[j*ni+i] = node(i, j)
			nodes[node(i, j)] = pos(i, j)
		}
	}
	start := []int32{0}
	var cn []int32
	for j := 0; j+1 < nj; j++ {
		for i := 0; i+1 < ni; i++ {
			cn = append(cn, node(i, j), node(i+1, j), node(i+1, j+1), node(i, j+1))
			start = append(start, int32(len(cn)))
		}
	}
	m, err := mesh.Build(mesh.Input{Nodes: nodes, CellStart: start, CellNodes: cn, Tags: gridTags(), Edges: edges, Blocks: []mesh.Block{blk}})
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// ringMesh is an O-type block around the annulus 1 ≤ r ≤ 2: i runs
// clockwise once around and its last line of nodes is its first, so the
// block's west side joins its own east side. Tags: wall (r = 1),
// farfield (r = 2); outlet has no faces.
func ringMesh(tb testing.TB, na, nr int) *mesh.Mesh {
	node := func(i, j int) int32 { return int32(j*na + i%na) }
	pos := func(i, j int) orb.Point {
		th, r := -2*math.Pi*float64(i)/float64(na), 1+float64(j)/float64(nr)
		return orb.Point{r * math.Cos(th), r * math.Sin(th)}
	}
	var e []mesh.TaggedEdge
	for i := 0; i < na; i++ {
		e = append(e, mesh.TaggedEdge{A: node(i, 0), B: node(i+1, 0), Tag: 0}, mesh.TaggedEdge{A: node(i, nr), B: node(i+1, nr), Tag: 2})
	}
	return structuredMesh(tb, "ring", na+1, nr+1, na*(nr+1), node, pos, e)
}

// cgridMesh is a C-type block around a flat plate with a wake cut, made by
// the conformal map z = w² of the rectangle w = u + iv, −1 ≤ u ≤ 1,
// 0 ≤ v ≤ 1, which folds the line v = 0 onto the positive real axis: the
// first nw edges of the south side (the wake's lower side) share their
// nodes, reversed, with the last nw (its upper side), and the edges
// between are the plate, tagged wall, with its two sides distinct. West
// and east (the parabola x = 1 − y²/4) are outlet, north farfield.
func cgridMesh(tb testing.TB, m2, nr, nw int) *mesh.Mesh {
	ni, nj := 2*m2+1, nr+1
	// Mesh node ids: grid nodes in order, skipping the upper wake nodes,
	// which reuse their lower twins.
	ids := make([]int32, ni*nj)
	n := int32(0)
	for j := 0; j < nj; j++ {
		for i := 0; i < ni; i++ {
			if j == 0 && i >= ni-1-nw {
				ids[i] = ids[ni-1-i]
				continue
			}
			ids[j*ni+i] = n
			n++
		}
	}
	node := func(i, j int) int32 { return ids[j*ni+i] }
	pos := func(i, j int) orb.Point {
		u, v := -1+2*float64(i)/float64(ni-1), float64(j)/float64(nj-1)
		return orb.Point{u*u - v*v, 2 * u * v}
	}
	var e []mesh.TaggedEdge
	for i := nw; i < ni-1-nw; i++ {
		e = append(e, mesh.TaggedEdge{A: node(i, 0), B: node(i+1, 0), Tag: 0})
	}
	for i := 0; i+1 < ni; i++ {
		e = append(e, mesh.TaggedEdge{A: node(i, nj-1), B: node(i+1, nj-1), Tag: 2})
	}
	for j := 0; j+1 < nj; j++ {
		e = append(e, mesh.TaggedEdge{A: node(0, j), B: node(0, j+1), Tag: 1}, mesh.TaggedEdge{A: node(ni-1, j), B: node(ni-1, j+1), Tag: 1})
	}
	return structuredMesh(tb, "cgrid", ni, nj, int(n), node, pos, e)
}
