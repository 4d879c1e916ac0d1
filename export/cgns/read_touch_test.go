package cgns

import (
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestReadTouchingZoneBCs: two structured zones that touch on x = 1 with
// no 1-to-1 connectivity, each with a BC on the touching side
// (touchbc.cgns, written through the CGNS library: read_files_test.go).
// Merged where they touch, the faces they share are interior: those
// faces of the BCs are left out, with a note naming the BCs and the zones
// (the left zone's BC wholly, so its tag is gone; the right zone's on its
// two faces against the left zone, keeping the one above it), and the
// read goes on. The same BC on a side the file joins by 1-to-1
// connectivity (joinedbc.cgns) contradicts the join and is refused,
// naming the BC and the zones.
func TestReadTouchingZoneBCs(t *testing.T) {
	dir := readerFiles(t)
	m, notes, err := ReadNotes(filepath.Join(dir, "touchbc.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	want := []string{
		"3 coincident nodes merged where zones touch that the file joins by no 1-to-1 connectivity (within 1e-06 of the local face length): left and right",
		"BCs on zone sides that the coincident-node merge joins, left out there as those faces are interior (the sides are an interface the file does not connect): " +
			"left/east (tag east, 2 of its 2 faces, against right), right/west (tag west, 2 of its 3 faces, against left)",
		"boundary condition types in the file: inlet BCInflow, west BCWall, outlet BCOutflow",
	}
	if !slices.Equal(notes, want) {
		t.Errorf("notes %q,\nwant %q", notes, want)
	}
	// 4 + 6 cells of side 0.5 on 18 nodes; 14 boundary faces: 6 of the
	// left zone and 8 of the right, one of them its free face on x = 1.
	if len(m.Nodes) != 18 || m.NumCells() != 10 || m.NumInterior != 13 || m.NumBoundary() != 14 {
		t.Fatalf("%d nodes, %d cells, %d interior and %d boundary faces; want 18, 10, 13, 14", len(m.Nodes), m.NumCells(), m.NumInterior, m.NumBoundary())
	}
	if !slices.Equal(m.Tags, []string{"inlet", "west", "outlet"}) {
		t.Errorf("tags %v, want [inlet west outlet]", m.Tags)
	}
	if lo, hi, _ := m.TagRange("west"); hi-lo != 1 {
		t.Errorf("tag west has %d faces, want 1", hi-lo)
	} else if p := m.Geo.FaceMid[lo]; p != [2]float64{1, 1.25} {
		t.Errorf("tag west: its face is at %v, want (1, 1.25), above the left zone", p)
	}

	_, err = Read(filepath.Join(dir, "joinedbc.cgns"))
	if want := "/Base/left/ZoneBC/east: 2 of its 2 faces lie where the 1-to-1 connectivity joins zone left to right; they are interior faces, which take no BC"; err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("a BC on a joined side: got %v, want %q", err, want)
	}
}
