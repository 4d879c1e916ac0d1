package deck

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestSpacingErrorsAtTheSpacing: a spacing law its segment cannot meet is
// reported at the spacing in the case file, not at a block side that uses
// the segment, and in a millimetre case the message says its lengths are
// metres.
func TestSpacingErrorsAtTheSpacing(t *testing.T) {
	for _, c := range []struct{ law, want string }{
		{"{first: 4000, count: n + 1}", "first spacing is"},
		{"{size: 1e-9}", "nodes, more than"},
	} {
		text := strings.Replace(square, "{name: e, line: [side, side], tag: wall, spacing: {count: n + 1}}", "{name: e, line: [side, side], tag: wall, spacing: "+c.law+"}", 1)
		if text == square {
			t.Fatal("the square case has changed; update the test")
		}
		_, err := Parse("square.yaml", []byte(text), LoadOptions{})
		var ie *InputError
		if !errors.As(err, &ie) || !errors.Is(err, ErrInput) {
			t.Fatalf("%s: got %v, want an input error", c.law, err)
		}
		if ie.Path != "geometry.loops[0].segments[1].spacing" || ie.Line != 14 {
			t.Errorf("%s: at %s (line %d), want the spacing of segment e on line 14: %v", c.law, ie.Path, ie.Line, err)
		}
		if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "lengths and coordinates in metres: 1 m is 1000 mm") {
			t.Errorf("%s: %v", c.law, err)
		}
	}
}

// TestGeometryErrorsSayMetres: an outline error of a millimetre case (a
// loop left open by 1 mm) gives its coordinates in metres and says so.
func TestGeometryErrorsSayMetres(t *testing.T) {
	text := strings.Replace(square, "{name: w, line: [0, 0],", "{name: w, line: [0, 1],", 1)
	if text == square {
		t.Fatal("the square case has changed; update the test")
	}
	_, err := Parse("square.yaml", []byte(text), LoadOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "(0, 0.001)") || !strings.Contains(err.Error(), "1 m is 1000 mm") {
		t.Fatalf("got %v, want the gap at (0, 0.001) m and the note on metres", err)
	}
}

// TestChainPointsFromFile: a polyline may take its points from an x-y
// file beside the case, in the case's units, its first point the chain's
// start or following it; the file is an input of the deck; a bad file is
// an error naming it and its line. The mesh of a 10 mm square with a hole
// whose corners come from the file covers the square less the hole
// (100 − 4 = 96 mm², elementary geometry).
func TestChainPointsFromFile(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		t.Helper()
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	write("hole.xy", "# x y, mm\n4 4\n4 6\n6 6\n6 4\n4 4\n")
	holed := strings.Replace(square, "mesh:\n", `    - name: hole
      start: [4, 4]
      segments:
        - {polyline: {file: hole.xy}, tag: hole}
mesh:
`, 1)
	holed = strings.Replace(holed, "  structured:\n    blocks:\n      - {south: s, east: e, north: n, west: w}\n", "  unstructured: {max_size: 1}\n", 1)
	c, err := Load(write("holed.yaml", holed), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(c, filepath.Join(dir, "deck"), RunOptions{Formats: []string{"manifest"}})
	if err != nil {
		t.Fatal(err)
	}
	area := 0.0
	for _, a := range res.Mesh.Geo.CellArea {
		area += a
	}
	if want := 96e-6; math.Abs(area-want) > 1e-12*want {
		t.Errorf("mesh area %.17g m², want %g", area, want)
	}
	if len(c.Inputs) != 2 || c.Inputs[1].Path != "hole.xy" {
		t.Errorf("inputs %v, want the case file and hole.xy", c.Inputs)
	}
	write("bad.xy", "4 4\n4 six\n")
	_, err = Load(write("bad.yaml", strings.Replace(holed, "hole.xy", "bad.xy", 1)), LoadOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "bad.xy: line 2") || !strings.Contains(err.Error(), "bad.yaml:") {
		t.Errorf("a bad point file: got %v, want an error at the file key naming bad.xy line 2", err)
	}
	_, err = Load(write("none.yaml", strings.Replace(holed, "hole.xy", "none.xy", 1)), LoadOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "none.xy") {
		t.Errorf("a missing point file: got %v", err)
	}
	// A header naming the case's unit (mm) is read; one naming another is
	// refused at the file key, with the unit to give the case.
	write("mm.xy", "x [mm] y [mm]\n4 4\n4 6\n6 6\n6 4\n4 4\n")
	if _, err := Load(write("mm.yaml", strings.Replace(holed, "hole.xy", "mm.xy", 1)), LoadOptions{}); err != nil {
		t.Errorf("a table whose header names the case's unit: %v", err)
	}
	write("metres.xy", "x [m] y [m]\n0.004 0.004\n0.004 0.006\n0.006 0.006\n0.006 0.004\n0.004 0.004\n")
	_, err = Load(write("metres.yaml", strings.Replace(holed, "hole.xy", "metres.xy", 1)), LoadOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "metres.xy: line 1") || !strings.Contains(err.Error(), "give the case units: m,") {
		t.Errorf("a table in metres in a case in mm: got %v, want a refusal naming metres.xy line 1 and units: m", err)
	}
}
