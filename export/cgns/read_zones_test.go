package cgns

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// zonesFilesC writes, through the CGNS library's own calls, the files of
// the tests below (each described where it is written). Nodes of a zone of
// 3 × 3 are numbered 1 + i + 3 j.
const zonesFilesC = cFilesPrelude + `
static cgsize_t ccw[16] = {1, 2, 5, 4, 2, 3, 6, 5, 4, 5, 8, 7, 5, 6, 9, 8};
static cgsize_t cw[16] = {1, 4, 5, 2, 2, 5, 6, 3, 4, 7, 8, 5, 5, 8, 9, 6};

/* A 3 x 3 node zone of unit quads at (x0 + i, j), z = zs[n] if zs. */
static int zone(int fn, int B, const char *name, double x0, const double *zs, cgsize_t *quads) {
    int Z, C, S;
    double x[9], y[9];
    for (int n = 0; n < 9; n++)
        x[n] = x0 + n % 3, y[n] = n / 3;
    cgsize_t size[3] = {9, 4, 0};
    ck(cg_zone_write(fn, B, name, size, Unstructured, &Z), name);
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateX", x, &C), "x");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateY", y, &C), "y");
    if (zs)
        ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateZ", zs, &C), "z");
    ck(cg_section_write(fn, B, Z, "quads", QUAD_4, 1, 4, 0, quads, &S), "quads");
    return Z;
}

/* Two zones of a 2D base side by side, sharing the edge x = 2 with no
 * connectivity: "z0" on [0, 2] x [0, 2], its quads counter-clockwise, and
 * "z1" on [2, 4] x [0, 2], its quads listed clockwise. Each has BAR_2
 * faces on y = 0 under BC "wall"; z0 also BAR_2 faces on x = 2 under BC
 * "cut" (the side it shares), and z1 a Vertex BC "top" of its nodes on
 * y = 2. */
static void twozones(void) {
    int fn = open_file("twozones.cgns"), B, S, BC;
    ck(cg_base_write(fn, "B", 2, 2, &B), "base");
    int Z0 = zone(fn, B, "z0", 0, NULL, ccw), Z1 = zone(fn, B, "z1", 2, NULL, cw);
    cgsize_t bars0[8] = {1, 2, 2, 3, 3, 6, 6, 9}, bars1[4] = {1, 2, 2, 3};
    ck(cg_section_write(fn, B, Z0, "bars", BAR_2, 5, 8, 0, bars0, &S), "bars0");
    ck(cg_section_write(fn, B, Z1, "bars", BAR_2, 5, 6, 0, bars1, &S), "bars1");
    cgsize_t wall[2] = {5, 6}, cut[2] = {7, 8}, top[3] = {7, 8, 9};
    ck(cg_boco_write(fn, B, Z0, "wall", BCWall, ElementRange, 2, wall, &BC), "wall0");
    ck(cg_boco_write(fn, B, Z0, "cut", BCWall, ElementRange, 2, cut, &BC), "cut");
    ck(cg_boco_write(fn, B, Z1, "wall", BCWall, ElementRange, 2, wall, &BC), "wall1");
    ck(cg_boco_write(fn, B, Z1, "top", BCSymmetryPlane, PointList, 3, top, &BC), "top");
    ck(cg_close(fn), "close");
}

/* One zone "dom" of a 2D base, its four quads listed clockwise but the
 * third. */
static void mostly(void) {
    int fn = open_file("mostly.cgns"), B;
    ck(cg_base_write(fn, "B", 2, 2, &B), "base");
    cgsize_t q[16];
    for (int k = 0; k < 16; k++)
        q[k] = k / 4 == 2 ? ccw[k] : cw[k];
    zone(fn, B, "dom", 0, NULL, q);
    ck(cg_close(fn), "close");
}

/* One zone "dom" of a 2D base in 3D space whose nodes' z is +1e-17 and
 * -1e-17 by turns (rounding), or z = 1e-9 i (a tilt). */
static void zround(const char *name, int tilt) {
    int fn = open_file(name), B;
    double z[9];
    for (int n = 0; n < 9; n++)
        z[n] = tilt ? 1e-9 * (n % 3) : (n % 2 ? 1e-17 : -1e-17);
    ck(cg_base_write(fn, "B", 2, 3, &B), "base");
    zone(fn, B, "dom", 0, z, ccw);
    ck(cg_close(fn), "close");
}

/* A 3D base with two unstructured zones. */
static void thin2(void) {
    int fn = open_file("thin2.cgns"), B, Z;
    ck(cg_base_write(fn, "B", 3, 3, &B), "base");
    cgsize_t size[3] = {8, 1, 0};
    ck(cg_zone_write(fn, B, "a", size, Unstructured, &Z), "a");
    ck(cg_zone_write(fn, B, "b", size, Unstructured, &Z), "b");
    ck(cg_close(fn), "close");
}

int main(int argc, char **argv) {
    if (argc != 2) {
        fprintf(stderr, "usage: %s DIR\n", argv[0]);
        return 2;
    }
    dir = argv[1];
    twozones();
    mostly();
    zround("zround.cgns", 0);
    zround("ztilt.cgns", 1);
    thin2();
    return 0;
}
`

// zonesFiles writes the files of zonesFilesC and returns their folder.
func zonesFiles(t *testing.T) string {
	t.Helper()
	return writeCFiles(t, zonesFilesC, "the zone test files' writer")
}

// TestReadUnstructuredZones: two unstructured zones of 2 × 2 unit quads
// that share the edge x = 2 without connectivity read as the one 4 × 2
// grid of unit quads they make (hand-counted: 15 nodes, 8 cells, 22
// faces of which 12 on the boundary), z1's cells after z0's (cell 4 is
// z1's first, centred at (2.5, 0.5)) and turned counter-clockwise (every
// area 1); its BCs keep their faces (wall: 2 + 2 on y = 0, top: z1's 2 on
// y = 2 by its nodes) but for z0's "cut" on the shared edge, which is
// interior now and left out with a note. A 3D base of two unstructured
// zones is refused, saying why.
func TestReadUnstructuredZones(t *testing.T) {
	dir := zonesFiles(t)
	m, notes, err := ReadNotes(filepath.Join(dir, "twozones.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Nodes) != 15 || m.NumCells() != 8 || m.NumFaces() != 22 || m.NumBoundary() != 12 {
		t.Fatalf("%d nodes, %d cells, %d faces (%d on the boundary); want 15, 8, 22 (12)", len(m.Nodes), m.NumCells(), m.NumFaces(), m.NumBoundary())
	}
	for c, a := range m.Geo.CellArea {
		if a != 1 {
			t.Errorf("cell %d has area %g, want 1", c, a)
		}
	}
	if p := m.Geo.CellCentroid[4]; math.Abs(p[0]-2.5) > 1e-15 || math.Abs(p[1]-0.5) > 1e-15 {
		t.Errorf("cell 4 is centred at %v, want z1's first quad's (2.5, 0.5)", p)
	}
	for tag, want := range map[string]int{"wall": 4, "top": 2, "cut": 0} {
		lo, hi, _ := m.TagRange(tag)
		if hi-lo != want {
			t.Errorf("tag %s has %d faces, want %d", tag, hi-lo, want)
		}
	}
	for _, want := range []string{
		"all 4 cells of /B/z1 run clockwise seen from +z (negative signed area) as the file lists them; their node order is reversed",
		"2 unstructured zones joined into one mesh, their cells in zone order (cells 0–3 z0, 4–7 z1): 3 coincident nodes merged where zones touch (within 1e-06 of the local face length), between z0 and z1",
		"BCs on zone boundaries that the coincident-node merge joins, left out there as those faces are interior: tag cut of zone z0 (2 of its 2 faces, against z1)",
	} {
		if !slices.Contains(notes, want) {
			t.Errorf("notes %q\nwant among them %q", notes, want)
		}
	}
	_, err = Read(filepath.Join(dir, "thin2.cgns"))
	if err == nil || !strings.Contains(err.Error(), "/B is a 3D base with 2 unstructured zones; cvdeck reads a slab one cell thick from one unstructured zone") {
		t.Errorf("a 3D base of two unstructured zones: %v; want it refused", err)
	}
}

// TestReadMostlyClockwiseZone: a zone whose quads are listed clockwise but
// the third is read turned round, with a note that says how many ran the
// other way, so that the third is the one cell of negative area (unit
// quads: areas 1, 1, −1, 1, hand-computed).
func TestReadMostlyClockwiseZone(t *testing.T) {
	dir := zonesFiles(t)
	m, notes, err := ReadNotes(filepath.Join(dir, "mostly.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	want := "3 of the 4 cells of /B/dom run clockwise seen from +z (negative signed area) as the file lists them, 1 the other way: the mesh is read turned round (every cell's node order reversed), so the 1 that ran the other way are the cells the checks name"
	if !slices.Contains(notes, want) {
		t.Errorf("notes %q, want %q", notes, want)
	}
	if got := fmt.Sprint(m.Geo.CellArea); got != "[1 1 -1 1]" {
		t.Errorf("cell areas %s, want [1 1 -1 1]", got)
	}
}

// TestReadZoneRounding: a zone whose z is ±1e-17 by turns (a spread of
// 2e-17, within 1e-12 of its largest coordinate 2, so 2e-12:
// hand-computed) reads as the plane z = constant with a note giving the
// spread; z = 1e-9 i (a spread of 2e-9) is refused, naming the zone and
// its nodes of least and greatest z.
func TestReadZoneRounding(t *testing.T) {
	dir := zonesFiles(t)
	m, notes, err := ReadNotes(filepath.Join(dir, "zround.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	want := "a plane mesh on z = constant, read as 2D (z dropped): the nodes' z spread over up to 2e-17 within a zone, within the 2e-12 that rounding gives, and each zone is taken as one plane at their mean"
	if !slices.Contains(notes, want) {
		t.Errorf("notes %q, want %q", notes, want)
	}
	if m.NumCells() != 4 || fmt.Sprint(m.Geo.CellArea) != "[1 1 1 1]" {
		t.Errorf("%d cells of areas %v; want 4 unit quads", m.NumCells(), m.Geo.CellArea)
	}
	_, err = Read(filepath.Join(dir, "ztilt.cgns"))
	if err == nil || !strings.Contains(err.Error(), "/B/dom/GridCoordinates/CoordinateZ spreads over 2e-09 (node 1 has z = 0, node 3 has 2e-09), more than the 2e-12 that rounding gives") {
		t.Errorf("ztilt.cgns: %v; want it refused, naming nodes 1 and 3", err)
	}
}
