package geometry

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// tagLengths sums the length of an outline's segments by tag.
func tagLengths(o Outline) map[string]float64 {
	m := map[string]float64{}
	for _, l := range o.Loops() {
		for _, s := range l.Segments {
			m[s.Attr().Tag] += s.Length()
		}
	}
	return m
}

// A stepped duct drawn as separate strokes, in the way a drawing program
// saves them: an inlet line, a bottom wall polyline, an outlet path and a
// top wall path drawn against the others' direction, the walls sharing
// the data-tag "wall", and a square hole drawn closed. The duct is the
// hexagon (0, 0) (300, 0) (300, 100) (100, 100) (100, 60) (0, 60),
// whose shoelace area is 300 × 100 − 100 × 40 = 26 000, less the hole's
// 20 × 20 = 400 (worked by hand).
const steppedDuct = `<?xml version="1.0" encoding="UTF-8"?>
<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 300 100">
  <line id="inlet" x1="0" y1="60" x2="0" y2="0" stroke="black"/>
  <polyline id="floor" data-tag="wall" points="0,0 300,0" fill="none"/>
  <g transform="translate(300 0)"><path id="outlet" d="m 0 0 v 100"/></g>
  <path id="roof" data-tag="wall" d="M 0 60 H 100 V 100 H 300" fill="none"/>
  <rect id="hole" x="200" y="20" width="20" height="20"/>
</svg>`

// TestReadSVGDocumentStrokes: open elements whose ends meet make one loop,
// each element's data-tag (or id) tagging its edges; open is as SVG 1.1
// §8.3 has it (from memory): a subpath is closed only by closepath (Z or
// z, §8.3.3), so a line, a polyline (§9.5, §9.6) and a path without Z are
// open. The area is the shoelace area worked above; the lengths by tag
// are the sides of the hexagon.
func TestReadSVGDocumentStrokes(t *testing.T) {
	o, err := ReadSVGDocument(strings.NewReader(steppedDuct), SVGOptions{Scale: 1e-3, FlipY: true})
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, o); math.Abs(a-(26000-400)*1e-6) > 1e-14 {
		t.Errorf("area %.17g m², want 0.0256", a)
	}
	want := map[string]float64{"inlet": 0.06, "wall": 0.3 + 0.1 + 0.04 + 0.2, "outlet": 0.1, "hole": 0.08}
	got := tagLengths(o)
	for tag, l := range want {
		if math.Abs(got[tag]-l) > 1e-12 {
			t.Errorf("tag %q: length %g, want %g", tag, got[tag], l)
		}
	}
	if len(got) != len(want) {
		t.Errorf("tags %v, want %v", got, want)
	}
	// A loop's tag given by the caller covers all its pieces, as it does a
	// closed shape's id.
	o, err = ReadSVGDocument(strings.NewReader(steppedDuct), SVGOptions{Tags: []string{"duct"}})
	if err != nil {
		t.Fatal(err)
	}
	if got := tagLengths(o); len(got) != 2 || got["duct"] != 60+300+100+100+40+200 {
		t.Errorf("tags %v, want duct 800 and hole 80", got)
	}
}

// TestReadSVGPathOpenSubpaths: in bare path data, each moveto starts a new
// subpath (SVG 1.1 §8.3.2, from memory), so "M 0 0 L 10 0 M 10 0 ..." is
// three open subpaths; their ends meet and they make the square of area
// 100. One that ends a hair from the next one's start (3e-5 of the
// drawing's 14.1 size, within JoinTolerance) joins it too.
func TestReadSVGPathOpenSubpaths(t *testing.T) {
	for _, d := range []string{
		"M 0 0 L 10 0 M 10 0 L 10 10 L 0 10 M 0 10 L 0 0",
		"M 0 10 L 0 0 M 10 10 L 0 10 M 10 0 L 10 10 M 0 0 H 10",
		"M 0 0 L 10 0 M 10 0.00001 V 10 H 0 V 0",
	} {
		o, err := ReadSVGPath(d, SVGOptions{})
		if err != nil {
			t.Errorf("%s: %v", d, err)
			continue
		}
		if a := outlineArea(t, o); math.Abs(a-100) > 1e-3 {
			t.Errorf("%s: area %g, want 100", d, a)
		}
		if len(o.Inner) != 0 || len(tagLengths(o)) != 1 || o.Outer.Segments[0].Attr().Tag != "outer" {
			t.Errorf("%s: want one loop tagged outer, got %v", d, tagLengths(o))
		}
	}
}

// TestReadSVGDocumentStrokeRefusals: strokes that do not close, that
// branch, or that leave one piece of a tagged loop untagged, are refused
// with the elements, their lines and the points named.
func TestReadSVGDocumentStrokeRefusals(t *testing.T) {
	doc := func(body string) string { return `<svg xmlns="http://www.w3.org/2000/svg">` + "\n" + body + "\n</svg>" }
	for _, c := range []struct{ name, doc, says string }{
		{"a gap", doc(`<line id="inlet" x1="0" y1="60" x2="0" y2="0"/>
<polyline id="floor" points="0,0 300,0 300,100 100,100 100,60 2,60"/>`),
			`the pieces SVG line element 0 (line 2, id "inlet") and SVG polyline element 1 (line 3, id "floor") join into an open chain that starts at (0, 60) (the start of SVG line element 0 (line 2, id "inlet")) and ends at (2, 60) (the end of SVG polyline element 1 (line 3, id "floor")), a gap of 2`},
		{"one open path", doc(`<path id="p" d="M 0 0 L 1 0 L 1 1"/>`),
			`SVG path element 0 (line 2, id "p") is open: it starts at (0, 0) and ends at (1, 1), a gap of 1.41`},
		{"one subpath of a path", doc(`<path id="p" d="M 5 5 h 1 v 1 h -1 z M 0 0 L 10 0 L 10 10"/>`),
			`SVG path element 0 (line 2, id "p"): subpath from command 5 is open: it starts at (0, 0) and ends at (10, 10)`},
		{"a branch", doc(`<polyline id="u" points="0,10 0,0 10,0 10,10"/>
<line id="lid" x1="0" y1="10" x2="10" y2="10"/>
<line id="strut" x1="10" y1="10" x2="20" y2="20"/>`),
			`3 ends meet at (10, 10): the end of SVG polyline element 0 (line 2, id "u"), the end of SVG line element 1 (line 3, id "lid") and the start of SVG line element 2 (line 4, id "strut")`},
		{"an untagged piece", doc(`<polyline id="u" points="0,10 0,0 10,0 10,10"/>
<line x1="0" y1="10" x2="10" y2="10"/>`),
			`SVG line element 1 (line 3) has no data-tag or id, while the other pieces of its loop are tagged "u": give it a data-tag or an id (as it stands its edges would take the loop's default tag "outer")`},
		{"an empty data-tag", doc(`<line id="a" data-tag=" " x1="0" y1="0" x2="1" y2="0"/>`),
			`SVG line element (line 2, id "a"): data-tag is empty`},
		{"a polyline without points", doc(`<polyline id="a"/>`), `SVG polyline element 0 (line 2, id "a"): polyline has no points attribute`},
	} {
		_, err := ReadSVGDocument(strings.NewReader(c.doc), SVGOptions{})
		if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), c.says) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: got %v, want %q", c.name, err, c.says)
		}
	}
}

// TestReadSVGDocumentStrokesTransformed: ends meet where the document
// draws them, after the transforms (SVG 1.1 §7.6): a side drawn from
// (0, 0) to (0, 50) inside a group translated by (100, 0) closes the
// polyline (100, 50) (0, 50) (0, 0) (100, 0), the 100 × 50 rectangle of
// area 5000.
func TestReadSVGDocumentStrokesTransformed(t *testing.T) {
	doc := `<svg xmlns="http://www.w3.org/2000/svg">
  <g transform="translate(100, 0)"><line id="outlet" x2="0" y2="50"/></g>
  <polyline id="walls" points="100,50 0,50 0,0 100,0"/>
</svg>`
	o, err := ReadSVGDocument(strings.NewReader(doc), SVGOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, o); math.Abs(a-5000) > 1e-9 {
		t.Errorf("area %g, want 5000", a)
	}
	var corners []orb.Point
	for _, s := range o.Outer.Segments {
		if s.Attr().Tag == "outlet" {
			corners = append(corners, s.At(0), s.At(1))
		}
	}
	if len(corners) != 2 || corners[0][0] != 100 || corners[1][0] != 100 {
		t.Errorf("outlet runs %v, want along x = 100", corners)
	}
}

// TestReadSVGGroupTags: a group's data-tag tags the elements inside it
// that have none of their own, before their ids (a drawing program names
// every path itself, path101, ...), and an element's own data-tag wins
// over its group's. The 100 × 50 box has walls of 100 + 100 and ends of
// 50 + 50 (elementary geometry).
func TestReadSVGGroupTags(t *testing.T) {
	const doc = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 50">
  <g id="layer1" data-tag="wall">
    <path id="path101" d="M 0,0 L 100,0"/>
    <g id="sub"><path id="path102" d="M 100,50 L 0,50"/></g>
    <path id="path103" data-tag="outlet" d="M 100,0 L 100,50"/>
  </g>
  <path id="inlet" d="M 0,50 L 0,0"/>
</svg>`
	o, err := ReadSVGDocument(strings.NewReader(doc), SVGOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]float64{"wall": 200, "outlet": 50, "inlet": 50}
	got := tagLengths(o)
	if len(got) != len(want) {
		t.Errorf("tags %v, want %v", got, want)
	}
	for tag, l := range want {
		if math.Abs(got[tag]-l) > 1e-12 {
			t.Errorf("tag %q: length %g, want %g", tag, got[tag], l)
		}
	}
}

// TestReadSVGUseRefused: a use element draws a copy of another (SVG 1.1
// §5.6, from memory); the copy is refused, naming it, rather than lost.
func TestReadSVGUseRefused(t *testing.T) {
	const doc = `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" viewBox="0 0 100 50">
  <rect id="box" x="0" y="0" width="100" height="50"/>
  <defs><circle id="hole" cx="0" cy="0" r="5"/></defs>
  <use xlink:href="#hole" x="30" y="25"/>
</svg>`
	_, err := ReadSVGDocument(strings.NewReader(doc), SVGOptions{})
	if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), `SVG use element (line 4) draws a copy of "#hole"`) {
		t.Errorf("got %v, want the use element refused", err)
	}
}

// TestReadSVGHiddenNotRead: elements a viewer does not show are not read
// (SVG 1.1 §11.5: display none takes the element and everything inside
// out of rendering; visibility is inherited, hidden or collapse hides an
// element, a child may set visible again; a style declaration overrides
// the presentation attribute, §6.4). The drawing is a 100 × 50 box, area
// 5000, with one visible hole of 10 × 10 among hidden ones.
func TestReadSVGHiddenNotRead(t *testing.T) {
	const doc = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 50">
  <rect id="box" x="0" y="0" width="100" height="50"/>
  <rect id="off" x="5" y="5" width="4" height="4" display="none"/>
  <g style="fill:none; display : None">
    <rect id="layer" x="20" y="5" width="4" height="4"/>
  </g>
  <g visibility="hidden">
    <rect id="unseen" x="30" y="5" width="4" height="4"/>
    <rect id="hole" x="40" y="20" width="10" height="10" style="visibility:visible"/>
  </g>
  <rect id="styled" x="60" y="5" width="4" height="4" display="inline" style="display:none"/>
</svg>`
	o, err := ReadSVGDocument(strings.NewReader(doc), SVGOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(o.Inner) != 1 || o.Inner[0].Segments[0].Attr().Tag != "hole" {
		t.Fatalf("%d inner loops, want the one visible hole", len(o.Inner))
	}
	if a := outlineArea(t, o); math.Abs(a-4900) > 1e-9 {
		t.Errorf("area %g, want 5000 − 100", a)
	}
}
