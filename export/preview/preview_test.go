package preview

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// bumpChannel is a channel [0, 4] × [floor, 1] over a circular-arc bump on
// the floor (our own test scenario), nx × ny quads, the tags inlet, outlet,
// floor and ceiling. Cells (bi, 0) just downstream of the bump crest are
// squashed, so they are small and skewed.
func bumpChannel(t testing.TB, nx, ny int) *mesh.Mesh {
	floor := func(x float64) float64 {
		if x < 1.5 || x > 2.5 {
			return 0
		}
		// Arc of radius r through (1.5, 0), (2.5, 0) with height 0.1.
		h := 0.1
		r := (0.25 + h*h) / (2 * h)
		return math.Sqrt(r*r-(x-2)*(x-2)) - (r - h)
	}
	in := mesh.Input{CellStart: []int32{0}, Tags: []string{"inlet", "outlet", "floor", "ceiling"}}
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			x := 4 * float64(i) / float64(nx)
			f := floor(x)
			s := float64(j) / float64(ny)
			s = s * s * (3 - 2*s) // cluster at both walls
			in.Nodes = append(in.Nodes, orb.Point{x, f + (1-f)*s})
		}
	}
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			in.CellNodes = append(in.CellNodes, id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
	}
	for j := 0; j < ny; j++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: id(0, j), B: id(0, j+1), Tag: 0}, mesh.TaggedEdge{A: id(nx, j), B: id(nx, j+1), Tag: 1})
	}
	for i := 0; i < nx; i++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: id(i, 0), B: id(i+1, 0), Tag: 2}, mesh.TaggedEdge{A: id(i, ny), B: id(i+1, ny), Tag: 3})
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// testInput flags cells by a simple aspect ratio (bounding-box width over
// height; a stand-in metric for the drawing, not a quality metric).
func testInput(m *mesh.Mesh) Input {
	nc := m.NumCells()
	ar := make([]float64, nc)
	st := make([]Status, nc)
	for c := 0; c < nc; c++ {
		x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
		for _, v := range m.Cell(c) {
			p := m.Nodes[v]
			x0, x1 = math.Min(x0, p[0]), math.Max(x1, p[0])
			y0, y1 = math.Min(y0, p[1]), math.Max(y1, p[1])
		}
		ar[c] = math.Max(x1-x0, y1-y0) / math.Min(x1-x0, y1-y0)
		switch {
		case ar[c] > 9.5:
			st[c] = Fail
		case ar[c] > 5:
			st[c] = Warn
		}
	}
	return Input{
		Title:      "bump channel",
		Mesh:       m,
		Conditions: []string{"inflow", "outflow", "wall", "wall"},
		Status:     st,
		Metrics: []Metric{
			{Name: "cell area", Unit: "m²", Lower: true, Values: m.Geo.CellArea},
			{Name: "aspect ratio (bounding box)", Values: ar, Limits: []Limit{{5, Warn}, {9.5, Fail}}},
		},
	}
}

// keep writes a picture to $CVDECK_PREVIEW_DIR when set, so a person can
// open it.
func keep(t *testing.T, name string, b []byte) {
	if d := os.Getenv("CVDECK_PREVIEW_DIR"); d != "" {
		if err := os.WriteFile(filepath.Join(d, name), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// svgCounts parses an SVG with encoding/xml (well-formedness) and counts
// its elements by name.
func svgCounts(t *testing.T, b []byte) map[string]int {
	t.Helper()
	n := map[string]int{}
	d := xml.NewDecoder(bytes.NewReader(b))
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return n
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		if s, ok := tok.(xml.StartElement); ok {
			n[s.Name.Local]++
		}
	}
}

func TestPreviewSmall(t *testing.T) {
	m := bumpChannel(t, 80, 24)
	in := testInput(m)
	var svg, svg2, pic, pic2 bytes.Buffer
	if err := SVG(&svg, in); err != nil {
		t.Fatal(err)
	}
	if err := SVG(&svg2, in); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(svg.Bytes(), svg2.Bytes()) {
		t.Fatal("two SVGs of one input differ")
	}
	if err := PNG(&pic, in); err != nil {
		t.Fatal(err)
	}
	if err := PNG(&pic2, in); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(pic.Bytes(), pic2.Bytes()) {
		t.Fatal("two PNGs of one input differ")
	}
	keep(t, "bump.svg", svg.Bytes())
	keep(t, "bump.png", pic.Bytes())
	n := svgCounts(t, svg.Bytes())
	counts := statusCounts(in.Status)
	if counts[Fail] == 0 || counts[Warn] == 0 {
		t.Fatalf("test scenario should have failing and warning cells: %v", counts)
	}
	// Every flagged cell filled in the overview, and again in the zoom
	// windows that show it; three zoom windows with their clip paths.
	if n["clipPath"] < MaxZoomWindows || n["path"] < counts[Fail]+counts[Warn] {
		t.Fatalf("SVG elements %v; flagged %v", n, counts)
	}
	s := svg.String()
	for _, want := range []string{
		// Each tag under its condition.
		">inflow<", ">inlet (24 faces)<", ">outflow<", ">outlet (24 faces)<", ">wall<", ">floor (80 faces)<", ">ceiling (80 faces)<",
		"fail: past a limit (", "zoom 1: cell",
		// The histogram's title names its unit, or that it has none.
		">aspect ratio (bounding box) (no unit)<", ">cell area (m²)<", " m²<",
		// Coordinates and scale: the overview spans x 0 to 4 m, y 0 to 1 m,
		// and its scale bar is the round length under 22 % of its width.
		">x (m)<", ">y (m)<", ">0.0<", ">4.0<", ">1.0<", ">500 mm<",
		// Zoom windows name the limit their cell is past, and the region.
		"fail: aspect ratio (bounding box)", "&gt; 9.5<",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("SVG lacks %q", want)
		}
	}
	if !regexp.MustCompile(`>x -?[0-9.]+ to -?[0-9.]+ m<`).MatchString(s) {
		t.Error("SVG names no zoom window's x range")
	}
	img, err := png.Decode(&pic)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != canvasW || b.Dy() < viewTop+minViewH {
		t.Fatalf("PNG is %v", b)
	}
	// The centroid of zoom window 1's cell, which fails, shows in the fail
	// colour where the window draws it; the window's title sits 8 px
	// above it.
	at := regexp.MustCompile(`y="([0-9.]+)"[^>]*>zoom 1: cell ([0-9]+) `).FindStringSubmatch(s)
	if at == nil {
		t.Fatal("no zoom 1 title")
	}
	top, _ := strconv.ParseFloat(at[1], 64)
	cell, _ := strconv.Atoi(at[2])
	zooms, regions := zoomCells(m, in)
	if len(zooms) == 0 || int(zooms[0]) != cell {
		t.Fatalf("zoom cells %v, title names cell %d", zooms, cell)
	}
	r := regions[0]
	win := newView(box{margin, top + 8, zoomSize, zoomSize}, r.x0, r.y0, r.x1, r.y1)
	c := m.Geo.CellCentroid[cell]
	px, py := win.px(c[0], c[1])
	if got := pixel(img, int(px), int(py)); got != failFill {
		t.Fatalf("PNG pixel at the centroid of zoom 1's cell is %v, want the fail colour %v", got, failFill)
	}
}

// pixel is the colour of img at (x, y).
func pixel(img image.Image, x, y int) rgb {
	r, g, b, _ := img.At(x, y).RGBA()
	return rgb{uint8(r >> 8), uint8(g >> 8), uint8(b >> 8)}
}

func TestPreviewErrors(t *testing.T) {
	m := bumpChannel(t, 4, 2)
	for _, tc := range []struct {
		in   Input
		want string
	}{
		{Input{}, "no mesh"},
		{Input{Mesh: m, Conditions: []string{"wall"}}, "1 boundary conditions for 4 tags"},
		{Input{Mesh: m, Status: []Status{Pass}}, "1 cell statuses for 8 cells"},
		{Input{Mesh: m, Worst: []int32{8}}, "worst cell 0 is cell 8"},
	} {
		if err := SVG(io.Discard, tc.in); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("got %v, want %q", err, tc.want)
		}
	}
}

// TestPreviewLargeBounded draws a million-cell mesh and checks the stated
// bound: the SVG stays under 1.5 MB.
func TestPreviewLargeBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a million-cell mesh")
	}
	m := bumpChannel(t, 2000, 500)
	in := testInput(m)
	var svg, pic bytes.Buffer
	if err := SVG(&svg, in); err != nil {
		t.Fatal(err)
	}
	if svg.Len() > 1500000 {
		t.Fatalf("SVG of %d cells is %d bytes, over the 1.5 MB bound", m.NumCells(), svg.Len())
	}
	if err := PNG(&pic, in); err != nil {
		t.Fatal(err)
	}
	keep(t, "large.svg", svg.Bytes())
	keep(t, "large.png", pic.Bytes())
	if !strings.Contains(svg.String(), "shaded by the ink of their lines") {
		t.Fatal("no shading note on a million-cell preview")
	}
	t.Logf("%d cells: SVG %d bytes, PNG %d bytes", m.NumCells(), svg.Len(), pic.Len())
}

// TestHistogramAxis checks that limits far beyond the values stay off a
// histogram's axis and are named instead, while near ones are drawn.
func TestHistogramAxis(t *testing.T) {
	for _, tc := range []struct {
		name          string
		values        []float64
		limits        []Limit
		lo, hi        float64
		on, off, text string
	}{
		// Aspect ratios of a sound mesh against limits 1e3 and 1e5: both
		// off, the axis is the values'.
		{"far above", []float64{1, 1.5, 2.05}, []Limit{{1000, Warn}, {1e5, Fail}}, 1, 2.05, "", "1000 100000",
			"beyond the axis: warn 1000, fail 1e+05"},
		// Growth 1 to 2.66: warn 3 within reach, fail 20 not.
		{"one near", []float64{1, 2.66}, []Limit{{3, Warn}, {20, Fail}}, 1, 3, "3", "20",
			"beyond the axis: fail 20"},
		// Minimum angles 30° to 60° with limits below: both within reach.
		{"near below", []float64{30, 60}, []Limit{{1, Warn}, {0.001, Fail}}, 0.001, 60, "1 0.001", "", ""},
		// A limit inside the values is always drawn.
		{"inside", []float64{0, 10}, []Limit{{5, Warn}}, 0, 10, "5", "", ""},
		// Every value equal: the axis is ± 1e-12 about zero, the limit off.
		{"constant", []float64{0, 0}, []Limit{{1e-12 * 5, Warn}, {math.NaN(), Fail}}, -1e-12, 1e-12, "", "5e-12",
			"beyond the axis: warn 5e-12"},
		{"below and above", []float64{10, 11}, []Limit{{0, Fail}, {100, Warn}}, 10, 11, "", "0 100",
			"below the axis: fail 0|beyond the axis: warn 100"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ax, n := histogramAxis(Metric{Values: append(tc.values, math.NaN(), math.Inf(1)), Limits: tc.limits})
			if n != len(tc.values) {
				t.Errorf("%d finite values, want %d", n, len(tc.values))
			}
			if ax.lo != tc.lo || ax.hi != tc.hi {
				t.Errorf("axis %g..%g, want %g..%g", ax.lo, ax.hi, tc.lo, tc.hi)
			}
			list := func(ls ...[]Limit) string {
				var out []string
				for _, l := range slices.Concat(ls...) {
					out = append(out, strconv.FormatFloat(l.Value, 'g', -1, 64))
				}
				return strings.Join(out, " ")
			}
			if got := list(ax.on); got != tc.on {
				t.Errorf("on the axis: %q, want %q", got, tc.on)
			}
			if got := list(ax.below, ax.above); got != tc.off {
				t.Errorf("off the axis: %q, want %q", got, tc.off)
			}
			if got := strings.Join(ax.offLines(""), "|"); got != tc.text {
				t.Errorf("text %q, want %q", got, tc.text)
			}
		})
	}
}

// holedSquare is the unit square of n × n quads with the cells of rows
// and columns [lo, hi) left out: a square hole, a body inside the domain
// (our own test scenario). Its boundary edges are untagged.
func holedSquare(t *testing.T, n, lo, hi int) *mesh.Mesh {
	in := mesh.Input{CellStart: []int32{0}}
	for j := 0; j <= n; j++ {
		for i := 0; i <= n; i++ {
			in.Nodes = append(in.Nodes, orb.Point{float64(i) / float64(n), float64(j) / float64(n)})
		}
	}
	id := func(i, j int) int32 { return int32(j*(n+1) + i) }
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			if i >= lo && i < hi && j >= lo && j < hi {
				continue
			}
			in.CellNodes = append(in.CellNodes, id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestBodiesView: a body a tenth of the domain's width gets a view of its
// surroundings, the hole's box padded by half its side; a body as wide as
// half the domain, and a mesh with no inner boundary, get none.
func TestBodiesView(t *testing.T) {
	r, ok := bodiesRegion(holedSquare(t, 40, 18, 22))
	// The hole spans [0.45, 0.55] both ways; padded by 0.05.
	want := [4]float64{0.4, 0.4, 0.6, 0.6}
	for k := range want {
		if !ok || math.Abs(r[k]-want[k]) > 1e-12 {
			t.Fatalf("bodies region %v (found %v), want %v", r, ok, want)
		}
	}
	if _, ok := bodiesRegion(holedSquare(t, 40, 10, 30)); ok {
		t.Error("a hole half the domain's width got a bodies view")
	}
	if _, ok := bodiesRegion(bumpChannel(t, 24, 8)); ok {
		t.Error("a channel with no inner boundary got a bodies view")
	}
	var b bytes.Buffer
	in := Input{Title: "holed square", Mesh: holedSquare(t, 40, 18, 22)}
	if err := SVG(&b, in); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "near the bodies") {
		t.Error("the SVG of a mesh with a small body has no view near it")
	}
	keep(t, "bodies.svg", b.Bytes())
}

// gradedChannel is [0, 4] × [0, 1] in nx columns whose widths grow
// geometrically by ratio r from left to right and ny equal rows (our own
// test scenario): on the overview the left columns are far under a pixel
// wide and the right ones many pixels.
func gradedChannel(t *testing.T, nx, ny int, r float64) *mesh.Mesh {
	xs := make([]float64, nx+1)
	for i := 1; i <= nx; i++ {
		xs[i] = xs[i-1] + math.Pow(r, float64(i))
	}
	in := mesh.Input{CellStart: []int32{0}}
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			in.Nodes = append(in.Nodes, orb.Point{4 * xs[i] / xs[nx], float64(j) / float64(ny)})
		}
	}
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			in.CellNodes = append(in.CellNodes, id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestInteriorLinesAndShading: a mesh with more interior faces than the
// overview draws gets lines for its large cells, at most the budget of
// them, every face of a cell above the threshold among them, and
// shading for its small cells, with no square of the domain left white
// (the centroid-count drawing this replaced left white squares wherever
// cells were about as wide as its bins).
func TestInteriorLinesAndShading(t *testing.T) {
	m := gradedChannel(t, 600, 100, 1.012)
	if m.NumInterior <= MaxInteriorFaces {
		t.Fatalf("scenario has %d interior faces, not more than the budget", m.NumInterior)
	}
	v := overviewOf(m)
	s := &scene{w: canvasW, h: 1000}
	d := drawInterior(s, m, v, 0, MaxInteriorFaces, meshLine, lineWidth)
	if d.lines == 0 || d.shaded == 0 || d.lines > MaxInteriorFaces || d.lines+d.shaded != m.NumInterior {
		t.Fatalf("drawn %+v of %d faces", d, m.NumInterior)
	}
	if d.threshold < minLinePx {
		t.Fatalf("threshold %g px under the least, %g", d.threshold, minLinePx)
	}
	above := 0
	for f := 0; f < m.NumInterior; f++ {
		if faceKey(m, f, v.scale) >= math.Pow(d.threshold*math.Exp2(1.0/sizeSteps), 2) {
			above++
		}
	}
	if d.lines < above {
		t.Fatalf("%d faces drawn as lines, but %d have cells over the threshold %g px", d.lines, above, d.threshold)
	}
	var pic, svg bytes.Buffer
	if err := PNG(&pic, Input{Mesh: m}); err != nil {
		t.Fatal(err)
	}
	keep(t, "graded.png", pic.Bytes())
	// Lines at the budget beside shading: still within the stated bound.
	if err := SVG(&svg, Input{Mesh: m}); err != nil {
		t.Fatal(err)
	}
	if svg.Len() > 1500000 {
		t.Fatalf("SVG of lines and shading is %d bytes, over the 1.5 MB bound", svg.Len())
	}
	t.Logf("SVG %d bytes", svg.Len())
	img, err := png.Decode(&pic)
	if err != nil {
		t.Fatal(err)
	}
	// Inside the domain, away from its boundary lines, every 4 px square
	// holds ink.
	x0, y0 := v.px(0, 1)
	x1, y1 := v.px(4, 0)
	for y := int(y0) + 4; y+4 < int(y1)-4; y += 4 {
		for x := int(x0) + 4; x+4 < int(x1)-4; x += 4 {
			blank := true
			for k := 0; k < 16 && blank; k++ {
				blank = pixel(img, x+k%4, y+k/4) == white
			}
			if blank {
				t.Fatalf("the 4 px square at (%d, %d) inside the domain is white", x, y)
			}
		}
	}
}

// TestZoomShowsThinCell: a wall cell thousands of times longer than it is
// thick is framed so that it is shapePx thick, around the face whose
// value fails it, or its shortest face without face values.
func TestZoomShowsThinCell(t *testing.T) {
	m := bumpChannel(t, 80, 600)
	c := int32(3) // the first row, on the floor
	thick := math.Abs(m.Geo.CellArea[c]) / cellExtent(m, int(c))
	if cellExtent(m, int(c))/thick < 1000 {
		t.Fatalf("scenario cell is %g thick, %g long: not thin", thick, cellExtent(m, int(c)))
	}
	faceVals := make([]float64, m.NumFaces())
	worst := -1
	for f := range faceVals {
		if m.Owner[f] == c && m.Neighbour[f] >= 0 && m.Neighbour[f] == c+1 {
			worst = f
		}
	}
	faceVals[worst] = 50
	vals := make([]float64, m.NumCells())
	vals[c] = 50
	st := make([]Status, m.NumCells())
	st[c] = Fail
	in := Input{Mesh: m, Status: st, Metrics: []Metric{{Name: "skew", Values: vals, FaceValues: faceVals, Limits: []Limit{{1, Warn}, {10, Fail}}}}}
	b := box{0, 0, zoomSize, zoomSize}
	for _, tc := range []struct {
		name string
		in   Input
		at   orb.Point
	}{
		{"worst face", in, m.Geo.FaceMid[worst]},
		{"no face values", Input{Mesh: m, Status: st}, shortestFaceMid(m, c)},
	} {
		v := zoomView(m, c, focusOf(m, tc.in, c), b)
		if got := thick * v.scale; got < shapePx*(1-1e-9) {
			t.Errorf("%s: the cell is %g px thick in its zoom, want %d or more", tc.name, got, shapePx)
		}
		if math.Abs(v.cx-tc.at[0]) > 1e-12 || math.Abs(v.cy-tc.at[1]) > 1e-12 {
			t.Errorf("%s: zoom centred on (%g, %g), want (%g, %g)", tc.name, v.cx, v.cy, tc.at[0], tc.at[1])
		}
	}
	// A cell of ordinary shape (mid-channel, 0.05 by about 0.06) keeps
	// the framing six cell sizes wide.
	m = bumpChannel(t, 80, 24)
	mid := int32(12*80 + 10)
	v := zoomView(m, mid, focusOf(m, Input{Mesh: m}, mid), b)
	if w := v.x1 - v.x0; math.Abs(w-6*cellExtent(m, int(mid))) > 1e-9 {
		t.Errorf("a square-ish cell's zoom is %g wide, want six times its %g", w, cellExtent(m, int(mid)))
	}
}

func shortestFaceMid(m *mesh.Mesh, c int32) orb.Point {
	best := -1
	for f := range m.FaceNodes {
		if (m.Owner[f] == c || m.Neighbour[f] == c) && (best < 0 || m.Geo.FaceLength[f] < m.Geo.FaceLength[best]) {
			best = f
		}
	}
	return m.Geo.FaceMid[best]
}

// TestCrossingLines: a zoom window names each limit its cell is past,
// failures first, with values in their units; a zero limit of a metric
// where smaller is worse takes in zero; a failing cell past no metric's
// fail limit is put down to a connectivity check.
func TestCrossingLines(t *testing.T) {
	m := bumpChannel(t, 4, 2)
	n := m.NumCells()
	fill := func(v float64, at float64) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = v
		}
		x[0] = at
		return x
	}
	st := make([]Status, n)
	st[0], st[1] = Fail, Fail
	in := Input{Mesh: m, Status: st, Metrics: []Metric{
		{Name: "max_angle", Unit: "°", Values: fill(90, 165), Limits: []Limit{{160, Warn}, {179, Fail}}},
		{Name: "area", Unit: "m²", Lower: true, Values: fill(1, 0), Limits: []Limit{{0, Warn}, {0, Fail}}},
		{Name: "ratio", Values: fill(1, 1), Limits: []Limit{{5, Warn}, {9, Fail}}},
	}}
	want := []string{"fail: area 0 m² ≤ 0 m²", "warn: max_angle 165° > 160°"}
	if got := crossingLines(in, 0); !slices.Equal(got, want) {
		t.Errorf("cell 0: %q, want %q", got, want)
	}
	want = []string{"fail: a connectivity check (see the report)"}
	if got := crossingLines(in, 1); !slices.Equal(got, want) {
		t.Errorf("cell 1: %q, want %q", got, want)
	}
	if got := crossingLines(in, 2); len(got) != 0 {
		t.Errorf("cell 2 passes, yet %q", got)
	}
}

// TestLegendGroups: each tag gets a colour of its own and is listed under
// its condition, the conditions in the order of their first tag.
func TestLegendGroups(t *testing.T) {
	m := bumpChannel(t, 4, 2)
	colours, groups := boundaryColours(m, []string{"inflow", "outflow", "wall", "wall"})
	var got []string
	for _, g := range groups {
		var tags []string
		for _, e := range g.tags {
			tags = append(tags, e.label+" "+strconv.Itoa(e.faces))
		}
		got = append(got, g.condition+": "+strings.Join(tags, ", "))
	}
	want := []string{"inflow: inlet 2", "outflow: outlet 2", "wall: floor 4, ceiling 4"}
	if !slices.Equal(got, want) {
		t.Errorf("legend %q, want %q", got, want)
	}
	for i := range colours {
		for j := range i {
			if colours[i] == colours[j] {
				t.Errorf("tags %s and %s share a colour", m.Tags[i], m.Tags[j])
			}
		}
	}
	if _, groups := boundaryColours(m, nil); len(groups) != 1 || len(groups[0].tags) != 4 || groups[0].condition != "" {
		t.Errorf("without conditions: %+v, want one group of the four tags", groups)
	}
}

// TestScaleAndTicks checks the round numbers behind the scale bars and
// ticks, and the wrapping of labels.
func TestScaleAndTicks(t *testing.T) {
	for _, tc := range []struct{ raw, step, below float64 }{
		{0.3, 0.5, 0.2}, {1, 1, 1}, {7.2, 10, 5}, {0.00042, 0.0005, 0.0002}, {1999, 2000, 1000},
	} {
		if got := niceStep(tc.raw); math.Abs(got-tc.step) > 1e-12*tc.step {
			t.Errorf("niceStep(%g) = %g, want %g", tc.raw, got, tc.step)
		}
		if got := niceBelow(tc.raw); math.Abs(got-tc.below) > 1e-12*tc.below {
			t.Errorf("niceBelow(%g) = %g, want %g", tc.raw, got, tc.below)
		}
	}
	for l, want := range map[float64]string{0.5: "500 mm", 2e-5: "20 µm", 3000: "3 km", 1: "1 m", 0.002: "2 mm"} {
		if got := lengthLabel(l); got != want {
			t.Errorf("lengthLabel(%g) = %q, want %q", l, got, want)
		}
	}
	if got := fixed(-1e-9, 2); got != "0.00" {
		t.Errorf("fixed(-1e-9, 2) = %q", got)
	}
	if got := stepDecimals(0.05); got != 2 {
		t.Errorf("stepDecimals(0.05) = %d", got)
	}
	// 8e-5 m wide about x = 1.5: enough decimals to tell the ends apart.
	if dec := spanDecimals(8e-5); fixed(1.49996, dec) == fixed(1.50004, dec) {
		t.Errorf("spanDecimals(8e-5) = %d cannot tell the ends apart", dec)
	}
	lines := wrap("fail: aspect ratio (bounding box) 9.874 > 9.5", 200, axisText, "  ")
	if len(lines) != 2 || !strings.HasPrefix(lines[1], "  ") {
		t.Errorf("wrap gave %q", lines)
	}
	for _, l := range lines {
		if textWidth(l, axisText) > 200 {
			t.Errorf("wrapped line %q is wider than 200 px", l)
		}
	}
}

// TestFontUnits: the raster font draws the unit and comparison signs the
// pictures write, not as '?'.
func TestFontUnits(t *testing.T) {
	for _, c := range "°²µ≤≥×" {
		if glyph(c) == glyph('?') || glyph(c) == ([7]uint8{}) {
			t.Errorf("the raster font lacks %q", c)
		}
	}
}

// TestHistogramsFillThePage: with more metrics than fit beside the
// pictures, the histograms continue in rows across the page below them.
// Every histogram frame (a white box columnW × histH) lies on the canvas,
// overlaps no other and no view of the mesh, and the page is no taller
// than the rows need.
func TestHistogramsFillThePage(t *testing.T) {
	in := testInput(bumpChannel(t, 40, 12))
	base := in.Metrics[1]
	for k := range 12 {
		mt := base
		mt.Name = fmt.Sprintf("metric %d", k)
		in.Metrics = append(in.Metrics, mt)
	}
	s, err := build(in)
	if err != nil {
		t.Fatal(err)
	}
	var hists, views []box
	for _, sh := range s.shapes {
		if sh.kind != rect || sh.fill == nil || *sh.fill != white {
			continue
		}
		b := box{sh.pts[0], sh.pts[1], sh.pts[2], sh.pts[3]}
		if b.w == columnW && b.h == histH {
			hists = append(hists, b)
		} else {
			views = append(views, b)
		}
	}
	if len(hists) != len(in.Metrics) {
		t.Fatalf("%d histogram frames for %d metrics", len(hists), len(in.Metrics))
	}
	low, below := 0.0, 0
	for i, h := range hists {
		if h.x < 0 || h.x+h.w > float64(s.w) || h.y < 0 || h.y+h.h > float64(s.h) {
			t.Errorf("histogram %d at %+v is off the %d × %d canvas", i, h, s.w, s.h)
		}
		for j := range i {
			if overlaps(h, hists[j]) {
				t.Errorf("histograms %d and %d overlap: %+v, %+v", j, i, hists[j], h)
			}
		}
		for _, v := range views {
			if overlaps(h, v) {
				t.Errorf("histogram %d at %+v overlaps the view at %+v", i, h, v)
			}
		}
		low = math.Max(low, h.y+h.h)
		if h.x < columnX {
			below++
		}
	}
	if below == 0 {
		t.Errorf("no histogram went below the pictures: the column runs on alone")
	}
	// Below the last frame: its caption lines and the margin.
	if room := float64(s.h) - low; room > histBlock-histH+margin {
		t.Errorf("%.0f px below the last histogram frame; at most %d expected", room, histBlock-histH+margin)
	}
}

// TestBlockOutlines: the bump channel read as two blocks side by side,
// split at i = nx/2, is outlined dashed, one segment per node step round
// each block, 2 (NI − 1) + 2 (NJ − 1) of them (so the shared side is drawn
// by both), each block named at its middle node and dotted at its first
// node; a mesh with no blocks draws neither, nor the legend entry.
func TestBlockOutlines(t *testing.T) {
	const nx, ny = 40, 12
	m := bumpChannel(t, nx, ny)
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	var cell int32
	for k, name := range []string{"upstream", "downstream"} {
		i0 := k * nx / 2
		b := mesh.Block{Name: name, NI: nx/2 + 1, NJ: ny + 1, FirstCell: cell}
		for j := 0; j <= ny; j++ {
			for i := 0; i <= nx/2; i++ {
				b.Node = append(b.Node, id(i0+i, j))
			}
		}
		m.Blocks = append(m.Blocks, b)
		cell += int32(nx / 2 * ny)
	}
	in := testInput(m)
	s, err := build(in)
	if err != nil {
		t.Fatal(err)
	}
	v := overviewOf(m)
	dashed, legend := 0, false
	names := map[string]bool{}
	for _, sh := range s.shapes {
		switch {
		case sh.kind == segments && sh.dashed && *sh.stroke == blockLine:
			dashed += len(sh.pts) / 4
		case sh.kind == label && sh.text == "Blocks":
			legend = true
		case sh.kind == label && (sh.text == "upstream" || sh.text == "downstream"):
			b := m.Blocks[0]
			if sh.text == "downstream" {
				b = m.Blocks[1]
			}
			c := m.Nodes[b.Node[(b.NJ/2)*b.NI+b.NI/2]]
			x, y := v.px(c[0], c[1])
			if math.Abs(sh.pts[0]-x) > 1e-9 || math.Abs(sh.pts[1]-(y+4)) > 1e-9 {
				t.Errorf("block %s named at (%g, %g), want its middle node at (%g, %g)", sh.text, sh.pts[0], sh.pts[1], x, y+4)
			}
			names[sh.text] = true
		}
	}
	if want := 2 * (2*(nx/2) + 2*ny); dashed != want {
		t.Errorf("%d dashed outline segments on the overview, want %d", dashed, want)
	}
	if !legend || len(names) != 2 {
		t.Errorf("legend %v, names %v: want the Blocks entry and both names", legend, names)
	}
	// A second name at the same place (a block listed twice) is left out.
	m.Blocks = append(m.Blocks, m.Blocks[0])
	m.Blocks[2].Name = "again"
	s, err = build(testInput(m))
	if err != nil {
		t.Fatal(err)
	}
	for _, sh := range s.shapes {
		if sh.kind == label && sh.text == "again" {
			t.Errorf("a block name drawn over another's")
		}
	}
	m.Blocks = nil
	s, err = build(testInput(m))
	if err != nil {
		t.Fatal(err)
	}
	for _, sh := range s.shapes {
		if (sh.kind == segments && sh.dashed && *sh.stroke == blockLine) || (sh.kind == label && sh.text == "Blocks") {
			t.Fatalf("a mesh without blocks draws block outlines or their legend")
		}
	}
}
