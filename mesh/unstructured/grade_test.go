package unstructured

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"cvdeck/quality"
	"github.com/paulmach/orb"
)

// pathLoop is a closed loop through the corners, the side from corner i
// to corner i+1 cut into pieces of at most sizes[i], tagged tags[i].
func pathLoop(corners []orb.Point, sizes []float64, tags []string) geometry.DiscreteLoop {
	var l geometry.DiscreteLoop
	for i, a := range corners {
		b := corners[(i+1)%len(corners)]
		n := max(1, int(math.Ceil(math.Hypot(b[0]-a[0], b[1]-a[1])/sizes[i]-1e-9)))
		for k := 0; k < n; k++ {
			t := float64(k) / float64(n)
			l.Points = append(l.Points, orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])})
			l.Tags = append(l.Tags, tags[i])
		}
	}
	return l
}

// stepOutline is the backward-facing step of the corner-grading issue:
// an upper floor from (0, 1) to (1, 1), a riser down to (1, 0) and a
// lower floor to (5, 0), all walls, then outlet, ceiling and inlet.
// riser is the riser's spacing (0.02 in the issue).
func stepOutline(riser float64) geometry.DiscreteOutline {
	return geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{pathLoop(
		[]orb.Point{{0, 1}, {1, 1}, {1, 0}, {5, 0}, {5, 3}, {0, 3}},
		[]float64{0.02, riser, 0.04, 0.1, 0.1, 0.05},
		[]string{"wall", "wall", "wall", "outlet", "ceiling", "inlet"},
	)}}
}

// stepLayers are the layers: 12 growing by 1.2 from 0.5 mm.
var stepLayers = Layers{Tags: []string{"wall"}, FirstHeight: 0.0005, Growth: 1.2, Count: 12}

// everyday grades the mesh with the quality package's everyday limits
// (common practice thresholds for cell-centred finite-volume solvers:
// growth fails above 20, skewness above 1, equiangle skewness above 1,
// warning above 3, 0.5 and 0.9).
func everyday(t *testing.T, m *mesh.Mesh) *quality.Report {
	t.Helper()
	lim, err := quality.Profile("everyday")
	if err != nil {
		t.Fatal(err)
	}
	r, err := quality.Evaluate(m, lim)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// metricMax returns the largest value of a cell metric.
func metricMax(t *testing.T, r *quality.Report, name string) float64 {
	t.Helper()
	s, ok := r.Metric(name)
	if !ok {
		t.Fatalf("no metric %q", name)
	}
	return float64(s.Max)
}

// summary is the report's figures that the corner grading is about.
func summary(t *testing.T, r *quality.Report) string {
	return fmt.Sprintf("%d cells, %d fail, %d warn; worst growth %.3g, skewness %.3g, equiangle skewness %.3g, max angle %.1f°",
		r.Cells, r.FailedCells, r.WarnedCells, metricMax(t, r, "growth"), metricMax(t, r, "skewness"),
		metricMax(t, r, "equiangle_skewness"), metricMax(t, r, "max_angle"))
}

// hasNode reports whether the mesh has a node within tol of p.
func hasNode(m *mesh.Mesh, p orb.Point, tol float64) bool {
	for _, q := range m.Nodes {
		if math.Hypot(q[0]-p[0], q[1]-p[1]) <= tol {
			return true
		}
	}
	return false
}

// fanInnerRatio returns the largest area ratio, across a face, of a
// triangle with a node at the corner c and a quadrilateral on a wall face
// ending at c: the innermost fan triangles beside the first wall cells.
func fanInnerRatio(m *mesh.Mesh, c orb.Point) float64 {
	worst := 0.0
	for f := 0; f < m.NumInterior; f++ {
		o, n := m.Owner[f], m.Neighbour[f]
		for _, pair := range [2][2]int32{{o, n}, {n, o}} {
			tri, quad := m.Cell(int(pair[0])), m.Cell(int(pair[1]))
			if len(tri) != 3 || len(quad) != 4 {
				continue
			}
			at := false
			for _, v := range tri {
				if m.Nodes[v] == c {
					at = true
				}
			}
			if !at {
				continue
			}
			a, b := math.Abs(m.Geo.CellArea[pair[0]]), math.Abs(m.Geo.CellArea[pair[1]])
			worst = math.Max(worst, max(a, b)/min(a, b))
		}
	}
	return worst
}

// The step: before the grading 36 cells failed the everyday
// limits (growth 209 beside the convex corner's fan, face skewness 13 and
// equiangle skewness 0.91 at the concave corner's foot). With the walls
// graded towards both corners no cell fails; at the concave corner (1, 0)
// the twelve layers of riser and floor meet on the bisector, at the
// nodes (1 + s_j, s_j) with s_j = h₁(G^j − 1)/(G − 1) (geometric series);
// at the convex corner (1, 1) the innermost fan triangles differ from the
// first wall cells by about √((s_n + s_{n−1})/s₁) = 8.46 (the balance of
// fanStep and fanSpacing; within 10% for the fan step's sin θ/θ and the
// columns' lean). The first layer keeps its height on every wall face.
func TestCornerGradingStep(t *testing.T) {
	out := stepOutline(0.02)
	m, rep, err := MeshWithReport(out, Options{MaxSize: 0.2, Layers: []Layers{stepLayers}})
	if err != nil {
		t.Fatal(err)
	}
	basicChecks(t, m, out)
	r := everyday(t, m)
	t.Log(summary(t, r))
	if r.FailedCells > 0 {
		t.Errorf("%d cells fail the everyday limits; want none", r.FailedCells)
	}
	for _, name := range []string{"skewness", "equiangle_skewness"} {
		s, _ := r.Metric(name)
		if s.Warned > 0 {
			t.Errorf("%d cells warn on %s (worst %.3g); want none", s.Warned, name, float64(s.Max))
		}
	}
	s := heights(stepLayers)
	for j := 1; j < len(s); j++ {
		if p := (orb.Point{1 + s[j], s[j]}); !hasNode(m, p, 1e-12) {
			t.Errorf("no node on the concave corner's bisector at %v (layer %d)", p, j)
		}
	}
	n := len(s) - 1
	want := math.Sqrt((s[n] + s[n-1]) / s[1])
	if got := fanInnerRatio(m, orb.Point{1, 1}); math.Abs(got-want) > 0.1*want {
		t.Errorf("innermost fan cells differ from the first wall cells by %.3g; want %.3g within 10%%", got, want)
	} else {
		t.Logf("innermost fan cells / first wall cells: %.3g (estimate %.3g)", got, want)
	}
	if k, dev := checkFirstHeight(t, m, "wall", stepLayers.FirstHeight); dev > 1e-9 {
		t.Errorf("first-cell height on %d wall faces deviates by %.3g; want exact", k, dev)
	}
	t.Logf("layer report: %+v", rep.Layers[0].Short)
}

// A square body in a channel, walls only on the body: four convex 90°
// corners with fans, nothing else. No cell fails the everyday limits, and
// at each corner the innermost fan triangles differ from the first wall
// cells by √((s_n + s_{n−1})/s₁) within 10% (see TestCornerGradingStep).
// Before the grading 32 cells failed here, with growth 105 beside the
// fans.
func TestCornerGradingConvex(t *testing.T) {
	body := []orb.Point{{1, 0.8}, {1, 1.2}, {1.4, 1.2}, {1.4, 0.8}}
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "farfield"),
		polyLoop(body, 0.04, "body"),
	}}
	l := Layers{Tags: []string{"body"}, FirstHeight: 0.002, Growth: 1.2, Count: 10}
	m, err := Mesh(out, Options{Layers: []Layers{l}})
	if err != nil {
		t.Fatal(err)
	}
	basicChecks(t, m, out)
	r := everyday(t, m)
	t.Log(summary(t, r))
	if r.FailedCells > 0 {
		t.Errorf("%d cells fail the everyday limits; want none", r.FailedCells)
	}
	s := heights(l)
	n := len(s) - 1
	want := math.Sqrt((s[n] + s[n-1]) / s[1])
	for _, c := range body {
		if got := fanInnerRatio(m, c); math.Abs(got-want) > 0.1*want {
			t.Errorf("corner %v: innermost fan cells differ from the first wall cells by %.3g; want %.3g within 10%%", c, got, want)
		}
	}
}

// bentFloor is a duct whose floor, a wall from (0, 0) to (1, 0), turns
// up by turn (concave) for another unit; an outlet 0.4 long square to
// that wall, a slip ceiling back to (0, 0.4) and an inlet square to the
// floor close it, so that both walls end square to their neighbours
// (their layers slide along inlet and outlet).
func bentFloor(turn, size float64) (geometry.DiscreteOutline, orb.Point) {
	s, c := math.Sincos(turn)
	b := orb.Point{1 + c, s}
	o := orb.Point{b[0] - 0.4*s, b[1] + 0.4*c}
	return geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{pathLoop(
		[]orb.Point{{0, 0}, {1, 0}, b, o, {0, 0.4}},
		[]float64{size, size, 0.05, 0.1, 0.05},
		[]string{"wall", "wall", "outlet", "ceiling", "inlet"},
	)}}, orb.Point{1, 0}
}

// Concave corners turning by 20°, 45°, 60°, 90° and 120°, layers on both
// walls with pieces 0.04 long, room enough beside the corner for the
// whole stack's zone (x₁₂ = s₁₂ tan 60° = 0.034 at 120°): the layers of the
// two walls meet on the corner's bisector, at the nodes
// p + s_j/cos(φ/2)·b (b the unit bisector, s_j the layer heights: the
// bisector point s_j above both walls), all twelve of them; the cells
// beside the bisector are mirror images, so the face skewness near the
// corner stays below the everyday warn level 0.5 (with one averaged ray
// on wall pieces 80 first heights long it reached 14 to 20, and 22 to 24
// cells failed), and no cell fails.
func TestCornerGradingConcave(t *testing.T) {
	for _, deg := range []float64{20, 45, 60, 90, 120} {
		t.Run(fmt.Sprintf("%g°", deg), func(t *testing.T) {
			phi := deg * math.Pi / 180
			out, p := bentFloor(phi, 0.04)
			m, err := Mesh(out, Options{MaxSize: 0.2, Layers: []Layers{stepLayers}})
			if err != nil {
				t.Fatal(err)
			}
			basicChecks(t, m, out)
			r := everyday(t, m)
			t.Log(summary(t, r))
			if r.FailedCells > 0 {
				t.Errorf("%d cells fail the everyday limits; want none", r.FailedCells)
			}
			// The bisector, turned φ/2 back from the floor's normal.
			bis := orb.Point{-math.Sin(phi / 2), math.Cos(phi / 2)}
			s := heights(stepLayers)
			for j := 1; j < len(s); j++ {
				d := s[j] / math.Cos(phi/2)
				if q := (orb.Point{p[0] + d*bis[0], p[1] + d*bis[1]}); !hasNode(m, q, 1e-12) {
					t.Errorf("no node on the bisector at %v (layer %d)", q, j)
				}
			}
			skew, _ := r.Field("skewness")
			worst := 0.0
			for c := range m.NumCells() {
				x := m.Geo.CellCentroid[c]
				if math.Hypot(x[0]-p[0], x[1]-p[1]) < 2*s[len(s)-1] {
					worst = math.Max(worst, skew[c])
				}
			}
			if worst > 0.5 {
				t.Errorf("face skewness %.3g near the corner; want at most 0.5", worst)
			}
		})
	}
}

// Harder cases, each with its risk: the mesh is valid (positive areas, the
// outline kept, every boundary face tagged) and no cell fails the
// everyday limits.
//
//   - a blunt plate 5 mm thick: two fans 5 mm apart at each end, on an
//     edge shorter than the grading wants, whose zones share it;
//   - the step with a riser spacing of 13 mm: the outline point at 13 mm
//     lies inside the concave corner's zone (its stack reaches 19.8 mm),
//     so only 7 layers tie and the rays beyond stop a layer below the
//     bisector;
//   - the step under a ceiling 30 mm above the upper floor: the gap rule
//     cuts the stacks at the convex corner;
//   - the step's loop starting at the concave corner, and an L-shaped body
//     (an inner, clockwise loop) with a concave corner: the zone and the
//     layers' front across a loop's start;
//   - a notch of 30° (a concave turn of 150°, beyond tieMaxTurn) and a
//     mild concave turn of 10° (below tieMinTurn): one averaged ray, the
//     spacing beside it set by the skewness rule;
//   - riser and floors under layer requests of different first heights:
//     the concave corner of two requests is not tied.
func TestCornerGradingHard(t *testing.T) {
	plate := []orb.Point{{1, 0.9975}, {1, 1.0025}, {2, 1.0025}, {2, 0.9975}}
	l := []orb.Point{{1, 0.5}, {1, 1.5}, {1.3, 1.5}, {1.3, 0.8}, {2, 0.8}, {2, 0.5}}
	step := func(riser, ceiling float64, start int) geometry.DiscreteOutline {
		c := []orb.Point{{0, 1}, {1, 1}, {1, 0}, {5, 0}, {5, ceiling}, {0, ceiling}}
		h := []float64{0.02, riser, 0.04, 0.1, 0.1, 0.05}
		tags := []string{"wall", "riser", "wall", "outlet", "ceiling", "inlet"}
		c, h, tags = append(c[start:], c[:start]...), append(h[start:], h[:start]...), append(tags[start:], tags[:start]...)
		return geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{pathLoop(c, h, tags)}}
	}
	notch := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{pathLoop(
		[]orb.Point{{0, 0}, {1, 0}, {1 - 0.5*math.Sqrt(3)/2, 0.25}, {1 - 0.5*math.Sqrt(3)/2, 0.6}, {0, 0.6}},
		[]float64{0.04, 0.04, 0.05, 0.1, 0.05},
		[]string{"wall", "wall", "outlet", "ceiling", "inlet"},
	)}}
	mild, _ := bentFloor(10*math.Pi/180, 0.04)
	box := polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "farfield")
	both := []string{"wall", "riser"}
	thin := Layers{Tags: []string{"body"}, FirstHeight: 1e-4, Growth: 1.2, Count: 10}
	cases := []struct {
		name   string
		out    geometry.DiscreteOutline
		layers []Layers
	}{
		{"blunt plate", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{box, pathLoop(plate, []float64{0.01, 0.01, 0.01, 0.01}, []string{"body", "body", "body", "body"})}}, []Layers{thin}},
		{"zone cut by an outline point", step(0.013, 3, 0), []Layers{{Tags: both, FirstHeight: 0.0005, Growth: 1.2, Count: 12}}},
		{"low ceiling", step(0.02, 1.03, 0), []Layers{{Tags: both, FirstHeight: 0.0005, Growth: 1.2, Count: 12}}},
		{"loop starting at the concave corner", step(0.02, 3, 2), []Layers{{Tags: both, FirstHeight: 0.0005, Growth: 1.2, Count: 12}}},
		{"L-shaped body", geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{box, pathLoop(l, []float64{0.02, 0.02, 0.02, 0.02, 0.02, 0.02}, []string{"body", "body", "body", "body", "body", "body"})}}, []Layers{{Tags: []string{"body"}, FirstHeight: 0.0005, Growth: 1.2, Count: 12}}},
		{"30° notch", notch, []Layers{stepLayers}},
		{"10° concave turn", mild, []Layers{stepLayers}},
		{"two requests", step(0.02, 3, 0), []Layers{{Tags: []string{"wall"}, FirstHeight: 0.0005, Growth: 1.2, Count: 12}, {Tags: []string{"riser"}, FirstHeight: 0.0004, Growth: 1.2, Count: 12}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, err := Mesh(c.out, Options{MaxSize: 0.2, Layers: c.layers})
			if err != nil {
				t.Fatal(err)
			}
			basicChecks(t, m, c.out)
			r := everyday(t, m)
			t.Log(summary(t, r))
			if r.FailedCells > 0 {
				for _, name := range []string{"growth", "skewness", "equiangle_skewness", "max_angle", "non_orthogonality"} {
					if s, _ := r.Metric(name); s.Failed > 0 {
						t.Logf("%s: %d fail, worst %v", name, s.Failed, s.Worst)
					}
				}
				t.Errorf("%d cells fail the everyday limits; want none", r.FailedCells)
			}
		})
	}
}

// equidistribute against the closed form: with h(x) = h₀ + kx the points
// of equal ∫ dx/h are x_i = h₀(e^(k i c) − 1)/k, c = I/N, so consecutive
// pieces grow by e^(kc) exactly (a geometric series); N is the nearest
// whole number to I; with two mirror-image lines the points are
// symmetric about the middle.
func TestEquidistribute(t *testing.T) {
	h0, k := 0.001, 0.2
	for _, want := range []float64{10, 7.4, 7.6} {
		l := h0 * math.Expm1(k*want) / k // ∫₀ˡ dx/h = want
		x, ok := equidistribute([]spacingLine{{h0, k}}, 0, l, 100)
		if !ok {
			t.Fatalf("I = %g: refused", want)
		}
		n := int(math.Round(want))
		if len(x) != n-1 {
			t.Fatalf("I = %g: %d points, want %d", want, len(x), n-1)
		}
		c := want / float64(n)
		for i, xi := range x {
			exact := h0 * math.Expm1(k*c*float64(i+1)) / k
			if math.Abs(xi-exact) > 1e-12*l {
				t.Errorf("I = %g: point %d at %.15g, want %.15g", want, i+1, xi, exact)
			}
		}
	}
	l := 0.3
	x, _ := equidistribute([]spacingLine{{h0, k}, {h0 + k*l, -k}}, 0, l, 1000)
	for i := range x {
		if j := len(x) - 1 - i; math.Abs(x[i]+x[j]-l) > 1e-12 {
			t.Errorf("points %d and %d at %.15g and %.15g are not symmetric about %g", i, j, x[i], x[j], l/2)
		}
	}
}

// The step's graded walls: beside the fan the first piece is fanSpacing
// (the fan balance), beside the concave corner the zone points lie at
// x_j = s_j tan 45° = s_j, and nowhere do neighbouring wall pieces differ
// by more than 2. Pieces inside one outline edge follow the growth ratio
// 1.2; where a split edge meets a whole one the ratio cannot be below the
// golden ratio 1.618 for equal edges (a split of L into a and L − a with
// L/a = a/(L − a)), and rounding the piece count brings it to below 2.
func TestGradedSpacing(t *testing.T) {
	g, err := flatten(stepOutline(0.02))
	if err != nil {
		t.Fatal(err)
	}
	opt, err := Options{MaxSize: 0.2, Layers: []Layers{stepLayers}}.withDefaults()
	if err != nil {
		t.Fatal(err)
	}
	specOf, err := wallSpecs(g, opt)
	if err != nil {
		t.Fatal(err)
	}
	w, ties, err := gradeCorners(g, opt, specOf)
	if err != nil {
		t.Fatal(err)
	}
	if len(ties) != 1 {
		t.Fatalf("%d tied corners, want 1 (the step's foot)", len(ties))
	}
	s := heights(stepLayers)
	_, theta := fanPlan(-math.Pi/2, fanMaxStep)
	fan := fanSpacing(s, theta)
	for i := range w.pts {
		a, b, c := w.pts[w.prevPt[i]], w.pts[i], w.pts[w.nextPt[i]]
		if w.tags[w.edgeTag[w.prevPt[i]]] != "wall" || w.tags[w.edgeTag[i]] != "wall" {
			continue
		}
		l1, l2 := math.Hypot(b[0]-a[0], b[1]-a[1]), math.Hypot(c[0]-b[0], c[1]-b[1])
		if r := max(l1, l2) / min(l1, l2); r > 2 {
			t.Errorf("wall pieces %.4g and %.4g meet at %v: ratio %.3g, want at most 2", l1, l2, b, r)
		}
		if b == (orb.Point{1, 1}) && (math.Abs(l1-fan) > 1e-12 || math.Abs(l2-fan) > 1e-12) {
			t.Errorf("pieces beside the fan are %.15g and %.15g, want %.15g", l1, l2, fan)
		}
	}
	for j := 1; j < len(s)-1; j++ { // the 12th is the riser's outline point at 0.02, snapped
		for side, want := range []orb.Point{{1, s[j]}, {1 + s[j], 0}} {
			if got := w.pts[ties[0].side[side][j-1]]; math.Hypot(got[0]-want[0], got[1]-want[1]) > 1e-15 {
				t.Errorf("zone point %d of side %d at %v, want %v", j, side, got, want)
			}
		}
	}
}

// The skewness rule grades kinks, not curves: a circle of 60 points under
// a first layer of 10 µm (estimated face skewness sin 6° · 42 mm /
// (4 · 10 µm) ≈ 110 at every point) keeps its points, as the user spaced
// them; a floor kinked by 10° (estimate sin 10° · 40 mm / (4 · 0.5 mm) ≈
// 3.5) gets the corner spacing 4·aimSkew·s₁/sin 10° beside the kink on
// both walls.
func TestKinkRule(t *testing.T) {
	grade := func(out geometry.DiscreteOutline, l Layers) (*pslg, *pslg) {
		t.Helper()
		g, err := flatten(out)
		if err != nil {
			t.Fatal(err)
		}
		opt, err := Options{Layers: []Layers{l}}.withDefaults()
		if err != nil {
			t.Fatal(err)
		}
		specOf, err := wallSpecs(g, opt)
		if err != nil {
			t.Fatal(err)
		}
		w, _, err := gradeCorners(g, opt, specOf)
		if err != nil {
			t.Fatal(err)
		}
		return g, w
	}
	circle := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "farfield"),
		circleLoop(orb.Point{1.5, 1}, 0.4, 60, true, "cylinder"),
	}}
	if g, w := grade(circle, Layers{Tags: []string{"cylinder"}, FirstHeight: 1e-5, Growth: 1.2, Count: 10}); w != g {
		t.Errorf("the circle got %d points more; want its own", len(w.pts)-len(g.pts))
	}
	phi := 10 * math.Pi / 180
	bend, p := bentFloor(phi, 0.04)
	g, w := grade(bend, stepLayers)
	if w == g {
		t.Fatal("the 10° kink was not graded")
	}
	want := 4 * aimSkew * stepLayers.FirstHeight / math.Sin(phi)
	for i, q := range w.pts {
		if q != p {
			continue
		}
		for _, r := range []orb.Point{w.pts[w.prevPt[i]], w.pts[w.nextPt[i]]} {
			if d := math.Hypot(r[0]-p[0], r[1]-p[1]); math.Abs(d-want) > 1e-12 {
				t.Errorf("wall piece beside the kink %.15g long, want %.15g", d, want)
			}
		}
	}
}

// A growth ratio of 1 keeps the corner spacing (0.78 mm beside the
// step's fan) along whole walls: the points that asks for are counted
// before they are made, and refused with the cell limit they would
// pass, where, and what to change.
func TestGradingLimit(t *testing.T) {
	_, err := Mesh(stepOutline(0.02), Options{Growth: 1, MaxCells: 20000, Layers: []Layers{stepLayers}})
	if err == nil {
		t.Fatal("no error")
	}
	for _, s := range []string{"more than 1538 wall points", "loop 0 point", "12 layers", "above the limit of 20000", "growth ratio 1"} {
		if !strings.Contains(err.Error(), s) {
			t.Errorf("error %q does not say %q", err, s)
		}
	}
}

// TestSameStacks: corners between two layer requests are graded only
// when their stacks are about the same: 0.5 and 0.4 mm first heights at
// growth 1.2 are (the step's two requests above pass the everyday
// limits), 50 µm and 1 µm are not, nor growths of 1.2 and 1.3.
func TestSameStacks(t *testing.T) {
	for _, c := range []struct {
		a, b Layers
		want bool
	}{
		{Layers{FirstHeight: 5e-4, Growth: 1.2}, Layers{FirstHeight: 4e-4, Growth: 1.2}, true},
		{Layers{FirstHeight: 5e-5, Growth: 1.2}, Layers{FirstHeight: 1e-6, Growth: 1.2}, false},
		{Layers{FirstHeight: 5e-4, Growth: 1.2}, Layers{FirstHeight: 5e-4, Growth: 1.3}, false},
		{Layers{FirstHeight: 5e-4}, Layers{FirstHeight: 5e-4, Growth: DefaultGrowth}, true},
	} {
		if got := sameStacks(c.a, c.b); got != c.want {
			t.Errorf("sameStacks(%+v, %+v) = %v, want %v", c.a, c.b, got, c.want)
		}
	}
}
