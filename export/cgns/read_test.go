package cgns

import (
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"cvdeck/mesh"
)

// TestReadBack: every file written is read back through the CGNS library
// with exactly the same node, cell and face counts and coordinates; an
// unstructured mesh comes back identical array for array.
func TestReadBack(t *testing.T) {
	dir := t.TempDir()
	for _, c := range deckCases(t) {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(dir, c.name+".cgns")
			if _, err := Write(path, c.deck); err != nil {
				t.Fatal(err)
			}
			rd, err := ReadDeck(path)
			if err != nil {
				t.Fatal(err)
			}
			if rd.Name != c.deck.Name || !slices.Equal(rd.BCs, c.deck.BCs) {
				t.Errorf("read base %q with BCs %v, wrote %q with %v", rd.Name, rd.BCs, c.deck.Name, c.deck.BCs)
			}
			got := rd.Mesh
			want := c.deck.Mesh
			sameCounts(t, got, want)
			if len(want.Blocks) == 0 {
				sameUnstructured(t, got, want)
				return
			}
			sameBlocks(t, got, want)
		})
	}
}

func sameCounts(t *testing.T, got, want *mesh.Mesh) {
	t.Helper()
	if len(got.Nodes) != len(want.Nodes) || got.NumCells() != want.NumCells() || got.NumFaces() != want.NumFaces() || got.NumInterior != want.NumInterior {
		t.Fatalf("read %d nodes, %d cells, %d faces (%d interior); wrote %d, %d, %d (%d)",
			len(got.Nodes), got.NumCells(), got.NumFaces(), got.NumInterior, len(want.Nodes), want.NumCells(), want.NumFaces(), want.NumInterior)
	}
	if !slices.Equal(got.Tags, want.Tags) {
		t.Fatalf("read tags %v, wrote %v", got.Tags, want.Tags)
	}
	if !slices.Equal(got.TagStart, want.TagStart) {
		t.Fatalf("read tag ranges %v, wrote %v", got.TagStart, want.TagStart)
	}
}

func sameUnstructured(t *testing.T, got, want *mesh.Mesh) {
	t.Helper()
	if !slices.Equal(got.Nodes, want.Nodes) {
		t.Error("node coordinates differ")
	}
	if !slices.Equal(got.CellStart, want.CellStart) || !slices.Equal(got.CellNodes, want.CellNodes) {
		t.Error("cells differ")
	}
	if !slices.Equal(got.FaceNodes, want.FaceNodes) || !slices.Equal(got.Owner, want.Owner) || !slices.Equal(got.Neighbour, want.Neighbour) || !slices.Equal(got.FaceTag, want.FaceTag) {
		t.Error("faces differ")
	}
}

// sameBlocks compares a structured mesh block by block: node (i, j) of each
// block at the same position, the same cells in the same order.
func sameBlocks(t *testing.T, got, want *mesh.Mesh) {
	t.Helper()
	if len(got.Blocks) != len(want.Blocks) {
		t.Fatalf("read %d blocks, wrote %d", len(got.Blocks), len(want.Blocks))
	}
	for b := range want.Blocks {
		gb, wb := &got.Blocks[b], &want.Blocks[b]
		if gb.NI != wb.NI || gb.NJ != wb.NJ || gb.FirstCell != wb.FirstCell || gb.Name != wb.Name {
			t.Fatalf("block %d: read %s %d×%d from cell %d, wrote %s %d×%d from %d", b, gb.Name, gb.NI, gb.NJ, gb.FirstCell, wb.Name, wb.NI, wb.NJ, wb.FirstCell)
		}
		for k := range wb.Node {
			if got.Nodes[gb.Node[k]] != want.Nodes[wb.Node[k]] {
				t.Fatalf("block %d node (%d, %d): read %v, wrote %v", b, k%wb.NI, k/wb.NI, got.Nodes[gb.Node[k]], want.Nodes[wb.Node[k]])
			}
		}
	}
	for c := 0; c < want.NumCells(); c++ {
		g, w := got.Cell(c), want.Cell(c)
		if len(g) != len(w) {
			t.Fatalf("cell %d: read %d nodes, wrote %d", c, len(g), len(w))
		}
		for k := range w {
			if got.Nodes[g[k]] != want.Nodes[w[k]] {
				t.Fatalf("cell %d node %d: read %v, wrote %v", c, k, got.Nodes[g[k]], want.Nodes[w[k]])
			}
		}
	}
	for f := 0; f < want.NumFaces(); f++ {
		if got.Owner[f] != want.Owner[f] || got.Neighbour[f] != want.Neighbour[f] || got.FaceTag[f] != want.FaceTag[f] {
			t.Fatalf("face %d: read owner %d neighbour %d tag %d, wrote %d %d %d", f, got.Owner[f], got.Neighbour[f], got.FaceTag[f], want.Owner[f], want.Neighbour[f], want.FaceTag[f])
		}
	}
}

// TestWriteAsUnstructured: a structured mesh written as one unstructured
// zone passes cgnscheck and reads back identical, without the blocks.
func TestWriteAsUnstructured(t *testing.T) {
	d := testDeck(cgridMesh(t, 6, 3, 2))
	d.Unstructured = true
	path := filepath.Join(t.TempDir(), "u.cgns")
	if _, err := Write(path, d); err != nil {
		t.Fatal(err)
	}
	cgnscheck(t, path)
	got, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Blocks) != 0 {
		t.Errorf("read %d blocks from an unstructured zone", len(got.Blocks))
	}
	sameCounts(t, got, d.Mesh)
	sameUnstructured(t, got, d.Mesh)
}

// TestReadInterfaces: the joins of whole sides come back as the
// structured view's block interfaces.
func TestReadInterfaces(t *testing.T) {
	for _, reverse := range []bool{false, true} {
		path := filepath.Join(t.TempDir(), "b.cgns")
		if _, err := Write(path, testDeck(splitRectangle(t, 6, 3, reverse))); err != nil {
			t.Fatal(err)
		}
		m, err := Read(path)
		if err != nil {
			t.Fatal(err)
		}
		want := mesh.BlockInterface{A: 0, B: 1, SideA: mesh.East, SideB: mesh.West}
		if reverse {
			want = mesh.BlockInterface{A: 0, B: 1, SideA: mesh.East, SideB: mesh.East, Reversed: true}
		}
		if len(m.Interfaces) != 1 || m.Interfaces[0] != want {
			t.Errorf("reverse=%v: interfaces %+v, want [%+v]", reverse, m.Interfaces, want)
		}
	}
}

// TestReadTouchingZones: two structured zones that share a side but carry
// no 1-to-1 connectivity, as a converter of a plain multi-block grid
// writes them (gridToCGNS; a 5 × 4 and a 5 × 4 block of unit squares side
// by side, one cell thick), read as one mesh: the 5 nodes of
// the shared side merged, with a note naming the zones, the shared side
// interior faces, and nothing left untagged but the outer boundary.
func TestReadTouchingZones(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("2\n6 5 2\n6 5 2\n")
	for blk := range 2 {
		for axis := range 3 {
			for k := range 2 {
				for j := range 5 {
					for i := range 6 {
						b.WriteString(strconv.FormatFloat([]float64{float64(5*blk + i), float64(j), 0.1 * float64(k)}[axis], 'g', -1, 64) + " ")
					}
				}
			}
			b.WriteString("\n")
		}
	}
	file := filepath.Join(dir, "two.cgns")
	gridToCGNS(t, b.String(), file)
	m, notes, err := ReadNotes(file)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.ContainsFunc(notes, func(n string) bool {
		return strings.HasPrefix(n, "5 coincident nodes merged where zones touch that the file joins by no 1-to-1 connectivity") && strings.HasSuffix(n, ": Zone1 and Zone2")
	}) {
		t.Errorf("notes %q, want the 5 merged nodes between Zone1 and Zone2", notes)
	}
	// 10 × 4 unit squares: 11 × 5 nodes, 2·10·4 + 10 + 4 faces, 28 on the
	// boundary (Euler's formula for a planar grid).
	if m.NumCells() != 40 || len(m.Nodes) != 55 || m.NumFaces() != 94 || m.NumBoundary() != 28 {
		t.Errorf("%d cells, %d nodes, %d faces, %d on the boundary; want 40, 55, 94, 28", m.NumCells(), len(m.Nodes), m.NumFaces(), m.NumBoundary())
	}
	// The same file cut short keeps its HDF5 signature: the error says
	// the file may be cut short.
	data, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	cut := filepath.Join(dir, "cut.cgns")
	if err := os.WriteFile(cut, data[:len(data)/3], 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Read(cut); err == nil || !strings.Contains(err.Error(), "begins as an HDF5 file does") || !strings.Contains(err.Error(), "may be cut short") {
		t.Errorf("a file cut short: got %v, want it said it may be cut short", err)
	}
}
