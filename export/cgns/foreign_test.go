package cgns

import (
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// foreignFiles compiles testdata/foreign.c against the CGNS library with
// the C compiler cgo uses and runs it, returning the folder of the files it
// wrote through the library's raw calls (conventions listed in foreign.c).
func foreignFiles(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	bin := compileC(t, filepath.Join("testdata", "foreign.c"), "testdata/foreign.c")
	if out, err := exec.Command(bin, dir).CombinedOutput(); err != nil {
		t.Fatalf("run foreign: %v\n%s", err, out)
	}
	return dir
}

// grid3 is the 3 × 3 node grid of foreign.c, 0-based node i + 3j.
func grid3() []orb.Point {
	var p []orb.Point
	for j := 0; j < 3; j++ {
		for i := 0; i < 3; i++ {
			p = append(p, orb.Point{float64(i), float64(j)})
		}
	}
	return p
}

func TestReadForeignUnstructured(t *testing.T) {
	dir := foreignFiles(t)
	cases := []struct {
		file string
		want mesh.Input
		bcs  []BC
	}{
		// Cells in element-number order: the QUAD_4 section (elements
		// 9..11) before the TRI_3 one (12..13), though written after it.
		// Tags: the family "outflow" first, then the BCs' own names.
		{"unordered.cgns", mesh.Input{
			CellStart: []int32{0, 4, 8, 12, 15, 18},
			CellNodes: []int32{0, 1, 4, 3, 1, 2, 5, 4, 3, 4, 7, 6, 4, 5, 8, 4, 8, 7},
			Tags:      []string{"outflow", "bottom", "top"},
			Edges: []mesh.TaggedEdge{{A: 2, B: 5, Tag: 0}, {A: 5, B: 8, Tag: 0},
				{A: 0, B: 1, Tag: 1}, {A: 1, B: 2, Tag: 1}, {A: 6, B: 7, Tag: 2}, {A: 7, B: 8, Tag: 2}},
		}, []BC{{"outflow", "BCOutflow"}, {"bottom", "BCWall"}, {"top", "BCSymmetryPlane"}}},
		// MIXED elements 1..7: quad, bar, tri, quad, tri, bar, quad.
		{"mixedbars.cgns", mesh.Input{
			CellStart: []int32{0, 4, 7, 11, 14, 18},
			CellNodes: []int32{0, 1, 4, 3, 4, 5, 8, 1, 2, 5, 4, 4, 8, 7, 3, 4, 7, 6},
			Tags:      []string{"base1", "base2"},
			Edges:     []mesh.TaggedEdge{{A: 0, B: 1, Tag: 0}, {A: 1, B: 2, Tag: 1}},
		}, []BC{{"base1", "BCWall"}, {"base2", "BCWall"}}},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			rd, err := ReadDeck(filepath.Join(dir, c.file))
			if err != nil {
				t.Fatal(err)
			}
			// FamilySpecified takes the family's FamilyBC (SIDS 12.8).
			if !slices.Equal(rd.BCs, c.bcs) {
				t.Errorf("BCs %v, want %v", rd.BCs, c.bcs)
			}
			got := rd.Mesh
			c.want.Nodes = grid3()
			want, err := mesh.Build(c.want)
			if err != nil {
				t.Fatal(err)
			}
			sameCounts(t, got, want)
			sameUnstructured(t, got, want)
		})
	}
}

func TestReadForeignStructured(t *testing.T) {
	dir := foreignFiles(t)
	for _, file := range []string{"twozone.cgns", "onesided.cgns", "twozone3d.cgns"} {
		t.Run(file, func(t *testing.T) {
			m, notes, err := ReadNotes(filepath.Join(dir, file))
			if err != nil {
				t.Fatal(err)
			}
			checkTwoZone(t, m)
			// The front and back BCs are left out, and a note says so
			// (kept, the front by its nodes would tag the right zone's
			// every boundary edge); another gives each tag's BC type as
			// foreign.c writes it.
			types := "boundary condition types in the file: inlet BCInflow, walls BCWall, outlet BCOutflow"
			want := []string{types}
			switch file {
			case "onesided.cgns":
				want = []string{strings.Replace(types, "BCWall", "BCWall or BCWallViscous", 1)}
				if _, err := ReadDeck(filepath.Join(dir, file)); err == nil || !strings.Contains(err.Error(), "one tag takes one boundary condition") {
					t.Errorf("ReadDeck of walls BCs of two types: %v", err)
				}
			case "twozone3d.cgns":
				want = []string{"a 3D base read as 2D: the k = 1 plane of each structured zone; BCs on the front and back left out: " +
					"left/front (tag front), left/back (tag back), right/frontnodes (tag frontnodes)", types}
			}
			if !slices.Equal(notes, want) {
				t.Errorf("notes %q, want %q", notes, want)
			}
		})
	}
}

// checkTwoZone checks the mesh of foreign.c's two structured zones.
func checkTwoZone(t *testing.T, m *mesh.Mesh) {
	t.Helper()
	// Two 2 × 2-cell zones on [0, 1] × [0, 1] and [1, 2] × [0, 1] sharing
	// 3 nodes: 15 nodes, 8 cells, 10 interior and 12 boundary faces.
	if len(m.Nodes) != 15 || m.NumCells() != 8 || m.NumInterior != 10 || m.NumBoundary() != 12 {
		t.Fatalf("read %d nodes, %d cells, %d interior and %d boundary faces; want 15, 8, 10, 12", len(m.Nodes), m.NumCells(), m.NumInterior, m.NumBoundary())
	}
	positiveAreaAndTags(t, m, 2, "the left-handed zone was not turned counter-clockwise")
	// Each tag's faces lie on its side: inlet x = 0, walls y = 0, outlet
	// x = 2; the 4 faces on y = 1 carry no BC.
	check := func(tag string, n int, on func(p orb.Point) bool) {
		lo, hi, _ := m.TagRange(tag)
		if hi-lo != n {
			t.Errorf("tag %s has %d faces, want %d", tag, hi-lo, n)
		}
		for f := lo; f < hi; f++ {
			if !on(m.Geo.FaceMid[f]) {
				t.Errorf("tag %s face %d at %v is off its side", tag, f, m.Geo.FaceMid[f])
			}
		}
	}
	check("inlet", 2, func(p orb.Point) bool { return p[0] == 0 })
	check("walls", 4, func(p orb.Point) bool { return p[1] == 0 })
	check("outlet", 2, func(p orb.Point) bool { return p[0] == 2 })
	if lo, hi := m.UntaggedRange(); hi-lo != 4 {
		t.Errorf("%d untagged faces, want 4", hi-lo)
	}
	want := []mesh.BlockInterface{{A: 0, B: 1, SideA: mesh.East, SideB: mesh.South}}
	if !slices.Equal(m.Interfaces, want) {
		t.Errorf("interfaces %+v, want %+v", m.Interfaces, want)
	}
	if len(m.Blocks) != 2 || m.Blocks[1].FirstCell != 4 || m.Blocks[1].Name != "right" {
		t.Errorf("blocks %+v", m.Blocks)
	}
}

// TestReadConverted: a file converted to ADF storage by the CGNS tools'
// cgnsconvert reads back as the same mesh.
func TestReadConverted(t *testing.T) {
	dir := t.TempDir()
	d := testDeck(mixedMesh(t, 6, 4))
	src, adf := filepath.Join(dir, "deck.cgns"), filepath.Join(dir, "deck.adf")
	if _, err := Write(src, d); err != nil {
		t.Fatal(err)
	}
	if out, err := exec.Command(tool(t, "cgnsconvert"), "-a", src, adf).CombinedOutput(); err != nil {
		t.Fatalf("cgnsconvert -a: %v\n%s", err, out)
	}
	if b, err := os.ReadFile(adf); err != nil || len(b) < 8 || string(b[:4]) == "\x89HDF" {
		t.Fatalf("cgnsconvert -a did not write an ADF file: %v", err)
	}
	got, err := Read(adf)
	if err != nil {
		t.Fatal(err)
	}
	sameCounts(t, got, d.Mesh)
	sameUnstructured(t, got, d.Mesh)
}

// TestReadRejects: files cvdeck cannot read get an error naming the node.
func TestReadRejects(t *testing.T) {
	dir := foreignFiles(t)
	_, err := Read(filepath.Join(dir, "highorder.cgns"))
	if err == nil || !strings.Contains(err.Error(), "/Imported/curved/p2") || !strings.Contains(err.Error(), "TRI_6") {
		t.Errorf("high-order section: got %v, want an error naming /Imported/curved/p2 and TRI_6", err)
	}
	_, err = Read(filepath.Join(dir, "pointjoin.cgns"))
	if err == nil || !strings.Contains(err.Error(), "/Imported/left/ZoneGridConnectivity/toright is a GridConnectivity_t (Abutting1to1)") {
		t.Errorf("point-list join: got %v, want an error naming /Imported/left/ZoneGridConnectivity/toright", err)
	}
	junk := filepath.Join(dir, "junk.cgns")
	os.WriteFile(junk, []byte("not a CGNS file\n"), 0o644)
	if _, err := Read(junk); err == nil || !strings.Contains(err.Error(), junk+" is not a CGNS file") {
		t.Errorf("junk file: got %v, want an error saying the file is not CGNS", err)
	}

	if _, err := Read(filepath.Join(dir, "missing.cgns")); err == nil || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: got %v, want a not-exist error", err)
	}
}

// sheetNodes are the k = 1 plane of foreign.c's sheet files: 21 × 11
// nodes, x = 0.1 j + 0.002 i (20 − i), y = 0.1 i + 0.02 j² (i along y, so
// the zone is left-handed), computed by the same IEEE operations as there.
func sheetNodes() []orb.Point {
	const ni, nj = 21, 11
	var pts []orb.Point
	for j := 0; j < nj; j++ {
		for i := 0; i < ni; i++ {
			fi, fj := float64(i), float64(j)
			pts = append(pts, orb.Point{0.1*fj + 0.002*fi*(20-fi), 0.1*fi + 0.02*fj*fj})
		}
	}
	return pts
}

// TestReadOnePlaneAndSlabZones: structured zones of a 3D base written
// through the CGNS library's own calls (foreign.c), one node plane thick
// (sheet1.cgns) and one cell thick (sheet2.cgns), read as the 2D mesh of
// their k = 1 plane: the same nodes, 200 quadrilaterals, and a total area
// equal to the shoelace area of the grid's boundary loop (Green's
// theorem). A second plane that is not the first moved in z
// (sheet2-skewed.cgns) is refused.
func TestReadOnePlaneAndSlabZones(t *testing.T) {
	dir := foreignFiles(t)
	pts := sheetNodes()
	for _, name := range []string{"sheet1.cgns", "sheet2.cgns"} {
		m, err := Read(filepath.Join(dir, name))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if m.NumCells() != 200 || len(m.Nodes) != len(pts) {
			t.Fatalf("%s: %d cells, %d nodes; want 200, %d", name, m.NumCells(), len(m.Nodes), len(pts))
		}
		for k, p := range pts {
			if m.Nodes[k] != p {
				t.Fatalf("%s: node %d at %v, want %v", name, k, m.Nodes[k], p)
			}
		}
		// Boundary loop: j = 0 row, i = ni−1 column, j = nj−1 row back,
		// i = 0 column back.
		const ni, nj = 21, 11
		var loop []orb.Point
		for i := 0; i < ni; i++ {
			loop = append(loop, pts[i])
		}
		for j := 1; j < nj; j++ {
			loop = append(loop, pts[j*ni+ni-1])
		}
		for i := ni - 2; i >= 0; i-- {
			loop = append(loop, pts[(nj-1)*ni+i])
		}
		for j := nj - 2; j > 0; j-- {
			loop = append(loop, pts[j*ni])
		}
		want := 0.0
		for k, p := range loop {
			q := loop[(k+1)%len(loop)]
			want += 0.5 * (p[0]*q[1] - q[0]*p[1])
		}
		got := 0.0
		for _, a := range m.Geo.CellArea {
			got += a
		}
		if math.Abs(got-math.Abs(want)) > 1e-13 {
			t.Errorf("%s: total area %.16g, boundary loop %.16g", name, got, math.Abs(want))
		}
	}
	if _, err := Read(filepath.Join(dir, "sheet2-skewed.cgns")); err == nil || !strings.Contains(err.Error(), "moved in z") {
		t.Errorf("a skewed second plane read without complaint: %v", err)
	}
}

// TestReadForeignSlab: an unstructured 2D case stored one cell thick in a
// 3D base (slab3d.cgns of foreign.c) reads as its lower plane: 3 cells of
// total area 2, all counter-clockwise (the upside-down HEXA_8 included),
// 6 nodes, the side faces tagged as written and the front and back faces
// (with their symmetry BC, and a BC listing the front plane's nodes, which
// lie on the boundary but on one plane only) left out, which a note says.
func TestReadForeignSlab(t *testing.T) {
	m, notes, err := ReadNotes(filepath.Join(foreignFiles(t), "slab3d.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"a 3D base read as 2D: zone dom, a slab one cell thick between z = 0.5 and z = 0.75, read as its lower plane; " +
		"BCs on the front and back left out: symmetry (tag symmetry, 4 of its 4 faces), frontnodes (tag frontnodes, by its nodes)",
		"boundary condition types in the file: inlet BCInflow, walls BCWall, outlet BCOutflow"}
	if !slices.Equal(notes, want) {
		t.Errorf("notes %q, want %q", notes, want)
	}
	if m.NumCells() != 3 || len(m.Nodes) != 6 || m.NumInterior != 2 || m.NumBoundary() != 6 {
		t.Fatalf("%d cells, %d nodes, %d interior and %d boundary faces; want 3, 6, 2, 6", m.NumCells(), len(m.Nodes), m.NumInterior, m.NumBoundary())
	}
	positiveAreaAndTags(t, m, 2, "a cell is turned the wrong way")
	for tag, n := range map[string]int{"inlet": 1, "walls": 4, "outlet": 1} {
		if lo, hi, _ := m.TagRange(tag); hi-lo != n {
			t.Errorf("tag %s has %d faces, want %d", tag, hi-lo, n)
		}
	}
}

// positiveAreaAndTags checks that every cell of m has positive area (else the
// reason is why) and that they add up to want, and that the tags are
// foreign.c's inlet, walls and outlet.
func positiveAreaAndTags(t *testing.T, m *mesh.Mesh, want float64, why string) {
	t.Helper()
	area := 0.0
	for c, a := range m.Geo.CellArea {
		if a <= 0 {
			t.Errorf("cell %d has area %g; %s", c, a, why)
		}
		area += a
	}
	if math.Abs(area-want) > 1e-14 {
		t.Errorf("total area %g, want %g", area, want)
	}
	if !slices.Equal(m.Tags, []string{"inlet", "walls", "outlet"}) {
		t.Fatalf("tags %v, want [inlet walls outlet]", m.Tags)
	}
}
