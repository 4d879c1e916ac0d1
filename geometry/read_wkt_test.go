package geometry

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkt"
)

// The grammar facts tested here are from OGC 06-103r4, Simple Feature
// Access Part 1 (1.2.1) §7.2.1 / ISO 19125-1, quoted from memory: a
// polygon is "(" ring {"," ring} ")", a ring "(" point {"," point} ")", a
// point two numbers separated by white space, keywords case-insensitive.

// TestWKTSyntaxErrors: every syntax error names the line and column of
// the offending token, what was expected and what was found.
func TestWKTSyntaxErrors(t *testing.T) {
	for _, c := range []struct {
		text string
		says []string
	}{
		// A missing comma: the fourth point's x is read as a third
		// coordinate; a number after it says which.
		{"POLYGON ((0 0, 10 0, 10 10 0 10, 0 0))", []string{"line 1, column 28: ", `expected ',' or ')' after the point (10 10), found "0" (is a ',' missing between two points?)`}},
		// A third coordinate without Z (OGC 06-103r4 §7.2.1: a 3D point
		// is written after the keyword Z).
		{"POLYGON ((0 0 1, 4 0 1, 4 2 1, 0 2 1, 0 0 1))", []string{"line 1, column 15: ", `after the point (0 0), found "1" (cvdeck reads points as x y pairs; points with a third coordinate z need the keyword Z, as in POLYGON Z`}},
		// Unclosed: the end of the text is placed after the last character, not on the newline.
		{"POLYGON ((0 0, 10 0, 10 10, 0 10, 0 0)\n", []string{"line 1, column 39: ", "or ')' closing the '(' at line 1, column 9, found the end of the text"}},
		{"POLYGN ((0 0, 10 0, 10 10, 0 10, 0 0))", []string{"line 1, column 1: ", `expected POLYGON, MULTIPOLYGON or GEOMETRYCOLLECTION, found "POLYGN"`}},
		{"POLYGON ((0 0, 10 0, 10, 0 10, 0 0))", []string{"line 1, column 24: ", `expected the y coordinate after x = 10, found ","`}},
		{"POLYGON ((0 0, 1o 0, 1 1, 0 0))", []string{"line 1, column 16: ", `expected a point "x y" (a number such as`, `found "1o"`}},
		{"POLYGON ((0 0, 1e999 0, 1 1, 0 0))", []string{"line 1, column 16: ", "a coordinate must lie within ±1.8e+308", `found "1e999"`}},
		{"POLYGON (0 0, 1 0, 1 1, 0 0)", []string{"line 1, column 10: ", `expected '(' opening a ring of points "x y, x y, ...", found "0"`}},
		{"POLYGON ((0 0, 1 0, 1 1, 0 0),)", []string{"line 1, column 31: ", `found ")"`}},
		{"POLYGON M ((0 0 0, 1 0 0, 1 1 0, 0 0 0))", []string{"line 1, column 9: ", "POLYGON M gives each point a measure, which is not a coordinate", `found "M"`}},
		{"multipolygon zm EMPTY", []string{"line 1, column 14: ", "MULTIPOLYGON ZM gives each point a measure", `found "zm"`}},
		{"POLYGON Z ((0 0 0, 1 0, 1 1 0, 0 0 0))", []string{"line 1, column 23: ", `expected the z coordinate after x y = 1 0 (a point after Z has three coordinates), found ","`}},
		{"POLYGON Z ((0 0 0 1, 1 0 0 1, 1 1 0 1, 0 0 0 1))", []string{"line 1, column 19: ", `after the point (0 0 0), found "1" (a point after Z has three coordinates`}},
		{"POLYGON ((0 0, 1 0, 1 1, 0 0)) POLYGON ((5 5, 6 5, 6 6, 5 5))", []string{"line 1, column 32: ", "expected the end of the text after the geometry", `found "POLYGON"`}},
		{"", []string{"line 1, column 1: ", "found the end of the text"}},
		// Several lines, tabs and a Windows line end: columns count characters from 1 on each line.
		{"MULTIPOLYGON (\r\n\t((0 0, 4 0, 4 4, 0 0)),\r\n\t((5 5, 6 5, 6 6; 5 5))\r\n)", []string{"line 3, column 16: ", `expected the y coordinate after x = 6`, `found "6;"`}},
		{"MULTIPOLYGON (((0 0, 1 0, 1 1, 0 0)) ((5 5, 6 5, 6 6, 5 5)))", []string{"line 1, column 38: ", "expected ',' and another polygon, or ')' closing the '(' at line 1, column 14", `found "("`}},
		{"GEOMETRYCOLLECTION (POLYGON ((0 0, 1 0, 1 1, 0 0)), CIRCLE (0 0 1))", []string{"line 1, column 53: ", `found "CIRCLE"`}},
		{"\ufeffPOLYGON ((0 0 1 0, 1 1, 0 0))", []string{"line 1, column 15: ", `found "1"`}},
		{strings.Repeat("GEOMETRYCOLLECTION (", 40), []string{"line 1, column 641: ", "geometry collections nest at most 32 deep"}},
	} {
		_, err := ReadWKT(c.text, PolygonTags{})
		if !errors.Is(err, ErrFormat) {
			t.Errorf("%q: got %v, want a format error", c.text, err)
			continue
		}
		for _, s := range c.says {
			if !strings.Contains(err.Error(), s) || strings.Contains(err.Error(), "\n") {
				t.Errorf("%q: error %q does not say %q", c.text, err, s)
			}
		}
		if !strings.HasPrefix(err.Error(), c.says[0]) {
			t.Errorf("%q: error %q does not start with the position %q", c.text, err, c.says[0])
		}
	}
}

// TestWKTZ: OGC 06-103r4 §7.2.1 writes points of three coordinates after
// the keyword Z. A z the same at every point is the plane of a drawing
// and is read (the 4 × 2 rectangle less its 1 × 1 hole keeps its area 7,
// worked by hand; the two squares of the MULTIPOLYGON Z theirs, 1 and
// 4); a z that varies, within a ring or between polygons, is refused at
// its token, naming the vertex and where the first z was.
func TestWKTZ(t *testing.T) {
	outs, err := ReadWKT("POLYGON Z ((0 0 7.5, 4 0 7.5, 4 2 7.5, 0 2 7.5, 0 0 7.5), (1 0.5 7.5, 1 1.5 7.5, 2 1.5 7.5, 2 0.5 7.5, 1 0.5 7.5))", PolygonTags{})
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, outs[0]); math.Abs(a-7) > 1e-12 {
		t.Errorf("POLYGON Z area %g, want 7", a)
	}
	outs, err = ReadWKT("GEOMETRYCOLLECTION Z (MULTIPOLYGON Z (((0 0 1, 1 0 1, 1 1 1, 0 1 1, 0 0 1)), ((5 5 1, 7 5 1, 7 7 1, 5 7 1, 5 5 1))))", PolygonTags{})
	if err != nil || len(outs) != 2 {
		t.Fatalf("MULTIPOLYGON Z: %d outlines, %v", len(outs), err)
	}
	for i, want := range []float64{1, 4} {
		if a := outlineArea(t, outs[i]); math.Abs(a-want) > 1e-12 {
			t.Errorf("MULTIPOLYGON Z polygon %d area %g, want %g", i, a, want)
		}
	}
	for _, c := range []struct{ text, says string }{
		{"POLYGON Z ((0 0 1, 4 0 1, 4 2 3, 0 2 1, 0 0 1))", "line 1, column 31: polygon 0 ring 0 vertex 2: z = 3 differs from z = 1 at line 1, column 17; cvdeck reads a plane drawing"},
		{"MULTIPOLYGON Z (((0 0 1, 1 0 1, 1 1 1, 0 0 1)),\n ((5 5 2, 6 5 2, 6 6 2, 5 5 2)))", "line 2, column 8: polygon 1 ring 0 vertex 0: z = 2 differs from z = 1 at line 1, column 23"},
	} {
		if _, err := ReadWKT(c.text, PolygonTags{}); !errors.Is(err, ErrFormat) || !strings.HasPrefix(err.Error(), c.says) {
			t.Errorf("%q: got %v, want %q", c.text, err, c.says)
		}
	}
}

// TestWKTNonFinite: NaN and infinities, which strconv.ParseFloat reads
// as numbers, are refused at their own token, naming the vertex they
// belong to (counted from 0 in text order, as ReadWKT numbers a ring's
// vertices and EdgeTag its edges):
// in "0 0, NaN 0" the NaN is vertex 1, at column 16.
func TestWKTNonFinite(t *testing.T) {
	for _, c := range []struct{ text, says string }{
		{"POLYGON ((0 0, NaN 0, 4 2, 0 2, 0 0))", `line 1, column 16: polygon 0 ring 0 vertex 1: a coordinate must be a finite number, found "NaN"`},
		{"POLYGON ((0 0, 4 0, 4 2, 0 2, 0 0), (1 1, 2 1, 2 -Inf, 1 1))", `line 1, column 50: polygon 0 ring 1 vertex 2: a coordinate must be a finite number, found "-Inf"`},
		{"MULTIPOLYGON (((0 0, 1 0, 1 1, 0 0)),\n((5 5, 6 5, 6 6, 5 +Infinity)))", `line 2, column 20: polygon 1 ring 0 vertex 3: a coordinate must be a finite number, found "+Infinity"`},
	} {
		if _, err := ReadWKT(c.text, PolygonTags{}); !errors.Is(err, ErrFormat) || !strings.HasPrefix(err.Error(), c.says) {
			t.Errorf("%q: got %v, want %q", c.text, err, c.says)
		}
	}
}

// TestWKTOtherErrors: geometries that bound no area and rings that are
// not closed are located too.
func TestWKTOtherErrors(t *testing.T) {
	for _, c := range []struct{ text, says string }{
		{"LINESTRING (0 0, 1 1)", "line 1, column 1: WKT: a LineString bounds no area; give a POLYGON or MULTIPOLYGON"},
		{"GEOMETRYCOLLECTION (\n  POLYGON ((0 0, 1 0, 1 1, 0 0)),\n  point (3 3))", "line 3, column 3: WKT: a Point bounds no area"},
		{"MULTIPOLYGON (((0 0, 1 0, 1 1, 0 0)),\n  ((5 5, 6 5, 6 6, 5 6)))", "line 2, column 3: WKT polygon 1 ring 0: a ring must be closed"},
		{"GEOMETRYCOLLECTION EMPTY", "WKT: no polygon found"},
		{"POLYGON EMPTY", "line 1, column 9: WKT polygon 0 has no rings"},
	} {
		_, err := ReadWKT(c.text, PolygonTags{})
		if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%q: got %v, want %q", c.text, err, c.says)
		}
	}
}

// orbPolygons reads text with orb's encoding/wkt, which ReadWKT used
// before it had its own parser, keeping only polygons; ok is false when
// orb rejects the text or finds a geometry that bounds no area.
func orbPolygons(text string) (polys []orb.Polygon, ok bool) {
	g, err := wkt.Unmarshal(strings.TrimSpace(text))
	if err != nil {
		return nil, false
	}
	var collect func(g orb.Geometry) bool
	collect = func(g orb.Geometry) bool {
		switch v := g.(type) {
		case orb.Polygon:
			polys = append(polys, v)
		case orb.MultiPolygon:
			polys = append(polys, v...)
		case orb.Collection:
			for _, m := range v {
				if !collect(m) {
					return false
				}
			}
		default:
			return false
		}
		return true
	}
	return polys, collect(g)
}

// samePolygons compares polygon lists coordinate by coordinate, NaNs
// equal to NaNs, an empty polygon equal to a nil one.
func samePolygons(a, b []orb.Polygon) error {
	if len(a) != len(b) {
		return fmt.Errorf("%d polygons, want %d", len(a), len(b))
	}
	for i := range a {
		if len(a[i]) != len(b[i]) {
			return fmt.Errorf("polygon %d: %d rings, want %d", i, len(a[i]), len(b[i]))
		}
		for r := range a[i] {
			if len(a[i][r]) != len(b[i][r]) {
				return fmt.Errorf("polygon %d ring %d: %d points, want %d", i, r, len(a[i][r]), len(b[i][r]))
			}
			for k, p := range a[i][r] {
				q := b[i][r][k]
				for d := range 2 {
					if p[d] != q[d] && !(math.IsNaN(p[d]) && math.IsNaN(q[d])) {
						return fmt.Errorf("polygon %d ring %d point %d: %v, want %v", i, r, k, p, q)
					}
				}
			}
		}
	}
	return nil
}

// wktOrbQuirk reports whether text uses one of the two forms orb's
// splitting accepted by accident and ReadWKT's parser, following the
// grammar, refuses: a run of commas between points read as one comma, and
// '|' beside the commas between rings or polygons (orb's pattern
// [\s|\t] lists it as white space).
func wktOrbQuirk(text string) bool {
	var prev byte
	for i := 0; i < len(text); i++ {
		c := text[i]
		if c == '|' || (c == ',' && prev == ',') {
			return true
		}
		if !isWKTSpace(c) {
			prev = c
		}
	}
	return false
}

// TestWKTAcceptsWhatOrbAccepted: every form the orb-based reader took is
// read the same, point for point; and the forms it refused only for
// white space are now taken.
func TestWKTAcceptsWhatOrbAccepted(t *testing.T) {
	before := []string{
		"POLYGON ((0 0, 3 0, 3 2, 0 2, 0 0), (1 0.5, 1 1.5, 2 1.5, 2 0.5, 1 0.5))",
		"polygon((0 0,1 0,1 1,0 0))",
		"Polygon ( ( 0 0 , 1 0 , 1 1 , 0 0 ) )",
		"\n\tPOLYGON ((0 0,\n\t1 0,\n\t1 1,\n\t0 0))\n\n",
		"\u00a0\fPOLYGON ((0 0, 1 0, 1 1, 0 0))\v\u2003", // Unicode white space around it, trimmed before orb parsed
		"POLYGON ((-1.5e2 +0.25, .5 0, 1. 1E1, -1.5e2 +0.25))",
		"POLYGON ((0x1p-2 0, 1 0, 1 1, 0x1p-2 0))", // strconv's hexadecimal floats
		"POLYGON ((0 0, Inf 0, 1 1, 0 0))",         // read, then refused as not finite
		"MULTIPOLYGON (((0 0, 1 0, 1 1, 0 0)), ((5 5, 7 5, 7 7, 5 7, 5 5), (6 6, 6.5 6, 6.5 6.5, 6 6)))",
		"MULTIPOLYGON(((0 0,1 0,1 1,0 0)),((5 5,7 5,7 7,5 5)))",
		"GEOMETRYCOLLECTION (POLYGON ((0 0, 1 0, 1 1, 0 0)), MULTIPOLYGON (((5 5, 7 5, 7 7, 5 5))))",
		"GEOMETRYCOLLECTION (GEOMETRYCOLLECTION (POLYGON ((0 0, 1 0, 1 1, 0 0))), POLYGON EMPTY)",
		"GEOMETRYCOLLECTION (MULTIPOLYGON EMPTY, POLYGON ((0 0, 1 0, 1 1, 0 0)))",
		"POLYGON EMPTY", "MULTIPOLYGON EMPTY", "GEOMETRYCOLLECTION EMPTY", "geometrycollection empty",
		"POLYGON ((0 0, 1 0, 1 1, 0 1))", // read, then refused as an open ring
	}
	for _, text := range before {
		want, ok := orbPolygons(text)
		if !ok {
			t.Fatalf("%q: orb refuses it; the list is of texts it read", text)
		}
		got, _, err := parseWKT(text)
		if err != nil {
			t.Errorf("%q: %v", text, err)
			continue
		}
		if err := samePolygons(got, want); err != nil {
			t.Errorf("%q: %v", text, err)
		}
	}
	// Refused by orb for their white space only; the grammar allows any.
	square := []orb.Polygon{{{{0, 0}, {1, 0}, {1, 1}, {0, 0}}}}
	for _, text := range []string{
		"POLYGON ((0  0, 1\t0, 1\n1, 0 0))",
		"POLYGON ((0 0,\r\n 1 0,\r\n 1 1,\r\n 0 0))\r\n",
		"POLYGON  EMPTY",
		"\ufeffPOLYGON ((0 0, 1 0, 1 1, 0 0))",
	} {
		want := square
		if strings.Contains(text, "EMPTY") {
			want = []orb.Polygon{{}}
		}
		outs, err := ReadWKT(text, PolygonTags{})
		if strings.Contains(text, "EMPTY") {
			if err == nil || !strings.Contains(err.Error(), "has no rings") {
				t.Errorf("%q: got %v, want the empty polygon refused as having no rings", text, err)
			}
		} else if err != nil || len(outs) != 1 {
			t.Errorf("%q: %v", text, err)
		}
		got, _, err := parseWKT(strings.TrimPrefix(text, "\ufeff"))
		if err != nil {
			t.Errorf("%q: %v", text, err)
		} else if err := samePolygons(got, want); err != nil {
			t.Errorf("%q: %v", text, err)
		}
	}
	// The two accidents of orb's splitting, refused with a position.
	for _, c := range []struct{ text, says string }{
		{"POLYGON ((0 0,, 1 0, 1 1, 0 0))", `line 1, column 15: expected a point "x y", found ","`},
		{"POLYGON ((0 0, 4 0, 4 4, 0 0) |,| (1 1, 2 1, 2 2, 1 1))", `line 1, column 31: expected ',' and another ring`},
	} {
		if _, ok := orbPolygons(c.text); !ok || !wktOrbQuirk(c.text) {
			t.Errorf("%q: orb no longer reads it, or wktOrbQuirk misses it", c.text)
		}
		if _, err := ReadWKT(c.text, PolygonTags{}); err == nil || !strings.HasPrefix(err.Error(), c.says) {
			t.Errorf("%q: got %v, want %q", c.text, err, c.says)
		}
	}
}

func TestTextPosition(t *testing.T) {
	text := "ab\r\nxé\tz"
	for _, c := range []struct{ off, line, col int }{
		{0, 1, 1}, {2, 1, 3}, {4, 2, 1}, {5, 2, 2}, {7, 2, 3}, {8, 2, 4}, {len(text), 2, 5},
	} {
		if l, col := textPosition(text, c.off); l != c.line || col != c.col {
			t.Errorf("offset %d: line %d column %d, want %d %d", c.off, l, col, c.line, c.col)
		}
	}
}

// FuzzReadWKT: no text makes the reader panic; every text orb's reader
// took (but for wktOrbQuirk) gives the same polygons; every error is one
// line that starts with a position or says "WKT"; every outline returned
// passes validation.
func FuzzReadWKT(f *testing.F) {
	for _, s := range []string{
		"POLYGON ((0 0, 3 0, 3 2, 0 2, 0 0), (1 0.5, 1 1.5, 2 1.5, 2 0.5, 1 0.5))",
		"MULTIPOLYGON (((0 0, 1 0, 1 1, 0 0)), ((5 5, 7 5, 7 7, 5 7, 5 5)))",
		"GEOMETRYCOLLECTION (POLYGON ((0 0, 1 0, 1 1, 0 0)), POLYGON EMPTY, POINT (1 2))",
		"POLYGON ((0 0, 10 0, 10 10 0 10, 0 0))", "POLYGON ((0 0, 10 0, 10 10, 0 10, 0 0)",
		"polygon((0 0,1 0,1 1,0 0))", "POLYGON ((0 0,\r\n1 0, 1 1, 0 0))",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		if want, ok := orbPolygons(text); ok && !wktOrbQuirk(text) {
			got, _, err := parseWKT(text)
			if err != nil {
				t.Fatalf("orb read %q, parseWKT refuses it: %v", text, err)
			}
			if err := samePolygons(got, want); err != nil {
				t.Fatalf("%q: %v", text, err)
			}
		}
		outs, err := ReadWKT(text, PolygonTags{})
		if err != nil {
			msg := err.Error()
			if strings.Contains(msg, "\n") || !(strings.HasPrefix(msg, "line ") || strings.HasPrefix(msg, "WKT")) {
				t.Fatalf("%q: error %q is not one located line", text, msg)
			}
			return
		}
		for _, o := range outs {
			if err := o.Validate(); err != nil {
				t.Fatalf("returned outline fails validation: %v", err)
			}
		}
	})
}
