package geometry

import (
	"errors"
	"strings"
	"testing"
)

// Path data with no command at all (SVG 1.1 §8.3.9: the grammar's
// svg-path is wsp* moveto-drawto-command-groups? wsp*, so empty data is
// well formed and draws nothing) is refused as drawing nothing, not
// measured as a span of no points (+Inf); so is a document whose only
// path is empty.
func TestSVGEmptyPathData(t *testing.T) {
	for _, d := range []string{"", " \n\t"} {
		_, err := ReadSVGPath(d, SVGOptions{})
		if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), "no drawing command (the path data is empty)") || strings.Contains(err.Error(), "Inf") {
			t.Errorf("%q: got %v, want no drawing command", d, err)
		}
	}
	_, err := ReadSVGDocument(strings.NewReader(`<svg xmlns="http://www.w3.org/2000/svg"><path d=""/></svg>`), SVGOptions{})
	if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), "no drawing command") {
		t.Errorf("document with an empty path: got %v, want no drawing command", err)
	}
}

// SVGOptions.Tags names loops in path order: as many tags as loops (or
// fewer) tag them, the hole of a 4 × 2 box taking the second; one more
// than the drawing has loops is refused, counting both.
func TestSVGTagsCount(t *testing.T) {
	const d = "M 0 0 H 4 V 2 H 0 Z M 1 0.5 V 1.5 H 2 V 0.5 Z"
	o, err := ReadSVGPath(d, SVGOptions{Tags: []string{"box", "strut"}})
	if err != nil {
		t.Fatal(err)
	}
	if o.Outer.Segments[0].Attr().Tag != "box" || o.Inner[0].Segments[0].Attr().Tag != "strut" {
		t.Errorf("tags %q and %q, want box and strut", o.Outer.Segments[0].Attr().Tag, o.Inner[0].Segments[0].Attr().Tag)
	}
	for _, c := range []struct {
		d    string
		tags []string
		says string
	}{
		{d, []string{"box", "strut", "fin"}, "tags gives 3 tags; the drawing has 2 loops"},
		{"M 0 0 H 4 V 2 H 0 Z", []string{"box", "fin"}, "tags gives 2 tags; the drawing has 1 loop:"},
	} {
		_, err := ReadSVGPath(c.d, SVGOptions{Tags: c.tags})
		if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%v: got %v, want %q", c.tags, err, c.says)
		}
	}
}
