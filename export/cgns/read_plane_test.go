package cgns

import (
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/export/vtk"
	"cvdeck/mesh"
)

// TestReadPlaneZonesConverted: single structured zones of our own lying
// on y = 0.25 (9 × 1 × 6 nodes) and on x = −0.75 (1 × 7 × 5 nodes, its
// (j, k) left-handed in (y, z)), written through the CGNS library into a
// 3D base (gridToCGNS), read as 2D meshes on the two coordinates that vary, with the
// notes saying so. Each cell's area equals the shoelace area of its four
// corners computed here from the grid formulas, and every cell is
// counter-clockwise.
func TestReadPlaneZonesConverted(t *testing.T) {
	cases := []struct {
		name       string
		n          [3]int
		node       func(a, b int) [3]float64 // the node at 2D index (a, b)
		uv         func(p [3]float64) orb.Point
		notes      []string
		leftHanded bool
	}{
		{"xz", [3]int{9, 1, 6}, func(i, k int) [3]float64 {
			fi, fk := float64(i), float64(k)
			return [3]float64{0.1*fi + 0.01*fk*fk, 0.25, 0.08*fk + 0.003*fi*(8-fi)}
		}, func(p [3]float64) orb.Point { return orb.Point{p[0], p[2]} }, []string{
			"a plane mesh on y = 0.25, read as 2D with (x, z) taken as (x, y), seen from −y (y dropped; files written from it, such as check -o's, are in that (x, y) plane)",
			"a 3D base read as 2D: the j = 1 plane of each structured zone",
		}, false},
		{"yz", [3]int{1, 7, 5}, func(j, k int) [3]float64 {
			fj, fk := float64(j), float64(k)
			return [3]float64{-0.75, 0.12*fk + 0.004*fj*fj, 0.1*fj + 0.01*fk*(4-fk)}
		}, func(p [3]float64) orb.Point { return orb.Point{p[1], p[2]} }, []string{
			"a plane mesh on x = -0.75, read as 2D with (y, z) taken as (x, y), seen from +x (x dropped; files written from it, such as check -o's, are in that (x, y) plane)",
			"a 3D base read as 2D: the i = 1 plane of each structured zone",
		}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			// The 2D index directions are the two of more than one node.
			var dims []int
			for _, v := range c.n {
				if v > 1 {
					dims = append(dims, v)
				}
			}
			nu, nv := dims[0], dims[1]
			var b strings.Builder
			b.WriteString("1\n" + strconv.Itoa(c.n[0]) + " " + strconv.Itoa(c.n[1]) + " " + strconv.Itoa(c.n[2]) + "\n")
			for axis := range 3 {
				for v := range nv {
					for u := range nu {
						b.WriteString(strconv.FormatFloat(c.node(u, v)[axis], 'g', -1, 64) + " ")
					}
				}
				b.WriteString("\n")
			}
			file := filepath.Join(t.TempDir(), c.name+".cgns")
			gridToCGNS(t, b.String(), file)
			m, notes, err := ReadNotes(file)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(notes, c.notes) {
				t.Errorf("notes %q, want %q", notes, c.notes)
			}
			if m.NumCells() != (nu-1)*(nv-1) || len(m.Nodes) != nu*nv {
				t.Fatalf("%d cells, %d nodes; want %d, %d", m.NumCells(), len(m.Nodes), (nu-1)*(nv-1), nu*nv)
			}
			for v := range nv {
				for u := range nu {
					if got, want := m.Nodes[v*nu+u], c.uv(c.node(u, v)); got != want {
						t.Fatalf("node (%d, %d) at %v, want %v", u, v, got, want)
					}
				}
			}
			// Shoelace area of each cell's corners, by the grid formulas.
			sign := 1.0
			if c.leftHanded {
				sign = -1
			}
			for v := range nv - 1 {
				for u := range nu - 1 {
					q := []orb.Point{c.uv(c.node(u, v)), c.uv(c.node(u+1, v)), c.uv(c.node(u+1, v+1)), c.uv(c.node(u, v+1))}
					want := 0.0
					for k, p := range q {
						r := q[(k+1)%4]
						want += 0.5 * (p[0]*r[1] - r[0]*p[1])
					}
					if want*sign <= 0 {
						t.Fatalf("cell (%d, %d): the grid is not as handed as the case says (area %g)", u, v, want)
					}
					if got := m.Geo.CellArea[v*(nu-1)+u]; math.Abs(got-math.Abs(want)) > 1e-14 {
						t.Errorf("cell (%d, %d) has area %.17g, want %.17g", u, v, got, math.Abs(want))
					}
				}
			}
		})
	}
}

// TestReadPlaneJoinedZones: two structured zones of a 3D base on the plane
// y = 0.25 (xzjoin.cgns, written through the CGNS library: read_files_test.go),
// one a single node plane in j, the other in i and left-handed, joined by
// 1-to-1 connectivity across their different index directions, with BCs
// at IFaceCenter, KFaceCenter, by a vertex range and by a vertex list:
// read as the same mesh as foreign.c's two zones on z = const, the BCs
// on the zones' own planes left out, and the join kept as a block
// interface. With the right zone's j running down against the left zone's
// k (xzjoinrev.cgns, Transforms with negative entries), the same mesh
// with the interface reversed.
func TestReadPlaneJoinedZones(t *testing.T) {
	dir := readerFiles(t)
	m, notes, err := ReadNotes(filepath.Join(dir, "xzjoin.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	want := []string{
		"a plane mesh on y = 0.25, read as 2D with (x, z) taken as (x, y), seen from −y (y dropped; files written from it, such as check -o's, are in that (x, y) plane)",
		"a 3D base read as 2D: the node plane of each structured zone (j = 1 of left, i = 1 of right); BCs on the front and back left out: " +
			"left/front (tag front), left/planenodes (tag planenodes), right/side (tag side)",
		"boundary condition types in the file: inlet BCInflow, walls BCWall, outlet BCOutflow",
	}
	if !slices.Equal(notes, want) {
		t.Errorf("notes %q, want %q", notes, want)
	}
	checkTwoZone(t, m)

	m, err = Read(filepath.Join(dir, "xzjoinrev.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Nodes) != 15 || m.NumCells() != 8 || m.NumInterior != 10 || m.NumBoundary() != 12 {
		t.Fatalf("reversed: %d nodes, %d cells, %d interior and %d boundary faces; want 15, 8, 10, 12", len(m.Nodes), m.NumCells(), m.NumInterior, m.NumBoundary())
	}
	positiveAreaAndTags(t, m, 2, "a zone is turned the wrong way")
	if want := []mesh.BlockInterface{{A: 0, B: 1, SideA: mesh.East, SideB: mesh.South, Reversed: true}}; !slices.Equal(m.Interfaces, want) {
		t.Errorf("reversed: interfaces %+v, want %+v", m.Interfaces, want)
	}
	if lo, hi, _ := m.TagRange("walls"); hi-lo != 4 {
		t.Errorf("reversed: tag walls has %d faces, want 4", hi-lo)
	} else {
		for f := lo; f < hi; f++ {
			if m.Geo.FaceMid[f][1] != 0 {
				t.Errorf("reversed: walls face %d at %v is off z = 0", f, m.Geo.FaceMid[f])
			}
		}
	}
}

// TestReadPlaneUnstructured: an unstructured zone of a 2D base in 3D
// space on the plane x = 2 (each node's x off by up to 3e-14, roundoff),
// its quadrilaterals clockwise seen from +x, reads as the 3 × 3 grid of
// unit squares in (y, z), turned counter-clockwise, with its BAR_2 BCs on
// their sides; the note on the plane is the one the VTK reader gives a
// legacy VTK file of the same cells. Off the plane by 1e-6 (a tilt), the
// zone is refused.
func TestReadPlaneUnstructured(t *testing.T) {
	dir := readerFiles(t)
	m, notes, err := ReadNotes(filepath.Join(dir, "xplane.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	// The file's x is 2 + 1e-14·(n mod 4) (read_files_test.go): a spread
	// of 3e-14 as stored in doubles (2 + 3e-14 rounds to 2 + 3.0198e-14),
	// within 1e-12 of the largest coordinate 2, taken as one plane at the
	// mean 2 + 1.33e-14, which 9 digits give as 2 (hand-computed).
	plane := "a plane mesh on x = 2 (the points' x spread over 3.02e-14, within the 2e-12 that rounding gives: taken as one plane at their mean), read as 2D with (y, z) taken as (x, y), seen from +x (x dropped; files written from it, such as check -o's, are in that (x, y) plane)"
	want := []string{plane,
		"all 4 cells of /Plane/dom run clockwise seen from +x (negative signed area) as the file lists them; their node order is reversed",
		"boundary condition types in the file: bottom BCWall, right BCOutflow"}
	if !slices.Equal(notes, want) {
		t.Errorf("notes %q, want %q", notes, want)
	}
	if len(m.Nodes) != 9 || m.NumCells() != 4 {
		t.Fatalf("%d nodes, %d cells; want 9, 4", len(m.Nodes), m.NumCells())
	}
	for n, p := range m.Nodes {
		if want := grid3()[n]; p != want {
			t.Errorf("node %d at %v, want %v", n, p, want)
		}
	}
	for c, a := range m.Geo.CellArea {
		if a != 1 {
			t.Errorf("cell %d has area %g, want 1", c, a)
		}
	}
	for tag, on := range map[string]func(p orb.Point) bool{
		"bottom": func(p orb.Point) bool { return p[1] == 0 },
		"right":  func(p orb.Point) bool { return p[0] == 2 },
	} {
		lo, hi, _ := m.TagRange(tag)
		if hi-lo != 2 {
			t.Errorf("tag %s has %d faces, want 2", tag, hi-lo)
		}
		for f := lo; f < hi; f++ {
			if !on(m.Geo.FaceMid[f]) {
				t.Errorf("tag %s face %d at %v is off its side", tag, f, m.Geo.FaceMid[f])
			}
		}
	}

	// The same points and cells as a legacy VTK file: the same note.
	var b strings.Builder
	b.WriteString("# vtk DataFile Version 3.0\nx = 2\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 9 double\n")
	for n := range 9 {
		b.WriteString(strconv.FormatFloat(2+1e-14*float64(n%4), 'g', 17, 64) + " " + strconv.Itoa(n%3) + " " + strconv.Itoa(n/3) + "\n")
	}
	b.WriteString("CELLS 4 20\n4 0 3 4 1\n4 1 4 5 2\n4 3 6 7 4\n4 4 7 8 5\nCELL_TYPES 4\n9\n9\n9\n9\n")
	legacy := filepath.Join(dir, "xplane.vtk")
	if err := os.WriteFile(legacy, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	_, vnotes, err := vtk.ReadFileNotes(legacy)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Contains(vnotes, plane) {
		t.Errorf("the VTK reader's notes %q do not hold the CGNS reader's %q", vnotes, plane)
	}

	_, err = Read(filepath.Join(dir, "xtilt.cgns"))
	if err == nil || !strings.Contains(err.Error(), "/Plane/dom/GridCoordinates/CoordinateZ spreads over 2") || !strings.Contains(err.Error(), "lie on no plane x, y or z = constant") {
		t.Errorf("a zone off the plane x = 2 by 1e-6: got %v, want it refused as on no plane", err)
	}
}
