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
// Points are "x y"; after POLYGON Z or MULTIPOLYGON Z they are "x y z",
// and z must be the same at every point of the text (within round-off of
// the coordinates' size), the plane of a drawing exported from a 3D
// program, as x-y point files allow; it is then dropped. A z that varies
// is refused, since the drawing would not be plane, and so are measures
// (M, ZM), which are not coordinates. A coordinate must be a finite
// number (strconv.ParseFloat also reads NaN and Inf).
//
// A syntax error names the line and column (1-based, in characters) of
// the offending token, what was found there and what was expected; see
// wktParser for the grammar read. A byte-order mark at the start, which
// some editors write, is skipped and not counted as a column.
func ReadWKT(text string, tags PolygonTags) ([]Outline, error) {
	text = strings.TrimPrefix(text, "\ufeff")
	p, err := parseWKTText(text)
	if err != nil {
		return nil, err
	}
	if b := p.nonFinite; b != nil {
		return nil, p.errorf(b.tok, "%s: a coordinate must be a finite number", b.vertex)
	}
	polys, at := p.polys, p.at
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
// 19125-1 (from memory), in its two-dimensional form and, with the
// keyword Z after the type, its three-dimensional one:
//
//	<polygon tagged text>      ::= POLYGON [Z] <polygon text>
//	<multipolygon tagged text> ::= MULTIPOLYGON [Z] <multipolygon text>
//	<collection tagged text>   ::= GEOMETRYCOLLECTION [Z] <collection text>
//	<polygon text>      ::= EMPTY | ( <ring text> {, <ring text>}* )
//	<multipolygon text> ::= EMPTY | ( <polygon text> {, <polygon text>}* )
//	<collection text>   ::= EMPTY | ( <tagged text> {, <tagged text>}* )
//	<ring text>         ::= ( <point> {, <point>}* )
//	<point>             ::= <x> <y> | <x> <y> <z> (after Z)
//
// A collection's members say Z for themselves, so GEOMETRYCOLLECTION Z
// is accepted and changes nothing.
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
	// The plane of the points read with a z, which every later z must
	// match: its z, the token it was read from, and the largest |x| or
	// |y| read so far, the round-off scale for comparing z.
	hasZ bool
	z    float64
	zTok wktToken
	size float64
	// nonFinite is the first coordinate read as NaN or an infinity, which
	// the grammar (and orb's reader before this one) reads as a number
	// and ReadWKT then refuses at its token.
	nonFinite *wktBadNumber
}

// wktBadNumber is a coordinate token that is no finite number, and the
// point it belongs to, as messages name it.
type wktBadNumber struct {
	tok    wktToken
	vertex string
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
	p, err := parseWKTText(text)
	if err != nil {
		return nil, nil, err
	}
	return p.polys, p.at, nil
}

// parseWKTText parses text, returning the parser with what it read.
func parseWKTText(text string) (*wktParser, error) {
	// Any Unicode white space may surround the geometry (strings.TrimSpace
	// was applied before orb parsed it); positions stay those of the text.
	p := &wktParser{text: text, end: len(strings.TrimRightFunc(text, unicode.IsSpace))}
	p.pos = min(p.end, len(text)-len(strings.TrimLeftFunc(text, unicode.IsSpace)))
	if err := p.taggedText(0); err != nil {
		return nil, err
	}
	if t := p.next(); t.s != "" {
		return nil, p.errorf(t, "expected the end of the text after the geometry (one geometry a file; a GEOMETRYCOLLECTION holds several)")
	}
	return p, nil
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
	return p.hintedErrorf(t, "", format, args...)
}

// hintedErrorf is errorf with a hint, if not "", said in parentheses
// after what was found.
func (p *wktParser) hintedErrorf(t wktToken, hint, format string, args ...any) error {
	// At the end, t.off is just past the last character written rather
	// than on a trailing newline: where the missing token belongs.
	found := fmt.Sprintf("found %q", t.s)
	if t.s == "" {
		found = "found the end of the text"
	}
	if hint != "" {
		found += " (" + hint + ")"
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

// taggedText reads one geometry: a keyword, Z if its points have three
// coordinates, and its text, depth collections deep.
func (p *wktParser) taggedText(depth int) error {
	t := p.next()
	kw := strings.ToUpper(t.s)
	z := false
	switch kw {
	case "POLYGON", "MULTIPOLYGON", "GEOMETRYCOLLECTION":
		switch d := p.peek(); strings.ToUpper(d.s) {
		case "Z":
			p.next()
			z = true
			kw += " Z"
		case "M", "ZM":
			return p.errorf(d, "%s %s gives each point a measure, which is not a coordinate: cvdeck reads points x y, or x y z after %s Z with z the same at every point (a plane drawing)", kw, strings.ToUpper(d.s), kw)
		}
	}
	switch kw {
	case "POLYGON", "POLYGON Z":
		return p.polygonText(kw, z)
	case "MULTIPOLYGON", "MULTIPOLYGON Z":
		return p.list(kw, "polygon", "polygons", func() error { return p.polygonText("", z) })
	case "GEOMETRYCOLLECTION", "GEOMETRYCOLLECTION Z":
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
// polygon; kw is the keyword before it, "" inside a MULTIPOLYGON, and z
// says whether its points have three coordinates.
func (p *wktParser) polygonText(kw string, z bool) error {
	p.at = append(p.at, p.peek().off)
	p.polys = append(p.polys, orb.Polygon{})
	i := len(p.polys) - 1
	return p.list(kw, "ring", "rings", func() error {
		r, err := p.ring(i, len(p.polys[i]), z)
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
		return p.errorf(open, "expected '(' opening the %s, or EMPTY, %s", whats, after)
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

// ring reads "(" point {"," point} ")", ring ri of polygon pi (both
// counted from 0 in text order, for messages), its points "x y z" when z
// is set and "x y" otherwise.
func (p *wktParser) ring(pi, ri int, z bool) (orb.Ring, error) {
	form := "x y"
	if z {
		form = "x y z"
	}
	open := p.next()
	if open.s != "(" {
		return nil, p.errorf(open, "expected '(' opening a ring of points \"%s, %s, ...\"", form, form)
	}
	var r orb.Ring
	for {
		// vertex names this point in messages, as polygonOutline numbers
		// a ring's vertices.
		vertex := fmt.Sprintf("polygon %d ring %d vertex %d", pi, ri, len(r))
		x, err := p.number(vertex, "expected a point \"%s\"", form)
		if err != nil {
			return nil, err
		}
		y, err := p.number(vertex, "expected the y coordinate after x = %s", x.s)
		if err != nil {
			return nil, err
		}
		point := fmt.Sprintf("(%s %s)", x.s, y.s)
		if z {
			zn, err := p.number(vertex, "expected the z coordinate after x y = %s %s (a point after Z has three coordinates)", x.s, y.s)
			if err != nil {
				return nil, err
			}
			point = fmt.Sprintf("(%s %s %s)", x.s, y.s, zn.s)
			p.size = max(p.size, math.Abs(x.v), math.Abs(y.v))
			if !p.hasZ {
				p.hasZ, p.z, p.zTok = true, zn.v, zn.tok
			} else if math.Abs(zn.v-p.z) > 1e-9*max(p.size, math.Abs(p.z)) {
				return nil, p.errorf(zn.tok, "%s: z = %s differs from z = %g at %s; cvdeck reads a plane drawing, so z must be the same at every point", vertex, zn.s, p.z, p.where(p.zTok))
			}
		}
		r = append(r, orb.Point{x.v, y.v})
		switch t := p.next(); t.s {
		case ",":
		case ")":
			return r, nil
		default:
			return nil, p.hintedErrorf(t, p.extraNumberHint(t, z), "expected ',' or ')' after the point %s", point)
		}
	}
}

// extraNumberHint says, for the token t found where a point should end
// (after its two coordinates, or three when z is set), why a number might
// stand there: one more number, then the end of the point, is a third
// coordinate given without the keyword Z (a 3D export); a number followed
// by another is more likely the next point with its comma missing. It is
// "" when t is no number.
func (p *wktParser) extraNumberHint(t wktToken, z bool) string {
	if _, err := strconv.ParseFloat(t.s, 64); err != nil {
		return ""
	}
	after := p.peek().s
	if _, err := strconv.ParseFloat(after, 64); err == nil {
		return "is a ',' missing between two points?"
	}
	if z {
		return "a point after Z has three coordinates, x y z; cvdeck reads no measures (M)"
	}
	return "cvdeck reads points as x y pairs; points with a third coordinate z need the keyword Z, as in POLYGON Z ((0 0 1, 4 0 1, ...)), with z the same at every point (a plane drawing)"
}

// wktNumber is a number token and its value.
type wktNumber struct {
	s   string
	v   float64
	tok wktToken
}

// number reads one coordinate of the point named vertex (for messages);
// expect says what was wanted, for the message when the token is not a
// number. The first NaN or infinity, which strconv.ParseFloat reads, is
// kept in p.nonFinite for ReadWKT to refuse.
func (p *wktParser) number(vertex, expect string, args ...any) (wktNumber, error) {
	t := p.next()
	if t.s == "" || isWKTPunct(t.s[0]) {
		return wktNumber{}, p.errorf(t, expect, args...)
	}
	v, err := strconv.ParseFloat(t.s, 64)
	if errors.Is(err, strconv.ErrRange) {
		return wktNumber{}, p.errorf(t, "%s: a coordinate must lie within ±%.3g", vertex, math.MaxFloat64)
	}
	if err != nil {
		return wktNumber{}, p.errorf(t, expect+" (a number such as 12, -0.5 or 1.5e3)", args...)
	}
	if (math.IsNaN(v) || math.IsInf(v, 0)) && p.nonFinite == nil {
		p.nonFinite = &wktBadNumber{t, vertex}
	}
	return wktNumber{t.s, v, t}, nil
}
