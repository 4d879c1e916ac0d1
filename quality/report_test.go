package quality

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// The JSON and text reports are the same bytes whether the loops run on one
// goroutine or several; the mesh spans several chunks so that the split
// matters.
func TestReportDeterministic(t *testing.T) {
	m := build(t, gridNodes(300, 150, orb.Point{0, 0}, orb.Point{0.01, 0}, orb.Point{0, 0.01}, 0.45), quadCells(300, 150, true), true)
	if m.NumCells() < 2*chunk {
		t.Fatalf("mesh of %d cells spans too few chunks", m.NumCells())
	}
	run := func(procs int) (string, string) {
		old := runtime.GOMAXPROCS(procs)
		defer runtime.GOMAXPROCS(old)
		r := evaluate(t, m)
		var j, x bytes.Buffer
		if err := WriteJSON(&j, r); err != nil {
			t.Fatal(err)
		}
		if err := WriteText(&x, r); err != nil {
			t.Fatal(err)
		}
		return j.String(), x.String()
	}
	j1, x1 := run(1)
	j4, x4 := run(4)
	if j1 != j4 || x1 != x4 {
		t.Error("report differs between 1 and 4 goroutines")
	}
	var back map[string]any
	if err := json.Unmarshal([]byte(j1), &back); err != nil {
		t.Fatalf("JSON does not parse: %v", err)
	}
	for _, key := range []string{"verdict", "metrics", "audit", "connectivity", "failed_cells", "duplicate_distance"} {
		if _, ok := back[key]; !ok {
			t.Errorf("JSON lacks %q", key)
		}
	}
}

// Every per-cell, per-face and per-node value, and every cell status, is
// the same float64 whether the loops run on one goroutine or several; the
// mesh spans several chunks, and its jitter folds some cells, so that
// worst lists, grades and the special cases are exercised.
func TestFieldsDeterministic(t *testing.T) {
	m := build(t, gridNodes(300, 150, orb.Point{0, 0}, orb.Point{0.01, 0}, orb.Point{0, 0.01}, 0.45), quadCells(300, 150, true), true)
	run := func(procs int) *Report {
		old := runtime.GOMAXPROCS(procs)
		defer runtime.GOMAXPROCS(old)
		return evaluate(t, m)
	}
	sameReport(t, "on one goroutine and on three", run(1), run(3))
}

// sameReport fails t unless a and b give the same JSON report and the same
// float64 bits in every field and the same cell status.
func sameReport(t *testing.T, what string, a, b *Report) {
	t.Helper()
	var ja, jb bytes.Buffer
	if err := WriteJSON(&ja, a); err != nil {
		t.Fatal(err)
	}
	if err := WriteJSON(&jb, b); err != nil {
		t.Fatal(err)
	}
	if ja.String() != jb.String() {
		t.Fatalf("JSON reports differ %s", what)
	}
	for i, list := range [][2][]Field{{a.CellFields, b.CellFields}, {a.FaceFields, b.FaceFields}, {a.NodeFields, b.NodeFields}} {
		if len(list[0]) != len(list[1]) {
			t.Fatalf("field list %d: %d fields and %d %s", i, len(list[0]), len(list[1]), what)
		}
		for k, f := range list[0] {
			g := list[1][k]
			if len(f.Values) != len(g.Values) {
				t.Fatalf("%s: %d values and %d %s", f.Name, len(f.Values), len(g.Values), what)
			}
			for j, x := range f.Values {
				if math.Float64bits(x) != math.Float64bits(g.Values[j]) {
					t.Fatalf("%s[%d] = %v and %v %s", f.Name, j, x, g.Values[j], what)
				}
			}
		}
	}
	if !slices.Equal(a.CellStatus, b.CellStatus) {
		t.Errorf("cell status differs %s", what)
	}
}

// The fields for cell data have one value per cell, in report order, and
// the worst lists agree with them.
func TestFieldsAndWorst(t *testing.T) {
	m := build(t, gridNodes(30, 20, orb.Point{0, 0}, orb.Point{0.1, 0}, orb.Point{0, 0.1}, 0.4), quadCells(30, 20, false), true)
	r := evaluate(t, m)
	var names []string
	for _, f := range r.CellFields {
		names = append(names, f.Name)
		if len(f.Values) != m.NumCells() {
			t.Errorf("field %s has %d values for %d cells", f.Name, len(f.Values), m.NumCells())
		}
	}
	want := "area face_length aspect_ratio min_angle max_angle equiangle_skewness scaled_jacobian non_orthogonality skewness growth closure free_stream gradient_error status defects"
	if got := strings.Join(names, " "); got != want {
		t.Errorf("cell fields %q", got)
	}
	s, _ := r.Metric("non_orthogonality")
	v := field(t, r, "non_orthogonality")
	for i, w := range s.Worst {
		if float64(w.Value) != v[w.Index] || (i > 0 && float64(w.Value) > float64(s.Worst[i-1].Value)) {
			t.Errorf("worst %d: %+v (field %g)", i, w, v[w.Index])
		}
		c := m.Geo.CellCentroid[w.Index]
		if w.X != c[0] || w.Y != c[1] {
			t.Errorf("worst %d at (%g, %g), centroid %v", i, w.X, w.Y, c)
		}
	}
	for _, x := range v {
		if x > float64(s.Worst[len(s.Worst)-1].Value) && !containsValue(s.Worst, x) {
			t.Errorf("value %g beats the worst list", x)
		}
	}
}

func containsValue(l []Located, x float64) bool {
	for _, w := range l {
		if float64(w.Value) == x {
			return true
		}
	}
	return false
}

// The text table shows every metric, the verdict and the named defects.
func TestWriteText(t *testing.T) {
	nodes := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {1, 0}, {2, 0}, {2, 1}, {1, 1}}
	r := evaluate(t, build(t, nodes, [][]int32{{0, 1, 2, 3}, {4, 5, 6, 7}}, true))
	var b bytes.Buffer
	if err := WriteText(&b, r); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"FAIL", "non_orthogonality", "dual_closure (nodes)", "duplicate_node", "node 1 (cell 0) and node 4 (cell 1)", "≤ 0"} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
}

// Non-finite values become null in JSON rather than breaking the encoder.
func TestNumberJSON(t *testing.T) {
	b, err := json.Marshal([]Number{1.5, Number(posInf()), 0})
	if err != nil || string(b) != "[1.5,null,0]" {
		t.Errorf("%s %v", b, err)
	}
}

func posInf() float64 { x := 0.0; return 1 / x }

// The report sums up the boundary faces by tag, in the mesh's tag order, a
// tag with no faces included and the untagged faces last: on a 4 × 2 grid
// of squares of side 0.5 on [0, 2] × [0, 1] with the bottom tagged floor
// and the top lid, each has 4 faces of total length 2, and the two sides,
// untagged, 4 faces of length 2 (the perimeter, 6, is elementary
// geometry).
func TestReportBoundaryTags(t *testing.T) {
	const nx, ny = 4, 2
	m := floorAndLid(t, nx, ny, 0.5, quadCells(nx, ny, false), "spare")
	r := evaluate(t, m)
	// Every boundary cell is a 0.5 m square: first-cell height 0.5 m.
	// Two squares stand on each floor and lid face, four on each side
	// face.
	half, none := Spread{0.5, 0.5, 0.5}, Number(math.NaN())
	nothing := Spread{none, none, none}
	want := []BoundaryTag{{"floor", 4, 2, half, Spread{2, 2, 2}}, {"lid", 4, 2, half, Spread{2, 2, 2}}, {"spare", 0, 0, nothing, nothing}, {"", 4, 2, half, Spread{4, 4, 4}}}
	if fmt.Sprint(r.Boundary) != fmt.Sprint(want) {
		t.Errorf("boundary %+v, want %+v", r.Boundary, want)
	}
	var x bytes.Buffer
	if err := WriteText(&x, r); err != nil {
		t.Fatal(err)
	}
	for _, line := range []string{"  floor                     4 faces, length 2 m; first-cell height 0.5 to 0.5 m, mean 0.5; 2 to 2 quadrilaterals stacked, mean 2", "  spare                     0 faces, length 0 m", "  (no tag)                  4 faces, length 2 m; first-cell height 0.5 to 0.5 m, mean 0.5; 4 to 4 quadrilaterals stacked, mean 4"} {
		if !strings.Contains(x.String(), line+"\n") {
			t.Errorf("text report lacks %q:\n%s", line, x.String())
		}
	}
}

// The first-cell height of a wall is the wall-normal extent of its cells:
// on a grid stretched away from a floor, the first row's spacing; on
// jittered triangles, each face's triangle height 2A/S_f (elementary
// geometry), computed here from the node positions alone.
func TestFirstCellHeight(t *testing.T) {
	const nx, ny = 6, 5
	ys := []float64{0, 1e-4, 3e-4, 7e-4, 1.5e-3, 3.1e-3} // spacings 1e-4, 2e-4, 4e-4, ...
	for _, tri := range []bool{false, true} {
		in := mesh.Input{Tags: []string{"floor"}, CellStart: []int32{0}}
		for j := 0; j <= ny; j++ {
			for i := 0; i <= nx; i++ {
				x := 0.01 * float64(i)
				if tri && i > 0 && i < nx {
					x += 0.003 * float64((i*7+j*3)%5-2) / 2
				}
				in.Nodes = append(in.Nodes, orb.Point{x, ys[j]})
			}
		}
		for _, c := range quadCells(nx, ny, tri) {
			in.CellNodes = append(in.CellNodes, c...)
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
		for i := 0; i < nx; i++ {
			in.Edges = append(in.Edges, mesh.TaggedEdge{A: int32(i), B: int32(i + 1), Tag: 0})
		}
		m, err := mesh.Build(in)
		if err != nil {
			t.Fatal(err)
		}
		r := evaluate(t, m)
		floor := r.Boundary[0]
		lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
		for f := int(m.TagStart[0]); f < int(m.TagStart[1]); f++ {
			want := 1e-4 // the quads' first row
			if tri {
				// The floor face's triangle: height 2A/S_f.
				idx := m.Cell(int(m.Owner[f]))
				p, q, w := m.Nodes[idx[0]], m.Nodes[idx[1]], m.Nodes[idx[2]]
				area := 0.5 * ((q[0]-p[0])*(w[1]-p[1]) - (w[0]-p[0])*(q[1]-p[1]))
				a, b := m.Nodes[m.FaceNodes[f][0]], m.Nodes[m.FaceNodes[f][1]]
				want = 2 * area / math.Hypot(b[0]-a[0], b[1]-a[1])
			}
			if got := cellHeight(m, f); !near(got, want, 1e-15) {
				t.Errorf("tri %v: face %d height %g, want %g", tri, f, got, want)
			}
			lo, hi, sum = min(lo, want), max(hi, want), sum+want
		}
		h := floor.FirstCellHeight
		if !near(float64(h.Min), lo, 1e-15) || !near(float64(h.Max), hi, 1e-15) || !near(float64(h.Mean), sum/nx, 1e-15) {
			t.Errorf("tri %v: floor spread %+v, want %g, %g, %g", tri, h, lo, sum/nx, hi)
		}
	}
}

// TestQuadLayers: on a strip of 4 × 6 unit squares whose lower three rows
// are quadrilaterals and upper three rows are split into triangles (a
// hybrid mesh in miniature), three quadrilaterals stand on each floor
// face, none under the lid, four across each side face of the lower rows
// and none across the upper ones (counted by hand).
func TestQuadLayers(t *testing.T) {
	const nx, ny = 4, 6
	quads, tris := quadCells(nx, ny, false), quadCells(nx, ny, true)
	var cells [][]int32
	for k, c := range quads {
		if k/nx < 3 {
			cells = append(cells, c)
		} else {
			cells = append(cells, tris[2*k:2*k+2]...)
		}
	}
	r := evaluate(t, floorAndLid(t, nx, ny, 1, cells))
	want := map[string]Spread{"floor": {3, 3, 3}, "lid": {0, 0, 0}, "": {0, 2, 4}}
	for _, b := range r.Boundary {
		if fmt.Sprint(b.QuadLayers) != fmt.Sprint(want[b.Tag]) {
			t.Errorf("tag %q: quadrilaterals stacked %v, want %v", b.Tag, b.QuadLayers, want[b.Tag])
		}
	}
}

// floorAndLid builds the mesh of the given cells on the grid of nx × ny
// squares of side h from the origin (gridNodes), its bottom edges tagged
// floor, its top edges lid, its sides untagged; extra tags follow with no
// faces.
func floorAndLid(t *testing.T, nx, ny int, h float64, cells [][]int32, extra ...string) *mesh.Mesh {
	t.Helper()
	in := mesh.Input{Nodes: gridNodes(nx, ny, orb.Point{0, 0}, orb.Point{h, 0}, orb.Point{0, h}, 0), Tags: append([]string{"floor", "lid"}, extra...), CellStart: []int32{0}}
	for _, c := range cells {
		in.CellNodes = append(in.CellNodes, c...)
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	for i := 0; i < nx; i++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: id(i, 0), B: id(i+1, 0), Tag: 0}, mesh.TaggedEdge{A: id(i, ny), B: id(i+1, ny), Tag: 1})
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestQuadLayersNotAlongARow: three rows of layer cells 1 long and 0.1
// thick on a floor of four faces, triangles above (a strip 4 wide): each
// floor face carries the 3 layers, while the end faces of the layer rows
// enter their first cell through its 0.1 side and carry none (not the 4
// cells of the row along the floor); the lid and the triangles' sides
// none. Over the 16 boundary faces: min 0, mean 12/16, max 3 (counted by
// hand).
func TestQuadLayersNotAlongARow(t *testing.T) {
	ys := []float64{0, 0.1, 0.2, 0.3, 1.3}
	var nodes []orb.Point
	for _, y := range ys {
		for i := 0; i <= 4; i++ {
			nodes = append(nodes, orb.Point{float64(i), y})
		}
	}
	id := func(i, j int) int32 { return int32(j*5 + i) }
	var cells [][]int32
	for j := 0; j < 4; j++ {
		for i := 0; i < 4; i++ {
			if j < 3 {
				cells = append(cells, []int32{id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)})
			} else {
				cells = append(cells, []int32{id(i, j), id(i+1, j), id(i+1, j+1)}, []int32{id(i, j), id(i+1, j+1), id(i, j+1)})
			}
		}
	}
	r := evaluate(t, build(t, nodes, cells, true))
	if got, want := fmt.Sprint(r.Boundary[0].QuadLayers), fmt.Sprint(Spread{0, 0.75, 3}); got != want {
		t.Errorf("quadrilaterals stacked %s, want %s", got, want)
	}
}

// TestThinCellsCounted: a grid of parallelograms L = 20 h long, their
// short sides sheared by α = 10°, has on its sheared boundary faces the
// skewness (L/2) sin α / (h / cos α) = L sin α cos α / (2h) = 1.68
// (elementary geometry: the foot of the perpendicular from the centroid
// to the side lies (L/2) sin α from the side's midpoint), past the
// everyday fail limit of 1, and an aspect ratio of L cos α / h = 19.7; so
// every failing cell is counted thin, and the text report says so.
func TestThinCellsCounted(t *testing.T) {
	const nx, ny, L, h = 4, 6, 20.0, 1.0
	alpha := 10 * math.Pi / 180
	m := build(t, gridNodes(nx, ny, orb.Point{0, 0}, orb.Point{L, 0}, orb.Point{h * math.Tan(alpha), h}, 0), quadCells(nx, ny, false), true)
	r, err := Evaluate(m, everyday(t))
	if err != nil {
		t.Fatal(err)
	}
	s, ok := r.Metric("skewness")
	if !ok {
		t.Fatal("no skewness summary")
	}
	want := L * math.Sin(alpha) * math.Cos(alpha) / (2 * h)
	if math.Abs(float64(s.Max)-want) > 1e-12*want {
		t.Errorf("largest skewness %.15g, want %.15g", float64(s.Max), want)
	}
	// The cells on the two sheared sides, i = 0 and i = nx − 1.
	if s.Failed != 2*ny || s.FailedThin != s.Failed {
		t.Errorf("skewness: %d failed, %d of them thin; want %d and all", s.Failed, s.FailedThin, 2*ny)
	}
	if a, _ := r.Metric("aspect_ratio"); math.Abs(float64(a.Max)-L*math.Cos(alpha)/h) > 1e-12*L {
		t.Errorf("aspect ratio %g, want %g", float64(a.Max), L*math.Cos(alpha)/h)
	}
	var b strings.Builder
	if err := WriteText(&b, r); err != nil {
		t.Fatal(err)
	}
	if line := fmt.Sprintf("skewness: %d of the %d failing cells have an aspect ratio of 10 or more and a largest angle within its warn limit (long cells, not slivers)", 2*ny, 2*ny); !strings.Contains(b.String(), line) {
		t.Errorf("the text report lacks %q:\n%s", line, b.String())
	}
	// A square grid's few failures, if any, are not thin.
	sq, err := Evaluate(build(t, gridNodes(3, 3, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), quadCells(3, 3, false), true), everyday(t))
	if err != nil {
		t.Fatal(err)
	}
	for _, ms := range sq.Metrics {
		if ms.FailedThin != 0 {
			t.Errorf("square grid: %s counts %d thin failures", ms.Name, ms.FailedThin)
		}
	}
}

// TestSliverNotCountedThin: a sliver triangle (0, 0), (10, 0), (5, 0.1),
// its largest angle 180° − 2 atan(0.1/5) = 177.7° (elementary geometry),
// fails non-orthogonality on its short sides and is long, but its angles
// fail too: it is not counted among the thin cells the report excuses.
func TestSliverNotCountedThin(t *testing.T) {
	m := build(t, []orb.Point{{0, 0}, {10, 0}, {5, 0.1}}, [][]int32{{0, 1, 2}}, true)
	r, err := Evaluate(m, everyday(t))
	if err != nil {
		t.Fatal(err)
	}
	mx, _ := r.Metric("max_angle")
	if want := 180 - 2*math.Atan(0.1/5)*180/math.Pi; math.Abs(float64(mx.Max)-want) > 1e-9 {
		t.Errorf("largest angle %.12g°, want %.12g°", float64(mx.Max), want)
	}
	no, _ := r.Metric("non_orthogonality")
	if no.Failed != 1 || no.FailedThin != 0 {
		t.Errorf("non-orthogonality: %d failed, %d of them counted thin; want 1 and none", no.Failed, no.FailedThin)
	}
}

// TestPositionDigits: worst-cell positions keep six significant digits
// near the origin and gain digits far from it, down to the resolution
// asked (decimal arithmetic by hand: 1000000.123456 to 1e-4 needs 11
// digits).
func TestPositionDigits(t *testing.T) {
	for _, c := range []struct {
		x, res float64
		want   string
	}{
		{0.984795123, 1e-3, "0.984795"},
		{1000000.123456, 1e-4, "1000000.1235"},
		{-2.5e6, 0.01, "-2500000"},
		{0.5, math.Inf(1), "0.5"},
	} {
		if got := position(c.x, c.res); got != c.want {
			t.Errorf("position(%v, %v) = %q, want %q", c.x, c.res, got, c.want)
		}
	}
}
