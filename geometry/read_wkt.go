package geometry

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/paulmach/orb"
)

// ReadWKT reads a POLYGON, MULTIPOLYGON or GEOMETRYCOLLECTION of them in
// well-known text into one validated, oriented outline per polygon, in
// text order: the exterior ring the outer loop, the holes the inner loops,
// one line segment per ring edge. Edges are tagged by tags
// (EdgeTag.Polygon counts the polygons in text order, across a
// collection) or by default "outer", "inner1", ...
//
// A syntax error names the line and column (1-based, in characters) of
// the offending token, what was found there and what was expected; see
// wktParser for the grammar read. A byte-order mark at the start, which
// some editors write, is skipped and not counted as a column.
func ReadWKT(text string, tags PolygonTags) ([]Outline, error) {
	text = strings.TrimPrefix(text, "\ufeff")
	polys, at, err := parseWKT(text)
	if err != nil {
		return nil, err
	}
	if len(polys) == 0 {
		return nil, fmt.Errorf("WKT: no polygon found: %w", ErrFormat)
	}
	for k, e := range tags.Edges {
		if e.Polygon < 0 || e.Polygon >= len(polys) {
			return nil, fmt.Errorf("WKT: edge tag range %d names polygon %d, but the text has polygons 0 to %d: %w", k, e.Polygon, len(polys)-1, ErrFormat)
		}
	}
	outs := make([]Outline, len(polys))
	for i, p := range polys {
		line, col := textPosition(text, at[i])
		where := fmt.Sprintf("line %d, column %d: WKT polygon %d", line, col, i)
		o, err := polygonOutline(p, tags, i, where, wktRingRule)
		if err != nil {
			return nil, err
		}
		outs[i] = o
	}
	return outs, nil
}

// wktArealess names the well-known-text geometry types that bound no
// area, as their messages call them.
var wktArealess = map[string]string{
	"POINT": "Point", "MULTIPOINT": "MultiPoint",
	"LINESTRING": "LineString", "MULTILINESTRING": "MultiLineString",
}

// wktMaxDepth bounds the nesting of geometry collections, so that no text
// can make the parser recurse without limit.
const wktMaxDepth = 32

// wktParser is a recursive-descent parser for the part of the
// well-known-text grammar that bounds areas. The grammar, from OGC 06-103r4
// Simple Feature Access Part 1 (version 1.2.1) §7.2.1, the same as ISO
// 19125-1 (from memory), in its two-dimensional form:
//
//	<polygon tagged text>      ::= POLYGON <polygon text>
//	<multipolygon tagged text> ::= MULTIPOLYGON <multipolygon text>
//	<collection tagged text>   ::= GEOMETRYCOLLECTION <collection text>
//	<polygon text>      ::= EMPTY | ( <ring text> {, <ring text>}* )
//	<multipolygon text> ::= EMPTY | ( <polygon text> {, <polygon text>}* )
//	<collection text>   ::= EMPTY | ( <tagged text> {, <tagged text>}* )
//	<ring text>         ::= ( <point> {, <point>}* )
//	<point>             ::= <x> <y>
//
// Keywords are case-insensitive, tokens are separated by white space or
// by the punctuation "(),", and a number is whatever strconv.ParseFloat
// reads. The closing of rings (first point equal to the last) is left to
// polygonOutline, which says which ring is open.
type wktParser struct {
	text  string
	pos   int           // byte offset of the next unread character
	end   int           // byte offset of the end of the text but for white space
	polys []orb.Polygon // polygons read so far, in text order
	at    []int         // byte offset of each polygon's text, for messages
}

// wktToken is one token: a punctuation mark, a word or a number; s is ""
// at the end of the text.
type wktToken struct {
	s   string
	off int // byte offset in the text
}

// parseWKT parses text into its polygons, with the byte offset of each
// polygon's text.
func parseWKT(text string) ([]orb.Polygon, []int, error) {
	// Any Unicode white space may surround the geometry (strings.TrimSpace
	// was applied before orb parsed it); positions stay those of the text.
	p := &wktParser{text: text, end: len(strings.TrimRightFunc(text, unicode.IsSpace))}
	p.pos = min(p.end, len(text)-len(strings.TrimLeftFunc(text, unicode.IsSpace)))
	if err := p.taggedText(0); err != nil {
		return nil, nil, err
	}
	if t := p.next(); t.s != "" {
		return nil, nil, p.errorf(t, "expected the end of the text after the geometry (one geometry a file; a GEOMETRYCOLLECTION holds several)")
	}
	return p.polys, p.at, nil
}

func isWKTSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' || c == '\v'
}

func isWKTPunct(c byte) bool { return c == '(' || c == ')' || c == ',' }

// next reads the next token.
func (p *wktParser) next() wktToken {
	for p.pos < p.end && isWKTSpace(p.text[p.pos]) {
		p.pos++
	}
	start := p.pos
	if start == p.end {
		return wktToken{off: start}
	}
	if isWKTPunct(p.text[start]) {
		p.pos++
	} else {
		for p.pos < p.end && !isWKTSpace(p.text[p.pos]) && !isWKTPunct(p.text[p.pos]) {
			p.pos++
		}
	}
	return wktToken{p.text[start:p.pos], start}
}

// peek returns the next token without reading it.
func (p *wktParser) peek() wktToken {
	pos := p.pos
	t := p.next()
	p.pos = pos
	return t
}

// errorf reports a syntax error at token t: its line and column, the
// expectation, and what was found instead.
func (p *wktParser) errorf(t wktToken, format string, args ...any) error {
	// At the end, t.off is just past the last character written rather
	// than on a trailing newline: where the missing token belongs.
	found := fmt.Sprintf("found %q", t.s)
	if t.s == "" {
		found = "found the end of the text"
	}
	line, col := textPosition(p.text, t.off)
	return fmt.Errorf("line %d, column %d: %s, %s: %w", line, col, fmt.Sprintf(format, args...), found, ErrFormat)
}

// where gives the position of token t as "line L, column C", for messages
// that point back at an opening parenthesis.
func (p *wktParser) where(t wktToken) string {
	line, col := textPosition(p.text, t.off)
	return fmt.Sprintf("line %d, column %d", line, col)
}

// textPosition returns the 1-based line and column, in characters, of the
// byte offset off in text.
func textPosition(text string, off int) (line, col int) {
	start := strings.LastIndexByte(text[:off], '\n') + 1
	return strings.Count(text[:off], "\n") + 1, utf8.RuneCountInString(text[start:off]) + 1
}

// taggedText reads one geometry: a keyword and its text, depth
// collections deep.
func (p *wktParser) taggedText(depth int) error {
	t := p.next()
	kw := strings.ToUpper(t.s)
	switch kw {
	case "POLYGON":
		return p.polygonText(kw)
	case "MULTIPOLYGON":
		return p.list(kw, "polygon", "polygons", func() error { return p.polygonText("") })
	case "GEOMETRYCOLLECTION":
		if depth >= wktMaxDepth {
			return p.errorf(t, "geometry collections nest at most %d deep", wktMaxDepth)
		}
		return p.list(kw, "geometry", "geometries", func() error { return p.taggedText(depth + 1) })
	}
	if name, ok := wktArealess[kw]; ok {
		line, col := textPosition(p.text, t.off)
		return fmt.Errorf("line %d, column %d: WKT: a %s bounds no area; give a POLYGON or MULTIPOLYGON: %w", line, col, name, ErrFormat)
	}
	return p.errorf(t, "expected POLYGON, MULTIPOLYGON or GEOMETRYCOLLECTION")
}

// polygonText reads EMPTY or a parenthesised list of rings as one
// polygon; kw is the keyword before it, "" inside a MULTIPOLYGON.
func (p *wktParser) polygonText(kw string) error {
	p.at = append(p.at, p.peek().off)
	p.polys = append(p.polys, orb.Polygon{})
	i := len(p.polys) - 1
	return p.list(kw, "ring", "rings", func() error {
		r, err := p.ring()
		p.polys[i] = append(p.polys[i], r)
		return err
	})
}

// list reads EMPTY or "(" item {"," item} ")", where each item, called
// what (plural whats) in messages, is read by item; kw is the keyword
// before the list, if any.
func (p *wktParser) list(kw, what, whats string, item func() error) error {
	open := p.next()
	if strings.EqualFold(open.s, "EMPTY") {
		return nil
	}
	if open.s != "(" {
		after := "here"
		if kw != "" {
			after = "after " + kw
		}
		hint := ""
		switch strings.ToUpper(open.s) {
		case "Z", "M", "ZM":
			hint = " (cvdeck reads points of two coordinates, x y, without Z or M)"
		}
		return p.errorf(open, "expected '(' opening the %s, or EMPTY, %s%s", whats, after, hint)
	}
	for {
		if err := item(); err != nil {
			return err
		}
		switch t := p.next(); t.s {
		case ",":
		case ")":
			return nil
		default:
			return p.errorf(t, "expected ',' and another %s, or ')' closing the '(' at %s", what, p.where(open))
		}
	}
}

// ring reads "(" point {"," point} ")".
func (p *wktParser) ring() (orb.Ring, error) {
	open := p.next()
	if open.s != "(" {
		return nil, p.errorf(open, "expected '(' opening a ring of points \"x y, x y, ...\"")
	}
	var r orb.Ring
	for {
		x, err := p.number("expected a point \"x y\"")
		if err != nil {
			return nil, err
		}
		y, err := p.number("expected the y coordinate after x = %s", x.s)
		if err != nil {
			return nil, err
		}
		r = append(r, orb.Point{x.v, y.v})
		switch t := p.next(); t.s {
		case ",":
		case ")":
			return r, nil
		default:
			return nil, p.errorf(t, "expected ',' or ')' after the point (%s %s)", x.s, y.s)
		}
	}
}

// wktNumber is a number token and its value.
type wktNumber struct {
	s string
	v float64
}

// number reads one coordinate; expect says what was wanted, for the
// message when the token is not a number.
func (p *wktParser) number(expect string, args ...any) (wktNumber, error) {
	t := p.next()
	if t.s == "" || isWKTPunct(t.s[0]) {
		return wktNumber{}, p.errorf(t, expect, args...)
	}
	v, err := strconv.ParseFloat(t.s, 64)
	if errors.Is(err, strconv.ErrRange) {
		return wktNumber{}, p.errorf(t, "a coordinate must lie within ±%.3g", math.MaxFloat64)
	}
	if err != nil {
		return wktNumber{}, p.errorf(t, expect+" (a number such as 12, -0.5 or 1.5e3)", args...)
	}
	return wktNumber{t.s, v}, nil
}
