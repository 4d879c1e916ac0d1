package cgns

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestReadSlabSideFirst: HEXA_8 elements of positive volume whose local
// numbering puts nodes 1–4 on a side face (sidehex.cgns, written through
// the CGNS library: read_files_test.go) are read by the face they have on
// the lower plane: two unit squares, counter-clockwise, with the side
// faces' BCs on x = 0 and x = 2. A HEXA_8 whose four lower nodes lie on
// none of its faces (twisthex.cgns) is refused, the error saying so.
func TestReadSlabSideFirst(t *testing.T) {
	dir := readerFiles(t)
	m, notes, err := ReadNotes(filepath.Join(dir, "sidehex.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range notes {
		if strings.Contains(n, "node order is reversed") {
			t.Errorf("note %q: the elements have positive volume and were read the wrong way", n)
		}
	}
	if m.NumCells() != 2 || len(m.Nodes) != 6 || m.NumInterior != 1 || m.NumBoundary() != 6 {
		t.Fatalf("%d cells, %d nodes, %d interior and %d boundary faces; want 2, 6, 1, 6", m.NumCells(), len(m.Nodes), m.NumInterior, m.NumBoundary())
	}
	for c, a := range m.Geo.CellArea {
		if a != 1 {
			t.Errorf("cell %d has area %g, want 1 (counter-clockwise)", c, a)
		}
	}
	if x := m.Geo.CellCentroid[0][0]; x != 0.5 {
		t.Errorf("cell 0 (the first HEXA_8, on 0 ≤ x ≤ 1) has its centroid at x = %g", x)
	}
	for tag, x := range map[string]float64{"inlet": 0, "outlet": 2} {
		lo, hi, _ := m.TagRange(tag)
		if hi-lo != 1 {
			t.Errorf("tag %s has %d faces, want 1", tag, hi-lo)
		} else if p := m.Geo.FaceMid[lo]; p != [2]float64{x, 0.5} {
			t.Errorf("tag %s: its face is at %v, want (%g, 0.5)", tag, p, x)
		}
	}

	_, err = Read(filepath.Join(dir, "twisthex.cgns"))
	if want := "/Slab/dom/hexa: element 1 (HEXA_8) does not stand between the planes z = 0 and 0.5 with one face on each (its nodes on the lower plane: 4 of 8)"; err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("a HEXA_8 with its lower nodes on no face: got %v, want %q", err, want)
	}
}
