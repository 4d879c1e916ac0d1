package deck

import (
	"bytes"
	"errors"
	"math"

	"github.com/paulmach/orb"
	"gopkg.in/yaml.v3"

	"cvdeck/geometry"
)

// segmentKinds are the shape keys of a chained segment; exactly one of them
// appears in each segment mapping.
var segmentKinds = []string{"line", "arc", "polyline", "spline"}

// namedSegment is a decoded segment with its optional name.
type namedSegment struct {
	name string
	seg  geometry.Segment
	at   value
}

// decodeChain reads a run of segments that start at start and each begin
// where the previous one ended:
//
//   - {line: [x, y], tag: t, spacing: {...}}           straight to (x, y)
//   - {arc: {through: [x, y], to: [x, y]}, ...}         circular arc through a point
//   - {arc: {centre: [x, y], to: [x, y], turn: ccw}, ...} arc about a centre
//   - {polyline: [[x, y], ...], ...}                    straight pieces through the points
//   - {spline: [[x, y], ...], ...}                      cubic spline through the points
//
// Every segment may carry a name (to refer to it from the mesh section), a
// tag (default: the enclosing tag) and a spacing (default: the enclosing
// spacing).
func decodeChain(c *Case, start orb.Point, list value, def defaults) ([]namedSegment, error) {
	items, err := list.list()
	if err != nil {
		return nil, err
	}
	if len(items) == 0 {
		return nil, list.errf("needs at least one segment")
	}
	var out []namedSegment
	cur := start
	for _, it := range items {
		o, err := it.object()
		if err != nil {
			return nil, err
		}
		var kind string
		var shape value
		for _, k := range segmentKinds {
			if v, ok := o.get(k); ok {
				if kind != "" {
					return nil, v.errf("a segment has one shape, but both %q and %q are given", kind, k)
				}
				kind, shape = k, v
			}
		}
		if kind == "" {
			return nil, it.errf("a segment needs one of the keys line, arc, polyline or spline")
		}
		o.known("name", "tag", "spacing")
		if err := o.done(); err != nil {
			return nil, err
		}
		attr, name, err := decodeAttr(c, o, def)
		if err != nil {
			return nil, err
		}
		var seg geometry.Segment
		switch kind {
		case "line":
			to, err := shape.point()
			if err != nil {
				return nil, err
			}
			seg, err = geometry.NewLine(cur[0], cur[1], to[0], to[1], attr)
			if err != nil {
				return nil, shape.wrap(err)
			}
		case "arc":
			seg, err = decodeArc(cur, shape, attr)
			if err != nil {
				return nil, err
			}
		case "polyline", "spline":
			pts, err := c.chainPoints(shape, cur)
			if err != nil {
				return nil, err
			}
			if kind == "polyline" {
				seg, err = geometry.NewPolyline(pts, attr)
			} else {
				seg, err = geometry.NewSpline(pts, attr)
			}
			if err != nil {
				return nil, shape.wrap(err)
			}
		}
		if err := c.checkSpacing(seg, o, it); err != nil {
			return nil, err
		}
		cur = seg.At(1)
		out = append(out, namedSegment{name: name, seg: seg, at: it})
	}
	return out, nil
}

// decodeArc reads an arc that starts at cur: {through, to} or {centre, to,
// turn}; with a centre, the end point's distance from it must equal the
// start's (the radius) and turn says which way round (ccw or cw).
func decodeArc(cur orb.Point, shape value, attr geometry.Attr) (geometry.Segment, error) {
	o, err := shape.object()
	if err != nil {
		return nil, err
	}
	tv, err := o.need("to")
	if err != nil {
		return nil, err
	}
	to, err := tv.point()
	if err != nil {
		return nil, err
	}
	if v, ok := o.get("through"); ok {
		if o.has("centre") {
			return nil, v.errf("an arc is given by a point it passes through or by its centre, not both")
		}
		if err := o.done(); err != nil {
			return nil, err
		}
		m, err := v.point()
		if err != nil {
			return nil, err
		}
		a, err := geometry.NewArcThrough(cur[0], cur[1], m[0], m[1], to[0], to[1], attr)
		if err != nil {
			return nil, shape.wrap(err)
		}
		return a, nil
	}
	cv, err := o.need("centre")
	if err != nil {
		return nil, shape.errf("an arc needs through: [x, y] or centre: [x, y]")
	}
	centre, err := cv.point()
	if err != nil {
		return nil, err
	}
	turn := "ccw"
	if v, ok := o.get("turn"); ok {
		if turn, err = v.oneOf("ccw", "cw"); err != nil {
			return nil, err
		}
	}
	if err := o.done(); err != nil {
		return nil, err
	}
	r0 := math.Hypot(cur[0]-centre[0], cur[1]-centre[1])
	r1 := math.Hypot(to[0]-centre[0], to[1]-centre[1])
	if !(r0 > 0) || math.Abs(r1-r0) > 1e-9*r0 {
		return nil, shape.errf("the arc's start (%g, %g) and end (%g, %g) must lie at the same non-zero distance from its centre (%g, %g); they are %g and %g away",
			cur[0], cur[1], to[0], to[1], centre[0], centre[1], r0, r1)
	}
	a0 := math.Atan2(cur[1]-centre[1], cur[0]-centre[0]) * 180 / math.Pi
	a1 := math.Atan2(to[1]-centre[1], to[0]-centre[0]) * 180 / math.Pi
	// Sweep the short or long way as turn says; equal ends make a circle.
	if turn == "ccw" {
		for a1 <= a0 {
			a1 += 360
		}
	} else {
		for a1 >= a0 {
			a1 -= 360
		}
	}
	a, err := geometry.NewArc(centre[0], centre[1], r0, a0, a1, attr)
	if err != nil {
		return nil, shape.wrap(err)
	}
	return a, nil
}

// decodeAttr reads a segment's name, tag and spacing, the tag and spacing
// defaulting to those of its loop or curve; the place that gives the
// segment its tag is noted (Case.noteTag).
func decodeAttr(c *Case, o *object, def defaults) (geometry.Attr, string, error) {
	var a geometry.Attr
	name := ""
	var err error
	if v, ok := o.get("name"); ok {
		if name, err = v.str(); err != nil {
			return a, "", err
		}
	}
	a.Tag = def.tag
	at := def.tagAt
	if v, ok := o.get("tag"); ok {
		if a.Tag, err = v.str(); err != nil {
			return a, "", err
		}
		at = v
	}
	if a.Tag == "" {
		return a, "", o.errf("the segment needs a boundary tag (tag: name), here or on its loop")
	}
	c.noteTag(a.Tag, at)
	if v, ok := o.get("spacing"); ok {
		if a.Spacing, err = decodeSpacing(v, c); err != nil {
			return a, "", err
		}
	} else if def.spacing != nil {
		a.Spacing = *def.spacing
	}
	return a, name, nil
}

// chainPoints reads the points of a polyline or spline that starts at
// cur: a list [[x, y], ...], or {file: points.dat}, an x-y point file
// (one "x y" pair a line, as a sketch's, in the case's units, relative to
// the case file) such as a table of aerofoil ordinates. The file's first
// point may be cur itself (a loop that starts where its table does), or
// the points follow cur.
func (c *Case) chainPoints(shape value, cur orb.Point) ([]orb.Point, error) {
	if shape.n.Kind != yaml.MappingNode {
		pts, err := shape.points(1)
		if err != nil {
			return nil, err
		}
		return append([]orb.Point{cur}, pts...), nil
	}
	o, err := shape.object()
	if err != nil {
		return nil, err
	}
	fv, err := o.need("file")
	if err != nil {
		return nil, err
	}
	if err := o.done(); err != nil {
		return nil, err
	}
	rel, err := fv.str()
	if err != nil {
		return nil, err
	}
	data, _, err := c.readInput(fv, rel)
	if err != nil {
		return nil, err
	}
	// The table's numbers are in the case's units, which a unit named in
	// its header must match.
	scale := shape.d.scale
	f, err := geometry.ReadPointFile(bytes.NewReader(data), geometry.PointOptions{Unit: scale})
	if ue := (*geometry.UnitError)(nil); errors.As(err, &ue) {
		return nil, fv.errf("%s: %v; give the case units: %s, or convert the table to the case's units", rel, err, ue.Unit)
	}
	if err != nil {
		return nil, fv.errf("%s: %v", rel, err)
	}
	pl := f.Polyline
	pts := []orb.Point{cur}
	for i, p := range pl.Vertices() {
		q := orb.Point{p[0] * scale, p[1] * scale}
		if i == 0 && math.Hypot(q[0]-cur[0], q[1]-cur[1]) <= 1e-9*math.Max(1, math.Hypot(cur[0], cur[1])) {
			continue // the table starts at cur
		}
		pts = append(pts, q)
	}
	if len(pts) < 2 {
		return nil, fv.errf("%s: needs at least one point besides the start", rel)
	}
	return pts, nil
}
