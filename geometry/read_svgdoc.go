package geometry

import (
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// ReadSVGDocument reads the shapes of an SVG document into one outline,
// as ReadSVGPath does for one path's data: every path element's d
// attribute, and the basic shapes rect (without rounded corners), circle,
// ellipse, polygon, line and polyline, each turned into the equivalent
// path data (SVG 1.1 §9). Each closed subpath becomes a loop; open ones
// (lines, polylines, paths not closed by Z) are joined end to end into
// loops where their ends meet, as ReadSVGPath says, so that an inlet, a
// wall and an outlet drawn as separate strokes make one loop. The edges
// an element draws take its data-tag attribute as their default tag, or
// its id when it has none (data-* attributes are SVG 2's way of carrying
// an application's own data, from memory; ids must be unique in a
// document, a data-tag need not be, so two strokes may both be "wall");
// within a loop joined from pieces, either every piece has a tag or none
// has. A group's data-tag tags the edges of the elements inside it that
// have none of their own (before their ids). The transform attributes of an element and of the groups
// around it are applied (SVG 1.1 §7.6: matrix, translate, scale, rotate,
// skewX and skewY, a list applied right to left, a group's before its
// parent's), the curves flattened so that they stay within the tolerance
// after the transform; a transform that cannot be read is refused, so
// coordinates are never silently misplaced. Shapes a viewer never draws where they
// stand, inside defs, symbol, marker, pattern, clipPath or mask elements
// (SVG 1.1 §5.3, §5.5, §11.6, §13.3, §14.3, §14.4: their content is only
// drawn when referenced), are not read, nor are elements a viewer does
// not show: display none, with everything inside (§11.5, the way drawing
// programs hide a layer), and visibility hidden or collapse, which
// elements inside inherit unless they set visibility visible (§11.5).
// Errors name the element, its
// index among the shapes read and its line in the document.
func ReadSVGDocument(r io.Reader, opt SVGOptions) (Outline, error) {
	dec := xml.NewDecoder(r)
	var subs []svgSubpath
	var matrices []*svgMatrix // per open element: its transform to the document, nil for none
	var hidden []bool         // per open element: inside content not drawn in place, or not displayed
	var visible []bool        // per open element: its visibility, which its children inherit
	var inherited []string    // per open element: the data-tag it or a group around it gives, or ""
	shapes := 0
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return Outline{}, fmt.Errorf("SVG document: %v: %w", err, ErrFormat)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			attrs := map[string]string{}
			for _, a := range t.Attr {
				if a.Name.Space == "" {
					attrs[a.Name.Local] = a.Value
				}
			}
			line, _ := dec.InputPos()
			var m *svgMatrix
			if len(matrices) > 0 {
				m = matrices[len(matrices)-1]
			}
			if tr, ok := attrs["transform"]; ok {
				own, err := parseSVGTransform(tr)
				if err != nil {
					return Outline{}, fmt.Errorf("SVG %s element (line %d): transform %q: %w", t.Name.Local, line, tr, err)
				}
				if m != nil {
					own = m.times(own)
				}
				m = &own
			}
			matrices = append(matrices, m)
			// An element's edges take its own data-tag, else the nearest
			// one a group around it gives, else its id.
			own, given := attrs["data-tag"]
			if given && strings.TrimSpace(own) == "" {
				id := ""
				if attrs["id"] != "" {
					id = fmt.Sprintf(", id %q", attrs["id"])
				}
				return Outline{}, fmt.Errorf("SVG %s element (line %d%s): data-tag is empty; give it the boundary tag of the edges it draws, or leave it out to tag them from the groups around it or by their ids: %w", t.Name.Local, line, id, ErrFormat)
			}
			group := ""
			if len(inherited) > 0 {
				group = inherited[len(inherited)-1]
			}
			if given {
				inherited = append(inherited, own)
			} else {
				inherited = append(inherited, group)
			}
			hide := len(hidden) > 0 && hidden[len(hidden)-1] || svgUndrawn[t.Name.Local] || svgProperty(attrs, "display") == "none"
			hidden = append(hidden, hide)
			shown := len(visible) == 0 || visible[len(visible)-1]
			switch svgProperty(attrs, "visibility") {
			case "visible":
				shown = true
			case "hidden", "collapse":
				shown = false
			}
			visible = append(visible, shown)
			if hide || !shown {
				continue
			}
			if t.Name.Local == "use" {
				// A use element draws a copy of another element, which
				// would be lost unread: refuse it rather than drop it.
				ref := attrs["href"]
				for _, a := range t.Attr {
					if a.Name.Local == "href" {
						ref = a.Value
					}
				}
				return Outline{}, fmt.Errorf("SVG use element (line %d) draws a copy of %q, which cvdeck does not read: replace the copy by the shape itself (in a drawing program, unlink the clone): %w", line, ref, ErrFormat)
			}
			d, isShape, err := shapePathData(t.Name.Local, attrs)
			where := fmt.Sprintf("SVG %s element %d (line %d", t.Name.Local, shapes, line)
			if id := attrs["id"]; id != "" {
				where += fmt.Sprintf(", id %q", id)
			}
			tag := attrs["id"]
			switch {
			case given:
				tag = own
				where += fmt.Sprintf(", data-tag %q", tag)
			case group != "":
				tag = group
				where += fmt.Sprintf(", data-tag %q from a group", tag)
			}
			where += ")"
			if err != nil {
				return Outline{}, fmt.Errorf("%s: %w", where, err)
			}
			if !isShape {
				continue
			}
			shapes++
			ps, err := parseSVGPath(d, where)
			if err != nil {
				return Outline{}, err
			}
			for i := range ps {
				ps[i].tag = tag
				ps[i].m = m
				ps[i].whole = len(ps) == 1
			}
			subs = append(subs, ps...)
		case xml.EndElement:
			if len(matrices) > 0 {
				matrices = matrices[:len(matrices)-1]
				hidden = hidden[:len(hidden)-1]
				visible = visible[:len(visible)-1]
				inherited = inherited[:len(inherited)-1]
			}
		}
	}
	if shapes == 0 {
		return Outline{}, fmt.Errorf("SVG document: no path, rect, circle, ellipse or polygon element found, nor a line or polyline: %w", ErrFormat)
	}
	return buildSVG(subs, opt)
}

// parseSVGTransform reads a transform list (SVG 1.1 §7.6): transforms
// separated by white space or commas, each a name and its numbers in
// parentheses, the list meaning their product in the order written (so
// the last is applied first). Angles are in degrees.
func parseSVGTransform(list string) (svgMatrix, error) {
	m := svgMatrix{1, 0, 0, 1, 0, 0}
	rest := strings.TrimSpace(list)
	for rest != "" {
		open := strings.IndexByte(rest, '(')
		shut := strings.IndexByte(rest, ')')
		if open < 0 || shut < open {
			return m, fmt.Errorf("%q is not a name(numbers) transform: %w", rest, ErrFormat)
		}
		name := strings.TrimSpace(rest[:open])
		var args []float64
		for _, f := range strings.FieldsFunc(rest[open+1:shut], func(r rune) bool { return r == ',' || r == ' ' || r == '\t' || r == '\n' || r == '\r' }) {
			x, err := strconv.ParseFloat(f, 64)
			if err != nil || math.IsInf(x, 0) || math.IsNaN(x) {
				return m, fmt.Errorf("%s: %q is not a finite number: %w", name, f, ErrFormat)
			}
			args = append(args, x)
		}
		rest = strings.TrimLeft(rest[shut+1:], " \t\n\r,")
		arity := func(counts ...int) error {
			for _, c := range counts {
				if len(args) == c {
					return nil
				}
			}
			return fmt.Errorf("%s takes %v numbers, not %d: %w", name, counts, len(args), ErrFormat)
		}
		var t svgMatrix
		rad := func(deg float64) float64 { return deg * math.Pi / 180 }
		switch name {
		case "matrix":
			if err := arity(6); err != nil {
				return m, err
			}
			t = svgMatrix(args)
		case "translate":
			if err := arity(1, 2); err != nil {
				return m, err
			}
			t = svgMatrix{1, 0, 0, 1, args[0], 0}
			if len(args) == 2 {
				t[5] = args[1]
			}
		case "scale":
			if err := arity(1, 2); err != nil {
				return m, err
			}
			sy := args[0]
			if len(args) == 2 {
				sy = args[1]
			}
			t = svgMatrix{args[0], 0, 0, sy, 0, 0}
		case "rotate":
			if err := arity(1, 3); err != nil {
				return m, err
			}
			c, s := math.Cos(rad(args[0])), math.Sin(rad(args[0]))
			t = svgMatrix{c, s, -s, c, 0, 0}
			if len(args) == 3 {
				// rotate(a, cx, cy) = translate(cx, cy) rotate(a) translate(−cx, −cy).
				cx, cy := args[1], args[2]
				t = svgMatrix{1, 0, 0, 1, cx, cy}.times(t).times(svgMatrix{1, 0, 0, 1, -cx, -cy})
			}
		case "skewX":
			if err := arity(1); err != nil {
				return m, err
			}
			t = svgMatrix{1, 0, math.Tan(rad(args[0])), 1, 0, 0}
		case "skewY":
			if err := arity(1); err != nil {
				return m, err
			}
			t = svgMatrix{1, math.Tan(rad(args[0])), 0, 1, 0, 0}
		default:
			return m, fmt.Errorf("unknown transform %q (matrix, translate, scale, rotate, skewX, skewY): %w", name, ErrFormat)
		}
		m = m.times(t)
	}
	if m[0]*m[3]-m[1]*m[2] == 0 {
		return m, fmt.Errorf("the transform flattens the drawing to a line or a point (determinant 0): %w", ErrFormat)
	}
	return m, nil
}

// svgProperty returns the value of a presentation property of an element,
// lower-cased and trimmed: from its style attribute when it is set there,
// else from the attribute of the same name (SVG 1.1 §6.4: a style
// declaration overrides the presentation attribute), "" when unset.
func svgProperty(attrs map[string]string, name string) string {
	v := attrs[name]
	for _, decl := range strings.Split(attrs["style"], ";") {
		if k, val, ok := strings.Cut(decl, ":"); ok && strings.TrimSpace(k) == name {
			v = val
		}
	}
	return strings.ToLower(strings.TrimSpace(v))
}

// svgUndrawn are the elements whose content is drawn only where another
// element refers to it, never in place.
var svgUndrawn = map[string]bool{"defs": true, "symbol": true, "marker": true, "pattern": true, "clipPath": true, "mask": true}

// shapePathData returns the path data equivalent to a shape element
// (SVG 1.1 §9.2–9.7: a line and a polyline are open, the others closed),
// and false for elements that are not shapes.
func shapePathData(name string, a map[string]string) (string, bool, error) {
	num := func(key string, def *float64) (float64, error) {
		s, ok := a[key]
		if !ok {
			if def != nil {
				return *def, nil
			}
			return 0, fmt.Errorf("attribute %q is missing: %w", key, ErrFormat)
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil {
			return 0, fmt.Errorf("attribute %s=%q must be a plain number (user units, no unit suffix): %w", key, s, ErrFormat)
		}
		return v, nil
	}
	zero := 0.0
	nums := func(keys []string, defs []*float64) ([]float64, error) {
		v := make([]float64, len(keys))
		for i, k := range keys {
			x, err := num(k, defs[i])
			if err != nil {
				return nil, err
			}
			v[i] = x
		}
		return v, nil
	}
	switch name {
	case "path":
		d, ok := a["d"]
		if !ok {
			return "", false, fmt.Errorf("path has no d attribute: %w", ErrFormat)
		}
		return d, true, nil
	case "rect":
		v, err := nums([]string{"x", "y", "width", "height", "rx", "ry"}, []*float64{&zero, &zero, nil, nil, &zero, &zero})
		if err != nil {
			return "", false, err
		}
		if v[4] != 0 || v[5] != 0 {
			return "", false, fmt.Errorf("rounded corners (rx, ry) are not read; draw them as a path: %w", ErrFormat)
		}
		if !(v[2] > 0 && v[3] > 0) {
			return "", false, fmt.Errorf("width %g and height %g must be positive: %w", v[2], v[3], ErrFormat)
		}
		return fmt.Sprintf("M %g %g h %g v %g h %g z", v[0], v[1], v[2], v[3], -v[2]), true, nil
	case "circle", "ellipse":
		keys := []string{"cx", "cy", "rx", "ry"}
		if name == "circle" {
			keys = []string{"cx", "cy", "r", "r"}
		}
		v, err := nums(keys, []*float64{&zero, &zero, nil, nil})
		if err != nil {
			return "", false, err
		}
		if !(v[2] > 0 && v[3] > 0) {
			return "", false, fmt.Errorf("radii %g and %g must be positive: %w", v[2], v[3], ErrFormat)
		}
		cx, cy, rx, ry := v[0], v[1], v[2], v[3]
		return fmt.Sprintf("M %g %g A %g %g 0 0 1 %g %g A %g %g 0 0 1 %g %g z", cx+rx, cy, rx, ry, cx-rx, cy, rx, ry, cx+rx, cy), true, nil
	case "polygon", "polyline":
		pts, ok := a["points"]
		if !ok {
			return "", false, fmt.Errorf("%s has no points attribute: %w", name, ErrFormat)
		}
		if name == "polyline" {
			return "M " + pts, true, nil
		}
		return "M " + pts + " z", true, nil
	case "line":
		v, err := nums([]string{"x1", "y1", "x2", "y2"}, []*float64{&zero, &zero, &zero, &zero})
		if err != nil {
			return "", false, err
		}
		return fmt.Sprintf("M %g %g L %g %g", v[0], v[1], v[2], v[3]), true, nil
	}
	return "", false, nil
}
