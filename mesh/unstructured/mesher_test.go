package unstructured

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"github.com/paulmach/orb"
)

// polyLoop discretises the closed polygon corners into edges of about
// spacing h, every edge tagged tag.
func polyLoop(corners []orb.Point, h float64, tag string) geometry.DiscreteLoop {
	var l geometry.DiscreteLoop
	for i, a := range corners {
		b := corners[(i+1)%len(corners)]
		n := max(1, int(math.Ceil(math.Hypot(b[0]-a[0], b[1]-a[1])/h)))
		for k := 0; k < n; k++ {
			t := float64(k) / float64(n)
			l.Points = append(l.Points, orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])})
			l.Tags = append(l.Tags, tag)
		}
	}
	return l
}

// circleLoop is a circle of n points, clockwise when cw.
func circleLoop(c orb.Point, r float64, n int, cw bool, tag string) geometry.DiscreteLoop {
	var l geometry.DiscreteLoop
	for k := 0; k < n; k++ {
		th := 2 * math.Pi * float64(k) / float64(n)
		if cw {
			th = -th
		}
		l.Points = append(l.Points, orb.Point{c[0] + r*math.Cos(th), c[1] + r*math.Sin(th)})
		l.Tags = append(l.Tags, tag)
	}
	return l
}

func loopArea(l geometry.DiscreteLoop) float64 {
	a := 0.0
	o := l.Points[0]
	for k, p := range l.Points {
		q := l.Points[(k+1)%len(l.Points)]
		a += (p[0]-o[0])*(q[1]-o[1]) - (q[0]-o[0])*(p[1]-o[1])
	}
	return a / 2
}

func outlineArea(o geometry.DiscreteOutline) float64 {
	a := 0.0
	for _, l := range o.Loops {
		a += loopArea(l)
	}
	return a
}

func minAngleDeg(m *mesh.Mesh, c int) float64 {
	nodes := m.Cell(c)
	n := len(nodes)
	best := math.Inf(1)
	for k := range n {
		p := m.Nodes[nodes[(k+n-1)%n]]
		q := m.Nodes[nodes[k]]
		r := m.Nodes[nodes[(k+1)%n]]
		ux, uy := p[0]-q[0], p[1]-q[1]
		vx, vy := r[0]-q[0], r[1]-q[1]
		ang := math.Atan2(math.Abs(ux*vy-uy*vx), ux*vx+uy*vy) * 180 / math.Pi
		best = math.Min(best, ang)
	}
	return best
}

// basicChecks: every cell has positive area, every face is used by one or
// two cells consistently (mesh.Build checks that), every boundary face is
// tagged, and the cell areas add up to the outline's area.
func basicChecks(t *testing.T, m *mesh.Mesh, out geometry.DiscreteOutline) {
	t.Helper()
	for c, a := range m.Geo.CellArea {
		if !(a > 0) {
			t.Fatalf("cell %d %v has area %g; every cell must be counter-clockwise with positive area", c, m.Cell(c), a)
		}
	}
	if lo, hi := m.UntaggedRange(); hi > lo {
		t.Fatalf("%d boundary faces carry no tag, first %v", hi-lo, m.FaceNodes[lo])
	}
	sum, comp := 0.0, 0.0
	for _, a := range m.Geo.CellArea {
		// Kahan summation: a million terms would otherwise lose digits.
		y := a - comp
		s := sum + y
		comp = (s - sum) - y
		sum = s
	}
	want := outlineArea(out)
	if math.Abs(sum-want) > 1e-12*want {
		t.Fatalf("cell areas add up to %.17g, outline area %.17g (relative error %.3g)", sum, want, math.Abs(sum-want)/want)
	}
}

// checkOutlineEdges checks that the outline is in the mesh: its points are
// the first mesh nodes, every boundary face lies on one outline edge and
// carries that edge's tag, and the faces on each edge add up to its
// length, so every edge is present (whole, or split by refinement into
// collinear pieces).
func checkOutlineEdges(t *testing.T, m *mesh.Mesh, out geometry.DiscreteOutline) {
	t.Helper()
	g, err := flatten(out)
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range g.pts {
		if m.Nodes[i] != p {
			t.Fatalf("node %d is %v, outline %s is %v", i, m.Nodes[i], g.where(int32(i)), p)
		}
	}
	covered := make([]float64, len(g.pts))
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		a, b := m.Nodes[m.FaceNodes[f][0]], m.Nodes[m.FaceNodes[f][1]]
		found := false
		for e := range g.pts {
			p, q := g.pts[e], g.pts[g.nextPt[e]]
			l := math.Hypot(q[0]-p[0], q[1]-p[1])
			dist := func(x orb.Point) float64 {
				return math.Abs((q[0]-p[0])*(x[1]-p[1])-(q[1]-p[1])*(x[0]-p[0])) / l
			}
			along := func(x orb.Point) float64 { return ((x[0]-p[0])*(q[0]-p[0]) + (x[1]-p[1])*(q[1]-p[1])) / l }
			if dist(a) > 1e-12*l || dist(b) > 1e-12*l {
				continue
			}
			sa, sb := along(a), along(b)
			if sa < -1e-12*l || sa > l*(1+1e-12) || sb < -1e-12*l || sb > l*(1+1e-12) {
				continue
			}
			// The owner is inside, so the face runs the way the loop does.
			if sb <= sa {
				t.Fatalf("boundary face %d runs against outline edge %s", f, g.where(int32(e)))
			}
			if m.Tags[m.FaceTag[f]] != g.tags[g.edgeTag[e]] {
				t.Fatalf("boundary face %d on outline edge %s is tagged %q, the edge %q", f, g.where(int32(e)), m.Tags[m.FaceTag[f]], g.tags[g.edgeTag[e]])
			}
			covered[e] += m.Geo.FaceLength[f]
			found = true
			break
		}
		if !found {
			t.Fatalf("boundary face %d (%v–%v) lies on no outline edge", f, a, b)
		}
	}
	for e := range g.pts {
		p, q := g.pts[e], g.pts[g.nextPt[e]]
		l := math.Hypot(q[0]-p[0], q[1]-p[1])
		if math.Abs(covered[e]-l) > 1e-9*l {
			t.Fatalf("outline edge from %s: boundary faces cover %.15g of its length %.15g", g.where(int32(e)), covered[e], l)
		}
	}
}

// sharpCorners returns the outline points with an interior angle below
// 60°, the corners where Ruppert-type refinement cannot hold the angle
// bound (Shewchuk 2002, §4).
func sharpCorners(out geometry.DiscreteOutline) []orb.Point {
	g, _ := flatten(out)
	var c []orb.Point
	for i, p := range g.pts {
		a, b := g.pts[g.prevPt[i]], g.pts[g.nextPt[i]]
		u := orb.Point{b[0] - p[0], b[1] - p[1]}
		w := orb.Point{a[0] - p[0], a[1] - p[1]}
		ang := math.Atan2(u[0]*w[1]-u[1]*w[0], u[0]*w[0]+u[1]*w[1])
		if ang < 0 {
			ang += 2 * math.Pi
		}
		if ang < math.Pi/3 {
			c = append(c, p)
		}
	}
	return c
}

// checkMinAngle checks the angle bound on every cell whose nodes are all
// farther than radius from every sharp corner.
func checkMinAngle(t *testing.T, m *mesh.Mesh, out geometry.DiscreteOutline, target, radius float64) {
	t.Helper()
	corners := sharpCorners(out)
	worst, skipped := 180.0, 0
cells:
	for c := range m.NumCells() {
		for _, n := range m.Cell(c) {
			for _, k := range corners {
				if math.Hypot(m.Nodes[n][0]-k[0], m.Nodes[n][1]-k[1]) < radius {
					skipped++
					continue cells
				}
			}
		}
		if a := minAngleDeg(m, c); a < worst {
			worst = a
		}
	}
	t.Logf("%d cells, %d near sharp corners; smallest angle elsewhere %.2f° (target %v°)", m.NumCells(), skipped, worst, target)
	if worst < target {
		t.Errorf("smallest angle %.3f° is below the target %v° away from sharp corners", worst, target)
	}
}

// Ruppert (1995) and Shewchuk (2002): away from small input angles, the
// refined mesh has no angle below the target; the mesh covers exactly the
// outline's area (1e-12 relative) and keeps every outline edge.
func TestMeshQuality(t *testing.T) {
	cases := map[string]geometry.DiscreteOutline{
		"channel with cylinder": {Loops: []geometry.DiscreteLoop{
			polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "wall"),
			circleLoop(orb.Point{1.5, 1}, 0.4, 40, true, "cylinder"),
		}},
		"heat sink fins": {Loops: []geometry.DiscreteLoop{
			polyLoop([]orb.Point{{0, 0}, {3, 0}, {3, 1}, {0, 1}}, 0.1, "duct"),
			polyLoop([]orb.Point{{0.5, 0.2}, {0.55, 0.8}, {0.6, 0.2}}, 0.05, "fin1"),
			polyLoop([]orb.Point{{1.5, 0.2}, {1.55, 0.8}, {1.6, 0.2}}, 0.05, "fin2"),
			polyLoop([]orb.Point{{2.5, 0.2}, {2.55, 0.8}, {2.6, 0.2}}, 0.05, "fin3"),
		}},
		"sharp wedge": {Loops: []geometry.DiscreteLoop{
			polyLoop([]orb.Point{{0, 0}, {4, 0}, {0, 0.7}, {1, 0.3}, {-1, 1}}, 0.2, "wall"),
		}},
	}
	spacing := map[string]float64{"channel with cylinder": 0.2, "heat sink fins": 0.1, "sharp wedge": 0.2}
	for name, out := range cases {
		for _, angle := range []float64{25, 30} {
			t.Run(fmt.Sprintf("%s/%v", name, angle), func(t *testing.T) {
				m, err := Mesh(out, Options{MinAngle: angle})
				if err != nil {
					t.Fatal(err)
				}
				basicChecks(t, m, out)
				checkOutlineEdges(t, m, out)
				// Cells with a node within one boundary spacing of a sharp
				// corner form the corner's fan and keep its angle.
				checkMinAngle(t, m, out, angle, spacing[name])
			})
		}
	}
}

func TestMeshErrors(t *testing.T) {
	sq := func(x0, y0, w float64, cw bool) geometry.DiscreteLoop {
		c := []orb.Point{{x0, y0}, {x0 + w, y0}, {x0 + w, y0 + w}, {x0, y0 + w}}
		if cw {
			c[1], c[3] = c[3], c[1]
		}
		return polyLoop(c, w/4, "w")
	}
	cases := []struct {
		name string
		out  geometry.DiscreteOutline
		opt  Options
		want string
	}{
		{"no loops", geometry.DiscreteOutline{}, Options{}, "no loops"},
		{"self-crossing loop", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{{Points: []orb.Point{{0, 0}, {0, 1}, {3, 0}, {3, 2}}, Tags: []string{"a", "a", "a", "a"}}}}, Options{}, "crosses another input edge"},
		{"flat loop", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{{Points: []orb.Point{{0, 0}, {1, 0}, {2, 0}}, Tags: []string{"a", "a", "a"}}}}, Options{}, "loop 0 encloses no area"},
		{"outer clockwise", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{sq(0, 0, 1, true)}}, Options{}, "loop 0 (the outer loop) runs clockwise"},
		{"hole counter-clockwise", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{sq(0, 0, 4, false), sq(1, 1, 1, false)}}, Options{}, "loop 1 (an inner loop) runs counter-clockwise"},
		{"hole crossing the outer loop", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{sq(0, 0, 4, false), sq(3.3, 1.1, 1.3, true)}}, Options{}, "crosses another input edge"},
		{"touching loops", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{sq(0, 0, 4, false), sq(0, 1, 1, true)}}, Options{}, "coincide"},
		{"tags missing", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{{Points: []orb.Point{{0, 0}, {1, 0}, {0, 1}}, Tags: []string{"a"}}}}, Options{}, "loop 0 has 3 points and 1 tags"},
		{"bad angle", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{sq(0, 0, 1, false)}}, Options{MinAngle: 40}, "minimum angle 40°"},
		{"too many cells", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{sq(0, 0, 1, false)}}, Options{MaxSize: 0.001, MaxCells: 1000}, "above the limit of 1000"},
		// A wedge of 0.0001° at the origin: the cells shrink toward its
		// tip without end, and the message names the corner.
		{"sliver corner", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{polyLoop([]orb.Point{{0, 0}, {1, 0}, {math.Cos(1e-4 * math.Pi / 180), math.Sin(1e-4 * math.Pi / 180)}}, 0.05, "a")}},
			Options{MaxSize: 0.05, MaxCells: 50000}, "sharpest corner, 0.0001° at (0, 0)"},
		{"unknown region tag", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{sq(0, 0, 1, false)}}, Options{Regions: []Region{{Shape: NearTag, Tag: "x", Size: 0.1}}}, `no boundary edge is tagged "x"`},
	}
	for _, c := range cases {
		_, err := Mesh(c.out, c.opt)
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %q does not say %q", c.name, err, c.want)
		}
	}
}

// A box region asks for smaller cells: inside it no edge may be much
// longer than its size, outside cells stay larger.
func TestMeshRegions(t *testing.T) {
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.25, "wall"),
	}}
	box := Region{Shape: Box, Min: orb.Point{1, 0.5}, Max: orb.Point{2, 1.5}, Size: 0.05}
	m, err := Mesh(out, Options{Regions: []Region{box}})
	if err != nil {
		t.Fatal(err)
	}
	basicChecks(t, m, out)
	longestIn, meanIn, nIn := 0.0, 0.0, 0
	for f := range m.NumFaces() {
		mid := m.Geo.FaceMid[f]
		if mid[0] > box.Min[0] && mid[0] < box.Max[0] && mid[1] > box.Min[1] && mid[1] < box.Max[1] {
			longestIn = math.Max(longestIn, m.Geo.FaceLength[f])
			meanIn += m.Geo.FaceLength[f]
			nIn++
		}
	}
	meanIn /= float64(nIn)
	t.Logf("box faces: %d, mean length %.4f, longest %.4f (size %v)", nIn, meanIn, longestIn, box.Size)
	if longestIn > 1.6*box.Size || meanIn < 0.6*box.Size || meanIn > 1.2*box.Size {
		t.Errorf("faces in the box: mean %.4f, longest %.4f; want the mean within 0.6–1.2 and the longest below 1.6 times the size %v", meanIn, longestIn, box.Size)
	}
}

// Same input, same mesh: the output does not depend on map order or
// timing.
func TestMeshDeterministic(t *testing.T) {
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "wall"),
		circleLoop(orb.Point{1.5, 1}, 0.4, 40, true, "cylinder"),
	}}
	a, err := Mesh(out, Options{})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Mesh(out, Options{})
	if !slices.Equal(a.Nodes, b.Nodes) || !slices.Equal(a.CellNodes, b.CellNodes) || !slices.Equal(a.FaceNodes, b.FaceNodes) {
		t.Fatal("two runs on the same outline gave different meshes")
	}
}

// TestMeshTinyAngles: a comb of five spikes with 2.9° tips. Ruppert's
// algorithm alone would not end here; with concentric shells and the
// corner rule (Shewchuk 2002, §4) it must end, with the angle target met
// away from the tips.
func TestMeshTinyAngles(t *testing.T) {
	corners := []orb.Point{{0, 0}, {4, 0}, {4, 0.5}}
	for k := 4; k >= 0; k-- {
		x := 0.4 + 0.8*float64(k)
		corners = append(corners, orb.Point{x + 0.025, 0.5}, orb.Point{x, 1.5}, orb.Point{x - 0.025, 0.5})
	}
	corners = append(corners, orb.Point{0, 0.5})
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{polyLoop(corners, 0.1, "wall")}}
	for _, angle := range []float64{25, 30} {
		m, err := Mesh(out, Options{MinAngle: angle, MaxCells: 2_000_000})
		if err != nil {
			t.Fatal(err)
		}
		basicChecks(t, m, out)
		checkOutlineEdges(t, m, out)
		// Cells with a node within one boundary spacing of a tip: the
		// tip's fan, between points at equal distances on its two sides.
		checkMinAngle(t, m, out, angle, 0.1)
	}
}
