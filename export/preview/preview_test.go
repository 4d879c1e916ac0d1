package preview

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
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
			{Name: "cell area", Values: m.Geo.CellArea},
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
	if n["clipPath"] != MaxZoomWindows || n["path"] < counts[Fail]+counts[Warn] {
		t.Fatalf("SVG elements %v; flagged %v", n, counts)
	}
	s := svg.String()
	for _, want := range []string{"inflow (24 faces)", "outflow (24 faces)", "wall (160 faces)", "fail: past a limit (", "zoom 1: cell", "aspect ratio (bounding box)"} {
		if !strings.Contains(s, want) {
			t.Errorf("SVG lacks %q", want)
		}
	}
	img, err := png.Decode(&pic)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != canvasW || b.Dy() < viewTop+minViewH {
		t.Fatalf("PNG is %v", b)
	}
	// The centre of zoom window 1 lies inside its cell, which fails.
	zb := overviewOf(m).b
	cx, cy := margin+zoomSize/2, int(zb.y+zb.h)+36+zoomSize/2
	r, g, b, _ := img.At(cx, cy).RGBA()
	if uint8(r>>8) != failFill.r || uint8(g>>8) != failFill.g || uint8(b>>8) != failFill.b {
		t.Fatalf("PNG pixel at the centre of zoom 1 is %d,%d,%d, want the fail colour", r>>8, g>>8, b>>8)
	}
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
	if !strings.Contains(svg.String(), "drawn as cell density") {
		t.Fatal("no density note on a million-cell preview")
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
			if got := strings.Join(ax.offLines(), "|"); got != tc.text {
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
