package geometry

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// TestReadPointsSeveralLoops: a file that holds more than one loop is
// told so, at the line where the second loop starts.
func TestReadPointsSeveralLoops(t *testing.T) {
	outer := "0 0\n100 0\n100 50\n0 50\n"
	hole := "25 25\n75 25\n75 40\n25 40\n"
	for _, c := range []struct {
		name, text string
		close      bool
		crossing   bool // the error is a crossing (errors.Is ErrSelfCrossing)
		says       []string
	}{
		{"closed loops, blank line", outer + "0 0\n\n" + hole + "25 25\n", true, false,
			[]string{"line 7: an x-y file holds one loop; this file closes its loop at line 5, back at the first point (0, 0) of line 1, and goes on", "GeoJSON, WKT or SVG"}},
		{"closed loops, no blank line", outer + "0 0\n" + hole, false, false,
			[]string{"line 6: an x-y file holds one loop; this file closes its loop at line 5"}},
		{"loops that do not repeat their first point", outer + "\n" + hole, true, true,
			[]string{"line 6: ", "the closing edge from line 9 back to line 1 crosses the edge from line 4 to line 6 at (", "loop crosses itself",
				"an x-y file holds one loop, so the points after the blank line at line 5 go on with it rather than start another", "GeoJSON, WKT or SVG"}},
		{"a comment between the loops", "# outer\n" + outer + "# hole\n\n" + hole, true, true,
			[]string{"line 8: ", "the points after the comment line at line 6 go on"}},
	} {
		_, _, err := ReadPoints(strings.NewReader(c.text), Attr{}, c.close)
		if !errors.Is(err, ErrFormat) || errors.Is(err, ErrSelfCrossing) != c.crossing {
			t.Errorf("%s: got %v", c.name, err)
			continue
		}
		for _, s := range c.says {
			if !strings.Contains(err.Error(), s) || strings.Contains(err.Error(), "\n") {
				t.Errorf("%s: error %q does not say %q", c.name, err, s)
			}
		}
		if !strings.HasPrefix(err.Error(), c.says[0][:strings.IndexByte(c.says[0], ':')+1]) {
			t.Errorf("%s: error %q does not start with its line", c.name, err)
		}
	}
}

// TestReadPointsCrossing: a closed point loop that crosses itself is
// located by the lines of its two edges, including the closing edge.
func TestReadPointsCrossing(t *testing.T) {
	for _, c := range []struct{ text, says string }{
		// Edge (0, 1)→(0.5, −1) crosses edge (0, 0)→(1, 0) at x = 0.25.
		{"0 0\n1 0\n1 1\n0 1\n0.5 -1\n", "line 4: the edge from line 4 to line 5 crosses the edge from line 1 to line 2 at (0.25, 0): loop crosses itself"},
		// A bow tie closed by the option: its edges from line 1 to 2 and from
		// line 3 to 4 cross at (0.5, 0.5); the closing edge (0, 1)→(0, 0) is clear.
		{"0 0\n1 1\n1 0\n0 1\n", "line 3: the edge from line 3 to line 4 crosses the edge from line 1 to line 2 at (0.5, 0.5)"},
		// A Z: the closing edge (2, 2)→(0, 0) crosses the diagonal (2, 0)→(0, 2) at (1, 1).
		{"# header\n0 0\n2 0\n0 2\n2 2\n", "line 5: the closing edge from line 5 back to line 2 crosses the edge from line 3 to line 4 at (1, 1)"},
	} {
		_, _, err := ReadPoints(strings.NewReader(c.text), Attr{}, true)
		if !errors.Is(err, ErrSelfCrossing) || !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%q: got %v, want %q", c.text, err, c.says)
		}
	}
}

// TestReadPointsStillAccepted: blank and comment lines within one loop,
// Windows line ends, a closing repeat of the first point, and open
// polylines that touch nothing are read as before; a byte-order mark is
// skipped.
func TestReadPointsStillAccepted(t *testing.T) {
	for _, c := range []struct {
		text   string
		close  bool
		closed bool
		length float64
	}{
		{"0 0\n\n1 0\n# corner\n1 1\n\n0 1\n\n", true, true, 4},
		{"# x y\r\n0 0\r\n1 0\r\n1 1\r\n0 1\r\n0 0\r\n", false, true, 4},
		{"0 0\n1 0\n\n1 1\n0 1\n\n0 0\n", true, true, 4},
		{"0, 0\n1,0\n\n1\t1\n", false, false, 2},
		// An open polyline may cross itself: it is a segment, validated in its loop.
		{"0 0\n1 1\n1 0\n0 1\n", false, false, 1 + 2*math.Sqrt2},
		// A byte-order mark before the first line, as some editors write.
		{"\ufeff0 0\n1 0\n1 1\n0 1\n", true, true, 4},
	} {
		p, closed, err := ReadPoints(strings.NewReader(c.text), Attr{}, c.close)
		if err != nil {
			t.Errorf("%q: %v", c.text, err)
			continue
		}
		if closed != c.closed || math.Abs(p.Length()-c.length) > 1e-12 {
			t.Errorf("%q: closed %v length %g, want %v %g", c.text, closed, p.Length(), c.closed, c.length)
		}
	}
}

// FuzzReadPoints: no point file makes the reader panic, every error is
// one line, and a closed loop it returns has no crossing edges.
func FuzzReadPoints(f *testing.F) {
	for _, s := range []string{
		"0 0\n1 0\n1 1\n0 1\n", "# x y\n0 0\n\n1 0\n1 1\n0 0\n", "0 0\n100 0\n100 50\n0 50\n\n25 25\n75 25\n75 40\n25 40\n",
		"0 0\n1 0\n1 1\n0 0\n2 2\n", "0,0\r\n1,1\r\n1,0\r\n0,1\r\n", "0 0\n1 x\n",
	} {
		f.Add(s, true)
	}
	f.Fuzz(func(t *testing.T, text string, close bool) {
		p, closed, err := ReadPoints(strings.NewReader(text), Attr{}, close)
		if err != nil {
			if msg := err.Error(); msg == "" || strings.Contains(msg, "\n") {
				t.Fatalf("%q: error %q is not one line", text, msg)
			}
			return
		}
		if close && !closed {
			t.Fatalf("%q: close set but the polyline is open", text)
		}
		if closed {
			pts := p.Vertices()
			lines := make([]int, len(pts))
			if err := pointLoopCrossing(pts, lines, pointGap{}); err != nil {
				t.Fatalf("%q: returned loop crosses itself: %v", text, err)
			}
		}
	})
}
