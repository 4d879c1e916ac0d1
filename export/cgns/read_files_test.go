package cgns

import (
	"os"
	"os/exec"
	"path/filepath"
	"testing"
)

// cFilesPrelude begins the C programs that write test files through the
// CGNS library: ck stops on a library error, naming the call, and
// open_file opens a new file in the folder dir (the program's argument).
const cFilesPrelude = `#include <stdio.h>
#include <stdlib.h>
#include <cgnslib.h>

static const char *dir;

static void ck(int rc, const char *what) {
    if (rc) {
        fprintf(stderr, "%s: %s\n", what, cg_get_error());
        exit(1);
    }
}

static int open_file(const char *name) {
    char path[4096];
    int fn;
    snprintf(path, sizeof path, "%s/%s", dir, name);
    ck(cg_open(path, CG_MODE_WRITE, &fn), path);
    return fn;
}
`

// writeCFiles compiles the C program src (what names it in failures)
// against the CGNS library with the C compiler cgo uses and runs it on a
// new folder, returning the folder of the files it wrote.
func writeCFiles(t *testing.T, src, what string) string {
	t.Helper()
	dir := t.TempDir()
	path := filepath.Join(dir, "files.c")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	if out, err := exec.Command(compileC(t, path, what), dir).CombinedOutput(); err != nil {
		t.Fatalf("run %s: %v\n%s", what, err, out)
	}
	return dir
}

// readerFilesC writes, through the CGNS library's own calls, the files of
// the reader tests on planes other than z = c, slabs whose elements start
// on a side face, and zones that touch with BCs on the sides they share
// (each described where it is written). Nodes are numbered i fastest,
// then j, then k, as SIDS orders structured zones.
const readerFilesC = cFilesPrelude + `
static void coords(int fn, int B, int Z, double *x, double *y, double *z) {
    int C;
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateX", x, &C), "x");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateY", y, &C), "y");
    if (z)
        ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateZ", z, &C), "z");
}

static void range_bc(int fn, int B, int Z, const char *name, BCType_t t, cgsize_t *r, GridLocation_t loc) {
    int BC;
    ck(cg_boco_write(fn, B, Z, name, t, PointRange, 2, r, &BC), name);
    if (loc != Vertex)
        ck(cg_boco_gridlocation_write(fn, B, Z, BC, loc), name);
}

/* Two zones of a 3D base on the plane y = 0.25, covering [0, 2] x [0, 1]
 * in (x, z): left, 3 x 1 x 3 nodes at x = 0.5 i, z = 0.5 k; right,
 * 1 x 3 x 3 nodes at x = 1 + 0.5 k, z = 0.5 j (0-based), left-handed in
 * its (j, k), or with rev z = 1 - 0.5 j, right-handed and its j running
 * against the left zone's k. They are joined on x = 1 (left i = 3, right
 * k = 1). */
static void xzjoin(const char *name, int rev) {
    int fn = open_file(name), B, Z1, Z2, I, BC;
    double x[9], y[9], z[9];
    ck(cg_base_write(fn, "Plane", 3, 3, &B), "base");
    cgsize_t sl[9] = {3, 1, 3, 2, 0, 2, 0, 0, 0}, sr[9] = {1, 3, 3, 0, 2, 2, 0, 0, 0};
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 3; b++) {
            x[a + 3 * b] = 0.5 * a, y[a + 3 * b] = 0.25, z[a + 3 * b] = 0.5 * b;
        }
    ck(cg_zone_write(fn, B, "left", sl, Structured, &Z1), "left");
    coords(fn, B, Z1, x, y, z);
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 3; b++) {
            x[a + 3 * b] = 1 + 0.5 * b, z[a + 3 * b] = rev ? 1 - 0.5 * a : 0.5 * a;
        }
    ck(cg_zone_write(fn, B, "right", sr, Structured, &Z2), "right");
    coords(fn, B, Z2, x, y, z);
    cgsize_t r1[6] = {3, 1, 1, 3, 1, 3}, d1[6] = {1, 1, 1, 1, 3, 1};
    int t1[3] = {3, 1, 2}, t2[3] = {2, 3, 1};
    if (rev) {
        d1[1] = 3, d1[4] = 1;
        t1[2] = -2, t2[1] = -3;
    }
    ck(cg_1to1_write(fn, B, Z1, "toright", "right", r1, d1, t1, &I), "join left");
    ck(cg_1to1_write(fn, B, Z2, "toleft", "left", d1, r1, t2, &I), "join right");
    cgsize_t inlet[6] = {1, 1, 1, 1, 1, 2}, walls[6] = {1, 1, 1, 2, 1, 1};
    range_bc(fn, B, Z1, "inlet", BCInflow, inlet, IFaceCenter);
    range_bc(fn, B, Z1, "walls", BCWall, walls, KFaceCenter);
    cgsize_t front[6] = {1, 1, 1, 2, 1, 2}, plane[6] = {1, 1, 1, 3, 1, 3};
    range_bc(fn, B, Z1, "front", BCSymmetryPlane, front, JFaceCenter);
    range_bc(fn, B, Z1, "planenodes", BCSymmetryPlane, plane, Vertex);
    cgsize_t wr[6] = {1, rev ? 3 : 1, 1, 1, rev ? 3 : 1, 3};
    range_bc(fn, B, Z2, "walls", BCWall, wr, Vertex);
    cgsize_t out[9] = {1, 1, 3, 1, 2, 3, 1, 3, 3};
    ck(cg_boco_write(fn, B, Z2, "outlet", BCOutflow, PointList, 3, out, &BC), "outlet");
    cgsize_t side[6] = {1, 1, 1, 1, 2, 2};
    range_bc(fn, B, Z2, "side", BCSymmetryPlane, side, IFaceCenter);
    ck(cg_close(fn), "close");
}

/* An unstructured zone of a 2D base in 3D space on the plane x = 2 (each
 * node's x off by up to noise): node 1 + i + 3 j at y = i, z = j, four
 * QUAD_4 listed clockwise seen from +x, and BAR_2 faces on z = 0
 * ("bottom") and y = 2 ("right"). */
static void xplane(const char *name, double noise) {
    int fn = open_file(name), B, Z, S, BC;
    double x[9], y[9], z[9];
    for (int n = 0; n < 9; n++)
        x[n] = 2 + noise * (n % 4), y[n] = n % 3, z[n] = n / 3;
    cgsize_t size[3] = {9, 4, 0};
    ck(cg_base_write(fn, "Plane", 2, 3, &B), "base");
    ck(cg_zone_write(fn, B, "dom", size, Unstructured, &Z), "zone");
    coords(fn, B, Z, x, y, z);
    cgsize_t quads[16] = {1, 4, 5, 2, 2, 5, 6, 3, 4, 7, 8, 5, 5, 8, 9, 6};
    ck(cg_section_write(fn, B, Z, "quads", QUAD_4, 1, 4, 0, quads, &S), "quads");
    cgsize_t bars[8] = {1, 2, 2, 3, 3, 6, 6, 9};
    ck(cg_section_write(fn, B, Z, "bars", BAR_2, 5, 8, 0, bars, &S), "bars");
    cgsize_t bottom[2] = {5, 6}, right[2] = {7, 8};
    ck(cg_boco_write(fn, B, Z, "bottom", BCWall, ElementRange, 2, bottom, &BC), "bottom");
    ck(cg_boco_write(fn, B, Z, "right", BCOutflow, ElementRange, 2, right, &BC), "right");
    ck(cg_close(fn), "close");
}

/* A slab of a 3D base between z = 0 and z = 0.5: node 1 + i + 3 j + 6 k
 * at (i, j, 0.5 k), and two HEXA_8 of positive volume whose nodes 1-4 lie
 * on a side face: on y = 0 for the first, on x = 1 for the second (or,
 * with twist, one HEXA_8 whose four lower nodes are on none of its
 * faces); QUAD_4 side faces on x = 0 ("inlet") and x = 2 ("outlet"). */
static void slab(const char *name, int twist) {
    int fn = open_file(name), B, Z, S, BC;
    double x[12], y[12], z[12];
    for (int n = 0; n < 12; n++)
        x[n] = n % 3, y[n] = n / 3 % 2, z[n] = 0.5 * (n / 6);
    cgsize_t size[3] = {12, twist ? 1 : 2, 0};
    ck(cg_base_write(fn, "Slab", 3, 3, &B), "base");
    ck(cg_zone_write(fn, B, "dom", size, Unstructured, &Z), "zone");
    coords(fn, B, Z, x, y, z);
    cgsize_t hexa[16] = {1, 7, 8, 2, 4, 10, 11, 5, 5, 11, 8, 2, 6, 12, 9, 3};
    cgsize_t twisted[8] = {1, 7, 5, 10, 8, 4, 11, 2};
    if (twist) {
        ck(cg_section_write(fn, B, Z, "hexa", HEXA_8, 1, 1, 0, twisted, &S), "hexa");
        ck(cg_close(fn), "close");
        return;
    }
    ck(cg_section_write(fn, B, Z, "hexa", HEXA_8, 1, 2, 0, hexa, &S), "hexa");
    cgsize_t sides[8] = {1, 4, 10, 7, 3, 6, 12, 9};
    ck(cg_section_write(fn, B, Z, "sides", QUAD_4, 3, 4, 0, sides, &S), "sides");
    cgsize_t inlet[1] = {3}, outlet[1] = {4};
    ck(cg_boco_write(fn, B, Z, "inlet", BCInflow, ElementList, 1, inlet, &BC), "inlet");
    ck(cg_boco_write(fn, B, Z, "outlet", BCOutflow, ElementList, 1, outlet, &BC), "outlet");
    ck(cg_close(fn), "close");
}

/* Two zones of a 2D base that touch on x = 1: left, 3 x 3 nodes at
 * (0.5 i, 0.5 j) on [0, 1] x [0, 1]; right, 3 x 4 nodes at
 * (1 + 0.5 i, 0.5 j) on [1, 2] x [0, 1.5]. Without joins ("touchbc")
 * they carry BCs on the touching sides too: left "east" on all of x = 1,
 * right "west" on all of its x = 1, half a cell higher. With joins
 * ("joinedbc") the left zone's "east" BC lies on the joined side. */
static void touch(const char *name, int joined) {
    int fn = open_file(name), B, Z1, Z2, I;
    double x[12], y[12];
    ck(cg_base_write(fn, "Base", 2, 2, &B), "base");
    cgsize_t sl[6] = {3, 3, 2, 2, 0, 0}, sr[6] = {3, 4, 2, 3, 0, 0};
    for (int n = 0; n < 9; n++)
        x[n] = 0.5 * (n % 3), y[n] = 0.5 * (n / 3);
    ck(cg_zone_write(fn, B, "left", sl, Structured, &Z1), "left");
    coords(fn, B, Z1, x, y, NULL);
    for (int n = 0; n < 12; n++)
        x[n] = 1 + 0.5 * (n % 3), y[n] = 0.5 * (n / 3);
    ck(cg_zone_write(fn, B, "right", sr, Structured, &Z2), "right");
    coords(fn, B, Z2, x, y, NULL);
    cgsize_t inlet[4] = {1, 1, 1, 3}, east[4] = {3, 1, 3, 3};
    range_bc(fn, B, Z1, "inlet", BCInflow, inlet, Vertex);
    range_bc(fn, B, Z1, "east", BCWall, east, Vertex);
    if (joined) {
        cgsize_t r[4] = {3, 1, 3, 3}, d[4] = {1, 1, 1, 3};
        int t[2] = {1, 2};
        ck(cg_1to1_write(fn, B, Z1, "toright", "right", r, d, t, &I), "join left");
        ck(cg_1to1_write(fn, B, Z2, "toleft", "left", d, r, t, &I), "join right");
    } else {
        cgsize_t west[4] = {1, 1, 1, 3}, outlet[4] = {3, 1, 3, 4};
        range_bc(fn, B, Z2, "west", BCWall, west, EdgeCenter);
        range_bc(fn, B, Z2, "outlet", BCOutflow, outlet, Vertex);
    }
    ck(cg_close(fn), "close");
}

int main(int argc, char **argv) {
    if (argc != 2) {
        fprintf(stderr, "usage: %s DIR\n", argv[0]);
        return 2;
    }
    dir = argv[1];
    xzjoin("xzjoin.cgns", 0);
    xzjoin("xzjoinrev.cgns", 1);
    xplane("xplane.cgns", 1e-14);
    xplane("xtilt.cgns", 1e-6);
    slab("sidehex.cgns", 0);
    slab("twisthex.cgns", 1);
    touch("touchbc.cgns", 0);
    touch("joinedbc.cgns", 1);
    return 0;
}
`

// readerFiles writes the files of readerFilesC and returns their folder.
func readerFiles(t *testing.T) string {
	t.Helper()
	return writeCFiles(t, readerFilesC, "the reader test files' writer")
}

// gridFileC writes structured zones given as text through the CGNS
// library's own calls, as a converter of a plain grid file would: the
// number of zones, each zone's node counts ni nj nk, then for each zone
// all its x, then all its y, then all its z (i fastest, then j, then k).
// The zones go into a base "Base" of cell and physical dimension 3, named
// Zone1, Zone2, …, with no connectivity between them.
const gridFileC = `#include <stdio.h>
#include <stdlib.h>
#include <cgnslib.h>

static void ck(int rc, const char *what) {
    if (rc) {
        fprintf(stderr, "%s: %s\n", what, cg_get_error());
        exit(1);
    }
}

int main(int argc, char **argv) {
    FILE *in = fopen(argv[1], "r");
    int nz, fn, B;
    if (!in || fscanf(in, "%d", &nz) != 1 || nz < 1 || nz > 100) {
        fprintf(stderr, "%s: no zone count\n", argv[1]);
        return 1;
    }
    int n[100][3];
    for (int z = 0; z < nz; z++)
        if (fscanf(in, "%d %d %d", &n[z][0], &n[z][1], &n[z][2]) != 3) {
            fprintf(stderr, "%s: zone %d has no node counts\n", argv[1], z + 1);
            return 1;
        }
    ck(cg_open(argv[2], CG_MODE_WRITE, &fn), argv[2]);
    ck(cg_base_write(fn, "Base", 3, 3, &B), "base");
    const char *names[3] = {"CoordinateX", "CoordinateY", "CoordinateZ"};
    for (int z = 0; z < nz; z++) {
        cgsize_t size[9] = {n[z][0], n[z][1], n[z][2], n[z][0] - 1, n[z][1] - 1, n[z][2] - 1, 0, 0, 0};
        char name[33];
        int Z, C;
        snprintf(name, sizeof name, "Zone%d", z + 1);
        ck(cg_zone_write(fn, B, name, size, Structured, &Z), name);
        long count = (long)n[z][0] * n[z][1] * n[z][2];
        double *v = malloc(count * sizeof *v);
        for (int a = 0; a < 3; a++) {
            for (long k = 0; k < count; k++)
                if (fscanf(in, "%lf", &v[k]) != 1) {
                    fprintf(stderr, "%s: zone %d: %s cut short\n", argv[1], z + 1, names[a]);
                    return 1;
                }
            ck(cg_coord_write(fn, B, Z, RealDouble, names[a], v, &C), names[a]);
        }
        free(v);
    }
    ck(cg_close(fn), "close");
    return 0;
}
`

// gridToCGNS writes the grid text (see gridFileC) as the CGNS file path,
// through a program compiled against the CGNS library.
func gridToCGNS(t *testing.T, text, path string) {
	t.Helper()
	dir := t.TempDir()
	src, grid := filepath.Join(dir, "grid.c"), filepath.Join(dir, "grid.txt")
	if err := os.WriteFile(src, []byte(gridFileC), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(grid, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	if out, err := exec.Command(compileC(t, src, "the grid writer"), grid, path).CombinedOutput(); err != nil {
		t.Fatalf("write %s from the grid: %v\n%s", filepath.Base(path), err, out)
	}
}
