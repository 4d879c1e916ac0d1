package deck

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/samples"
)

// teeCase is a tee junction in mm: a main duct 400 long and 50 high with
// a branch 30 wide and 120 long leaving its roof. The blocks are the
// upstream leg, the junction box, the downstream leg and, when branch is
// set, the branch.
func teeCase(branch bool, extra string) string {
	blocks := `      - {name: upstream, south: floor_up, east: cut_w, north: roof_up, west: inlet}
      - {name: junction, south: floor_mid, east: cut_e, north: cut_top, west: cut_w}
      - {name: downstream, south: floor_down, east: outlet, north: roof_down, west: cut_e}
`
	if branch {
		blocks += "      - {name: branch, south: cut_top, east: branch_e, north: branch_out, west: branch_w}\n"
	}
	return `name: tee
units: mm
geometry:
  loops:
    - name: tee
      start: [-150, 0]
      segments:
        - {name: floor_up, line: [-15, 0], tag: wall, spacing: {count: 28}}
        - {name: floor_mid, line: [15, 0], tag: wall, spacing: {count: 7}}
        - {name: floor_down, line: [250, 0], tag: wall, spacing: {count: 48}}
        - {name: outlet, line: [250, 50], tag: outlet, spacing: {count: 11}}
        - {name: roof_down, line: [15, 50], tag: wall, spacing: {count: 48}}
        - {name: branch_e, line: [15, 170], tag: wall, spacing: {count: 25}}
        - {name: branch_out, line: [-15, 170], tag: branch_outlet, spacing: {count: 7}}
        - {name: branch_w, line: [-15, 50], tag: wall, spacing: {count: 25}}
        - {name: roof_up, line: [-150, 50], tag: wall, spacing: {count: 28}}
        - {name: inlet, line: [-150, 0], tag: inlet, spacing: {count: 11}}
  curves:
    - {name: cut_w, start: [-15, 0], segments: [{line: [-15, 50], spacing: {count: 11}}]}
    - {name: cut_e, start: [15, 0], segments: [{line: [15, 50], spacing: {count: 11}}]}
    - {name: cut_top, start: [-15, 50], segments: [{line: [15, 50], spacing: {count: 7}}]}
mesh:
  structured:
    blocks:
` + blocks + extra
}

// buildCase parses a case and builds its structured mesh as the pipeline
// does, the covering check included.
func buildCase(t *testing.T, name, text string) (*Case, []string, error) {
	t.Helper()
	c, err := Parse(name, []byte(text), LoadOptions{})
	if err != nil {
		t.Fatalf("parse: %v", err)
	}
	_, notes, err := c.buildStructured()
	return c, notes, err
}

// number returns the number a pattern's first group captures in s.
func number(t *testing.T, s, pattern string) float64 {
	t.Helper()
	m := regexp.MustCompile(pattern).FindStringSubmatch(s)
	if m == nil {
		t.Fatalf("%q not found in: %s", pattern, s)
	}
	v, err := strconv.ParseFloat(m[1], 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestCoverMissingBlock leaves the tee's branch block out, with the cut
// above the junction given a condition so that nothing else stops the
// run: the mesh must be refused as input, at the first uncovered
// segment, naming the three branch segments and both areas. Elementary
// geometry: the duct is 400 × 50 = 20000 mm², the branch 30 × 120 =
// 3600 mm², the outline 23600 mm².
func TestCoverMissingBlock(t *testing.T) {
	_, _, err := buildCase(t, "tee.yaml", teeCase(false, "boundaries:\n  cut_top: {kind: outflow-pressure, pressure: 100000}\n"))
	if err == nil {
		t.Fatal("a tee without its branch block passed")
	}
	if !errors.Is(err, ErrInput) {
		t.Errorf("not an input error (exit 2): %v", err)
	}
	msg := err.Error()
	for _, want := range []string{
		"tee.yaml:13:11: geometry.loops[0].segments[5]",
		`"branch_e" (line 13), "branch_out" (line 14) and "branch_w" (line 15) of loop "tee"`,
		fmt.Sprintf("cover %g mm² of the outline's %g mm²", 400.0*50, 400.0*50+30*120),
		`faces tagged "cut_top" (6 faces)`,
	} {
		if !strings.Contains(msg, want) {
			t.Errorf("error lacks %q:\n%s", want, msg)
		}
	}
	for _, used := range []string{"floor_up", "roof_down", "inlet\"", "outlet\""} {
		if strings.Contains(msg, used) {
			t.Errorf("error names %s, which a block uses:\n%s", used, msg)
		}
	}
}

// TestCoverFullTee meshes the whole tee: it passes, and the mesh's area
// and the outline's equal the tee's 23600 mm² (elementary geometry), to
// round-off.
func TestCoverFullTee(t *testing.T) {
	c, err := Parse("tee.yaml", []byte(teeCase(true, "")), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m, notes, err := c.buildStructured()
	if err != nil {
		t.Fatalf("the whole tee is refused: %v", err)
	}
	for _, n := range notes {
		if strings.Contains(n, "bounds") || strings.Contains(n, "along") {
			t.Errorf("unexpected note on the outline: %s", n)
		}
	}
	cv, err := newCoverage(c, m)
	if err != nil {
		t.Fatal(err)
	}
	have, want, tol, err := cv.areas(m)
	if err != nil {
		t.Fatal(err)
	}
	exact := (400*50 + 30*120) * 1e-6 // m², elementary geometry
	for name, a := range map[string]float64{"mesh": have, "outline": want} {
		if math.Abs(a-exact) > 1e-12*exact {
			t.Errorf("%s area %.15g m², want %.15g", name, a, exact)
		}
	}
	if !(tol > 0 && tol < 1e-8*exact) {
		t.Errorf("area tolerance %g m² is not a round-off tolerance for %g m²", tol, exact)
	}
}

// TestCoverGap meshes a 3 m square as a 3 × 3 array of unit blocks with
// the middle one left out: every outline segment is a block side, but
// the blocks cover 8 m² of the square's 9 (elementary geometry), and the
// middle block's four sides lie open.
func TestCoverGap(t *testing.T) {
	var segs, curves, blocks strings.Builder
	// The outline: three unit segments a side, counter-clockwise from the
	// origin, named s<i><j> after the block they bound.
	side := func(name string, x, y float64) {
		fmt.Fprintf(&segs, "        - {name: %s, line: [%g, %g], spacing: {count: 5}}\n", name, x, y)
	}
	for i := 1; i <= 3; i++ {
		side(fmt.Sprintf("s%d0", i), float64(i), 0)
	}
	for j := 1; j <= 3; j++ {
		side(fmt.Sprintf("e3%d", j), 3, float64(j))
	}
	for i := 2; i >= 0; i-- {
		side(fmt.Sprintf("n%d3", i+1), float64(i), 3)
	}
	for j := 2; j >= 0; j-- {
		side(fmt.Sprintf("w0%d", j+1), 0, float64(j))
	}
	// h<i><j>: the horizontal cut under block (i, j); v<i><j>: the
	// vertical cut west of it.
	for i := 1; i <= 3; i++ {
		for j := 1; j <= 2; j++ {
			fmt.Fprintf(&curves, "    - {name: h%d%d, start: [%d, %d], segments: [{line: [%d, %d], spacing: {count: 5}}]}\n", i, j+1, i-1, j, i, j)
			fmt.Fprintf(&curves, "    - {name: v%d%d, start: [%d, %d], segments: [{line: [%d, %d], spacing: {count: 5}}]}\n", j+1, i, j, i-1, j, i)
		}
	}
	name := func(kind string, i, j int) string {
		switch {
		case kind == "south" && j == 1:
			return fmt.Sprintf("s%d0", i)
		case kind == "north" && j == 3:
			return fmt.Sprintf("n%d3", i)
		case kind == "west" && i == 1:
			return fmt.Sprintf("w0%d", j)
		case kind == "east" && i == 3:
			return fmt.Sprintf("e3%d", j)
		case kind == "south":
			return fmt.Sprintf("h%d%d", i, j)
		case kind == "north":
			return fmt.Sprintf("h%d%d", i, j+1)
		case kind == "west":
			return fmt.Sprintf("v%d%d", i, j)
		}
		return fmt.Sprintf("v%d%d", i+1, j)
	}
	for i := 1; i <= 3; i++ {
		for j := 1; j <= 3; j++ {
			if i == 2 && j == 2 {
				continue
			}
			fmt.Fprintf(&blocks, "      - {name: b%d%d, south: %s, east: %s, north: %s, west: %s}\n",
				i, j, name("south", i, j), name("east", i, j), name("north", i, j), name("west", i, j))
		}
	}
	text := "name: ring\ngeometry:\n  loops:\n    - name: square\n      tag: wall\n      start: [0, 0]\n      segments:\n" + segs.String() +
		"  curves:\n" + curves.String() + "mesh:\n  structured:\n    blocks:\n" + blocks.String()
	_, _, err := buildCase(t, "ring.yaml", text)
	if err == nil {
		t.Fatal("eight blocks round a gap passed")
	}
	msg := err.Error()
	if !errors.Is(err, ErrInput) {
		t.Errorf("not an input error: %v", err)
	}
	for _, want := range []string{"ring.yaml:", "mesh: the mesh does not fill the outline: the blocks cover 8 m² of the outline's 9 m², 1 m² apart",
		`"h22" (4 faces)`, `"h23" (4 faces)`, `"v22" (4 faces)`, `"v32" (4 faces)`} {
		if !strings.Contains(msg, want) {
			t.Errorf("error lacks %q:\n%s", want, msg)
		}
	}
}

// growCase is a cylinder of radius 0.1 m in a duct 2 m square, with an
// O-grid grown off the cylinder to the given distance.
func growCase(reach float64, extra string) string {
	return fmt.Sprintf(`name: grow
geometry:
  loops:
    - name: duct
      start: [-1, -1]
      tag: duct
      spacing: {count: 21}
      segments:
        - {line: [1, -1]}
        - {line: [1, 1]}
        - {line: [-1, 1]}
        - {line: [-1, -1]}
    - name: cyl
      tag: cyl
      circle: {centre: [0, 0], radius: 0.1}
      spacing: {count: 65}
mesh:
  structured:
    grow:
      - {name: og, from: cyl, shape: o, first_height: 1e-3, growth: 1.15, outer_distance: %g, outer_tag: farfield}
%s`, reach, extra)
}

// TestCoverGrownPastLoop grows the O-grid 3 m out: its outer ring, a
// circle of radius 3.1 m about the duct's centre (the march off a circle
// is concentric), reaches 3.1 − 1 = 2.1 m past the duct's side on the
// axes (elementary geometry). The error names the grid, the distance and
// the side.
func TestCoverGrownPastLoop(t *testing.T) {
	_, _, err := buildCase(t, "grow.yaml", growCase(3, ""))
	if err == nil {
		t.Fatal("a grid grown past its duct passed")
	}
	if !errors.Is(err, ErrInput) {
		t.Errorf("not an input error: %v", err)
	}
	msg := err.Error()
	if !strings.Contains(msg, `mesh.structured.grow[0]: grown grid "og" reaches`) || !strings.Contains(msg, `past the outer loop "duct"`) {
		t.Errorf("error does not name the grid and the loop:\n%s", msg)
	}
	if d := number(t, msg, `reaches ([0-9.]+) m past`); math.Abs(d-2.1) > 1e-3 {
		t.Errorf("reaches %g m past, want 2.1 (elementary geometry):\n%s", d, msg)
	}
	if !regexp.MustCompile(`outside segment [1-4] \(tag duct, line \d+\) of loop "duct"`).MatchString(msg) {
		t.Errorf("error does not name the side passed:\n%s", msg)
	}
}

// TestCoverGrownInside grows the O-grid 0.5 m out: it lies inside the
// duct, 1 − (0.1 + 0.5) = 0.4 m from its sides (elementary geometry), and
// a note says that the duct only bounds it. A condition on the duct's
// tag is refused, naming the grid's own tag.
func TestCoverGrownInside(t *testing.T) {
	_, notes, err := buildCase(t, "grow.yaml", growCase(0.5, ""))
	if err != nil {
		t.Fatalf("a grid inside its duct is refused: %v", err)
	}
	var note string
	for _, n := range notes {
		if strings.HasPrefix(n, `outer loop "duct" only bounds grown grid "og"`) {
			note = n
		}
	}
	if note == "" {
		t.Fatalf("no note on the duct; notes: %q", notes)
	}
	if d := number(t, note, `no closer to it than ([0-9.]+) m`); math.Abs(d-0.4) > 1e-3 {
		t.Errorf("gap %g m, want 0.4 (elementary geometry): %s", d, note)
	}
	_, _, err = buildCase(t, "grow.yaml", growCase(0.5, "boundaries:\n  duct: {kind: wall-adiabatic}\n  farfield: {kind: farfield}\n"))
	if err == nil || !errors.Is(err, ErrInput) {
		t.Fatalf("a condition on the bounding loop's tag is not refused: %v", err)
	}
	for _, want := range []string{"grow.yaml:22:9: boundaries.duct", `tag "duct" is on no face of the mesh`, `the whole loop "duct"`, `(here "farfield")`} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error lacks %q:\n%v", want, err)
		}
	}
}

// TestCoverMixed grows a 0.1 m layer off a channel's floor with a block
// above it: the channel's two short end segments are neither block sides
// nor grown from, but lie along the grid's start and end lines, so the
// mesh covers the 1 × 0.5 m² channel (elementary geometry) and passes;
// where such a segment's tag differs from the grid's, a note says so.
func TestCoverMixed(t *testing.T) {
	text := func(lowTag string) string {
		return `name: mixed
geometry:
  loops:
    - name: channel
      start: [0, 0]
      segments:
        - {name: floor, line: [1, 0], tag: wall, spacing: {count: 41}}
        - {name: right_low, line: [1, 0.1], tag: outlet, spacing: {count: 11}}
        - {name: right_high, line: [1, 0.5], tag: outlet, spacing: {count: 21}}
        - {name: lid, line: [0, 0.5], tag: lid, spacing: {count: 41}}
        - {name: left_high, line: [0, 0.1], tag: inlet, spacing: {count: 21}}
        - {name: left_low, line: [0, 0], tag: ` + lowTag + `, spacing: {count: 11}}
  curves:
    - {name: cut, start: [0, 0.1], segments: [{line: [1, 0.1], spacing: {count: 41}}]}
mesh:
  structured:
    blocks:
      - {name: upper, south: cut, east: right_high, north: lid, west: left_high}
    grow:
      - {name: bl, from: floor, shape: open, first_height: 0.01, layers: 10, outer_distance: 0.1, outer_tag: cut, start_tag: inlet, end_tag: outlet}
`
	}
	c, err := Parse("mixed.yaml", []byte(text("inlet")), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m, notes, err := c.buildStructured()
	if err != nil {
		t.Fatalf("a layer grown under a block is refused: %v", err)
	}
	for _, n := range notes {
		if strings.Contains(n, "along") {
			t.Errorf("note on a segment whose tag the grid keeps: %s", n)
		}
	}
	cv, err := newCoverage(c, m)
	if err != nil {
		t.Fatal(err)
	}
	have, want, tol, err := cv.areas(m)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(have-0.5) > tol || math.Abs(want-0.5) > 1e-12 {
		t.Errorf("areas: mesh %.15g, outline %.15g m², want 0.5 (tolerance %g)", have, want, tol)
	}
	_, notes, err = buildCase(t, "mixed.yaml", text("foot"))
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, n := range notes {
		found = found || strings.Contains(n, `segment "left_low" (line 12) of loop "channel" is no block side`) && strings.Contains(n, `tagged "inlet": its own tag "foot"`)
	}
	if !found {
		t.Errorf("no note on left_low's tag; notes: %q", notes)
	}
}

// TestCoverSamples meshes every structured sample, at refinement 1 and 2:
// each fills its outline.
func TestCoverSamples(t *testing.T) {
	if testing.Short() {
		t.Skip("meshes every structured sample")
	}
	dir := t.TempDir()
	for _, s := range samples.List() {
		path, err := samples.Write(s.Name, dir)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range []float64{1, 2} {
			c, err := Load(path, LoadOptions{Refine: r})
			if err != nil {
				t.Fatalf("%s: %v", s.Name, err)
			}
			if c.Mesh.unstructured != nil {
				break
			}
			if _, _, err := c.buildStructured(); err != nil {
				t.Errorf("%s at refinement %g: %v", s.Name, r, err)
			}
		}
	}
}

// TestEdgeIndex checks the inside test and the nearest-edge search on a
// unit square with a notch against elementary geometry.
func TestEdgeIndex(t *testing.T) {
	// The square (0,0)–(1,1) with a square notch (0.4..0.6) × (0.5..1)
	// cut from its top.
	pts := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0.6, 1}, {0.6, 0.5}, {0.4, 0.5}, {0.4, 1}, {0, 1}}
	ends := append(append([]orb.Point(nil), pts[1:]...), pts[0])
	x := newEdgeIndex(pts, ends)
	for _, tc := range []struct {
		p      orb.Point
		inside bool
		dist   float64
	}{
		{orb.Point{0.5, 0.25}, true, 0.25},
		{orb.Point{0.5, 0.75}, false, 0.1}, // in the notch: 0.1 from its walls
		{orb.Point{0.2, 0.9}, true, 0.1},
		{orb.Point{2, 0.5}, false, 1},
		{orb.Point{-3, -4}, false, 5}, // from the corner (0, 0)
		{orb.Point{0.2, 1}, true, 0},  // on the top: a ray along no edge
	} {
		if got := x.inside(tc.p); got != tc.inside && tc.dist > 0 {
			t.Errorf("inside(%v) = %v, want %v", tc.p, got, tc.inside)
		}
		if d, _ := x.nearest(tc.p, nil); math.Abs(d-tc.dist) > 1e-12 {
			t.Errorf("nearest(%v) = %g, want %g", tc.p, d, tc.dist)
		}
	}
	// Only the bottom edge kept: the distance to it.
	if d, e := x.nearest(orb.Point{0.5, 0.75}, func(e int) bool { return e == 0 }); e != 0 || math.Abs(d-0.75) > 1e-12 {
		t.Errorf("nearest to the bottom = %g (edge %d), want 0.75 (edge 0)", d, e)
	}
}

// TestCoverCurveDividedOtherwise: a duct whose roof, a circular arc of
// radius 3.9 through (0, 1), (1.5, 1.3) and (3, 1), is meshed by two
// blocks whose north sides are two free arcs on the same circle, divided
// into their own 15 edges each, while the outline's roof has 20, 30 or 60
// edges of its own: the roof lies along the mesh's boundary within the
// chords' sagittas (κ L²/8 for a chord of length L on a curve of
// curvature κ, elementary geometry), and the areas agree within the area
// between the two divisions, so every division is accepted.
func TestCoverCurveDividedOtherwise(t *testing.T) {
	const text = `name: split
parameters: {ROOF: 31}
geometry:
  loops:
    - name: duct
      start: [0, 0]
      segments:
        - {name: floor, line: [3, 0], tag: wall, spacing: {count: 31}}
        - {name: right, line: [3, 1], tag: outlet, spacing: {count: 11}}
        - {name: roof, arc: {through: [1.5, 1.3], to: [0, 1]}, tag: wall, spacing: {count: ROOF}}
        - {name: left, line: [0, 0], tag: inlet, spacing: {count: 11}}
  curves:
    - {name: f1, start: [0, 0], segments: [{line: [1.5, 0], tag: wall, spacing: {count: 16}}]}
    - {name: f2, start: [1.5, 0], segments: [{line: [3, 0], tag: wall, spacing: {count: 16}}]}
    - {name: mid, start: [1.5, 0], segments: [{line: [1.5, 1.3], spacing: {count: 11}}]}
    - {name: r1, start: [0, 1], segments: [{arc: {through: [0.75, -2.6 + sqrt(15.21 - 0.5625)], to: [1.5, 1.3]}, tag: wall, spacing: {count: 16}}]}
    - {name: r2, start: [1.5, 1.3], segments: [{arc: {through: [2.25, -2.6 + sqrt(15.21 - 0.5625)], to: [3, 1]}, tag: wall, spacing: {count: 16}}]}
mesh:
  structured:
    blocks:
      - {name: a, south: f1, east: mid, north: r1, west: left}
      - {name: b, south: f2, east: right, north: r2, west: mid}
`
	for _, roof := range []float64{21, 31, 61} {
		c, err := Parse("split.yaml", []byte(text), LoadOptions{Params: map[string]float64{"ROOF": roof}})
		if err != nil {
			t.Fatal(err)
		}
		if _, _, err := c.buildStructured(); err != nil {
			t.Errorf("roof of %g nodes: %v", roof, err)
		}
	}
}
