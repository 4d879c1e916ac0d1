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
func ReadPoints(r io.Reader, a Attr, close bool) (*Polyline, bool, error) {
	var pts []orb.Point
	var lines []int
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 16*1024*1024)
	for n := 1; sc.Scan(); n++ {
		text := sc.Text()
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
		if len(pts) > 0 && pts[len(pts)-1] == p {
			return nil, false, fmt.Errorf("line %d: point (%g, %g) repeats the point on line %d, which would make a zero-length edge: %w", n, p[0], p[1], lines[len(lines)-1], ErrFormat)
		}
		if len(pts) >= MaxSegmentNodes {
			return nil, false, fmt.Errorf("line %d: more than %d points: %w", n, MaxSegmentNodes, ErrFormat)
		}
		pts = append(pts, p)
		lines = append(lines, n)
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
	return pl, closed, nil
}

func isPointSep(c byte) bool { return c == ' ' || c == '\t' || c == ',' || c == '\r' }
