package deck

import (
	"errors"
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
