package deck

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"gopkg.in/yaml.v3"

	"cvdeck/mesh"
	"cvdeck/mesh/unstructured"
)

// unstructuredSpec is the decoded unstructured mesh settings.
type unstructuredSpec struct {
	opt unstructured.Options
	// layerYplus[i], when set, gives layer i's first height as a target y+
	// in the reference state.
	layerYplus []*value
	layerAt    []value
	regionAt   []value // the place of each region in the case file
	at         value
}

// decodeUnstructured reads the unstructured mesher's settings:
//
//	unstructured:
//	  min_angle: 28          # degrees (default 25, at most 33)
//	  growth: 1.2            # size growth ratio away from the boundary
//	  max_size: 20           # largest cell size (case units)
//	  quad_dominant: false   # pair triangles into quadrilaterals
//	  regions:               # finer cells where asked
//	    - {box: {from: [x, y], to: [x, y]}, size: h}
//	    - {circle: {centre: [x, y], radius: r}, size: h}
//	    - {near: tag, distance: d, size: h}
//	  layers:                # quadrilateral boundary layers on viscous walls
//	    - {tags: [cylinder], first_height: 0.05, growth: 1.2, count: 12}
//	    - {tags: [wing], yplus: 1, growth: 1.15, thickness: 5}
//
// Boundary cell sizes come from the outline's spacing laws. What the
// mesher would refuse is refused here, at the key concerned: a min_angle
// above 0 and at most unstructured.MaxMinAngle, a growth from 1 to
// unstructured.MaxGrowth, a region's near tag and a layer request's tags that the
// outline has (c.Geometry, decoded before the mesh), and the layers'
// bounds (see decodeLayers); the mesher's own checks are a backstop, whose
// errors can only be placed at the unstructured section as a whole.
func decodeUnstructured(c *Case, v value) (*unstructuredSpec, error) {
	o, err := v.object()
	if err != nil {
		return nil, err
	}
	us := &unstructuredSpec{at: v}
	if x, ok := o.get("min_angle"); ok {
		if us.opt.MinAngle, err = x.number(); err != nil {
			return nil, err
		}
		if !(us.opt.MinAngle > 0 && us.opt.MinAngle <= unstructured.MaxMinAngle) {
			return nil, x.errf("the minimum angle is above 0 and at most %g degrees (Delaunay refinement ends in practice up to about 33°, Shewchuk 2002), got %g", unstructured.MaxMinAngle, us.opt.MinAngle)
		}
	}
	if x, ok := o.get("growth"); ok {
		if us.opt.Growth, err = x.number(); err != nil {
			return nil, err
		}
		if !(us.opt.Growth >= 1 && us.opt.Growth <= unstructured.MaxGrowth) {
			return nil, x.errf("the size growth ratio away from the boundary is from 1 (cells as small as the boundary's throughout) to %g, got %g", unstructured.MaxGrowth, us.opt.Growth)
		}
	}
	if x, ok := o.get("max_size"); ok {
		if us.opt.MaxSize, err = x.positiveLength(); err != nil {
			return nil, err
		}
	}
	if x, ok := o.get("quad_dominant"); ok {
		if us.opt.QuadDominant, err = x.boolean(); err != nil {
			return nil, err
		}
	}
	if x, ok := o.get("regions"); ok {
		items, err := x.list()
		if err != nil {
			return nil, err
		}
		for _, it := range items {
			r, err := decodeRegion(c, it)
			if err != nil {
				return nil, err
			}
			us.opt.Regions = append(us.opt.Regions, r)
			us.regionAt = append(us.regionAt, it)
		}
	}
	if x, ok := o.get("layers"); ok {
		items, err := x.list()
		if err != nil {
			return nil, err
		}
		for _, it := range items {
			l, yplus, err := decodeLayers(c, it)
			if err != nil {
				return nil, err
			}
			us.opt.Layers = append(us.opt.Layers, l)
			us.layerYplus = append(us.layerYplus, yplus)
			us.layerAt = append(us.layerAt, it)
		}
	}
	return us, o.done()
}

// regionShapes are the keys of a refinement region's shape, one of which
// each region gives.
var regionShapes = []string{"box", "circle", "near"}

// decodeRegion reads one refinement region (see decodeUnstructured); a
// near region's tag must be one of the outline's.
func decodeRegion(c *Case, v value) (unstructured.Region, error) {
	var r unstructured.Region
	o, err := v.object()
	if err != nil {
		return r, err
	}
	sv, err := o.need("size")
	if err != nil {
		return r, err
	}
	if r.Size, err = sv.positiveLength(); err != nil {
		return r, err
	}
	shapes := 0
	if bv, ok := o.get("box"); ok {
		shapes++
		bo, err := bv.object()
		if err != nil {
			return r, err
		}
		fv, err := bo.need("from")
		if err != nil {
			return r, err
		}
		tv, err := bo.need("to")
		if err != nil {
			return r, err
		}
		a, err := fv.point()
		if err != nil {
			return r, err
		}
		b, err := tv.point()
		if err != nil {
			return r, err
		}
		r.Shape = unstructured.Box
		r.Min = [2]float64{min(a[0], b[0]), min(a[1], b[1])}
		r.Max = [2]float64{max(a[0], b[0]), max(a[1], b[1])}
		if err := bo.done(); err != nil {
			return r, err
		}
	}
	if cv, ok := o.get("circle"); ok {
		shapes++
		co, err := cv.object()
		if err != nil {
			return r, err
		}
		pv, err := co.need("centre")
		if err != nil {
			return r, err
		}
		if r.Center, err = pv.point(); err != nil {
			return r, err
		}
		rv, err := co.need("radius")
		if err != nil {
			return r, err
		}
		if r.Radius, err = rv.positiveLength(); err != nil {
			return r, err
		}
		r.Shape = unstructured.Circle
		if err := co.done(); err != nil {
			return r, err
		}
	}
	if nv, ok := o.get("near"); ok {
		shapes++
		if r.Tag, err = nv.str(); err != nil {
			return r, err
		}
		if err := c.Geometry.checkTag(nv, r.Tag, "for the region to be near"); err != nil {
			return r, err
		}
		dv, err := o.need("distance")
		if err != nil {
			return r, err
		}
		if r.Distance, err = dv.positiveLength(); err != nil {
			return r, err
		}
		r.Shape = unstructured.NearTag
	} else {
		o.known("distance")
	}
	switch {
	case shapes > 1:
		var given []string
		for _, k := range o.keys {
			if slices.Contains(regionShapes, k) {
				given = append(given, k)
			}
		}
		return r, o.keyAt(given[1]).errf("a refinement region has one shape: give one of box, circle and near, not both %s and %s (a second region, another item of the list, takes the other)", given[0], given[1])
	case shapes == 0:
		return r, v.errf("a refinement region is one of box: {from, to}, circle: {centre, radius} or near: TAG with distance")
	}
	return r, o.done()
}

// decodeLayers reads one boundary-layer request (see decodeUnstructured):
// its tags, each one of the outline's; the first cell height as
// first_height or yplus (returned, for the reference state to turn into a
// height when the mesh is built), one of them; a growth from 1 to
// unstructured.MaxLayerGrowth; and count (1 to unstructured.MaxLayerCount) or thickness (at least
// first_height), one of them.
func decodeLayers(c *Case, v value) (unstructured.Layers, *value, error) {
	var l unstructured.Layers
	o, err := v.object()
	if err != nil {
		return l, nil, err
	}
	tv, err := o.need("tags")
	if err != nil {
		return l, nil, err
	}
	if l.Tags, err = tv.strings(); err != nil {
		return l, nil, err
	}
	for i, tag := range l.Tags {
		at := tv
		if tv.n.Kind == yaml.SequenceNode {
			at = value{tv.d, tv.n.Content[i], fmt.Sprintf("%s[%d]", tv.path, i)}
		}
		if err := c.Geometry.checkTag(at, tag, "for the layers to grow from"); err != nil {
			return l, nil, err
		}
	}
	var yplus *value
	key, hv, err := o.either("first_height", "yplus", "each sets the height of the first layer")
	if err != nil {
		return l, nil, err
	}
	switch key {
	case "first_height":
		if l.FirstHeight, err = hv.positiveLength(); err != nil {
			return l, nil, err
		}
	case "yplus":
		yplus = &hv
	default:
		return l, nil, v.errf("boundary layers need the first cell height: first_height (case units) or yplus (with a reference state), one of them")
	}
	if gv, ok := o.get("growth"); ok {
		if l.Growth, err = gv.number(); err != nil {
			return l, nil, err
		}
		if !(l.Growth >= 1 && l.Growth <= unstructured.MaxLayerGrowth) {
			return l, nil, gv.errf("the height ratio of consecutive layers is from 1 (layers of equal height) to %g, got %g", float64(unstructured.MaxLayerGrowth), l.Growth)
		}
	}
	key, nv, err := o.either("count", "thickness", "the layers stop at the count or at the thickness")
	if err != nil {
		return l, nil, err
	}
	switch key {
	case "count":
		if l.Count, err = nv.count(1); err != nil {
			return l, nil, err
		}
		if l.Count > unstructured.MaxLayerCount {
			return l, nil, nv.errf("at most %d layers in one request, got %d", unstructured.MaxLayerCount, l.Count)
		}
	case "thickness":
		if l.Thickness, err = nv.positiveLength(); err != nil {
			return l, nil, err
		}
		if l.FirstHeight > 0 && l.Thickness < l.FirstHeight {
			return l, nil, nv.errf("the layers' thickness, %g, is less than their first height, %g (case units): not even one layer fits", l.Thickness/v.d.scale, l.FirstHeight/v.d.scale)
		}
	default:
		return l, nil, v.errf("boundary layers need count (the number of layers) or thickness (their total height), one of them")
	}
	return l, yplus, o.done()
}

// buildUnstructured meshes the case's outline with the unstructured mesher
// and returns the mesh notes: one per layer request, on the layers asked
// for and built (see layerNote).
func (c *Case) buildUnstructured() (*mesh.Mesh, []string, error) {
	us := c.Mesh.unstructured
	opt := us.opt
	opt.MaxCells = c.Mesh.maxCells
	opt.Layers = append([]unstructured.Layers(nil), opt.Layers...)
	// Refinement by r scales every size by 1/r, every count by r and every
	// growth ratio g to g^(1/r), as decodeSpacing does for the outline.
	r := c.Refine
	for i := range opt.Layers {
		l := &opt.Layers[i]
		if yv := us.layerYplus[i]; yv != nil {
			h, err := c.wallHeight(*yv)
			if err != nil {
				return nil, nil, err
			}
			l.FirstHeight = h
		}
		l.FirstHeight /= r
		if l.Count > 0 {
			l.Count = max(1, int(math.Round(float64(l.Count)*r)))
		}
		if l.Growth == 0 {
			l.Growth = unstructured.DefaultGrowth
		}
		l.Growth = math.Pow(l.Growth, 1/r)
	}
	if opt.Growth == 0 {
		opt.Growth = unstructured.DefaultGrowth
	}
	opt.Growth = math.Pow(opt.Growth, 1/r)
	opt.MaxSize /= r
	opt.Regions = append([]unstructured.Region(nil), opt.Regions...)
	for i := range opt.Regions {
		opt.Regions[i].Size /= r
	}
	d, err := c.Geometry.shape.Discretise()
	if err != nil {
		return nil, nil, c.Geometry.locate(err)
	}
	m, rep, err := unstructured.MeshWithReport(d, opt)
	if err != nil {
		var big *unstructured.CellLimitError
		if errors.As(err, &big) {
			return nil, nil, c.cellLimitError(big)
		}
		// The key path already says the unstructured mesher.
		msg := strings.TrimPrefix(err.Error(), "unstructured: ")
		return nil, nil, &InputError{File: c.File, Line: us.at.n.Line, Col: us.at.n.Column, Path: us.at.path, Msg: msg, Err: err}
	}
	var notes []string
	for _, l := range rep.Layers {
		notes = append(notes, layerNote(l)+topLayerNote(l))
	}
	return m, notes, nil
}

// topLayerNote says how the layers of a request meet the triangles above
// them: the top layer's thickness h = h₁ G^(n−1) (LayerReport.Top, n the
// most layers built), the lengths f of the edges along the layers' top
// that the triangles are built on (FrontMin, FrontMax), and the largest
// area ratio between a top layer cell and the equilateral triangle on its
// top edge, √3 f²/4 (TopJump; our own estimate for near-equilateral
// triangles, about 0.433 f/h for a cell f wide; the growth metric of the
// report measures the jumps themselves). Where the ratio is large the
// layers end too thin for the triangles (or too thick): more or
// faster-growing layers, or a finer wall spacing, bring it near 1. "" when
// nothing was built.
func topLayerNote(r unstructured.LayerReport) string {
	if !(r.Top > 0) || !(r.FrontMax > 0) {
		return ""
	}
	return fmt.Sprintf("; the top layer, about %.3g m thick under top edges %.3g to %.3g m long, differs in area from near-equilateral triangles on those edges by about %.3g times at most (the growth metric gives the measured jumps, larger where the triangles grow)", r.Top, r.FrontMin, r.FrontMax, r.TopJump)
}

// layerNote says in one line how many layers a request asked for and how
// many were built on its wall faces, and why fewer where fewer:
//
//	layers on cylinder: 10 asked, 10 built on all 96 wall faces
//	layers on cylinder: 100 asked, 18 to 24 built (all 100 on none of 96 wall faces); fewer on 90 faces where ...
func layerNote(r unstructured.LayerReport) string {
	var b strings.Builder
	fmt.Fprintf(&b, "layers on %s: %d asked, ", strings.Join(r.Tags, ", "), r.Asked)
	switch {
	case r.Faces == 0:
		b.WriteString("none built: another layer request with a thinner first layer has the same tags and takes their faces")
		return b.String()
	case r.Full == r.Faces:
		fmt.Fprintf(&b, "%s built on all %d wall faces", span(r.Min, r.Max), r.Faces)
		return b.String()
	}
	full := "none"
	if r.Full > 0 {
		full = fmt.Sprint(r.Full)
	}
	fmt.Fprintf(&b, "%s built (all %d on %s of %d wall faces)", span(r.Min, r.Max), r.Asked, full, r.Faces)
	for i, s := range r.Short {
		sep, unit := "; fewer on ", " faces"
		if i > 0 {
			sep, unit = "; on ", ""
		}
		if s.Faces == 1 && i == 0 {
			unit = " face"
		}
		fmt.Fprintf(&b, "%s%d%s where %s", sep, s.Faces, unit, s.Reason)
	}
	return b.String()
}

// span writes a range of whole numbers: "7", or "5 to 7".
func span(lo, hi int) string {
	if lo == hi {
		return fmt.Sprint(lo)
	}
	return fmt.Sprintf("%d to %d", lo, hi)
}

// cellLimitError words the mesher's refusal of a mesh above the cell
// limit in the case's units, at the place in the case file of what asks
// for most of the cells, and says what to change. Sizes are quoted as the
// case file writes them, before the refinement factor divides them.
func (c *Case) cellLimitError(e *unstructured.CellLimitError) error {
	us := c.Mesh.unstructured
	at := us.at
	unit := c.Units
	perUnit := c.Refine / unitScale[unit] // metres in the mesher to case units in the file
	length := func(m float64) string { return fmt.Sprintf("%.3g %s", m*perUnit, unit) }
	var b strings.Builder
	fmt.Fprintf(&b, "the sizes ask for about %.3g cells", e.Estimate)
	if e.LayerCells > 0 {
		fmt.Fprintf(&b, " (%d of them in the boundary layers)", e.LayerCells)
	}
	fmt.Fprintf(&b, ", more than the limit of %d", e.Limit)
	if e.Limit == DefaultMaxCells {
		b.WriteString(" (the default; mesh.max_cells in the case file, or --max-cells for one `cvdeck mesh`, sets another)")
	} else {
		b.WriteString(" (mesh.max_cells in the case file, or --max-cells for one `cvdeck mesh`)")
	}
	if c.Refine != 1 {
		fmt.Fprintf(&b, " at refinement factor %g", c.Refine)
	}
	what, change := "", ""
	switch {
	case e.Region >= 0:
		at = us.regionAt[e.Region]
		what, change = fmt.Sprintf("this region's size, %s,", length(e.Size)), "a size of about %s would fit"
	case e.LayerTop:
		what, change = fmt.Sprintf("the spacing along the walls with boundary layers (%s at the finest, kept along the layers' top)", length(e.Size)), "a spacing of about %s there would fit"
	case e.Tag != "":
		what, change = fmt.Sprintf("the spacing along boundary %s (%s at the finest)", e.Tag, length(e.Size)), "a spacing of about %s there would fit"
	case !math.IsInf(e.Size, 1) && c.sketch != "":
		// A sketch run's max_size is its --size, in metres after --scale.
		what, change = fmt.Sprintf("--size, %s,", length(e.Size)), "a --size of about %s would fit"
	case !math.IsInf(e.Size, 1):
		what, change = fmt.Sprintf("max_size, %s,", length(e.Size)), "a max_size of about %s would fit"
	default:
		what = "the size grown out from the boundary spacing"
	}
	fmt.Fprintf(&b, "; %s asks for about %.3g of them", what, e.Part)
	if e.Fit > 0 && change != "" {
		fmt.Fprintf(&b, ": "+change+", or raise the limit", fmt.Sprintf("%.3g %s", unstructured.RoundUp3(e.Fit*perUnit), unit))
	} else {
		b.WriteString(", and the other sizes alone ask for more than the limit: coarsen them too, or raise the limit")
	}
	return &InputError{File: c.File, Line: at.n.Line, Col: at.n.Column, Path: at.path, Msg: b.String(), Err: e}
}
