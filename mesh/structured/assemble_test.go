package structured

import (
	"math"
	"sort"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// nozzleWall is the wall of a converging-diverging nozzle half-section of
// our own: y = 0.6 + 0.4 cos(2πx/3) on 0 ≤ x ≤ 3, throat 0.2 at x = 1.5.
func nozzleWall(x float64) float64 { return 0.6 + 0.4*math.Cos(2*math.Pi*x/3) }

// nozzleBlocks returns the nozzle split at x = 1 and x = 2 into three
// blocks of ni wall nodes each and nj nodes across, clustered to the wall.
// interfaceNJ, when non-zero, gives the node count of the second block's
// west side instead, to provoke a mismatch.
func nozzleBlocks(t *testing.T, ni, nj, interfaceNJ int) []*Block {
	t.Helper()
	cut := func(x float64, n int) geometry.Chain {
		// From the axis up to the wall, clustered at the wall.
		f := geometric(n, 0.02)
		for k := range f {
			f[k] = 1 - f[k]
		}
		for a, z := 0, n-1; a < z; a, z = a+1, z-1 {
			f[a], f[z] = f[z], f[a]
		}
		return line(orb.Point{x, 0}, orb.Point{x, nozzleWall(x)}, f, "")
	}
	wall := func(x0, x1 float64) geometry.Chain {
		p := make([]orb.Point, ni)
		for k := range p {
			x := x0 + (x1-x0)*float64(k)/float64(ni-1)
			p[k] = orb.Point{x, nozzleWall(x)}
		}
		return chainOf(p, "wall")
	}
	names := []string{"inlet", "throat", "outlet"}
	var blocks []*Block
	for b := 0; b < 3; b++ {
		x0, x1 := float64(b), float64(b+1)
		west, east := cut(x0, nj), cut(x1, nj)
		if b == 1 && interfaceNJ > 0 {
			west, east = cut(x0, interfaceNJ), cut(x1, interfaceNJ)
		}
		if b == 0 {
			west.Tags = fill(len(west.Tags), "inflow")
		}
		if b == 2 {
			east.Tags = fill(len(east.Tags), "outflow")
		}
		s := BlockSides{
			Name:  names[b],
			South: line(orb.Point{x0, 0}, orb.Point{x1, 0}, uniform(ni), "symmetry"),
			East:  east,
			North: reversed(wall(x0, x1)),
			West:  reversed(west),
		}
		blk, err := TFI(s)
		if err != nil {
			t.Fatal(err)
		}
		blocks = append(blocks, blk)
	}
	return blocks
}

func fill(n int, tag string) []string {
	t := make([]string, n)
	for k := range t {
		t[k] = tag
	}
	return t
}

// assertNoDuplicateNodes fails if two mesh nodes coincide (the interfaces
// must have been merged, common practice for a conforming mesh).
func assertNoDuplicateNodes(t *testing.T, m *mesh.Mesh) {
	t.Helper()
	idx := make([]int, len(m.Nodes))
	for k := range idx {
		idx[k] = k
	}
	sort.Slice(idx, func(a, b int) bool {
		p, q := m.Nodes[idx[a]], m.Nodes[idx[b]]
		if p[0] != q[0] {
			return p[0] < q[0]
		}
		return p[1] < q[1]
	})
	for k := 1; k < len(idx); k++ {
		if dist(m.Nodes[idx[k]], m.Nodes[idx[k-1]]) < 1e-12 {
			t.Fatalf("nodes %d and %d coincide at %v", idx[k-1], idx[k], m.Nodes[idx[k]])
		}
	}
}

func TestAssembleNozzleThreeBlocks(t *testing.T) {
	const ni, nj = 31, 21
	blocks := nozzleBlocks(t, ni, nj, 0)
	m, err := Assemble(blocks, AssembleOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if want := 3*ni*nj - 2*nj; len(m.Nodes) != want {
		t.Errorf("%d nodes, want %d (two interfaces of %d nodes merged)", len(m.Nodes), want, nj)
	}
	if want := 3 * (ni - 1) * (nj - 1); m.NumCells() != want {
		t.Errorf("%d cells, want %d", m.NumCells(), want)
	}
	assertNoDuplicateNodes(t, m)
	// Interfaces: inlet east = throat west, throat east = outlet west, same
	// direction; shared node indices in the structured view.
	want := []mesh.BlockInterface{{A: 0, B: 1, SideA: mesh.East, SideB: mesh.West}, {A: 1, B: 2, SideA: mesh.East, SideB: mesh.West}}
	if len(m.Interfaces) != 2 || m.Interfaces[0] != want[0] || m.Interfaces[1] != want[1] {
		t.Fatalf("interfaces %+v, want %+v", m.Interfaces, want)
	}
	for _, f := range m.Interfaces {
		a, b := m.Blocks[f.A], m.Blocks[f.B]
		for j := 0; j < nj; j++ {
			if na, nb := a.Node[j*a.NI+a.NI-1], b.Node[j*b.NI]; na != nb {
				t.Fatalf("interface %d-%d row %d: nodes %d and %d", f.A, f.B, j, na, nb)
			}
		}
	}
	// The wall nodes are evenly spaced in x over a whole period of the
	// cosine, so the trapezoid sum of the wall polygon is exactly
	// ∫₀³ (0.6 + 0.4 cos(2πx/3)) dx = 1.8 (closed form; trapezoid rule exact
	// for a trigonometric polynomial of low degree over a full period).
	total := 0.0
	for c, a := range m.Geo.CellArea {
		if a <= 0 {
			t.Fatalf("cell %d has area %g", c, a)
		}
		total += a
	}
	if math.Abs(total-1.8) > 1e-12 {
		t.Errorf("cell areas sum to %.15g, want 1.8", total)
	}
	for _, tag := range []string{"symmetry", "wall", "inflow", "outflow"} {
		if _, _, ok := m.TagRange(tag); !ok {
			t.Errorf("tag %q missing; tags %v", tag, m.Tags)
		}
	}
	if m.NumBoundary() != 2*3*(ni-1)+2*(nj-1) {
		t.Errorf("%d boundary faces", m.NumBoundary())
	}
}

// An annulus as one block whose west and east sides are the same radial
// line: the O-grid seam is a self-interface.
func TestAssembleOGridSeam(t *testing.T) {
	const n, nj = 48, 11
	inner := arc(orb.Point{}, 1, 2*math.Pi, 0, n+1, "wall") // clockwise
	outer := arc(orb.Point{}, 5, 0, 2*math.Pi, n+1, "farfield")
	inner.Points[n] = inner.Points[0]
	outer.Points[n] = outer.Points[0]
	seam := line(orb.Point{1, 0}, orb.Point{5, 0}, geometric(nj, 0.01), "")
	b, err := TFI(BlockSides{Name: "ring", South: inner, East: seam, North: outer, West: reversed(seam)})
	if err != nil {
		t.Fatal(err)
	}
	m, err := Assemble([]*Block{b}, AssembleOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Nodes) != n*nj || m.NumCells() != n*(nj-1) {
		t.Errorf("%d nodes %d cells, want %d and %d", len(m.Nodes), m.NumCells(), n*nj, n*(nj-1))
	}
	if len(m.Interfaces) != 1 || m.Interfaces[0] != (mesh.BlockInterface{A: 0, B: 0, SideA: mesh.East, SideB: mesh.West}) {
		t.Errorf("interfaces %+v", m.Interfaces)
	}
	assertNoDuplicateNodes(t, m)
	// Closed form: the area between two inscribed regular n-gons.
	want := 0.5 * (25 - 1) * n * math.Sin(2*math.Pi/n)
	total := 0.0
	for _, a := range m.Geo.CellArea {
		total += a
	}
	if math.Abs(total-want) > 1e-12*want {
		t.Errorf("area %.15g, want %.15g", total, want)
	}
}

func TestAssembleBadInput(t *testing.T) {
	t.Run("interface counts", func(t *testing.T) {
		_, err := Assemble(nozzleBlocks(t, 11, 9, 10), AssembleOptions{})
		wantErr(t, err, `block "inlet" east side (9 nodes)`, `block "throat" west side (10 nodes)`, "lie along the same curve, from (1, 0) to (1, 0.4)", "differ by 1")
	})
	t.Run("interface positions", func(t *testing.T) {
		blocks := nozzleBlocks(t, 11, 9, 0)
		k := blocks[1].SideNode(mesh.West, 4)
		blocks[1].Y[k] += 1e-5
		_, err := Assemble(blocks, AssembleOptions{})
		wantErr(t, err, `block "inlet" east side and block "throat" west side (9 nodes each) lie along the same curve`, "node (10, 4)", "node (0, 4)", "1e-05 apart")
	})
	t.Run("untagged", func(t *testing.T) {
		blocks := nozzleBlocks(t, 11, 9, 0)
		_, err := Assemble(blocks[:2], AssembleOptions{})
		wantErr(t, err, `block "throat" east side is not shared with any block`, "edge 0", "no boundary tag")
	})
	t.Run("T junction", func(t *testing.T) {
		sq := func(name string, x0, y0, x1, y1 float64, nx, ny int) *Block {
			b, err := TFI(BlockSides{Name: name,
				South: line(orb.Point{x0, y0}, orb.Point{x1, y0}, uniform(nx), "wall"),
				East:  line(orb.Point{x1, y0}, orb.Point{x1, y1}, uniform(ny), "wall"),
				North: line(orb.Point{x1, y1}, orb.Point{x0, y1}, uniform(nx), "wall"),
				West:  line(orb.Point{x0, y1}, orb.Point{x0, y0}, uniform(ny), "wall")})
			if err != nil {
				t.Fatal(err)
			}
			return b
		}
		_, err := Assemble([]*Block{sq("left", 0, 0, 1, 1, 3, 3), sq("low", 1, 0, 2, 0.5, 3, 2), sq("high", 1, 0.5, 2, 1, 3, 2)}, AssembleOptions{})
		// low's west side lies along the lower half of left's east side.
		wantErr(t, err, `block "left" east side and block "low" west side run along each other from (1, 0) to (1, 0.5)`, "with 2 and 2 nodes there",
			`that stretch is only part of block "left" east side;`)
	})
	t.Run("clockwise block", func(t *testing.T) {
		b := NewBlock("flipped", 2, 2)
		copy(b.X, []float64{0, 0, 1, 1})
		copy(b.Y, []float64{0, 1, 0, 1})
		for s := range b.Tags {
			b.Tags[s][0] = "wall"
		}
		_, err := Assemble([]*Block{b}, AssembleOptions{})
		wantErr(t, err, `block 0 "flipped" has signed area -1`)
	})
	t.Run("sizes", func(t *testing.T) {
		b := NewBlock("short", 3, 3)
		b.X = b.X[:5]
		_, err := Assemble([]*Block{b}, AssembleOptions{})
		wantErr(t, err, `block "short": 3 × 3 nodes need 9 coordinates, have 5 x`)
	})
}

func wantErr(t *testing.T, err error, parts ...string) {
	t.Helper()
	if err == nil {
		t.Fatalf("no error; want one containing %q", parts)
	}
	for _, p := range parts {
		if !strings.Contains(err.Error(), p) {
			t.Errorf("error %q lacks %q", err, p)
		}
	}
}

func TestSplitI(t *testing.T) {
	b := nozzleBlocks(t, 21, 5, 0)[1]
	parts, err := b.SplitI(5, 12)
	if err != nil {
		t.Fatal(err)
	}
	if len(parts) != 3 || parts[0].NI != 6 || parts[1].NI != 8 || parts[2].NI != 9 {
		t.Fatalf("pieces %d", len(parts))
	}
	if parts[2].At(8, 4) != b.At(20, 4) || parts[1].At(0, 2) != b.At(5, 2) {
		t.Error("pieces do not hold the original nodes")
	}
	if _, err := b.SplitI(12, 5); err == nil {
		t.Error("cuts out of order accepted")
	}
}

// Thin blocks: a layer 2% as thick as it is long has sides within the 5%
// matching distance of each other. Only the coincident sides may pair: the
// layer's wall and its outer side are boundaries, and stacked on another
// block its outer side joins that block's floor.
func TestAssembleThinBlocks(t *testing.T) {
	sq := func(name string, y0, y1 float64, south, north string) *Block {
		b, err := TFI(BlockSides{Name: name,
			South: line(orb.Point{0, y0}, orb.Point{1, y0}, uniform(11), south),
			East:  line(orb.Point{1, y0}, orb.Point{1, y1}, uniform(3), "out"),
			North: line(orb.Point{1, y1}, orb.Point{0, y1}, uniform(11), north),
			West:  line(orb.Point{0, y1}, orb.Point{0, y0}, uniform(3), "in")})
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	if _, err := Assemble([]*Block{sq("layer", 0, 0.02, "wall", "far")}, AssembleOptions{}); err != nil {
		t.Errorf("lone thin layer: %v", err)
	}
	m, err := Assemble([]*Block{sq("layer", 0, 0.02, "wall", ""), sq("above", 0.02, 0.04, "", "far")}, AssembleOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := mesh.BlockInterface{A: 0, B: 1, SideA: mesh.North, SideB: mesh.South} // both run west to east
	if len(m.Interfaces) != 1 || m.Interfaces[0] != want {
		t.Errorf("interfaces %+v, want %+v", m.Interfaces, want)
	}
}

// rect returns a block over [x0, x1] × [y0, y1] with every side tagged
// (free cuts carry their curve's name as a tag in a case) and the given
// arc-length fractions along its south and north sides.
func rect(t *testing.T, name string, x0, y0, x1, y1 float64, south, north []float64, nj int) *Block {
	t.Helper()
	b, err := TFI(BlockSides{Name: name,
		South: line(orb.Point{x0, y0}, orb.Point{x1, y0}, south, name+"_s"),
		East:  line(orb.Point{x1, y0}, orb.Point{x1, y1}, uniform(nj), name+"_e"),
		North: reversed(line(orb.Point{x0, y1}, orb.Point{x1, y1}, north, name+"_n")),
		West:  line(orb.Point{x0, y1}, orb.Point{x0, y0}, uniform(nj), name+"_w")})
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// Two blocks stacked on the line y = 0.02 whose sides there are tagged and
// end where each other ends, but do not match node for node: they are
// named with their sides and counts, or the worst offset, and not as two
// boundaries that run close nor as a touching corner.
func TestAssembleSidesAlongOneLine(t *testing.T) {
	t.Run("counts", func(t *testing.T) {
		lower := rect(t, "lower", 0, 0, 0.4, 0.02, uniform(121), uniform(121), 5)
		upper := rect(t, "upper", 0, 0.02, 0.4, 0.06, uniform(131), uniform(131), 5)
		_, err := Assemble([]*Block{upper, lower}, AssembleOptions{})
		wantErr(t, err, `block "upper" south side (131 nodes) and block "lower" north side (121 nodes) lie along the same curve, from (0, 0.02) to (0.4, 0.02)`, "differ by 10 nodes")
	})
	t.Run("spacing", func(t *testing.T) {
		// Uniform fractions k/120 against (k/120)²: the largest offset is
		// 0.4·max(f − f²) = 0.4/4 = 0.1, at f = ½, node 60 (elementary
		// calculus).
		sq := uniform(121)
		for k := range sq {
			sq[k] *= sq[k]
		}
		lower := rect(t, "lower", 0, 0, 0.4, 0.02, uniform(121), uniform(121), 5)
		upper := rect(t, "upper", 0, 0.02, 0.4, 0.06, sq, uniform(121), 5)
		_, err := Assemble([]*Block{upper, lower}, AssembleOptions{})
		wantErr(t, err, `block "upper" south side and block "lower" north side (121 nodes each) lie along the same curve`,
			"node (60, 0) at (0.1, 0.02) and node (60, 4) at (0.2, 0.02), are 0.1 apart")
	})
	t.Run("arc", func(t *testing.T) {
		// Two sectors of an annulus meeting on the arc r = 2 with 21 and 25
		// nodes.
		sector := func(name string, r0, r1 float64, n int) *Block {
			b, err := TFI(BlockSides{Name: name,
				South: line(orb.Point{r0, 0}, orb.Point{r1, 0}, uniform(5), name+"_s"),
				East:  arc(orb.Point{}, r1, 0, math.Pi/2, n, name+"_e"),
				North: line(orb.Point{0, r1}, orb.Point{0, r0}, uniform(5), name+"_n"),
				West:  arc(orb.Point{}, r0, math.Pi/2, 0, n, name+"_w")})
			if err != nil {
				t.Fatal(err)
			}
			return b
		}
		_, err := Assemble([]*Block{sector("inner", 1, 2, 21), sector("outer", 2, 3, 25)}, AssembleOptions{})
		wantErr(t, err, `block "inner" east side (21 nodes) and block "outer" west side (25 nodes) lie along the same curve`, "differ by 4 nodes")
	})
}

// A block standing on part of another's side with no node in common: its
// south side runs along the middle of the other's north side. Without the
// overlap check the two would pass as separate boundaries on one line.
func TestAssemblePartOfASide(t *testing.T) {
	base := rect(t, "base", 0, 0, 2, 1, uniform(4), uniform(4), 3) // north nodes at x = 0, 2/3, 4/3, 2
	top := rect(t, "top", 0.5, 1, 1.5, 2, uniform(3), uniform(3), 3)
	_, err := Assemble([]*Block{base, top}, AssembleOptions{})
	wantErr(t, err, `block "base" north side and block "top" south side run along each other from (0.6667, 1) to (1.333, 1)`,
		`that stretch is only part of block "base" north side and of block "top" south side`)
	// Set apart by a millionth, the two are boundaries that do not meet.
	top = rect(t, "top", 0.5, 1+1e-6, 1.5, 2, uniform(3), uniform(3), 3)
	if _, err := Assemble([]*Block{base, top}, AssembleOptions{}); err != nil {
		t.Errorf("blocks a millionth apart: %v", err)
	}
}
