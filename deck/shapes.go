package deck

import (
	"cvdeck/geometry"
)

// decodeLoopShape reads a whole-loop shape:
//
//	circle:    {centre: [x, y], radius: r}
//	rectangle: {from: [x, y], to: [x, y], bottom: {...}, right: {...}, top: {...}, left: {...}}
//	naca:      {digits: "2412", chord: c, leading_edge: [x, y], angle: deg,
//	            closed_trailing_edge: true, upper: {...}, lower: {...}, base: {...}}
//
// where each part ({...}: name, tag, spacing) overrides the loop's tag and
// spacing for that side or surface, and a name makes it a curve the mesh
// section can refer to.
func decodeLoopShape(c *Case, shape string, v value, loop *object, def defaults) ([]geometry.Segment, []namedSegment, error) {
	o, err := v.object()
	if err != nil {
		return nil, nil, err
	}
	part := func(key string) (geometry.Attr, string, error) {
		pv, ok := o.get(key)
		if !ok {
			if def.tag == "" {
				return geometry.Attr{}, "", v.errf("the %s needs a boundary tag: give the loop a tag, or %s: {tag: name}", shape, key)
			}
			a := geometry.Attr{Tag: def.tag}
			if def.spacing != nil {
				a.Spacing = *def.spacing
			}
			c.noteTag(def.tag, def.tagAt)
			return a, "", nil
		}
		po, err := pv.object()
		if err != nil {
			return geometry.Attr{}, "", err
		}
		a, name, err := decodeAttr(c, po, def)
		if err != nil {
			return a, "", err
		}
		return a, name, po.done()
	}
	var segs []geometry.Segment
	var named []namedSegment
	switch shape {
	case "circle":
		cv, err := o.need("centre")
		if err != nil {
			return nil, nil, err
		}
		centre, err := cv.point()
		if err != nil {
			return nil, nil, err
		}
		rv, err := o.need("radius")
		if err != nil {
			return nil, nil, err
		}
		r, err := rv.positiveLength()
		if err != nil {
			return nil, nil, err
		}
		if err := o.done(); err != nil {
			return nil, nil, err
		}
		a, _, err := part("")
		if err != nil {
			return nil, nil, err
		}
		l, err := geometry.NewCircle(centre[0], centre[1], r, a)
		if err != nil {
			return nil, nil, v.wrap(err)
		}
		segs = l.Segments
	case "rectangle":
		fv, err := o.need("from")
		if err != nil {
			return nil, nil, err
		}
		from, err := fv.point()
		if err != nil {
			return nil, nil, err
		}
		tv, err := o.need("to")
		if err != nil {
			return nil, nil, err
		}
		to, err := tv.point()
		if err != nil {
			return nil, nil, err
		}
		var sides [4]geometry.Attr
		var names [4]string
		for k, key := range []string{"bottom", "right", "top", "left"} {
			if sides[k], names[k], err = part(key); err != nil {
				return nil, nil, err
			}
		}
		if err := o.done(); err != nil {
			return nil, nil, err
		}
		l, err := geometry.NewRectangle(from[0], from[1], to[0], to[1], sides)
		if err != nil {
			return nil, nil, v.wrap(err)
		}
		segs = l.Segments
		for k, n := range names {
			if n != "" {
				named = append(named, namedSegment{name: n, seg: segs[k], at: v})
			}
		}
	case "naca":
		dv, err := o.need("digits")
		if err != nil {
			return nil, nil, err
		}
		digits, err := dv.str()
		if err != nil {
			return nil, nil, err
		}
		chord := 1.0 * c.scale()
		if cv, ok := o.get("chord"); ok {
			if chord, err = cv.positiveLength(); err != nil {
				return nil, nil, err
			}
		}
		var le [2]float64
		if lv, ok := o.get("leading_edge"); ok {
			p, err := lv.point()
			if err != nil {
				return nil, nil, err
			}
			le = p
		}
		angle := 0.0
		if av, ok := o.get("angle"); ok {
			if angle, err = av.number(); err != nil {
				return nil, nil, err
			}
		}
		closed := false
		if bv, ok := o.get("closed_trailing_edge"); ok {
			if closed, err = bv.boolean(); err != nil {
				return nil, nil, err
			}
		}
		sec, err := geometry.NewNACA4(digits, chord, le[0], le[1], angle, closed)
		if err != nil {
			return nil, nil, dv.wrap(err)
		}
		ua, un, err := part("upper")
		if err != nil {
			return nil, nil, err
		}
		la, ln, err := part("lower")
		if err != nil {
			return nil, nil, err
		}
		ba := geometry.Attr{}
		bn := ""
		if !closed {
			if ba, bn, err = part("base"); err != nil {
				return nil, nil, err
			}
		} else if o.has("base") {
			bv, _ := o.get("base")
			return nil, nil, bv.errf("a closed trailing edge has no base")
		}
		if err := o.done(); err != nil {
			return nil, nil, err
		}
		segs = sec.Segments(ua, la, ba)
		for k, n := range []string{un, ln, bn} {
			if n != "" && k < len(segs) {
				named = append(named, namedSegment{name: n, seg: segs[k], at: v})
			}
		}
	}
	loop.known(shape)
	return segs, named, nil
}

// scale returns metres per case length unit.
func (c *Case) scale() float64 { return unitScale[c.Units] }
