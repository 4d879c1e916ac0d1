package deck

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/export/manifest"
	"cvdeck/geometry"
)

// runSketch meshes the sketch text saved as name with the flags' options
// and returns the run's result and its manifest.
func runSketch(t *testing.T, name, text string, so SketchOptions) (*Result, *manifest.Manifest) {
	t.Helper()
	dir := t.TempDir()
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	c, err := SketchCase(path, so, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "deck")
	res, err := Run(c, out, RunOptions{Formats: []string{"manifest"}})
	if err != nil {
		t.Fatal(err)
	}
	man, err := manifest.Read(out)
	if err != nil {
		t.Fatal(err)
	}
	return res, man
}

// A sketch run of a duct drawn as separate strokes carries each stroke's
// tag into the mesh's boundary faces and the manifest's boundary tags,
// each tag's faces as long as its strokes: inlet 60, outlet 100, the two
// walls (tagged alike by data-tag) 300 and 100 + 40 + 200, worked by
// hand from the drawing.
func TestSketchStrokeTags(t *testing.T) {
	const duct = `<svg xmlns="http://www.w3.org/2000/svg">
  <line id="inlet" x1="0" y1="60" x2="0" y2="0"/>
  <polyline id="floor" data-tag="wall" points="0,0 300,0"/>
  <path id="outlet" d="M 300 0 V 100"/>
  <path id="roof" data-tag="wall" d="M 0 60 H 100 V 100 H 300"/>
</svg>`
	res, man := runSketch(t, "duct.svg", duct, SketchOptions{Size: 20, FlipY: true})
	want := map[string]float64{"inlet": 60, "wall": 640, "outlet": 100}
	listed := map[string]bool{}
	for _, tg := range man.Tags {
		listed[tg.Tag] = true
		if _, ok := want[tg.Tag]; !ok || tg.Faces == 0 {
			t.Errorf("deck.yaml lists tag %q with %d faces, want only %v", tg.Tag, tg.Faces, want)
		}
	}
	m := res.Mesh
	for tag, length := range want {
		if !listed[tag] {
			t.Errorf("deck.yaml does not list tag %q", tag)
		}
		lo, hi, ok := m.TagRange(tag)
		if !ok {
			t.Errorf("the mesh has no boundary faces tagged %q", tag)
			continue
		}
		sum := 0.0
		for f := lo; f < hi; f++ {
			sum += m.Geo.FaceLength[f]
		}
		if math.Abs(sum-length) > 1e-9*length {
			t.Errorf("tag %q: faces %g long, want %g", tag, sum, length)
		}
	}
}

// A point file's title names the sketch's loop, where the loop's name
// shows (its curve in the case, and messages about it), while its edges
// keep the tag "outer"; a unit in the header is checked against --scale.
func TestSketchPointTitle(t *testing.T) {
	const xy = "Settling chamber, rev 2\nX [mm]\tY [mm]\tZ [mm]\n0\t0\t12\n400\t0\t12\n400\t100\t12\n0\t100\t12\n"
	dir := t.TempDir()
	path := filepath.Join(dir, "chamber.xy")
	if err := os.WriteFile(path, []byte(xy), 0o644); err != nil {
		t.Fatal(err)
	}
	c, err := SketchCase(path, SketchOptions{Size: 0.05, Scale: 1e-3}, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if got := c.Geometry.shape.Outer.Name; got != "Settling chamber, rev 2" {
		t.Errorf("loop name %q, want the file's title", got)
	}
	if _, ok := c.Geometry.curves["Settling chamber, rev 2"]; !ok {
		t.Errorf("no curve named by the title among %v", c.Geometry.order)
	}
	if tags := outlineTags(c.Geometry.shape); len(tags) != 1 || tags[0] != "outer" {
		t.Errorf("tags %v, want [outer]", tags)
	}
	// Read at 1 m to the unit, the millimetres of the header are refused,
	// saying which --scale reads them.
	_, err = SketchCase(path, SketchOptions{Size: 50}, LoadOptions{})
	if !errors.Is(err, ErrInput) || !errors.Is(err, geometry.ErrUnit) || !strings.Contains(err.Error(), "chamber.xy: line 2, column 4: the file gives its coordinates in mm") || !strings.Contains(err.Error(), "--scale 0.001") {
		t.Errorf("got %v, want the header's mm refused at 1 m to the unit, naming --scale 0.001", err)
	}
	// A loop that touches itself is named by the title in the message.
	if err := os.WriteFile(path, []byte("Wedge\n0 0\n1 0\n0.5 0\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = SketchCase(path, SketchOptions{Size: 0.1}, LoadOptions{})
	if err == nil || !strings.Contains(err.Error(), `outer loop "Wedge"`) {
		t.Errorf("got %v, want the loop named by the title", err)
	}
}

// Without MaxSize every cell of a sketch run is about Size across; with
// it, cells grow away from the boundary towards MaxSize by Growth, so a
// 1 m square at Size 0.05 takes far fewer cells, its largest are far
// above Size and none passes MaxSize by more than a mesher's margin, and
// a slower growth takes more cells than a faster one. The equilateral
// triangle of side h has area √3 h²/4 (elementary geometry), so the
// uniform mesh has about 1/(√3 · 0.05²/4) ≈ 924 cells. A growth with no
// room to grow, and a MaxSize below Size, are refused naming the flags.
func TestSketchMaxSize(t *testing.T) {
	const square = "0 0\n1 0\n1 1\n0 1\n0 0\n"
	cells := func(so SketchOptions) (int, float64) {
		res, _ := runSketch(t, "square.xy", square, so)
		largest := 0.0
		for _, l := range res.Mesh.Geo.FaceLength {
			largest = max(largest, l)
		}
		return res.Mesh.NumCells(), largest
	}
	uniform, uniformLargest := cells(SketchOptions{Size: 0.05})
	if want := 4 / (math.Sqrt(3) * 0.05 * 0.05); math.Abs(float64(uniform)-want) > 0.25*want {
		t.Errorf("uniform sketch mesh: %d cells, want about %.0f", uniform, want)
	}
	fast, fastLargest := cells(SketchOptions{Size: 0.05, MaxSize: 0.4, Growth: 1.3})
	slow, _ := cells(SketchOptions{Size: 0.05, MaxSize: 0.4, Growth: 1.1})
	if !(fast < uniform/2 && slow > fast) {
		t.Errorf("cells: uniform %d, growth 1.3 to 0.4 m %d, growth 1.1 %d; want the graded meshes far smaller and the slower growth larger", uniform, fast, slow)
	}
	if !(fastLargest > 2*uniformLargest && fastLargest < 1.5*0.4) {
		t.Errorf("largest face %g m graded (uniform %g m), want well above --size and near --max-size 0.4 at most", fastLargest, uniformLargest)
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "square.xy")
	if err := os.WriteFile(path, []byte(square), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		so   SketchOptions
		says string
	}{
		{SketchOptions{Size: 0.05, Growth: 1.2}, "--growth 1.2 would change nothing"},
		{SketchOptions{Size: 0.05, MaxSize: 0.05, Growth: 1.2}, "give --max-size too"},
		{SketchOptions{Size: 0.05, MaxSize: 0.01}, "--max-size 0.01 is below --size 0.05"},
	} {
		if _, err := SketchCase(path, c.so, LoadOptions{}); !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%+v: got %v, want an input error saying %q", c.so, err, c.says)
		}
	}
}

// writeSketch saves text as name in a new folder and returns its path.
func writeSketch(t *testing.T, name, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// outlineBox returns the bounding box of the outline's segment ends.
func outlineBox(o geometry.Outline) (lo, hi [2]float64) {
	lo, hi = [2]float64{math.Inf(1), math.Inf(1)}, [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, l := range o.Loops() {
		for _, s := range l.Segments {
			for _, p := range []orb.Point{s.At(0), s.At(1)} {
				lo = [2]float64{min(lo[0], p[0]), min(lo[1], p[1])}
				hi = [2]float64{max(hi[0], p[0]), max(hi[1], p[1])}
			}
		}
	}
	return lo, hi
}

// --flip-y, and flip_y in a case, mirror every sketch format in the x
// axis, not SVG alone: the right triangle (0, 0), (4, 0), (0, 3) with a
// square hole, written as GeoJSON, WKT and an x-y file, comes out with y
// in [−3, 0], still oriented (outer loop counter-clockwise, positive
// shoelace area 4·3/2 − 0.5² = 5.75, worked by hand), and the GeoJSON
// edge_tags tag of the hypotenuse (edge 1, from (4, 0) to (0, 3)) stays
// on the mirrored hypotenuse, from (4, 0) to (0, −3).
func TestSketchFlipYEveryFormat(t *testing.T) {
	sketches := map[string]string{
		"tri.geojson": `{"type": "Feature", "properties": {"edge_tags": [{"ring": 0, "from": 1, "to": 1, "tag": "slope"}]},
		  "geometry": {"type": "Polygon", "coordinates": [[[0, 0], [4, 0], [0, 3], [0, 0]], [[0.5, 0.5], [0.5, 1], [1, 1], [1, 0.5], [0.5, 0.5]]]}}`,
		"tri.wkt": "POLYGON ((0 0, 4 0, 0 3, 0 0), (0.5 0.5, 0.5 1, 1 1, 1 0.5, 0.5 0.5))",
		"tri.xy":  "0 0\n4 0\n0 3\n0 0\n",
	}
	for name, text := range sketches {
		path := writeSketch(t, name, text)
		c, err := SketchCase(path, SketchOptions{Size: 0.5, FlipY: true}, LoadOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		o := c.Geometry.shape
		lo, hi := outlineBox(o)
		if lo != [2]float64{0, -3} || hi != [2]float64{4, 0} {
			t.Errorf("%s flipped: box %v to %v, want (0, -3) to (4, 0)", name, lo, hi)
		}
		d, err := o.Discretise()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		want := 6.0
		if name != "tri.xy" {
			want = 5.75
		}
		if a := d.Area(); math.Abs(a-want) > 1e-12 {
			t.Errorf("%s flipped: area %g, want %g (positive: the outer loop counter-clockwise)", name, a, want)
		}
		if name != "tri.geojson" {
			continue
		}
		found := false
		for _, s := range o.Outer.Segments {
			if s.Attr().Tag != "slope" {
				continue
			}
			found = true
			ends := map[orb.Point]bool{s.At(0): true, s.At(1): true}
			if !ends[orb.Point{4, 0}] || !ends[orb.Point{0, -3}] {
				t.Errorf("slope tag on the edge %v to %v, want the mirrored hypotenuse (4, 0) to (0, -3)", s.At(0), s.At(1))
			}
		}
		if !found {
			t.Errorf("the slope tag is lost in the flip")
		}
	}
	// Unflipped, the same file keeps y in [0, 3].
	c, err := SketchCase(writeSketch(t, "tri.wkt", sketches["tri.wkt"]), SketchOptions{Size: 0.5}, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if lo, hi := outlineBox(c.Geometry.shape); lo != [2]float64{0, 0} || hi != [2]float64{4, 3} {
		t.Errorf("unflipped: box %v to %v, want (0, 0) to (4, 3)", lo, hi)
	}
}

// flipOutline refuses a segment it cannot mirror as lines, naming it.
func TestFlipOutlineRefusesArcs(t *testing.T) {
	circle, err := geometry.NewCircle(0, 0, 1, geometry.Attr{})
	if err != nil {
		t.Fatal(err)
	}
	circle.Name = "disc"
	_, err = flipOutline(geometry.Outline{Outer: circle})
	if err == nil || !strings.Contains(err.Error(), `segment 0 of loop 0 ("disc") is of kind "arc"; only lines and polylines can be flipped`) {
		t.Errorf("got %v, want the arc refused", err)
	}
}

// A case's tags list names SVG loops; for a GeoJSON, WKT or x-y sketch it
// is refused at the tags key, saying where that format carries its tags,
// rather than ignored.
func TestSketchTagsOnlyForSVG(t *testing.T) {
	for name, says := range map[string]string{
		"p.geojson": `a GeoJSON sketch tags its edges in its feature's properties: "tag"`,
		"p.wkt":     "a WKT sketch carries no tags: its loops are tagged outer, inner1",
		"p.xy":      "an x-y point file is one loop whose edges are tagged outer",
	} {
		text := map[string]string{
			"p.geojson": `{"type": "Polygon", "coordinates": [[[0, 0], [4, 0], [4, 2], [0, 2], [0, 0]]]}`,
			"p.wkt":     "POLYGON ((0 0, 4 0, 4 2, 0 2, 0 0))",
			"p.xy":      "0 0\n4 0\n4 2\n0 2\n",
		}[name]
		path := writeSketch(t, name, text)
		caseText, err := sketchCaseText(path, name, SketchOptions{Size: 0.5})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		caseText = strings.Replace(caseText, "  spacing: {size: size}\n", "  spacing: {size: size}\n  tags: [duct]\n", 1)
		_, err = Parse(filepath.Join(filepath.Dir(path), "p.yaml"), []byte(caseText), LoadOptions{})
		if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "geometry.tags: tags (the tag of each loop, in path order) applies to SVG sketches only") || !strings.Contains(err.Error(), says) {
			t.Errorf("%s with tags: got %v, want it refused saying %q", name, err, says)
		}
	}
}

// A UTF-8 byte-order mark, which some editors write first, is dropped
// before any reader sees the text: an SVG document, SVG path data,
// GeoJSON, WKT and an x-y file of the 4 × 2 rectangle all read with the
// mark as without it (area 8, by hand).
func TestSketchByteOrderMark(t *testing.T) {
	for name, text := range map[string]string{
		"doc.svg":     `<svg xmlns="http://www.w3.org/2000/svg"><rect x="0" y="0" width="4" height="2"/></svg>`,
		"path.svg":    "M 0 0 H 4 V 2 H 0 Z",
		"r.geojson":   `{"type": "Polygon", "coordinates": [[[0, 0], [4, 0], [4, 2], [0, 2], [0, 0]]]}`,
		"r.wkt":       "POLYGON ((0 0, 4 0, 4 2, 0 2, 0 0))",
		"r.xy":        "0 0\n4 0\n4 2\n0 2\n",
		"r.titled.xy": "Box\nx y\n0 0\n4 0\n4 2\n0 2\n",
	} {
		o, err := readSketch(name, []byte("\ufeff"+text), sketchRead{scale: 1})
		if err != nil {
			t.Errorf("%s with a byte-order mark: %v", name, err)
			continue
		}
		d, err := o.Discretise()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if a := d.Area(); math.Abs(a-8) > 1e-12 {
			t.Errorf("%s: area %g, want 8", name, a)
		}
	}
}

// A --size larger than the whole sketch is a slip of units and is refused,
// giving the sketch's size: the 300 × 100 duct read at --scale 0.001
// spans √(0.3² + 0.1²) = 0.3162 m corner to corner (Pythagoras), so
// --size 2 is refused and --size 0.3 taken.
func TestSketchSizeBeyondTheSketch(t *testing.T) {
	path := writeSketch(t, "duct.wkt", "POLYGON ((0 0, 300 0, 300 100, 0 100, 0 0))")
	_, err := SketchCase(path, SketchOptions{Size: 2, Scale: 0.001}, LoadOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "--size 2 m is larger than the whole sketch duct.wkt, which spans 0.3162 m corner to corner") {
		t.Errorf("got %v, want --size 2 refused, giving the sketch's 0.3162 m", err)
	}
	if _, err := SketchCase(path, SketchOptions{Size: 0.3, Scale: 0.001}, LoadOptions{}); err != nil {
		t.Errorf("--size 0.3 within the sketch: %v", err)
	}
}

// The tip of a cusp inside one SVG Bézier stays a node when the curve is
// respaced. The cubic P0 (0, 0), P1 (100, 100), P2 (0, 100), P3 (100, 0)
// has x′(t) = 300 (1 − 2t)² and y′(t) = 300 (1 − 2t), both 0 at t = ½
// (the Bernstein form of a cubic Bézier, differentiated by hand): a cusp
// at B(½) = (50, 75), where the curve turns back by 180°. Spaced at 1,
// the nodes must reach y = 75 exactly (arc-length spacing across the
// cusp cut it to 74.5); the smooth parts keep about the size.
func TestSketchRespaceKeepsCusp(t *testing.T) {
	o, err := readSketch("cusp.svg", []byte("M0 0 C 100 100 0 100 100 0 L 100 -50 L 0 -50 Z"), sketchRead{scale: 1})
	if err != nil {
		t.Fatal(err)
	}
	size, err := geometry.Size(1)
	if err != nil {
		t.Fatal(err)
	}
	d, err := respace(o, size).Discretise()
	if err != nil {
		t.Fatal(err)
	}
	top, tip := math.Inf(-1), false
	for _, p := range d.Loops[0].Points {
		top = max(top, p[1])
		tip = tip || math.Hypot(p[0]-50, p[1]-75) < 1e-9
	}
	if !tip || top != 75 {
		t.Errorf("highest node at y = %.9g, cusp tip (50, 75) a node: %v; want the tip kept", top, tip)
	}
	pts := d.Loops[0].Points
	longest := 0.0
	for i := range pts {
		longest = max(longest, dist(pts[i], pts[(i+1)%len(pts)]))
	}
	if longest > 1.5 {
		t.Errorf("longest boundary edge %g, want about the size 1", longest)
	}
}

// sharpVertices keeps the vertices turning by more than 10°: the turns
// of (0, 0), (1, 0), (2, h) are atan h, 5.71° for h = 0.1 and 11.3° for
// h = 0.2 (by hand); a cusp, turning back, is sharp.
func TestSharpVertices(t *testing.T) {
	for _, c := range []struct {
		name string
		pts  []orb.Point
		want []int
	}{
		{"5.71°", []orb.Point{{0, 0}, {1, 0}, {2, 0.1}}, nil},
		{"11.3°", []orb.Point{{0, 0}, {1, 0}, {2, 0.2}}, []int{1}},
		{"cusp", []orb.Point{{0, 0}, {1, 0}, {0.5, 0}, {0.5, -1}}, []int{1, 2}},
		{"straight", []orb.Point{{0, 0}, {1, 0}, {2, 0}}, nil},
	} {
		if got := sharpVertices(c.pts); !slices.Equal(got, c.want) {
			t.Errorf("%s: %v, want %v", c.name, got, c.want)
		}
	}
}
