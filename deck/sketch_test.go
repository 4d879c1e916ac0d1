package deck

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

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
