package geometry

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
)

// ReadPoints reads a plain point file, one "x y" pair a line (white space
// or a comma between them; "#" starts a comment; blank lines are skipped),
// as one polyline carrying a. The polyline is closed when its last point
// equals its first, or when close is set (the first point is then
// appended if needed); a closed polyline is a whole loop by itself, an
// open one a segment of a loop. Errors give the line and column.
//
// A file holds one loop: holes need a format with rings (GeoJSON, WKT,
// SVG). Since a file of several loops is an easy mistake, it gets its
// own message: a point equal to the first one with more points after it
// closes the loop early, and a closed polyline that crosses itself where
// blank or comment lines break the points is said to look like several
// loops. Other crossings of a closed polyline are reported by the lines
// of the two edges.
func ReadPoints(r io.Reader, a Attr, close bool) (*Polyline, bool, error) {
	var pts []orb.Point
	var lines []int
	closedAt := 0             // line of the last point if it equals the first
	var gap, pending pointGap // the first break between two points; the break since the last point
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 16*1024*1024)
	for n := 1; sc.Scan(); n++ {
		text := sc.Text()
		if n == 1 {
			// A byte-order mark, which some editors write, is not text.
			text = strings.TrimPrefix(text, "\ufeff")
		}
		blank := strings.TrimSpace(text) == ""
		if i := strings.IndexByte(text, '#'); i >= 0 {
			text = text[:i]
		}
		type field struct {
			s   string
			col int
		}
		var fs []field
		for i := 0; i < len(text); {
			if isPointSep(text[i]) {
				i++
				continue
			}
			j := i
			for j < len(text) && !isPointSep(text[j]) {
				j++
			}
			fs = append(fs, field{text[i:j], i + 1})
			i = j
		}
		if len(fs) == 0 {
			if len(pts) > 0 && pending.line == 0 {
				pending = pointGap{line: n, blank: blank}
			}
			continue
		}
		if len(fs) != 2 {
			return nil, false, fmt.Errorf("line %d: expected two numbers \"x y\", found %d fields: %w", n, len(fs), ErrFormat)
		}
		var p orb.Point
		for k, f := range fs {
			v, err := strconv.ParseFloat(f.s, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, false, fmt.Errorf("line %d, column %d: %q is not a finite number: %w", n, f.col, f.s, ErrFormat)
			}
			p[k] = v
		}
		if closedAt > 0 {
			return nil, false, fmt.Errorf("line %d: an x-y file holds one loop; this file closes its loop at line %d, back at the first point (%g, %g) of line %d, and goes on (put holes in a GeoJSON, WKT or SVG file instead): %w", n, closedAt, pts[0][0], pts[0][1], lines[0], ErrFormat)
		}
		if gap.line == 0 && pending.line > 0 {
			gap, gap.next = pending, n
		}
		pending = pointGap{}
		if len(pts) > 0 && pts[len(pts)-1] == p {
			return nil, false, fmt.Errorf("line %d: point (%g, %g) repeats the point on line %d, which would make a zero-length edge: %w", n, p[0], p[1], lines[len(lines)-1], ErrFormat)
		}
		if len(pts) >= MaxSegmentNodes {
			return nil, false, fmt.Errorf("line %d: more than %d points: %w", n, MaxSegmentNodes, ErrFormat)
		}
		pts = append(pts, p)
		lines = append(lines, n)
		if len(pts) > 1 && p == pts[0] {
			closedAt = n
		}
	}
	if err := sc.Err(); err != nil {
		return nil, false, fmt.Errorf("reading points: %w", err)
	}
	closed := len(pts) > 1 && pts[0] == pts[len(pts)-1]
	if close && !closed && len(pts) > 0 {
		pts = append(pts, pts[0])
		closed = true
	}
	switch {
	case len(pts) < 2:
		return nil, false, fmt.Errorf("found %d points, a polyline needs at least 2: %w", len(pts), ErrFormat)
	case closed && len(pts) < 4:
		return nil, false, fmt.Errorf("closed polyline has %d distinct points, a loop needs at least 3: %w", len(pts)-1, ErrFormat)
	}
	pl, err := NewPolyline(pts, a)
	if err != nil {
		return nil, false, err
	}
	if closed {
		if err := pointLoopCrossing(pts, lines, gap); err != nil {
			return nil, false, err
		}
	}
	return pl, closed, nil
}

// pointLoopCrossing reports the first crossing of the closed polyline pts
// (first == last) read from the lines given (lines[k] the line of point
// k; the closing point appended to the file's points has none), by the
// lines of the two edges. When the points are broken by blank or comment
// lines (gap), the message says that the file reads as one loop, since
// several loops are the common cause. Crossings of neighbouring edges that
// fold back over each other are left to outline validation.
func pointLoopCrossing(pts []orb.Point, lines []int, gap pointGap) error {
	n := len(pts) - 1 // edges; edge k runs from point k to point k+1
	pieces := make([]Piece, n)
	for k := range n {
		pieces[k] = Piece{pts[k], pts[k+1]}
	}
	neighbours := func(i, j int) bool { return j == i+1 || i == j+1 || (i == 0 && j == n-1) || (j == 0 && i == n-1) }
	i, j, p, ok := FirstCrossing(pieces, neighbours)
	if !ok {
		return nil
	}
	if i > j {
		i, j = j, i
	}
	edge := func(k int) string {
		if k+1 == len(lines) {
			return fmt.Sprintf("the closing edge from line %d back to line %d", lines[k], lines[0])
		}
		return fmt.Sprintf("the edge from line %d to line %d", lines[k], lines[k+1])
	}
	msg := fmt.Sprintf("%s crosses %s at (%.9g, %.9g)", edge(j), edge(i), p[0], p[1])
	if gap.line > 0 {
		what := "comment line"
		if gap.blank {
			what = "blank line"
		}
		return fmt.Errorf("line %d: %s: %w; an x-y file holds one loop, so the points after the %s at line %d go on with it rather than start another (put holes in a GeoJSON, WKT or SVG file instead): %w", gap.next, msg, ErrSelfCrossing, what, gap.line, ErrFormat)
	}
	return fmt.Errorf("line %d: %s: %w: %w", lines[j], msg, ErrSelfCrossing, ErrFormat)
}

// pointGap is a run of lines without a point in a point file: its first
// line, whether that line is blank (else a comment), and the line of the
// point after it.
type pointGap struct {
	line  int
	blank bool
	next  int
}

func isPointSep(c byte) bool { return c == ' ' || c == '\t' || c == ',' || c == '\r' }
