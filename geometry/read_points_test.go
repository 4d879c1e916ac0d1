package geometry

import (
	"errors"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
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
		_, _, err := readPoints(strings.NewReader(c.text), Attr{}, c.close)
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
		_, _, err := readPoints(strings.NewReader(c.text), Attr{}, true)
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
		p, closed, err := readPoints(strings.NewReader(c.text), Attr{}, c.close)
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
		"Duct 2\nX [m]\tY [m]\n0\t0\n1\t0\n1\t1\n", "x,y,z\n0,0,5\n1,0,5\n1,1,5\n", "x y z\n0 0 1\n1 0 2\n",
		"0;0\n1;0\n1;1\n", "0,5;1,25\n", "x [ft] y [ft]\n0 0\n", "Title\nx y\nz\n", "\"A, B\",,\n0,0\n1,0\n0,1\n",
	} {
		f.Add(s, true)
	}
	f.Fuzz(func(t *testing.T, text string, close bool) {
		p, closed, err := readPoints(strings.NewReader(text), Attr{}, close)
		if err != nil {
			if msg := err.Error(); msg == "" || strings.Contains(msg, "\n") {
				t.Fatalf("%q: error %q is not one line", text, msg)
			}
			return
		}
		if close && !closed {
			t.Fatalf("%q: close set but the polyline is open", text)
		}
		pts := p.Vertices()
		if closed {
			lines := make([]int, len(pts))
			if err := pointLoopCrossing(pts, lines, pointGap{}); err != nil {
				t.Fatalf("%q: returned loop crosses itself: %v", text, err)
			}
		}
		// The points written again with a title, a header in metres and a
		// constant z column, semicolon separated, read back the same.
		var b strings.Builder
		b.WriteString("Fuzzed section\nx [m]; y [m]; z [m]\n")
		for _, q := range pts {
			b.WriteString(strconv.FormatFloat(q[0], 'g', -1, 64) + ";" + strconv.FormatFloat(q[1], 'g', -1, 64) + ";-2.5\n")
		}
		f, err := ReadPointFile(strings.NewReader(b.String()), PointOptions{Unit: 1})
		if err != nil {
			t.Fatalf("%q: written again as %q: %v", text, b.String(), err)
		}
		if f.Title != "Fuzzed section" || f.Unit != "m" || f.Closed != closed || !slices.Equal(f.Polyline.Vertices(), pts) {
			t.Fatalf("%q: written again with a title, header and z, read back as title %q unit %q closed %v points %v, not %v", text, f.Title, f.Unit, f.Closed, f.Polyline.Vertices(), pts)
		}
	})
}

// trapezoid is a closed point loop of known area: the trapezoid with
// parallel sides 4 (y = 0) and 2 (y = 2) and height 2, of area
// (4 + 2)/2 × 2 = 6 (the trapezoid rule of elementary geometry).
var trapezoid = [][2]string{{"0", "0"}, {"4", "0"}, {"3", "2"}, {"1", "2"}}

// trapezoidText writes the trapezoid one point a line, its two numbers
// and any third joined by sep.
func trapezoidText(sep string, z ...string) string {
	var b strings.Builder
	for k, p := range trapezoid {
		b.WriteString(p[0] + sep + p[1])
		if k < len(z) {
			b.WriteString(sep + z[k])
		}
		b.WriteString("\n")
	}
	return b.String()
}

// TestReadPointsHeads: a title, a header of column names (with units that
// agree with the caller's), three columns of constant z, and semicolons
// or tabs between the numbers are read, and each reads the trapezoid of
// area 6 that the bare file gives; planar.Area (orb, an outside library)
// measures it.
func TestReadPointsHeads(t *testing.T) {
	for _, c := range []struct {
		name, text  string
		unit        float64
		title, told string // the title and the unit ReadPointFile reports
	}{
		{"bare", trapezoidText(" "), 0, "", ""},
		{"title", "Diffuser section B\n" + trapezoidText(" "), 0, "Diffuser section B", ""},
		{"quoted title of a spreadsheet", "\"Diffuser, section B\",,\n" + trapezoidText(","), 0, "Diffuser, section B", ""},
		{"comment, then a title", "# exported 3 May\n\nDuct 2\n" + trapezoidText(" "), 0, "Duct 2", ""},
		{"header", "x y\n" + trapezoidText(" "), 0, "", ""},
		{"header in capitals with commas", "X,Y\n" + trapezoidText(","), 0, "", ""},
		{"title and header", "Duct 2\nx_coord;y_coord\n" + trapezoidText(";"), 0, "Duct 2", ""},
		{"header with units, tab separated", "X [m]\tY [m]\n" + trapezoidText("\t"), 1, "", "m"},
		{"header with units in parentheses", "x(mm) y(mm)\n" + trapezoidText(" "), 1e-3, "", "mm"},
		{"inches", "x [in], y [in]\n" + trapezoidText(", "), 0.0254, "", "in"},
		{"plain numbers", "x/c [-] y/c [-]\n" + trapezoidText(" "), 0, "", ""},
		{"unit in the title", "Vane [cm]\n" + trapezoidText(" "), 0.01, "Vane [cm]", "cm"},
		{"constant z", "x,y,z\n" + trapezoidText(",", "5", "5.0", "5", "5e0"), 0, "", ""},
		{"zero z, negative zero", trapezoidText(" ", "0", "-0", "0", "0.000"), 0, "", ""},
		{"semicolons", trapezoidText(";"), 0, "", ""},
		{"a byte-order mark before the title", "\ufeffDuct 2\n" + trapezoidText(" "), 0, "Duct 2", ""},
	} {
		f, err := ReadPointFile(strings.NewReader(c.text), PointOptions{Close: true, Unit: c.unit})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if f.Title != c.title || f.Unit != c.told || !f.Closed {
			t.Errorf("%s: title %q unit %q closed %v, want %q %q true", c.name, f.Title, f.Unit, f.Closed, c.title, c.told)
		}
		pts := f.Polyline.Vertices()
		if a := math.Abs(planar.Area(orb.Ring(pts))); len(pts) != 5 || math.Abs(a-6) > 1e-15 {
			t.Errorf("%s: %d points, area %g, want the trapezoid's 5 (closed) and 6", c.name, len(pts), a)
		}
	}
}

// TestReadPointsRefusals: what the reader does not take, each refused at
// its line and column with the reason and what would be valid.
func TestReadPointsRefusals(t *testing.T) {
	for _, c := range []struct {
		name, text string
		unit       float64
		says       []string
		isUnit     bool // the error is an ErrUnit
	}{
		{"varying z", "x y z\n0 0 1\n4 0 1\n3 2 1.5\n1 2 1\n", 0,
			[]string{"line 4, column 5: z = 1.5 differs from z = 1 on line 2", "must be the same on every line"}, false},
		{"decimal commas and semicolons", "0;0\n4;0\n3,5;2\n", 0,
			[]string{"line 3, column 2: \"3,5;2\" looks written with decimal commas, which are not read: write decimal points (0.5, not 0,5)"}, false},
		{"decimal commas and spaces", "0,5 1,25\n", 0, []string{"line 1, column 2: \"0,5 1,25\" looks written with decimal commas"}, false},
		{"a decimal comma in a third column", "0 0\n1 0,5\n", 0,
			[]string{"line 2, column 4:", "decimal commas"}, false},
		{"text among the points", "Duct\n0 0\n4 0\nvane\n3 2\n", 0,
			[]string{`line 4, column 1: "vane" is not a finite number (a title and a header of column names come only before the first point, on line 2)`}, false},
		{"two titles", "Duct\nRevision B\n0 0\n", 0,
			[]string{`line 2, column 1: "Revision B" is not a point, and comes after the title on line 1`}, false},
		{"a line after the header", "x y\nz w\n0 0\n", 0, []string{`line 2, column 1: "z w" is not a point, and comes after the header on line 1`}, false},
		{"a point with a typo first", "O 0\n4 0\n3 2\n", 0,
			[]string{`line 1, column 1: "O 0" is not a point, nor a title (which holds a word of two letters or more), nor a header of column names`}, false},
		{"header of two, points of three", "x y\n0 0 0\n", 0, []string{`line 2: expected two numbers "x y" as the header on line 1 names, found 3 fields`}, false},
		{"three columns, then two", "0 0 0\n4 0 0\n3 2\n", 0, []string{`line 3: expected three numbers "x y z" as on line 1, found 2 fields`}, false},
		{"four fields", "0 0 0 0\n", 0, []string{`line 1: expected two numbers "x y" or three "x y z", found 4 fields`}, false},
		{"a unit cvdeck does not read", "x [ft] y [ft]\n0 0\n", 1, []string{`line 1, column 4: the header gives the unit "ft", which is not one cvdeck reads (m, mm, cm, in`}, false},
		{"two units", "x [mm] y [m]\n0 0\n", 1, []string{`line 1, column 11: the unit "m" differs from "mm" on line 1, column 4`}, false},
		{"millimetres read as metres", "X [mm]\tY [mm]\n" + trapezoidText("\t"), 1,
			[]string{"line 1, column 4: the file gives its coordinates in mm (0.001 m), but they are being read at 1 m to the unit, which would make the outline 1000 times too large:"}, true},
		{"inches read as millimetres", "x [in] y [in]\n" + trapezoidText(" "), 1e-3,
			[]string{"line 1, column 4: the file gives its coordinates in in (0.0254 m)", "25.4 times too small"}, true},
		{"a unit the caller cannot check", "x [m] y [m]\n" + trapezoidText(" "), 0,
			[]string{`line 1, column 4: the file gives its coordinates in m`, `remove "m" from the file`}, true},
	} {
		_, err := ReadPointFile(strings.NewReader(c.text), PointOptions{Close: true, Unit: c.unit})
		if !errors.Is(err, ErrFormat) || errors.Is(err, ErrUnit) != c.isUnit {
			t.Errorf("%s: got %v", c.name, err)
			continue
		}
		for _, s := range c.says {
			if !strings.Contains(err.Error(), s) || strings.Contains(err.Error(), "\n") {
				t.Errorf("%s: error %q does not say %q", c.name, err, s)
			}
		}
	}
}

// readPoints reads a point file with ReadPointFile, with no unit to check
// a header's against, and returns its polyline and whether it is closed.
func readPoints(r io.Reader, a Attr, close bool) (*Polyline, bool, error) {
	f, err := ReadPointFile(r, PointOptions{Attr: a, Close: close})
	if err != nil {
		return nil, false, err
	}
	return f.Polyline, f.Closed, nil
}

// TestReadPointsSpreadsheetForms: what a spreadsheet writes. A z that
// differs from the first by round-off (1e-17 beside coordinates of 1) is
// the same plane; an empty field, quoted numbers and a leading column
// that counts the points are refused, each saying so.
func TestReadPointsSpreadsheetForms(t *testing.T) {
	square := "0 0 0\n1 0 1e-17\n1 1 0\n0 1 -1e-17\n"
	f, err := ReadPointFile(strings.NewReader(square), PointOptions{Close: true})
	if err != nil || len(f.Polyline.Vertices()) != 5 {
		t.Errorf("z within round-off: got %v", err)
	}
	for _, c := range []struct{ name, text, says string }{
		{"an empty field", "x,y\n0,0\n1,,0\n1,1\n", "line 3, column 3: an empty field between two separators"},
		{"quoted numbers", "x,y\n\"0\",\"0\"\n", "quotation marks are not read"},
		{"a point-number column", "Point,X,Y\n1,0,0\n2,1,0\n3,1,0.5\n", "the first column counts the points (1, 2, 3, ...): leave it out"},
	} {
		_, err := ReadPointFile(strings.NewReader(c.text), PointOptions{Close: true})
		if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%s: got %v, want an error saying %q", c.name, err, c.says)
		}
	}
}
