package cgns

import (
	"path/filepath"
	"slices"
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
		if _, err := Write(path, testDeck(twoBlockMesh(t, 6, 3, reverse))); err != nil {
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
