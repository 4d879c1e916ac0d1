package deck

import (
	"errors"
	"fmt"
	"slices"
	"sort"
	"strings"

	"cvdeck/geometry"
)

// geometrySpec is the decoded geometry section: the loops of the outline
// and every named curve (a named segment, a named loop or a free curve)
// that the mesh section may refer to.
type geometrySpec struct {
	// shape is the validated, normalised outline of the loops.
	shape  geometry.Outline
	loops  []loopSpec
	curves map[string]*curveSpec
	order  []string // curve names in order of definition
}

// loopSpec is one loop of the outline.
type loopSpec struct {
	name     string
	segments []geometry.Segment
	segAt    []value // where each segment is written
	at       value
}

// curveSpec is a named run of segments: one segment of a loop, a whole
// loop, or a free curve of the curves list.
type curveSpec struct {
	name     string
	segments []geometry.Segment
	closed   bool
	at       value
}

// decodeGeometry reads the geometry section:
//
//	geometry:
//	  loops:              # the first loop is the outer one, the rest inner
//	    - name: channel
//	      start: [x, y]
//	      segments: [...]  # see decodeChain
//	    - name: cylinder
//	      circle: {centre: [x, y], radius: r}
//	      tag: cylinder
//	      spacing: {count: 65}
//	  curves:             # free curves, e.g. cuts between structured blocks
//	    - {name: cut, start: [x, y], segments: [...]}
//	  file: sketch.geojson  # or: the loops of a sketch file
func decodeGeometry(c *Case, v value) (*geometrySpec, error) {
	o, err := v.object()
	if err != nil {
		return nil, err
	}
	g := &geometrySpec{curves: map[string]*curveSpec{}}
	if fv, ok := o.get("file"); ok {
		if o.has("loops") {
			return nil, fv.errf("geometry comes from a sketch file or from loops, not both")
		}
		if err := decodeSketchRef(c, g, o, fv); err != nil {
			return nil, err
		}
		// The sketch file gives its edges their tags: errors about a tag
		// point at the file key.
		for _, l := range g.loops {
			for _, seg := range l.segments {
				c.noteTag(seg.Attr().Tag, fv)
			}
		}
	} else {
		lv, err := o.need("loops")
		if err != nil {
			return nil, err
		}
		items, err := lv.list()
		if err != nil {
			return nil, err
		}
		if len(items) == 0 {
			return nil, lv.errf("needs at least the outer loop")
		}
		for i, it := range items {
			l, err := decodeLoop(c, g, it, i)
			if err != nil {
				return nil, err
			}
			g.loops = append(g.loops, l)
		}
	}
	if cv, ok := o.get("curves"); ok {
		items, err := cv.list()
		if err != nil {
			return nil, err
		}
		for _, it := range items {
			if err := decodeCurve(c, g, it); err != nil {
				return nil, err
			}
		}
	}
	if err := o.done(); err != nil {
		return nil, err
	}
	if g.shape, err = g.outline(); err != nil {
		return nil, err
	}
	return g, nil
}

// noteTag records at as the place in the case file that gives a boundary
// tag, unless an earlier place gives it already: an error about the tag as
// a whole, such as a tag without a boundary condition, is reported at the
// first segment (or grid boundary) that carries it, where the name can be
// read and checked. A zero at (no place) or an empty tag records nothing.
func (c *Case) noteTag(tag string, at value) {
	if tag == "" || at.n == nil {
		return
	}
	if c.tagAt == nil {
		c.tagAt = map[string]value{}
	}
	if _, ok := c.tagAt[tag]; !ok {
		c.tagAt[tag] = at
	}
}

// tags returns the outline's boundary tags in the order they first
// appear, loop by loop: each segment's tag, or for a segment with none
// its loop's name, "outer", "inner1", ... (the tags geometry.Outline's
// Discretise gives the edges, and so the mesh's).
func (g *geometrySpec) tags() []string {
	var out []string
	seen := map[string]bool{}
	for i, l := range g.shape.Loops() {
		def := l.Name
		if def == "" {
			def = "outer"
			if i > 0 {
				def = fmt.Sprintf("inner%d", i)
			}
		}
		for _, seg := range l.Segments {
			t := seg.Attr().Tag
			if t == "" {
				t = def
			}
			if !seen[t] {
				seen[t] = true
				out = append(out, t)
			}
		}
	}
	return out
}

// checkTag refuses, at v, a tag that no boundary of the outline carries,
// naming the outline's tags and the nearest of them; what says what the
// tag is for ("for the region to be near").
func (g *geometrySpec) checkTag(v value, tag, what string) error {
	tags := g.tags()
	if slices.Contains(tags, tag) {
		return nil
	}
	hint := ""
	if s := closest(tag, tags); s != "" {
		hint = fmt.Sprintf("; did you mean %q?", s)
	}
	return v.errf("no boundary of the outline is tagged %q %s%s (the outline's tags: %s)", tag, what, hint, strings.Join(tags, ", "))
}

// addCurve registers a named curve, refusing a second use of a name.
func (g *geometrySpec) addCurve(cs *curveSpec) error {
	if prev, dup := g.curves[cs.name]; dup {
		return cs.at.errf("the name %q is used twice (first at line %d)", cs.name, prev.at.n.Line)
	}
	g.curves[cs.name] = cs
	g.order = append(g.order, cs.name)
	return nil
}

// curve looks up a named curve, suggesting the nearest name on a miss.
func (g *geometrySpec) curve(at value, name string) (*curveSpec, error) {
	cs, ok := g.curves[name]
	if ok {
		return cs, nil
	}
	names := append([]string(nil), g.order...)
	sort.Strings(names)
	hint := ""
	if s := closest(name, names); s != "" {
		hint = fmt.Sprintf("; did you mean %q?", s)
	}
	if len(names) == 0 {
		return nil, at.errf("no curve is named %q: give segments, loops or curves a name in the geometry section", name)
	}
	return nil, at.errf("no curve is named %q%s (named: %s)", name, hint, strings.Join(names, ", "))
}

var loopShapes = []string{"segments", "circle", "rectangle", "naca"}

// decodeLoop reads one loop: a chain of segments from a start point, or a
// whole-loop shape (circle, rectangle, NACA 4-digit section).
func decodeLoop(c *Case, g *geometrySpec, v value, index int) (loopSpec, error) {
	o, err := v.object()
	if err != nil {
		return loopSpec{}, err
	}
	l := loopSpec{name: fmt.Sprintf("loop%d", index), at: v}
	if nv, ok := o.get("name"); ok {
		if l.name, err = nv.str(); err != nil {
			return l, err
		}
	}
	def, err := decodeDefaults(c, o, "", value{})
	if err != nil {
		return l, err
	}
	shape := ""
	for _, k := range loopShapes {
		if o.has(k) {
			if shape != "" {
				return l, v.errf("a loop is one of %s; both %q and %q are given", strings.Join(loopShapes, ", "), shape, k)
			}
			shape = k
		}
	}
	switch shape {
	case "":
		return l, v.errf("a loop needs segments (with a start point) or one of the shapes circle, rectangle, naca")
	case "segments":
		named, err := decodeStartedChain(c, g, o, def)
		if err != nil {
			return l, err
		}
		for _, ns := range named {
			l.segments = append(l.segments, ns.seg)
			l.segAt = append(l.segAt, ns.at)
		}
	default:
		sv, _ := o.get(shape)
		segs, named, err := decodeLoopShape(c, shape, sv, o, def)
		if err != nil {
			return l, err
		}
		l.segments = segs
		for range segs {
			l.segAt = append(l.segAt, sv)
		}
		for _, ns := range named {
			if err := g.addCurve(&curveSpec{name: ns.name, segments: []geometry.Segment{ns.seg}, at: sv}); err != nil {
				return l, err
			}
		}
	}
	if err := o.done(); err != nil {
		return l, err
	}
	if err := g.addCurve(&curveSpec{name: l.name, segments: l.segments, closed: true, at: v}); err != nil {
		return l, err
	}
	return l, nil
}

// decodeCurve reads a free curve: {name, start, segments, tag, spacing};
// its segments take the curve's name as their tag unless told otherwise.
func decodeCurve(c *Case, g *geometrySpec, v value) error {
	o, err := v.object()
	if err != nil {
		return err
	}
	nv, err := o.need("name")
	if err != nil {
		return err
	}
	name, err := nv.str()
	if err != nil {
		return err
	}
	def, err := decodeDefaults(c, o, name, nv)
	if err != nil {
		return err
	}
	named, err := decodeStartedChain(c, g, o, def)
	if err != nil {
		return err
	}
	if err := o.done(); err != nil {
		return err
	}
	cs := &curveSpec{name: name, at: v}
	for _, ns := range named {
		cs.segments = append(cs.segments, ns.seg)
	}
	return g.addCurve(cs)
}

// defaults are what a loop or curve gives the segments that name none of
// their own: a tag, with the place in the case file that gives it (see
// Case.noteTag; zero when there is no tag), and a spacing (nil: none).
type defaults struct {
	tag     string
	tagAt   value
	spacing *geometry.Spacing
}

// decodeDefaults reads the tag and spacing a loop or curve gives the
// segments that name none of their own; tag, written at tagAt, is the tag
// when it gives none either (a free curve's name, "" for a loop).
func decodeDefaults(c *Case, o *object, tag string, tagAt value) (defaults, error) {
	def := defaults{tag: tag, tagAt: tagAt}
	var err error
	if tv, ok := o.get("tag"); ok {
		if def.tag, err = tv.str(); err != nil {
			return def, err
		}
		def.tagAt = tv
	}
	if sv, ok := o.get("spacing"); ok {
		sp, err := decodeSpacing(sv, c)
		if err != nil {
			return def, err
		}
		def.spacing = &sp
	}
	return def, nil
}

// decodeStartedChain reads the start point and the segments of a loop or
// curve (see decodeChain) and registers every named segment as a curve.
func decodeStartedChain(c *Case, g *geometrySpec, o *object, def defaults) ([]namedSegment, error) {
	sv, err := o.need("start")
	if err != nil {
		return nil, err
	}
	start, err := sv.point()
	if err != nil {
		return nil, err
	}
	list, err := o.need("segments")
	if err != nil {
		return nil, err
	}
	named, err := decodeChain(c, start, list, def)
	if err != nil {
		return nil, err
	}
	for _, ns := range named {
		if ns.name != "" {
			if err := g.addCurve(&curveSpec{name: ns.name, segments: []geometry.Segment{ns.seg}, at: ns.at}); err != nil {
				return nil, err
			}
		}
	}
	return named, nil
}

// outline validates the loops as one outline (closed, not self-crossing,
// not crossing each other, inner loops inside the outer one, no zero-length
// segment) and returns it normalised: outer loop counter-clockwise, inner
// loops clockwise. A geometry error is reported at the segment (or loop)
// it concerns.
func (g *geometrySpec) outline() (geometry.Outline, error) {
	o := geometry.Outline{Outer: g.loops[0].loop()}
	for _, l := range g.loops[1:] {
		o.Inner = append(o.Inner, l.loop())
	}
	n, err := o.Normalise()
	if err != nil {
		return n, g.locate(err)
	}
	return n, nil
}

func (l loopSpec) loop() geometry.Loop {
	return geometry.Loop{Name: l.name, Segments: l.segments}
}

// locate turns a geometry error into an input error at the YAML node of the
// loop and segment it names.
func (g *geometrySpec) locate(err error) error {
	var ge *geometry.Error
	if errors.As(err, &ge) && ge.Loop >= 0 && ge.Loop < len(g.loops) {
		l := g.loops[ge.Loop]
		at := l.at
		if ge.Segment >= 0 && ge.Segment < len(l.segAt) {
			at = l.segAt[ge.Segment]
		}
		return at.wrap(inMetres(err, at.d.scale))
	}
	if len(g.loops) > 0 {
		return g.loops[0].at.wrap(inMetres(err, g.loops[0].at.d.scale))
	}
	return err
}

// inMetres adds to an error of the geometry or mesh packages, whose
// coordinates and lengths are in metres, what a metre is in the case's
// units (scale metres per case unit), when these are not metres.
func inMetres(err error, scale float64) error {
	if scale == 1 {
		return err
	}
	for name, s := range unitScale {
		if s == scale {
			return fmt.Errorf("%w (lengths and coordinates in metres: 1 m is %g %s)", err, 1/s, name)
		}
	}
	return err
}
