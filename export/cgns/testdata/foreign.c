/* foreign.c writes CGNS files through the CGNS mid-level library with
 * conventions cvdeck's writer does not use, so the reader is tested on
 * files written by other means:
 *
 *   unordered.cgns  - physical dimension 3 (constant z), boundary BAR_2
 *                     section numbered first, TRI_3 section written before
 *                     the QUAD_4 section that precedes it in numbering, BCs
 *                     as ElementRange, ElementList (with a FamilyName) and
 *                     a Vertex PointList; no ParentElements.
 *   mixedbars.cgns  - one MIXED section holding QUAD_4, TRI_3 and BAR_2
 *                     elements, BC as PointRange at EdgeCenter.
 *   twozone.cgns    - two structured zones, the second left-handed (i along
 *                     y), joined 1-to-1 with Transform [2, 1]; BCs as
 *                     IFaceCenter, JFaceCenter and Vertex ranges.
 *   twozone3d.cgns  - twozone.cgns as a 3D solver takes a 2D case: a base of
 *                     cell dimension 3, each zone one cell thick in k (z = 0
 *                     and 0.1), joined with Transform [2, 1, 3]; BCs as
 *                     FaceCenter, IFaceCenter, JFaceCenter and Vertex
 *                     ranges, and symmetry BCs on the front (KFaceCenter;
 *                     and the right zone's as a Vertex PointList) and back
 *                     (Vertex, k = 2) planes.
 *   sheet1.cgns     - a 3D base with one structured zone of 21 x 11 x 1 nodes
 *                     (x = 0.1 j + 0.002 i (20 - i), y = 0.1 i + 0.02 j^2,
 *                     z = 0), coordinates only.
 *   sheet2.cgns     - the same zone one cell thick (k = 2 at z = 0.05).
 *   sheet2-skewed.cgns - sheet2.cgns with the second plane's x moved by
 *                     0.001, which is not a 2D case.
 *   slab3d.cgns     - an unstructured 2D case stored one cell thick in a 3D
 *                     base: a HEXA_8 written upside down (first face on the
 *                     upper plane) and two PENTA_6 over [0, 2] x [0, 1],
 *                     z = 0.5 to 0.75; QUAD_4 side faces tagged by
 *                     ElementList and ElementRange, front and back faces
 *                     (QUAD_4, TRI_3) under a symmetry BC, and the front
 *                     plane's nodes as a Vertex PointList BC.
 *   highorder.cgns  - a TRI_6 section, which cvdeck does not read.
 *   onesided.cgns   - twozone.cgns with the join recorded on the second
 *                     zone only, and its walls BCs of two types (BCWall,
 *                     BCWallViscous).
 *   pointjoin.cgns  - twozone.cgns's zones joined by a GridConnectivity_t
 *                     (point lists) instead, which cvdeck does not merge.
 *
 * Usage: foreign OUTDIR. Exits non-zero with the library's message on any
 * failure. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cgnslib.h>

static void ck(int rc, const char *what) {
    if (rc) {
        fprintf(stderr, "%s: %s\n", what, cg_get_error());
        exit(1);
    }
}

static char path[4096];
static const char *dir;

static int open_file(const char *name) {
    int fn;
    snprintf(path, sizeof path, "%s/%s", dir, name);
    ck(cg_open(path, CG_MODE_WRITE, &fn), path);
    return fn;
}

/* A 3 x 3 node grid on [0, 2] x [0, 2], node (i, j) = 1 + i + 3 j. */
static double gx[9] = {0, 1, 2, 0, 1, 2, 0, 1, 2};
static double gy[9] = {0, 0, 0, 1, 1, 1, 2, 2, 2};
static double gz[9] = {0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5};

static void unordered(void) {
    int fn = open_file("unordered.cgns"), B, Z, S, C, BC, F;
    cgsize_t size[3] = {9, 5, 0};
    ck(cg_base_write(fn, "Imported", 2, 3, &B), "base");
    ck(cg_family_write(fn, B, "outflow", &F), "family");
    ck(cg_fambc_write(fn, B, F, "FamBC", BCOutflow, &BC), "fambc");
    ck(cg_zone_write(fn, B, "dom", size, Unstructured, &Z), "zone");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateX", gx, &C), "x");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateY", gy, &C), "y");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateZ", gz, &C), "z");
    /* Boundary edges 1..8: bottom (1, 2), right (3, 4), top (5, 6), left (7, 8). */
    cgsize_t bars[16] = {1, 2, 2, 3, 3, 6, 6, 9, 9, 8, 8, 7, 7, 4, 4, 1};
    ck(cg_section_write(fn, B, Z, "edges", BAR_2, 1, 8, 0, bars, &S), "bars");
    /* Square (1, 1) as two triangles, elements 12..13, written first. */
    cgsize_t tris[6] = {5, 6, 9, 5, 9, 8};
    ck(cg_section_write(fn, B, Z, "tris", TRI_3, 12, 13, 0, tris, &S), "tris");
    cgsize_t quads[12] = {1, 2, 5, 4, 2, 3, 6, 5, 4, 5, 8, 7};
    ck(cg_section_write(fn, B, Z, "quads", QUAD_4, 9, 11, 0, quads, &S), "quads");
    cgsize_t bottom[2] = {1, 2};
    ck(cg_boco_write(fn, B, Z, "bottom", BCWall, ElementRange, 2, bottom, &BC), "bottom");
    cgsize_t right[2] = {4, 3};
    ck(cg_boco_write(fn, B, Z, "right", FamilySpecified, ElementList, 2, right, &BC), "right");
    ck(cg_goto(fn, B, "Zone_t", Z, "ZoneBC_t", 1, "BC_t", BC, "end"), "goto right");
    ck(cg_famname_write("outflow"), "right family");
    cgsize_t top[3] = {9, 8, 7};
    ck(cg_boco_write(fn, B, Z, "top", BCSymmetryPlane, PointList, 3, top, &BC), "top");
    ck(cg_close(fn), "close");
}

static void mixedbars(void) {
    int fn = open_file("mixedbars.cgns"), B, Z, S, C, BC;
    cgsize_t size[3] = {9, 5, 0};
    ck(cg_base_write(fn, "Imported", 2, 2, &B), "base");
    ck(cg_zone_write(fn, B, "dom", size, Unstructured, &Z), "zone");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateX", gx, &C), "x");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateY", gy, &C), "y");
    /* Elements 1..7: quad, bar, tri, quad, tri, bar, quad. */
    cgsize_t conn[] = {QUAD_4, 1, 2, 5, 4, BAR_2, 1, 2, TRI_3, 5, 6, 9, QUAD_4, 2, 3, 6, 5,
                       TRI_3, 5, 9, 8, BAR_2, 2, 3, QUAD_4, 4, 5, 8, 7};
    cgsize_t off[] = {0, 5, 8, 12, 17, 21, 24, 29};
    ck(cg_poly_section_write(fn, B, Z, "all", MIXED, 1, 7, 0, conn, off, &S), "mixed");
    cgsize_t rng[2] = {2, 2};
    ck(cg_boco_write(fn, B, Z, "base1", BCWall, PointRange, 2, rng, &BC), "bc1");
    ck(cg_boco_gridlocation_write(fn, B, Z, BC, EdgeCenter), "bc1 location");
    cgsize_t lst[1] = {6};
    ck(cg_boco_write(fn, B, Z, "base2", BCWall, PointList, 1, lst, &BC), "bc2");
    ck(cg_boco_gridlocation_write(fn, B, Z, BC, EdgeCenter), "bc2 location");
    ck(cg_close(fn), "close");
}

enum join { BOTH_SIDES, ONE_SIDE, POINT_LISTS };

static void twozone(enum join join) {
    const char *names[] = {"twozone.cgns", "onesided.cgns", "pointjoin.cgns"};
    int fn = open_file(names[join]), B, Z1, Z2, C, BC, I;
    cgsize_t size[6] = {3, 3, 2, 2, 0, 0};
    double x[9], y[9];
    ck(cg_base_write(fn, "Imported", 2, 2, &B), "base");
    /* left: x = (i-1)/2, y = (j-1)/2, right-handed. */
    for (int j = 0; j < 3; j++)
        for (int i = 0; i < 3; i++) {
            x[3 * j + i] = 0.5 * i;
            y[3 * j + i] = 0.5 * j;
        }
    ck(cg_zone_write(fn, B, "left", size, Structured, &Z1), "zone left");
    ck(cg_coord_write(fn, B, Z1, RealDouble, "CoordinateX", x, &C), "x");
    ck(cg_coord_write(fn, B, Z1, RealDouble, "CoordinateY", y, &C), "y");
    /* right: x = 1 + (j-1)/2, y = (i-1)/2, left-handed. */
    for (int j = 0; j < 3; j++)
        for (int i = 0; i < 3; i++) {
            x[3 * j + i] = 1 + 0.5 * j;
            y[3 * j + i] = 0.5 * i;
        }
    ck(cg_zone_write(fn, B, "right", size, Structured, &Z2), "zone right");
    ck(cg_coord_write(fn, B, Z2, RealDouble, "CoordinateX", x, &C), "x");
    ck(cg_coord_write(fn, B, Z2, RealDouble, "CoordinateY", y, &C), "y");
    cgsize_t r1[4] = {3, 1, 3, 3}, d1[4] = {1, 1, 3, 1};
    int t[2] = {2, 1};
    if (join == POINT_LISTS) {
        cgsize_t p1[6] = {3, 1, 3, 2, 3, 3}, q1[6] = {1, 1, 2, 1, 3, 1};
        ck(cg_conn_write(fn, B, Z1, "toright", Vertex, Abutting1to1, PointList, 3, p1, "right",
                         Structured, PointListDonor, Integer, 3, q1, &I), "point join left");
        ck(cg_conn_write(fn, B, Z2, "toleft", Vertex, Abutting1to1, PointList, 3, q1, "left",
                         Structured, PointListDonor, Integer, 3, p1, &I), "point join right");
    } else {
        if (join == BOTH_SIDES)
            ck(cg_1to1_write(fn, B, Z1, "toright", "right", r1, d1, t, &I), "join left");
        ck(cg_1to1_write(fn, B, Z2, "toleft", "left", d1, r1, t, &I), "join right");
    }
    cgsize_t inlet[4] = {1, 1, 1, 2};
    ck(cg_boco_write(fn, B, Z1, "inlet", BCInflow, PointRange, 2, inlet, &BC), "inlet");
    ck(cg_boco_gridlocation_write(fn, B, Z1, BC, EdgeCenter), "inlet location");
    cgsize_t wl[4] = {1, 1, 3, 1};
    ck(cg_boco_write(fn, B, Z1, "walls", BCWall, PointRange, 2, wl, &BC), "walls left");
    cgsize_t outlet[4] = {1, 3, 2, 3};
    ck(cg_boco_write(fn, B, Z2, "outlet", BCOutflow, PointRange, 2, outlet, &BC), "outlet");
    ck(cg_boco_gridlocation_write(fn, B, Z2, BC, EdgeCenter), "outlet location");
    cgsize_t wr[4] = {1, 1, 1, 3};
    /* The one-sided file also gives the two walls BCs different types. */
    ck(cg_boco_write(fn, B, Z2, "walls", join == ONE_SIDE ? BCWallViscous : BCWall, PointRange, 2, wr, &BC), "walls right");
    ck(cg_close(fn), "close");
}

static void twozone3d(void) {
    int fn = open_file("twozone3d.cgns"), B, Z1, Z2, C, BC, I;
    cgsize_t size[9] = {3, 3, 2, 2, 2, 1, 0, 0, 0};
    double x[18], y[18], z[18];
    ck(cg_base_write(fn, "Slab", 3, 3, &B), "base");
    for (int zone = 0; zone < 2; zone++) {
        for (int k = 0; k < 2; k++)
            for (int j = 0; j < 3; j++)
                for (int i = 0; i < 3; i++) {
                    int n = 9 * k + 3 * j + i;
                    /* left: x = (i-1)/2, y = (j-1)/2; right: x = 1 + (j-1)/2,
                     * y = (i-1)/2 (left-handed in the plane). */
                    x[n] = zone == 0 ? 0.5 * i : 1 + 0.5 * j;
                    y[n] = zone == 0 ? 0.5 * j : 0.5 * i;
                    z[n] = 0.1 * k;
                }
        int *Z = zone == 0 ? &Z1 : &Z2;
        ck(cg_zone_write(fn, B, zone == 0 ? "left" : "right", size, Structured, Z), "zone");
        ck(cg_coord_write(fn, B, *Z, RealDouble, "CoordinateX", x, &C), "x");
        ck(cg_coord_write(fn, B, *Z, RealDouble, "CoordinateY", y, &C), "y");
        ck(cg_coord_write(fn, B, *Z, RealDouble, "CoordinateZ", z, &C), "z");
    }
    cgsize_t r1[6] = {3, 1, 1, 3, 3, 2}, d1[6] = {1, 1, 1, 3, 1, 2};
    int t[3] = {2, 1, 3};
    ck(cg_1to1_write(fn, B, Z1, "toright", "right", r1, d1, t, &I), "join left");
    ck(cg_1to1_write(fn, B, Z2, "toleft", "left", d1, r1, t, &I), "join right");
    cgsize_t inlet[6] = {1, 1, 1, 1, 2, 1};
    ck(cg_boco_write(fn, B, Z1, "inlet", BCInflow, PointRange, 2, inlet, &BC), "inlet");
    ck(cg_boco_gridlocation_write(fn, B, Z1, BC, FaceCenter), "inlet location");
    cgsize_t wl[6] = {1, 1, 1, 3, 1, 2};
    ck(cg_boco_write(fn, B, Z1, "walls", BCWall, PointRange, 2, wl, &BC), "walls left");
    cgsize_t front[6] = {1, 1, 1, 2, 2, 1};
    ck(cg_boco_write(fn, B, Z1, "front", BCSymmetryPlane, PointRange, 2, front, &BC), "front");
    ck(cg_boco_gridlocation_write(fn, B, Z1, BC, KFaceCenter), "front location");
    cgsize_t back[6] = {1, 1, 2, 3, 3, 2};
    ck(cg_boco_write(fn, B, Z1, "back", BCSymmetryPlane, PointRange, 2, back, &BC), "back");
    /* The right zone's front plane by its nodes, which a side BC is not. */
    cgsize_t fnodes[27];
    for (int n = 0; n < 9; n++) {
        fnodes[3 * n] = n % 3 + 1;
        fnodes[3 * n + 1] = n / 3 + 1;
        fnodes[3 * n + 2] = 1;
    }
    ck(cg_boco_write(fn, B, Z2, "frontnodes", BCSymmetryPlane, PointList, 9, fnodes, &BC), "front nodes");
    cgsize_t outlet[6] = {1, 3, 1, 2, 3, 1};
    ck(cg_boco_write(fn, B, Z2, "outlet", BCOutflow, PointRange, 2, outlet, &BC), "outlet");
    ck(cg_boco_gridlocation_write(fn, B, Z2, BC, JFaceCenter), "outlet location");
    cgsize_t wr[6] = {1, 1, 1, 1, 2, 1};
    ck(cg_boco_write(fn, B, Z2, "walls", BCWall, PointRange, 2, wr, &BC), "walls right");
    ck(cg_boco_gridlocation_write(fn, B, Z2, BC, IFaceCenter), "walls right location");
    ck(cg_close(fn), "close");
}

static void sheet(const char *name, int nk, double shift) {
    int fn = open_file(name), B, Z, C;
    cgsize_t size[9] = {21, 11, nk, 20, 10, nk - 1, 0, 0, 0};
    double x[2 * 231], y[2 * 231], z[2 * 231];
    for (int k = 0; k < nk; k++)
        for (int j = 0; j < 11; j++)
            for (int i = 0; i < 21; i++) {
                int n = 231 * k + 21 * j + i;
                double fi = i, fj = j;
                x[n] = 0.1 * fj + 0.002 * fi * (20 - fi) + (k == 1 ? shift : 0);
                y[n] = 0.1 * fi + 0.02 * fj * fj;
                z[n] = 0.05 * k;
            }
    ck(cg_base_write(fn, "Sheet", 3, 3, &B), "base");
    ck(cg_zone_write(fn, B, "sheet", size, Structured, &Z), "zone");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateX", x, &C), "x");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateY", y, &C), "y");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateZ", z, &C), "z");
    ck(cg_close(fn), "close");
}

static void slab3d(void) {
    int fn = open_file("slab3d.cgns"), B, Z, S, C, BC;
    cgsize_t size[3] = {12, 3, 0};
    double x[12], y[12], z[12];
    /* Node 1 + i + 3 j + 6 k at (i, j, 0.5 + 0.25 k). */
    for (int k = 0; k < 2; k++)
        for (int j = 0; j < 2; j++)
            for (int i = 0; i < 3; i++) {
                int n = 6 * k + 3 * j + i;
                x[n] = i;
                y[n] = j;
                z[n] = 0.5 + 0.25 * k;
            }
    ck(cg_base_write(fn, "Slab", 3, 3, &B), "base");
    ck(cg_zone_write(fn, B, "dom", size, Unstructured, &Z), "zone");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateX", x, &C), "x");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateY", y, &C), "y");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateZ", z, &C), "z");
    cgsize_t hexa[8] = {7, 10, 11, 8, 1, 4, 5, 2}; /* upside down, positive volume */
    ck(cg_section_write(fn, B, Z, "hexa", HEXA_8, 1, 1, 0, hexa, &S), "hexa");
    cgsize_t penta[12] = {2, 3, 6, 8, 9, 12, 2, 6, 5, 8, 12, 11};
    ck(cg_section_write(fn, B, Z, "penta", PENTA_6, 2, 3, 0, penta, &S), "penta");
    /* Side faces 4..9: left (inlet), bottom and top (walls), right (outlet). */
    cgsize_t sides[24] = {4, 1, 7, 10, 1, 2, 8, 7, 2, 3, 9, 8, 6, 5, 11, 12, 5, 4, 10, 11, 3, 6, 12, 9};
    ck(cg_section_write(fn, B, Z, "sides", QUAD_4, 4, 9, 0, sides, &S), "sides");
    /* Front and back faces 10..13. */
    cgsize_t fq[8] = {1, 4, 5, 2, 7, 8, 11, 10};
    ck(cg_section_write(fn, B, Z, "frontback", QUAD_4, 10, 11, 0, fq, &S), "front quads");
    cgsize_t ft[6] = {2, 6, 3, 8, 9, 12};
    ck(cg_section_write(fn, B, Z, "fronttri", TRI_3, 12, 13, 0, ft, &S), "front tris");
    cgsize_t inlet[1] = {4}, walls[2] = {5, 8}, outlet[1] = {9}, sym[2] = {10, 13};
    ck(cg_boco_write(fn, B, Z, "inlet", BCInflow, ElementList, 1, inlet, &BC), "inlet");
    ck(cg_boco_write(fn, B, Z, "walls", BCWall, ElementRange, 2, walls, &BC), "walls");
    ck(cg_boco_write(fn, B, Z, "outlet", BCOutflow, PointList, 1, outlet, &BC), "outlet");
    ck(cg_boco_gridlocation_write(fn, B, Z, BC, FaceCenter), "outlet location");
    ck(cg_boco_write(fn, B, Z, "symmetry", BCSymmetryPlane, ElementRange, 2, sym, &BC), "symmetry");
    /* The front plane by its nodes, every one of them on the boundary. */
    cgsize_t fnodes[6] = {1, 2, 3, 4, 5, 6};
    ck(cg_boco_write(fn, B, Z, "frontnodes", BCSymmetryPlane, PointList, 6, fnodes, &BC), "front nodes");
    ck(cg_close(fn), "close");
}

static void highorder(void) {
    int fn = open_file("highorder.cgns"), B, Z, S, C;
    cgsize_t size[3] = {6, 1, 0};
    double x[6] = {0, 1, 0, 0.5, 0.5, 0}, y[6] = {0, 0, 1, 0, 0.5, 0.5};
    ck(cg_base_write(fn, "Imported", 2, 2, &B), "base");
    ck(cg_zone_write(fn, B, "curved", size, Unstructured, &Z), "zone");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateX", x, &C), "x");
    ck(cg_coord_write(fn, B, Z, RealDouble, "CoordinateY", y, &C), "y");
    cgsize_t conn[6] = {1, 2, 3, 4, 5, 6};
    ck(cg_section_write(fn, B, Z, "p2", TRI_6, 1, 1, 0, conn, &S), "tri6");
    ck(cg_close(fn), "close");
}

int main(int argc, char **argv) {
    if (argc != 2) {
        fprintf(stderr, "usage: foreign OUTDIR\n");
        return 2;
    }
    dir = argv[1];
    unordered();
    mixedbars();
    twozone(BOTH_SIDES);
    twozone(ONE_SIDE);
    twozone(POINT_LISTS);
    twozone3d();
    sheet("sheet1.cgns", 1, 0);
    sheet("sheet2.cgns", 2, 0);
    sheet("sheet2-skewed.cgns", 2, 0.001);
    slab3d();
    highorder();
    return 0;
}
