package unstructured

import (
	"bufio"
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"cvdeck/geometry"
	"cvdeck/mesh/unstructured/predicates"
	"github.com/paulmach/orb"
)

func randomPoints(n int, seed uint64) []orb.Point {
	r := rand.New(rand.NewPCG(seed, seed^0x9e3779b97f4a7c15))
	pts := make([]orb.Point, n)
	for i := range pts {
		pts[i] = orb.Point{r.Float64(), r.Float64()}
	}
	return pts
}

// checkEmptyCircles checks the defining property of a Delaunay
// triangulation (Delaunay 1934): no point lies strictly inside the
// circumcircle of any triangle. It tests every point against every
// triangle with the exact incircle predicate, and checks that every
// triangle is counter-clockwise and that the triangles tile the convex
// hull (their area sum equals the hull's area, by Andrew's monotone chain).
func checkEmptyCircles(t *testing.T, pts []orb.Point, tris []int32) {
	t.Helper()
	area := 0.0
	for k := 0; k < len(tris); k += 3 {
		a, b, c := pts[tris[k]], pts[tris[k+1]], pts[tris[k+2]]
		if predicates.Orient2d(a[0], a[1], b[0], b[1], c[0], c[1]) <= 0 {
			t.Fatalf("triangle %d (%v) is not counter-clockwise", k/3, tris[k:k+3])
		}
		area += 0.5 * ((b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0]))
		for i, p := range pts {
			if predicates.Incircle(a[0], a[1], b[0], b[1], c[0], c[1], p[0], p[1]) > 0 {
				t.Fatalf("point %d %v lies inside the circumcircle of triangle %d %v", i, p, k/3, tris[k:k+3])
			}
		}
	}
	hull := hullArea(pts)
	b := orb.MultiPoint(pts).Bound()
	scale := (b.Max[0] - b.Min[0]) * (b.Max[1] - b.Min[1])
	if math.Abs(area-hull) > 1e-9*hull+1e-14*scale {
		t.Fatalf("triangles cover area %.15g, convex hull has %.15g", area, hull)
	}
}

// hullArea returns the area of the convex hull (Andrew 1979).
func hullArea(pts []orb.Point) float64 {
	if len(pts) < 3 {
		return 0
	}
	p := slices.Clone(pts)
	slices.SortFunc(p, func(a, b orb.Point) int {
		if a[0] != b[0] {
			return cmpF(a[0], b[0])
		}
		return cmpF(a[1], b[1])
	})
	cross := func(o, a, b orb.Point) float64 {
		return predicates.Orient2d(o[0], o[1], a[0], a[1], b[0], b[1])
	}
	var h []orb.Point
	for pass := 0; pass < 2; pass++ {
		start := len(h)
		for _, q := range p {
			for len(h) >= start+2 && cross(h[len(h)-2], h[len(h)-1], q) <= 0 {
				h = h[:len(h)-1]
			}
			h = append(h, q)
		}
		h = h[:len(h)-1]
		slices.Reverse(p)
	}
	a := 0.0
	for i := range h {
		j := (i + 1) % len(h)
		a += h[i][0]*h[j][1] - h[j][0]*h[i][1]
	}
	return a / 2
}

func cmpF(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

func TestDelaunayEmptyCircleRandom(t *testing.T) {
	for _, n := range []int{3, 10, 100, 2000} {
		pts := randomPoints(n, uint64(n))
		tris, err := Delaunay(pts)
		if err != nil {
			t.Fatal(err)
		}
		checkEmptyCircles(t, pts, tris)
	}
}

// TestDelaunayDegenerate runs inputs where exact predicates matter: a
// grid (every cell's four corners cocircular), points on one circle, many
// collinear points with a few off the line, and duplicates.
func TestDelaunayDegenerate(t *testing.T) {
	var grid []orb.Point
	for j := 0; j < 30; j++ {
		for i := 0; i < 30; i++ {
			grid = append(grid, orb.Point{float64(i) * 0.1, float64(j) * 0.1})
		}
	}
	var circle []orb.Point
	for k := 0; k < 200; k++ {
		th := 2 * math.Pi * float64(k) / 200
		circle = append(circle, orb.Point{math.Cos(th), math.Sin(th)})
	}
	// Exactly cocircular lattice points: the 12 integer points on the
	// circle of radius 5 (3-4-5 triangles), plus its centre.
	lattice := []orb.Point{{0, 0}}
	for _, q := range [][2]float64{{5, 0}, {4, 3}, {3, 4}, {0, 5}, {-3, 4}, {-4, 3}, {-5, 0}, {-4, -3}, {-3, -4}, {0, -5}, {3, -4}, {4, -3}} {
		lattice = append(lattice, orb.Point{q[0], q[1]})
	}
	var line []orb.Point
	for k := 0; k < 500; k++ {
		line = append(line, orb.Point{float64(k) / 7, float64(k) / 7 * 0.3})
	}
	line = append(line, orb.Point{10, 30}, orb.Point{40, -5}, orb.Point{0.5, 0.2})
	dups := append(randomPoints(300, 9), randomPoints(300, 9)...)
	for name, pts := range map[string][]orb.Point{"grid": grid, "circle": circle, "lattice": lattice, "collinear": line, "duplicates": dups} {
		t.Run(name, func(t *testing.T) {
			tris, err := Delaunay(pts)
			if err != nil {
				t.Fatal(err)
			}
			checkEmptyCircles(t, pts, tris)
		})
	}
}

func TestDelaunayErrors(t *testing.T) {
	for name, pts := range map[string][]orb.Point{
		"two":       {{0, 0}, {1, 1}},
		"collinear": {{0, 0}, {1, 1}, {2, 2}, {3, 3}},
		"same":      {{1, 1}, {1, 1}, {1, 1}},
		"nan":       {{0, 0}, {1, 0}, {math.NaN(), 1}},
	} {
		if _, err := Delaunay(pts); err == nil {
			t.Errorf("%s: no error", name)
		} else {
			t.Logf("%s: %v", name, err)
		}
	}
}

// scipyDelaunay triangulates pts with scipy.spatial.Delaunay (Debian
// python3-scipy, Qhull underneath) and returns the triangles and scipy's
// own wall and CPU times. The points go through a text file with 17 significant
// digits, which round-trips float64 exactly.
func scipyDelaunay(tb testing.TB, pts []orb.Point, wantTris bool) (tris [][3]int32, wall, cpu float64) {
	tb.Helper()
	if _, err := os.Stat("/usr/bin/python3"); err != nil {
		missingTool(tb, "/usr/bin/python3")
	}
	if err := exec.Command("/usr/bin/python3", "-c", "import scipy.spatial").Run(); err != nil {
		missingTool(tb, "python3-scipy")
	}
	dir := tb.TempDir()
	in := filepath.Join(dir, "points.txt")
	var buf bytes.Buffer
	for _, p := range pts {
		buf.WriteString(strconv.FormatFloat(p[0], 'g', 17, 64))
		buf.WriteByte(' ')
		buf.WriteString(strconv.FormatFloat(p[1], 'g', 17, 64))
		buf.WriteByte('\n')
	}
	if err := os.WriteFile(in, buf.Bytes(), 0o644); err != nil {
		tb.Fatal(err)
	}
	out := filepath.Join(dir, "tris.txt")
	script := `
import sys, time, numpy as np
from scipy.spatial import Delaunay
p = np.loadtxt(sys.argv[1])
t0, c0 = time.perf_counter(), time.process_time()
d = Delaunay(p)
print(time.perf_counter() - t0, time.process_time() - c0)
if sys.argv[3] == "1":
    np.savetxt(sys.argv[2], d.simplices, fmt="%d")
`
	want := "0"
	if wantTris {
		want = "1"
	}
	res, err := exec.Command("/usr/bin/python3", "-c", script, in, out, want).CombinedOutput()
	if err != nil {
		tb.Fatalf("scipy: %v\n%s", err, res)
	}
	if _, err := fmt.Sscan(strings.TrimSpace(string(res)), &wall, &cpu); err != nil {
		tb.Fatalf("scipy timing %q: %v", res, err)
	}
	if !wantTris {
		return nil, wall, cpu
	}
	f, err := os.Open(out)
	if err != nil {
		tb.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		var a, b, c int32
		if _, err := fmt.Sscan(sc.Text(), &a, &b, &c); err != nil {
			tb.Fatal(err)
		}
		tris = append(tris, [3]int32{a, b, c})
	}
	return tris, wall, cpu
}

// missingTool skips, or fails under CI=true, when a reference tool is
// absent.
func missingTool(tb testing.TB, name string) {
	tb.Helper()
	if os.Getenv("CI") == "true" {
		tb.Fatalf("reference tool %s is missing (CI=true: a missing tool is a failure)", name)
	}
	tb.Skipf("reference tool %s is missing", name)
}

func canonical(tris [][3]int32) [][3]int32 {
	out := make([][3]int32, len(tris))
	for i, t := range tris {
		s := t
		slices.Sort(s[:])
		out[i] = s
	}
	slices.SortFunc(out, func(a, b [3]int32) int {
		for k := range 3 {
			if a[k] != b[k] {
				return int(a[k] - b[k])
			}
		}
		return 0
	})
	return out
}

// TestDelaunayMatchesScipy: for points in general position the Delaunay
// triangulation is unique, so cvdeck and scipy.spatial.Delaunay (Debian
// python3-scipy) must give the same set of triangles.
func TestDelaunayMatchesScipy(t *testing.T) {
	pts := randomPoints(5000, 42)
	want, _, _ := scipyDelaunay(t, pts, true)
	flat, err := Delaunay(pts)
	if err != nil {
		t.Fatal(err)
	}
	var got [][3]int32
	for k := 0; k < len(flat); k += 3 {
		got = append(got, [3]int32{flat[k], flat[k+1], flat[k+2]})
	}
	g, w := canonical(got), canonical(want)
	if len(g) != len(w) {
		t.Fatalf("cvdeck gives %d triangles, scipy %d", len(g), len(w))
	}
	for i := range g {
		if g[i] != w[i] {
			t.Fatalf("triangle %d differs: cvdeck %v, scipy %v", i, g[i], w[i])
		}
	}
}

// checkConstrainedDelaunay checks the defining property of the
// constrained Delaunay triangulation (Lee and Lin 1986; Chew 1989): every
// edge that is not a segment is locally Delaunay, the far vertex of either
// neighbour outside the other's circumcircle. With ghost triangles every
// edge has two sides, so hull edges are skipped.
func checkConstrainedDelaunay(t *testing.T, tr *triangulation) {
	t.Helper()
	for e := int32(0); e < int32(len(tr.v)); e++ {
		if tr.seg[e] != noSeg || tr.isGhost(e/3) || tr.isGhost(tr.adj[e]/3) {
			continue
		}
		if tr.illegal(e) {
			t.Fatalf("edge %d–%d is not a segment and not locally Delaunay", tr.v[e], tr.v[next(e)])
		}
		if tr.adj[tr.adj[e]] != e || tr.v[tr.adj[e]] != tr.v[next(e)] {
			t.Fatalf("half-edge %d and its twin %d do not match", e, tr.adj[e])
		}
	}
}

// Recovery and refinement keep the triangulation constrained Delaunay.
func TestConstrainedDelaunay(t *testing.T) {
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {3, 0}, {3, 1}, {0, 1}}, 0.1, "duct"),
		polyLoop([]orb.Point{{0.5, 0.2}, {0.55, 0.8}, {0.6, 0.2}}, 0.05, "fin"),
		circleLoop(orb.Point{2, 0.5}, 0.3, 30, true, "body"),
	}}
	g, err := flatten(out)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := constrainedTriangulation(g, 0)
	if err != nil {
		t.Fatal(err)
	}
	checkConstrainedDelaunay(t, tr)
	opt, _ := Options{}.withDefaults()
	tr, err = triangulateOutline(g, g, opt)
	if err != nil {
		t.Fatal(err)
	}
	checkConstrainedDelaunay(t, tr)
}

// FuzzDelaunay triangulates up to 64 points decoded from bytes, on a
// coarse 16 × 16 lattice so that collinear, cocircular and repeated points
// are common (in float64 the lattice of 0.1 steps is not exactly
// collinear, which makes slivers too), and checks the empty-circle
// property and the hull area; the only acceptable error is for inputs
// with no three points off one line.
func FuzzDelaunay(f *testing.F) {
	f.Add([]byte{0x00, 0x0f, 0xf0, 0xff, 0x88})
	f.Add([]byte{0x11, 0x22, 0x33, 0x44, 0x55, 0x66})
	f.Add([]byte{0x00, 0x01, 0x10, 0x11, 0x02, 0x20, 0x22, 0x12, 0x21})
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) > 64 {
			data = data[:64]
		}
		pts := make([]orb.Point, len(data))
		for i, b := range data {
			pts[i] = orb.Point{float64(b>>4) * 0.1, float64(b&15) * 0.1}
		}
		tris, err := Delaunay(pts)
		if err != nil {
			// Refusal is right only if no three points are off one line
			// (exactly, in float64).
			for i := range pts {
				for j := range pts {
					for k := range pts {
						if predicates.Orient2d(pts[i][0], pts[i][1], pts[j][0], pts[j][1], pts[k][0], pts[k][1]) != 0 {
							t.Fatalf("points %d, %d, %d are not collinear, yet: %v", i, j, k, err)
						}
					}
				}
			}
			return
		}
		checkEmptyCircles(t, pts, tris)
	})
}
