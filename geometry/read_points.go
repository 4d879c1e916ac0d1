package geometry

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode"

	"github.com/paulmach/orb"
)

// ErrUnit marks a point file whose header names a unit other than the one
// its numbers are read in (see UnitError).
var ErrUnit = errors.New("units disagree")

// PointOptions say how ReadPointFile reads a point file.
type PointOptions struct {
	// Attr is the polyline's tag and spacing law.
	Attr Attr
	// Close closes the polyline, appending the first point if needed.
	Close bool
	// Unit is the length in metres that the caller takes one of the
	// file's numbers to be (1 for metres, 1e-3 for millimetres): a unit
	// named in the header must agree with it. 0 means the caller does not
	// say, and a unit named in the header is refused, since it could not
	// be checked.
	Unit float64
}

// PointFile is what ReadPointFile finds in a point file.
type PointFile struct {
	Polyline *Polyline
	// Closed reports whether the polyline is closed (last point equal to
	// the first).
	Closed bool
	// Title is the file's title line, "" when it has none. A caller that
	// makes a loop of the points and has no name of its own for it names
	// the loop by the title: the name is how messages point at the loop,
	// and it is the boundary tag of edges that have none.
	Title string
	// Unit is the unit its header names ("m", "mm", "cm" or "in"), "" when
	// it names none.
	Unit string
}

// pointUnits are the units a point file's header may name, in metres:
// the SI metre and its parts, and the international inch, 0.0254 m
// exactly (by its 1959 definition; from memory).
var pointUnits = map[string]float64{"m": 1, "mm": 1e-3, "cm": 1e-2, "in": 0.0254}

// ReadPointFile reads a plain point file, one point a line, as one
// polyline carrying opt.Attr. Numbers are separated by white space, a
// comma, a semicolon or a tab; "#" starts a comment; blank lines are
// skipped. Errors give the line and column. It reads:
//
//   - a title: the first line that is not blank or a comment, when it is
//     not numbers (its first field is not a number) and holds a word of
//     two letters or more; it is kept in PointFile.Title;
//   - a header of column names after the title, or in its place: two or
//     three names beginning with x, y and z (in either case: "x y",
//     "X,Y,Z", "x_m;y_m"), each with an optional unit in brackets or
//     parentheses ("X [m]", "y(mm)"); it is skipped;
//   - points: "x y", or "x y z" with the same z on every line (a plane
//     drawing exported from a 3D program), of which x and y are read; a z
//     that changes is refused at the first line where it differs.
//
// A unit named in the header (m, mm, cm, in; "-" or "1" for plain
// numbers), or in brackets in the title, is checked against opt.Unit,
// never applied: the numbers mean the same with or without the header, a
// unit is stated once, where the file is used (a case's units, a
// sketch's scale), and a header that contradicts it is refused with both
// named, so that a unit can neither be applied twice nor be silently
// ignored. A unit in a header that is none of these is refused too.
//
// A decimal comma is not read: a line whose numbers look written with
// one ("0,5;1,25", "0,5 1,25") is refused with that said, since a comma
// separates numbers.
//
// The polyline is closed when its last point equals its first, or when
// opt.Close is set (the first point is then appended if needed); a
// closed polyline is a whole loop by itself, an open one a segment of a
// loop.
//
// A file holds one loop: holes need a format with rings (GeoJSON, WKT,
// SVG). Since a file of several loops is an easy mistake, it gets its
// own message: a point equal to the first one with more points after it
// closes the loop early, and a closed polyline that crosses itself where
// blank or comment lines break the points is said to look like several
// loops. Other crossings of a closed polyline are reported by the lines
// of the two edges.
func ReadPointFile(r io.Reader, opt PointOptions) (PointFile, error) {
	var pf PointFile
	var pts []orb.Point
	var lines []int
	closedAt := 0                // line of the last point if it equals the first
	var gap, pending pointGap    // the first break between two points; the break since the last point
	var head pointHead           // the title and header lines
	cols, colsAt := 0, 0         // numbers a line (2 or 3) and the line that set it
	z, zAt := 0.0, 0             // the plane of three-column files and its first line
	first, counting := 0.0, true // the first column's first value, and whether it counts the points
	size := 0.0                  // the largest |x| or |y| so far
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
		fs := pointFields(text)
		if len(fs) == 0 {
			if len(pts) > 0 && pending.line == 0 {
				pending = pointGap{line: n, blank: blank}
			}
			continue
		}
		if len(pts) == 0 && !isNumber(fs[0].s) {
			if err := head.read(n, text, fs); err != nil {
				return PointFile{}, err
			}
			continue
		}
		if !isNumber(fs[0].s) {
			return PointFile{}, fmt.Errorf("line %d, column %d: %q is not a finite number (a title and a header of column names come only before the first point, on line %d)%s: %w", n, fs[0].col, fs[0].s, lines[0], quoteHint(text), ErrFormat)
		}
		if c := emptyField(text); c > 0 {
			return PointFile{}, fmt.Errorf("line %d, column %d: an empty field between two separators: a number is missing; every line holds x y (or x y z): %w", n, c, ErrFormat)
		}
		if c := decimalComma(text); c > 0 {
			return PointFile{}, fmt.Errorf("line %d, column %d: %q looks written with decimal commas, which are not read: write decimal points (0.5, not 0,5); a comma, like a semicolon, white space or a tab, separates numbers: %w", n, c, strings.TrimSpace(text), ErrFormat)
		}
		if cols == 0 {
			cols, colsAt = len(fs), n
			if head.cols > 0 && len(fs) != head.cols {
				return PointFile{}, fmt.Errorf("line %d: expected %s as the header on line %d names, found %d fields%s: %w", n, pointColumns(head.cols), head.at, len(fs), commaHint(text, head.cols), ErrFormat)
			}
			if len(fs) != 2 && len(fs) != 3 {
				return PointFile{}, fmt.Errorf("line %d: expected two numbers \"x y\" or three \"x y z\", found %d fields%s: %w", n, len(fs), commaHint(text, 0), ErrFormat)
			}
		} else if len(fs) != cols {
			return PointFile{}, fmt.Errorf("line %d: expected %s as on line %d, found %d fields%s: %w", n, pointColumns(cols), colsAt, len(fs), commaHint(text, cols), ErrFormat)
		}
		var v [3]float64
		for k, f := range fs {
			x, err := strconv.ParseFloat(f.s, 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return PointFile{}, fmt.Errorf("line %d, column %d: %q is not a finite number%s: %w", n, f.col, f.s, quoteHint(text), ErrFormat)
			}
			v[k] = x
		}
		// Whether the first column so far counts the points 1, 2, 3, ...
		// (or from 0), as a spreadsheet's index column does.
		counting = counting && v[0] == math.Trunc(v[0]) && (len(pts) == 0 && (v[0] == 0 || v[0] == 1) || len(pts) > 0 && v[0] == first+float64(len(pts)))
		if len(pts) == 0 {
			first = v[0]
		}
		size = math.Max(size, math.Max(math.Abs(v[0]), math.Abs(v[1])))
		if cols == 3 {
			// z the same on every line, within round-off of the
			// coordinates' size (a plane exported from 3D may carry
			// 1e-17 beside 0).
			if zAt == 0 {
				z, zAt = v[2], n
			} else if math.Abs(v[2]-z) > 1e-9*math.Max(size, math.Abs(z)) {
				hint := ""
				if counting {
					hint = "; the first column counts the points (1, 2, 3, ...): leave it out, so that the columns are x y (or x y z)"
				}
				return PointFile{}, fmt.Errorf("line %d, column %d: z = %g differs from z = %g on line %d; a file of x y z points is read as a plane drawing, so z must be the same on every line%s: %w", n, fs[2].col, v[2], z, zAt, hint, ErrFormat)
			}
		}
		p := orb.Point{v[0], v[1]}
		if closedAt > 0 {
			return PointFile{}, fmt.Errorf("line %d: an x-y file holds one loop; this file closes its loop at line %d, back at the first point (%g, %g) of line %d, and goes on (put holes in a GeoJSON, WKT or SVG file instead): %w", n, closedAt, pts[0][0], pts[0][1], lines[0], ErrFormat)
		}
		if gap.line == 0 && pending.line > 0 {
			gap, gap.next = pending, n
		}
		pending = pointGap{}
		if len(pts) > 0 && pts[len(pts)-1] == p {
			return PointFile{}, fmt.Errorf("line %d: point (%g, %g) repeats the point on line %d, which would make a zero-length edge: %w", n, p[0], p[1], lines[len(lines)-1], ErrFormat)
		}
		if len(pts) >= MaxSegmentNodes {
			return PointFile{}, fmt.Errorf("line %d: more than %d points: %w", n, MaxSegmentNodes, ErrFormat)
		}
		pts = append(pts, p)
		lines = append(lines, n)
		if len(pts) > 1 && p == pts[0] {
			closedAt = n
		}
	}
	if err := sc.Err(); err != nil {
		return PointFile{}, fmt.Errorf("reading points: %w", err)
	}
	if err := head.checkUnit(opt.Unit); err != nil {
		return PointFile{}, err
	}
	closed := len(pts) > 1 && pts[0] == pts[len(pts)-1]
	if opt.Close && !closed && len(pts) > 0 {
		pts = append(pts, pts[0])
		closed = true
	}
	switch {
	case len(pts) < 2:
		return PointFile{}, fmt.Errorf("found %d points, a polyline needs at least 2: %w", len(pts), ErrFormat)
	case closed && len(pts) < 4:
		return PointFile{}, fmt.Errorf("closed polyline has %d distinct points, a loop needs at least 3: %w", len(pts)-1, ErrFormat)
	}
	pl, err := NewPolyline(pts, opt.Attr)
	if err != nil {
		return PointFile{}, err
	}
	if closed {
		if err := pointLoopCrossing(pts, lines, gap); err != nil {
			return PointFile{}, err
		}
	}
	pf.Polyline, pf.Closed, pf.Title, pf.Unit = pl, closed, head.title, head.unit
	return pf, nil
}

// pointField is one field of a line of a point file and its column.
type pointField struct {
	s   string
	col int
}

// pointFields splits a line at the separators.
func pointFields(text string) []pointField {
	var fs []pointField
	for i := 0; i < len(text); {
		if isPointSep(text[i]) {
			i++
			continue
		}
		j := i
		for j < len(text) && !isPointSep(text[j]) {
			j++
		}
		fs = append(fs, pointField{text[i:j], i + 1})
		i = j
	}
	return fs
}

// quoteHint says, for a line with quotation marks, that they are not
// read (as a spreadsheet may write "0","0"), and is "" otherwise.
func quoteHint(text string) string {
	if strings.ContainsAny(text, "\"'") {
		return "; quotation marks are not read: save the numbers without them"
	}
	return ""
}

// emptyField returns the column of the second of two commas or
// semicolons with nothing but white space between them inside a line
// ("1,,0"), a field left empty, and 0 when there is none; separators at
// the end of a line, which spreadsheets write, are not fields.
func emptyField(text string) int {
	text = strings.TrimRight(text, " \t\r,;")
	last := -1
	for i := 0; i < len(text); i++ {
		switch c := text[i]; {
		case c == ',' || c == ';':
			if last >= 0 {
				return i + 1
			}
			last = i
		case c == ' ' || c == '\t':
		default:
			last = -1
		}
	}
	return 0
}

// isNumber reports whether s is a finite number.
func isNumber(s string) bool {
	x, err := strconv.ParseFloat(s, 64)
	return err == nil && !math.IsNaN(x) && !math.IsInf(x, 0)
}

func pointColumns(n int) string {
	switch n {
	case 2:
		return "two numbers \"x y\""
	case 3:
		return "three numbers \"x y z\""
	}
	return fmt.Sprintf("%d numbers", n)
}

// decimalComma returns the column of the first comma that stands between
// two digits on a line whose numbers are also separated by something
// other than a comma ("0,5;1,25", "0,5 1,25"), and 0 for other lines: in
// a file that separates its numbers by commas alone, "0,5" is two
// numbers, but beside another separator a comma between digits is most
// likely a decimal comma.
func decimalComma(text string) int {
	text = strings.TrimRight(text, " \t\r")
	start := len(text) - len(strings.TrimLeft(text, " \t\r"))
	comma, other := 0, false
	for i := start; i < len(text); {
		if !isPointSep(text[i]) {
			i++
			continue
		}
		j := i
		for j < len(text) && isPointSep(text[j]) {
			j++
		}
		run := text[i:j]
		if !strings.Contains(run, ",") {
			other = true
		} else if run == "," && i > start && j < len(text) && isDigit(text[i-1]) && isDigit(text[j]) && comma == 0 {
			comma = i + 1
		}
		i = j
	}
	if other {
		return comma
	}
	return 0
}

// commaHint says, for a line with the wrong number of fields, when it
// would read as cols numbers (2 or 3 when cols is 0) if its commas were
// decimal points.
func commaHint(text string, cols int) string {
	if !strings.Contains(text, ",") {
		return ""
	}
	fs := strings.FieldsFunc(text, func(r rune) bool { return r == ' ' || r == '\t' || r == ';' || r == '\r' })
	if (cols == 0 && len(fs) != 2 && len(fs) != 3) || (cols > 0 && len(fs) != cols) {
		return ""
	}
	for _, f := range fs {
		if !isNumber(strings.ReplaceAll(f, ",", ".")) {
			return ""
		}
	}
	return " (the line reads as numbers with decimal commas, which are not read: write decimal points)"
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

// pointHead gathers the lines before a point file's first point: a title
// and a header of column names.
type pointHead struct {
	title           string
	titleAt, at     int    // lines of the title and the header, 0 when none
	cols            int    // columns the header names, 0 when none
	unit            string // unit named in the header or title
	unitAt, unitCol int
}

// read takes one line before the first point.
func (h *pointHead) read(n int, text string, fs []pointField) error {
	const form = "a point file may begin with a title line and a header of column names (x y, or x y z), then holds only points"
	if h.at > 0 || h.titleAt > 0 && !isPointHeader(text) {
		what := fmt.Sprintf("the title on line %d", h.titleAt)
		if h.at > 0 {
			what = fmt.Sprintf("the header on line %d", h.at)
		}
		return fmt.Errorf("line %d, column %d: %q is not a point, and comes after %s; %s%s: %w", n, fs[0].col, strings.TrimSpace(text), what, form, quoteHint(text), ErrFormat)
	}
	if isPointHeader(text) {
		cols, err := h.header(n, text)
		if err != nil {
			return err
		}
		h.at, h.cols = n, cols
		return nil
	}
	if !hasWord(text) {
		return fmt.Errorf("line %d, column %d: %q is not a point, nor a title (which holds a word of two letters or more), nor a header of column names; %s%s: %w", n, fs[0].col, strings.TrimSpace(text), form, quoteHint(text), ErrFormat)
	}
	h.titleAt = n
	h.title = strings.Trim(strings.TrimSpace(strings.TrimRight(text, " \t\r,;")), `"`)
	for _, u := range bracketed(text) {
		if _, ok := pointUnits[u.s]; ok {
			if err := h.claim(n, u); err != nil {
				return err
			}
		}
	}
	return nil
}

// header reads the units of a header line and returns its columns.
func (h *pointHead) header(n int, text string) (int, error) {
	for _, u := range bracketed(text) {
		if u.s == "-" || u.s == "1" || u.s == "" {
			continue // a plain number
		}
		if _, ok := pointUnits[u.s]; !ok {
			return 0, fmt.Errorf("line %d, column %d: the header gives the unit %q, which is not one cvdeck reads (m, mm, cm, in; - for plain numbers): %w", n, u.col, u.s, ErrFormat)
		}
		if err := h.claim(n, u); err != nil {
			return 0, err
		}
	}
	return len(headerNames(text)), nil
}

// claim records a unit named on line n; two different units are refused.
func (h *pointHead) claim(n int, u pointField) error {
	if h.unit != "" && h.unit != u.s {
		return fmt.Errorf("line %d, column %d: the unit %q differs from %q on line %d, column %d; give every coordinate in one unit: %w", n, u.col, u.s, h.unit, h.unitAt, h.unitCol, ErrFormat)
	}
	if h.unit == "" {
		h.unit, h.unitAt, h.unitCol = u.s, n, u.col
	}
	return nil
}

// checkUnit compares the unit named in the file with the caller's, in
// metres to one of the file's numbers (0 for none).
func (h *pointHead) checkUnit(unit float64) error {
	if h.unit == "" {
		return nil
	}
	named := pointUnits[h.unit]
	if unit != 0 && math.Abs(named/unit-1) <= 1e-9 {
		return nil
	}
	return &UnitError{Line: h.unitAt, Column: h.unitCol, Unit: h.unit, Metres: named, ReadAt: unit}
}

// UnitError is a point file whose header names a unit other than the one
// its numbers are read in.
type UnitError struct {
	Line, Column int     // where the file names its unit
	Unit         string  // the unit named: "m", "mm", "cm" or "in"
	Metres       float64 // the unit in metres
	ReadAt       float64 // metres to one of the file's numbers as read; 0 when the reader is not told
}

func (e *UnitError) Error() string {
	if e.ReadAt == 0 {
		return fmt.Sprintf("line %d, column %d: the file gives its coordinates in %s, but the numbers of this file are read in the unit of the case that uses it, which is not checked against the file's: remove %q from the file and state the unit in the case: %v: %v", e.Line, e.Column, e.Unit, e.Unit, ErrUnit, ErrFormat)
	}
	how := fmt.Sprintf("%.4g times too small", e.Metres/e.ReadAt)
	if e.ReadAt > e.Metres {
		how = fmt.Sprintf("%.4g times too large", e.ReadAt/e.Metres)
	}
	return fmt.Sprintf("line %d, column %d: the file gives its coordinates in %s (%g m), but they are being read at %g m to the unit, which would make the outline %s: %v: %v",
		e.Line, e.Column, e.Unit, e.Metres, e.ReadAt, how, ErrUnit, ErrFormat)
}

// Unwrap makes a UnitError both an ErrUnit and an ErrFormat.
func (e *UnitError) Unwrap() []error { return []error{ErrUnit, ErrFormat} }

// isPointHeader reports whether a line is a header of column names: two
// or three names, the k-th beginning with x, y or z (either case), each
// with an optional unit in brackets or parentheses.
func isPointHeader(text string) bool {
	names := headerNames(text)
	if len(names) != 2 && len(names) != 3 {
		return false
	}
	for k, s := range names {
		s = strings.Trim(s, `"'`)
		if s == "" || unicode.ToLower(rune(s[0])) != rune("xyz"[k]) {
			return false
		}
	}
	return true
}

// headerNames returns the column names of a header line, with their
// units (bracketed text, which may stand apart: "X [m]") taken off.
func headerNames(text string) []string {
	var names []string
	for _, f := range pointFields(text) {
		s := f.s
		if i := strings.IndexAny(s, "[("); i >= 0 {
			s = s[:i]
		}
		if s == "" || strings.ContainsAny(f.s, "])") && !strings.ContainsAny(f.s, "[(") {
			// A unit standing apart, or the end of one.
			if len(names) == 0 {
				return nil
			}
			continue
		}
		names = append(names, s)
	}
	return names
}

// bracketed returns the texts in brackets or parentheses on a line,
// trimmed, with their columns.
func bracketed(text string) []pointField {
	var out []pointField
	for i := 0; i < len(text); i++ {
		shut := map[byte]byte{'[': ']', '(': ')'}[text[i]]
		if shut == 0 {
			continue
		}
		j := strings.IndexByte(text[i+1:], shut)
		if j < 0 {
			break
		}
		s := text[i+1 : i+1+j]
		t := strings.TrimSpace(s)
		out = append(out, pointField{t, i + 2 + strings.Index(s, t)})
		i += j + 1
	}
	return out
}

// hasWord reports whether the text holds two letters in a row.
func hasWord(text string) bool {
	run := 0
	for _, r := range text {
		if unicode.IsLetter(r) {
			if run++; run >= 2 {
				return true
			}
		} else {
			run = 0
		}
	}
	return false
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

func isPointSep(c byte) bool { return c == ' ' || c == '\t' || c == ',' || c == ';' || c == '\r' }
