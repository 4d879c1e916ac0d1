package geometry

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// outlineArea is the area enclosed by an outline's own vertices.
func outlineArea(t *testing.T, o Outline) float64 {
	t.Helper()
	d, err := o.Discretise()
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Validate(); err != nil {
		t.Fatal(err)
	}
	a := 0.0
	for _, l := range d.Loops {
		a += planar.Area(orb.Ring(l.Points))
	}
	return a
}

// RFC 7946 Appendix A.3 (Polygon without and with a hole), A.6
// (MultiPolygon) and §1.5 (FeatureCollection with a Point, a LineString
// and a Polygon) without its LineString, which is refused
// (TestReadGeoJSONRefusesArealess), its Point skipped; areas against the
// closed forms of their squares.
func TestReadGeoJSONRFC7946Examples(t *testing.T) {
	cases := []struct {
		name  string
		doc   string
		areas []float64
	}{
		{"A.3 no holes", `{"type": "Polygon", "coordinates": [[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]]]}`, []float64{1}},
		{"A.3 with holes", `{"type": "Polygon", "coordinates": [
			[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]],
			[[100.8, 0.8], [100.8, 0.2], [100.2, 0.2], [100.2, 0.8], [100.8, 0.8]]]}`, []float64{0.64}},
		{"A.6", `{"type": "MultiPolygon", "coordinates": [
			[[[102.0, 2.0], [103.0, 2.0], [103.0, 3.0], [102.0, 3.0], [102.0, 2.0]]],
			[[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]],
			 [[100.2, 0.2], [100.2, 0.8], [100.8, 0.8], [100.8, 0.2], [100.2, 0.2]]]]}`, []float64{1, 0.64}},
		{"1.5", `{"type": "FeatureCollection", "features": [
			{"type": "Feature", "geometry": {"type": "Point", "coordinates": [102.0, 0.5]}, "properties": {"prop0": "value0"}},
			{"type": "Feature", "geometry": {"type": "Polygon", "coordinates": [[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]]]},
			 "properties": {"prop0": "value0", "prop1": {"this": "that"}}}]}`, []float64{1}},
	}
	for _, c := range cases {
		outs, err := ReadGeoJSON([]byte(c.doc))
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if len(outs) != len(c.areas) {
			t.Fatalf("%s: %d outlines, want %d", c.name, len(outs), len(c.areas))
		}
		for i, o := range outs {
			if a := outlineArea(t, o); math.Abs(a-c.areas[i]) > 1e-12 {
				t.Errorf("%s polygon %d: area %.15g want %g", c.name, i, a, c.areas[i])
			}
		}
	}
	// The hole of A.3 gets the default tag "inner1", the exterior "outer".
	outs, _ := ReadGeoJSON([]byte(cases[1].doc))
	if outs[0].Outer.Segments[0].Attr().Tag != "outer" || outs[0].Inner[0].Segments[0].Attr().Tag != "inner1" {
		t.Errorf("default tags %q %q", outs[0].Outer.Segments[0].Attr().Tag, outs[0].Inner[0].Segments[0].Attr().Tag)
	}
}

func TestReadGeoJSONTags(t *testing.T) {
	doc := `{"type": "Feature", "properties": {"name": "duct", "tag": "wall",
	  "edge_tags": [{"from": 1, "to": 1, "tag": "outflow"}, {"from": 3, "to": 3, "tag": "inflow"}, {"ring": 1, "from": 0, "to": 3, "tag": "strut"}]},
	  "geometry": {"type": "Polygon", "coordinates": [
	    [[0, 0], [4, 0], [4, 1], [0, 1], [0, 0]],
	    [[1, 0.4], [1, 0.6], [1.5, 0.6], [1.5, 0.4], [1, 0.4]]]}}`
	outs, err := ReadGeoJSON([]byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, s := range outs[0].Outer.Segments {
		got = append(got, s.Attr().Tag)
	}
	if strings.Join(got, " ") != "wall outflow wall inflow" {
		t.Errorf("outer edge tags %v", got)
	}
	// The hole runs clockwise in the file already, so it keeps its order.
	if outs[0].Inner[0].Segments[2].Attr().Tag != "strut" || outs[0].Inner[0].Flipped {
		t.Errorf("hole tags/orientation: %q flipped %v", outs[0].Inner[0].Segments[2].Attr().Tag, outs[0].Inner[0].Flipped)
	}
	bad := []struct{ doc, says string }{
		{`{"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 1]]]}`, "ring 0: a ring must be closed"},
		{`{"type": "Feature", "properties": {"edge_tags": [{"from": 0, "to": 9, "tag": "x"}]}, "geometry": {"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 0]]]}}`,
			"edge tag range 0 (0 to 9) must lie within edges 0 to 2"},
		{`{"type": "Feature", "properties": {"edge_tags": [{"from": 0, "to": 1, "tag": "a"}, {"from": 1, "to": 2, "tag": "b"}]}, "geometry": {"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 0]]]}}`,
			`tags edge 1 of ring 0, already tagged "a"`},
		{`{"type": "Feature", "properties": {"edge_tags": [{"form": 0, "to": 1, "tag": "a"}]}, "geometry": null}`, `unknown field "form"`},
		{`{"type": "Feature", "properties": {"tag": 7}, "geometry": null}`, `property "tag" must be a non-empty string`},
		{"{\"type\": \"Polygon\",\n \"coordinates\": [[[0, 0], [1, 0], [1, 1] [0, 0]]]}", "line 2, column"},
		{`{"type": "Polygon", "coordinates": [[[0, 0], [1, 1], [1, 0], [0, 1], [0, 0]]]}`, "exterior ring 0, edge from vertex 0 to vertex 1 at (0.5, 0.5): meets the edge from vertex 2: loop crosses itself"},
		{`{"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 1], [0, 0]], [[2, 2], [3, 2], [3, 3], [2, 2]]]}`, "hole ring 1, edge from vertex 0 to vertex 1 at (2, 2): this point lies outside the outer loop"},
		{`{"type": "Point", "coordinates": [1, 2]}`, "no Polygon or MultiPolygon found"},
		{`{"type": "FeatureCollection", "features": []}`, "no Polygon or MultiPolygon found"},
		{`{"type": "Polygonal", "coordinates": []}`, `unknown GeoJSON type "Polygonal"`},
	}
	for _, b := range bad {
		_, err := ReadGeoJSON([]byte(b.doc))
		if !errors.Is(err, ErrFormat) && !errors.Is(err, ErrSelfCrossing) && !errors.Is(err, ErrOutside) {
			t.Errorf("%s: got %v", b.says, err)
			continue
		}
		if !strings.Contains(err.Error(), b.says) || strings.Contains(err.Error(), "\n") {
			t.Errorf("error %q does not say %q", err, b.says)
		}
	}
}

func TestReadWKT(t *testing.T) {
	outs, err := ReadWKT("POLYGON ((0 0, 3 0, 3 2, 0 2, 0 0), (1 0.5, 1 1.5, 2 1.5, 2 0.5, 1 0.5))",
		PolygonTags{Tag: "wall", Edges: []EdgeTag{{Ring: 0, From: 1, To: 1, Tag: "outflow"}, {Ring: 0, From: 3, To: 3, Tag: "inflow"}}})
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, outs[0]); math.Abs(a-5) > 1e-12 { // 3·2 − 1·1
		t.Errorf("area %g want 5", a)
	}
	if tg := outs[0].Outer.Segments[3].Attr().Tag; tg != "inflow" {
		t.Errorf("edge 3 tag %q", tg)
	}
	if tg := outs[0].Inner[0].Segments[0].Attr().Tag; tg != "wall" {
		t.Errorf("hole tag %q", tg)
	}
	outs, err = ReadWKT("MULTIPOLYGON (((0 0, 1 0, 1 1, 0 0)), ((5 5, 7 5, 7 7, 5 7, 5 5)))", PolygonTags{Edges: []EdgeTag{{Polygon: 1, From: 0, To: 0, Tag: "floor"}}})
	if err != nil || len(outs) != 2 {
		t.Fatalf("multipolygon: %v", err)
	}
	if a := outlineArea(t, outs[1]); math.Abs(a-4) > 1e-12 || outs[1].Outer.Segments[0].Attr().Tag != "floor" {
		t.Errorf("second polygon area %g, tag %q", a, outs[1].Outer.Segments[0].Attr().Tag)
	}
	for _, b := range []struct{ text, says string }{
		{"LINESTRING (0 0, 1 1)", "a LineString bounds no area"},
		{"POLYGON ((0 0, 1 0, 1 1", "line 1, column 24: expected ',' or ')' after the point (1 1), found the end of the text"},
		{"POLYGON ((0 0, 1 0, 1 1, 0 0))", "names polygon 3"},
		{"POLYGON ((0 0, 1 0, 1 1, 0 1))", "ring 0: a ring must be closed (last position equal to the first) with at least 4 positions (OGC Simple Features"},
	} {
		tags := PolygonTags{}
		if strings.Contains(b.says, "polygon 3") {
			tags.Edges = []EdgeTag{{Polygon: 3, Tag: "x"}}
		}
		if _, err := ReadWKT(b.text, tags); err == nil || !strings.Contains(err.Error(), b.says) {
			t.Errorf("%s: got %v, want %q", b.text, err, b.says)
		}
	}
}

// SVG 1.1 Appendix F.6.5 (endpoint to centre parametrisation), cases
// worked by hand from the spec's formulas: the unit circle through (1, 0)
// and (0, 1) has centres (0, 0) and (1, 1), and the two flags pick one
// of four arcs.
func TestSVGArcCentreSpecCases(t *testing.T) {
	p1, p2 := orb.Point{1, 0}, orb.Point{0, 1}
	cases := []struct {
		large, sweep           bool
		cx, cy, theta1, dtheta float64
	}{
		{false, true, 0, 0, 0, math.Pi / 2},
		{true, true, 1, 1, -math.Pi / 2, 3 * math.Pi / 2},
		{false, false, 1, 1, -math.Pi / 2, -math.Pi / 2},
		{true, false, 0, 0, 0, -3 * math.Pi / 2},
	}
	for _, c := range cases {
		a, ok := svgArcCentre(p1, p2, 1, 1, 0, c.large, c.sweep)
		if !ok || math.Abs(a.cx-c.cx) > 1e-15 || math.Abs(a.cy-c.cy) > 1e-15 ||
			math.Abs(a.theta1-c.theta1) > 1e-15 || math.Abs(a.dtheta-c.dtheta) > 1e-15 {
			t.Errorf("large=%v sweep=%v: centre (%g, %g) θ1 %g Δθ %g, want (%g, %g) %g %g",
				c.large, c.sweep, a.cx, a.cy, a.theta1, a.dtheta, c.cx, c.cy, c.theta1, c.dtheta)
		}
	}
	// F.6.6: radii 0.5 cannot span (0, 0)–(2, 0); Λ = 4, so they are
	// scaled by √Λ = 2 to 1 and the centre is the midpoint.
	a, _ := svgArcCentre(orb.Point{0, 0}, orb.Point{2, 0}, 0.5, 0.5, 0, false, true)
	if math.Abs(a.rx-1) > 1e-15 || math.Abs(a.cx-1) > 1e-15 || math.Abs(a.cy) > 1e-15 || math.Abs(a.dtheta-math.Pi) > 1e-15 {
		t.Errorf("F.6.6 scaling: r %g centre (%g, %g) Δθ %g", a.rx, a.cx, a.cy, a.dtheta)
	}
	// Round trip through F.6.4 (centre to endpoint): a rotated ellipse
	// given by centre and angles; its end points and flags
	// (fA = |Δθ| > 180°, fS = Δθ > 0) must convert back to the same
	// centre and angles.
	for _, dth := range []float64{100, 250, -200, -30} {
		cx, cy, rx, ry, phi, th1 := 3.0, -1.0, 2.0, 1.0, 30.0, 20.0
		e := svgArc{cx: cx, cy: cy, rx: rx, ry: ry, cosPhi: math.Cos(phi * math.Pi / 180), sinPhi: math.Sin(phi * math.Pi / 180)}
		q1 := e.point(th1 * math.Pi / 180)
		q2 := e.point((th1 + dth) * math.Pi / 180)
		b, ok := svgArcCentre(q1, q2, rx, ry, phi, math.Abs(dth) > 180, dth > 0)
		if !ok || math.Abs(b.cx-cx) > 1e-12 || math.Abs(b.cy-cy) > 1e-12 || math.Abs(b.rx-rx) > 1e-12 ||
			math.Abs(math.Remainder(b.theta1-th1*math.Pi/180, 2*math.Pi)) > 1e-12 || math.Abs(b.dtheta-dth*math.Pi/180) > 1e-12 {
			t.Errorf("Δθ=%g°: centre (%g, %g) r %g θ1 %g° Δθ %g°", dth, b.cx, b.cy, b.rx, b.theta1*180/math.Pi, b.dtheta*180/math.Pi)
		}
	}
}

// The same shape written with absolute, relative, implicit-repeat and
// shorthand commands reads to the same outline.
func TestReadSVGPathForms(t *testing.T) {
	abs := "M 0 0 L 10 0 L 10 10 L 0 10 Z"
	forms := []string{
		"m0,0 l10,0 0,10 -10,0 z",
		"M0 0H10V10H0Z",
		"M0 0 10 0 10 10 0 10z",
		"m0 0h10v10h-10z",
		"M0,0L10,0L10,10L0,10L0,0",
	}
	ref, err := ReadSVGPath(abs, SVGOptions{})
	if err != nil {
		t.Fatal(err)
	}
	refArea := outlineArea(t, ref)
	if refArea != 100 {
		t.Fatalf("square area %g", refArea)
	}
	for _, f := range forms {
		o, err := ReadSVGPath(f, SVGOptions{})
		if err != nil {
			t.Errorf("%q: %v", f, err)
			continue
		}
		if a := outlineArea(t, o); a != refArea || len(o.Outer.Segments) != 4 {
			t.Errorf("%q: area %g, %d segments", f, a, len(o.Outer.Segments))
		}
	}
	// Packed numbers: "1.5.5" is 1.5 then .5; "1-2" is 1 then −2.
	subs, err := parseSVGPath("M0 0L1.5.5L1-2z", "SVG path")
	if err != nil {
		t.Fatal(err)
	}
	if s := subs[0].segs; s[0].pts[0] != (orb.Point{1.5, 0.5}) || s[1].pts[0] != (orb.Point{1, -2}) {
		t.Errorf("packed numbers read as %v %v", s[0].pts, s[1].pts)
	}
}

// Curves flattened within the tolerance: the enclosed areas against
// closed forms. A circle of two arcs (πr²); a region under a quadratic
// and its smooth T continuation, whose bulge and dip cancel (400, by the
// parabola area 2/3 · base · height); a cubic S-curve with reflection.
func TestReadSVGPathCurves(t *testing.T) {
	const tol = 1e-3
	o, err := ReadSVGPath("M 10 0 A 10 10 0 0 1 -10 0 A 10 10 0 1 1 10 0 Z", SVGOptions{Tolerance: tol})
	if err != nil {
		t.Fatal(err)
	}
	// The chords lie inside the circle by at most tol: area error ≤ tol · perimeter.
	if a := outlineArea(t, o); math.Abs(a-100*math.Pi) > tol*20*math.Pi || a > 100*math.Pi {
		t.Errorf("two-arc circle area %g want 100π = %g", a, 100*math.Pi)
	}
	o, err = ReadSVGPath("M0 0 Q 5 10 10 0 T 20 0 L 20 -20 L 0 -20 Z", SVGOptions{Tolerance: tol})
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, o); math.Abs(a-400) > tol*100 {
		t.Errorf("Q/T region area %g want 400", a)
	}
	// Cubic: C 0 10 10 10 10 0 closed by the chord. Here y(t) = 30t(1−t),
	// x(t) = 30t² − 20t³, so the area ∫y dx = 1800∫t²(1−t)² dt = 60; the
	// Green's-theorem quadrature cubicArea must agree.
	o, err = ReadSVGPath("M0 0 C 0 10 10 10 10 0 Z", SVGOptions{Tolerance: tol})
	if err != nil {
		t.Fatal(err)
	}
	want := cubicArea(orb.Point{0, 0}, orb.Point{0, 10}, orb.Point{10, 10}, orb.Point{10, 0})
	if math.Abs(want-60) > 1e-12 {
		t.Fatalf("reference cubic area %g", want)
	}
	if a := outlineArea(t, o); math.Abs(math.Abs(a)-want) > tol*30 {
		t.Errorf("cubic region area %g want %g", a, want)
	}
	// S reflects the previous control point: "C 0 10 5 10 5 5 S 10 0 10 5"
	// has its second curve's first control at (5, 0).
	subs, err := parseSVGPath("M0 0 C 0 10 5 10 5 5 S 10 0 10 5", "SVG path")
	if err != nil {
		t.Fatal(err)
	}
	if c1 := subs[0].segs[1].pts[0]; c1 != (orb.Point{5, 0}) {
		t.Errorf("S reflected control %v want (5, 0)", c1)
	}
	// Flip and scale: mm drawing to metres, y down to y up.
	o, err = ReadSVGPath("M 0 0 h 100 v 50 h -100 z", SVGOptions{Scale: 1e-3, FlipY: true})
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, o); math.Abs(a-0.005) > 1e-15 {
		t.Errorf("flipped scaled area %g want 0.005", a)
	}
	if p := o.Outer.Segments[0].At(0); p[1] > 0 {
		t.Errorf("flipped point %v has y > 0", p)
	}
	// Two subpaths: the larger is the outer loop whatever the order.
	o, err = ReadSVGPath("M 4 4 h 2 v 2 h -2 z M 0 0 h 10 v 10 h -10 z", SVGOptions{Tags: []string{"body", "far"}})
	if err != nil {
		t.Fatal(err)
	}
	if o.Outer.Segments[0].Attr().Tag != "far" || len(o.Inner) != 1 || o.Inner[0].Segments[0].Attr().Tag != "body" {
		t.Errorf("outer %q inner %d", o.Outer.Segments[0].Attr().Tag, len(o.Inner))
	}
}

// cubicArea returns ½∮(x dy − y dx) over the cubic Bézier and its closing
// chord (the chord from p3 back to p0 adds ½(x3 y0 − x0 y3)), by
// Gauss–Legendre (16 points), exact for this degree-5 integrand.
func cubicArea(p0, p1, p2, p3 orb.Point) float64 {
	bez := func(t float64) (orb.Point, orb.Point) {
		u := 1 - t
		var p, d orb.Point
		for k := range 2 {
			p[k] = u*u*u*p0[k] + 3*u*u*t*p1[k] + 3*u*t*t*p2[k] + t*t*t*p3[k]
			d[k] = 3*u*u*(p1[k]-p0[k]) + 6*u*t*(p2[k]-p1[k]) + 3*t*t*(p3[k]-p2[k])
		}
		return p, d
	}
	s := 0.0
	for k, x := range glX {
		p, d := bez((x + 1) / 2)
		s += glW[k] * (p[0]*d[1] - p[1]*d[0]) / 2
	}
	s /= 2
	return math.Abs(s + (p3[0]*p0[1]-p0[0]*p3[1])/2)
}

func TestReadSVGPathErrors(t *testing.T) {
	for _, c := range []struct{ d, says string }{
		{"L 1 1", "command 0 at byte 1: path data must begin with a moveto"},
		{"M 0 0 L 1", "command 1 at byte 9: expected a number, found the end of the data"},
		{"M 0 0 L 1 x", "expected a number, found 'x'"},
		{"M 0 0 L 1 0 L 1 1", "subpath from command 0 is open"},
		{"M 0 0 A 1 1 0 2 1 1 1 z", "command 1 at byte 14: expected an arc flag 0 or 1"},
		{"M 0 0 K 1 1", "byte 6: expected a command letter"},
		{"M 0 0 L 1e999 0 z", `number "1e999" is out of range`},
		{"M 0 0 L 1 1 L 1 0 L 0 1 Z", "loop crosses itself"},
		{"M 0 0 Z", "no closed subpath that draws anything"},
	} {
		_, err := ReadSVGPath(c.d, SVGOptions{})
		if err == nil || !strings.Contains(err.Error(), c.says) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%q: got %v, want %q", c.d, err, c.says)
		}
	}
}

func TestReadPoints(t *testing.T) {
	text := "# section of our own\n0 0\n\n1.0, 0   # trailing comment\n1\t1\n0,1\n0 0\n"
	p, closed, err := readPoints(strings.NewReader(text), Attr{Tag: "hull"}, false)
	if err != nil {
		t.Fatal(err)
	}
	if !closed || len(p.Vertices()) != 5 || p.Attr().Tag != "hull" {
		t.Errorf("closed %v, %d points", closed, len(p.Vertices()))
	}
	open := "0 0\n2 0\n2 1\n"
	p, closed, err = readPoints(strings.NewReader(open), Attr{}, false)
	if err != nil || closed || p.Length() != 3 {
		t.Errorf("open polyline: closed %v length %v err %v", closed, p.Length(), err)
	}
	p, closed, _ = readPoints(strings.NewReader(open), Attr{}, true)
	if !closed || p.Length() != 3+math.Sqrt(5) {
		t.Errorf("closed by option: %v length %g", closed, p.Length())
	}
	o := Outline{Outer: Loop{Segments: []Segment{p}}}
	if a := outlineArea(t, o); a != 1 {
		t.Errorf("triangle area %g want 1", a)
	}
	for _, c := range []struct{ text, says string }{
		{"0 0\n1 x\n", `line 2, column 3: "x" is not a finite number`},
		{"0 0\n1 2 3\n", "line 2: expected two numbers"},
		{"0 0\n0 0\n", "line 2: point (0, 0) repeats the point on line 1"},
		{"# nothing\n", "found 0 points"},
		{"0 0\n1 1\n0 0\n", "closed polyline has 2 distinct points"},
	} {
		_, _, err := readPoints(strings.NewReader(c.text), Attr{}, false)
		if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%q: got %v, want %q", c.text, err, c.says)
		}
	}
}

// FuzzSVGPath: no input makes the path parser or reader panic.
func FuzzSVGPath(f *testing.F) {
	for _, s := range []string{
		"M 0 0 L 10 0 L 10 10 Z", "m0 0h10v10h-10z", "M10 0A10 10 0 0 1-10 0A10 10 0 1 1 10 0Z",
		"M0 0Q5 10 10 0T20 0L20-20L0-20Z", "M0 0C0 10 10 10 10 0S20-10 20 0Z", "M0 0L1.5.5L1-2z",
		"M 0 0 A 0 0 0 0 0 1 1 Z", "M0 0 a1e308 1e308 0 1 1 1 1z",
		// Open subpaths that join end to end, or do not.
		"M0 0L10 0M10 0L10 10L0 10M0 10L0 0", "M0 0H10M0 0V10H10V0", "M0 0L1 0M1 0L1 1M1 1L0 0M0 0L0 -1",
		"M0 0H10V10M0 0V10.00001", "M0 0Q5 10 10 0M10 0L0 0",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, d string) {
		o, err := ReadSVGPath(d, SVGOptions{Tolerance: 0.01})
		if err != nil {
			return
		}
		if err := o.Validate(); err != nil {
			t.Fatalf("outline returned by ReadSVGPath fails validation: %v", err)
		}
	})
}

func TestReadSVGDocument(t *testing.T) {
	doc := `<?xml version="1.0"?>
<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 200 100">
  <g id="layer">
    <rect id="duct" x="0" y="0" width="200" height="100"/>
    <circle id="rod" cx="50" cy="50" r="10"/>
    <polygon id="vane" points="120,40 150,40 150,60"/>
    <path id="strut" d="M 80 20 h 10 v 10 h -10 z"/>
    <text x="5" y="5">not a shape</text>
  </g>
  <defs><marker id="arrow"><path id="head" d="M 0 0 L 4 2 L 0 4 z"/></marker><circle id="spare" cx="20" cy="20" r="5"/></defs>
  <clipPath id="clip"><rect id="window" x="10" y="10" width="5" height="5"/></clipPath>
</svg>`
	o, err := ReadSVGDocument(strings.NewReader(doc), SVGOptions{Scale: 1e-3, FlipY: true, Tolerance: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	if len(o.Inner) != 3 || o.Outer.Segments[0].Attr().Tag != "duct" {
		t.Fatalf("outer %q, %d inner loops", o.Outer.Segments[0].Attr().Tag, len(o.Inner))
	}
	tags := []string{o.Inner[0].Segments[0].Attr().Tag, o.Inner[1].Segments[0].Attr().Tag, o.Inner[2].Segments[0].Attr().Tag}
	if strings.Join(tags, " ") != "rod vane strut" {
		t.Errorf("inner tags %v (shapes in defs, markers and clip paths are not drawn in place, SVG 1.1 §5.3)", tags)
	}
	// Area (m²): duct 0.02 minus the rod's inscribed polygon (≤ π·1e-4, within the
	// tolerance), the vane triangle 3e-4 and the strut 1e-4.
	a := outlineArea(t, o)
	want := 0.02 - math.Pi*1e-4 - 3e-4 - 1e-4
	if math.Abs(a-want) > 0.01*2*math.Pi*10*1e-6 {
		t.Errorf("document area %g want %g", a, want)
	}
	for _, c := range []struct{ doc, says string }{
		{`<svg><g transform="skew(2)"><rect width="1" height="1"/></g></svg>`, `SVG g element (line 1): transform "skew(2)": unknown transform "skew"`},
		{`<svg><rect transform="scale(1, 0)" width="1" height="1"/></svg>`, "determinant 0"},
		{`<svg><rect transform="translate(1 2 3)" width="1" height="1"/></svg>`, "translate takes [1 2] numbers, not 3"},
		{`<svg><rect transform="rotate(30" width="1" height="1"/></svg>`, "is not a name(numbers) transform"},
		{`<svg><rect width="10mm" height="1"/></svg>`, `attribute width="10mm" must be a plain number`},
		{`<svg><rect width="1" height="1" rx="0.1"/></svg>`, "rounded corners"},
		{`<svg><text>nothing</text></svg>`, "no path, rect, circle, ellipse or polygon element"},
		{`<svg><path id="p" d="M 0 0 L 1"/></svg>`, `SVG path element 0 (line 1, id "p"): command 1 at byte 9`},
		{`<svg><rect`, "SVG document:"},
	} {
		if _, err := ReadSVGDocument(strings.NewReader(c.doc), SVGOptions{}); err == nil || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%s: got %v, want %q", c.doc, err, c.says)
		}
	}
}

// Transforms are applied as SVG 1.1 §7.6 defines them: a unit square under
// translate(10,5) rotate(90) scale(2,3) (applied right to left) has its
// corners at (10,5), (10,7), (7,7) and (7,5) and area 6, worked by hand;
// inside a group translated by (100, 0), a circle of radius 1 scaled by 3
// has its centre at (100, 0) and area π·9 within the flattening
// tolerance, which holds in the document's units after the scaling.
func TestReadSVGDocumentTransforms(t *testing.T) {
	doc := `<svg xmlns="http://www.w3.org/2000/svg">
  <rect id="box" transform="translate(10,5) rotate(90) scale(2,3)" width="1" height="1"/>
</svg>`
	o, err := ReadSVGDocument(strings.NewReader(doc), SVGOptions{Scale: 1})
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, o); math.Abs(a-6) > 1e-12 {
		t.Errorf("area %g, want 6", a)
	}
	corners := map[orb.Point]bool{}
	for _, s := range o.Outer.Segments {
		l, ok := s.(*Line)
		if !ok {
			t.Fatalf("segment %T, want lines", s)
		}
		corners[orb.Point{math.Round(l.A[0]*1e9) / 1e9, math.Round(l.A[1]*1e9) / 1e9}] = true
	}
	for _, p := range []orb.Point{{10, 5}, {10, 7}, {7, 7}, {7, 5}} {
		if !corners[p] {
			t.Errorf("no corner at %v among %v", p, corners)
		}
	}
	doc = `<svg xmlns="http://www.w3.org/2000/svg">
  <rect id="duct" x="-200" y="-100" width="400" height="200"/>
  <g transform="translate(100 0)"><circle id="rod" transform="scale(3)" cx="0" cy="0" r="1"/></g>
</svg>`
	tol := 1e-3
	o, err = ReadSVGDocument(strings.NewReader(doc), SVGOptions{Scale: 1, Tolerance: tol})
	if err != nil {
		t.Fatal(err)
	}
	rod := 400*200 - outlineArea(t, o)
	if want := 9 * math.Pi; rod > want || rod < want-tol*2*math.Pi*3 {
		t.Errorf("rod area %g, want π·9 = %g less at most the tolerance times its perimeter", rod, want)
	}
	var sx, sy float64
	var n int
	for _, s := range o.Inner[0].Segments {
		for _, p := range s.(interface{ Vertices() []orb.Point }).Vertices() {
			sx, sy, n = sx+p[0], sy+p[1], n+1
		}
	}
	if cx, cy := sx/float64(n), sy/float64(n); math.Abs(cx-100) > 0.05 || math.Abs(cy) > 0.05 {
		t.Errorf("rod centred at (%g, %g), want (100, 0)", cx, cy)
	}
}
