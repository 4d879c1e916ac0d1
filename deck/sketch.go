package deck

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/bc"
	"cvdeck/geometry"
	"cvdeck/mesh/unstructured"
)

// sketchKinds maps sketch file extensions to their reader.
var sketchKinds = map[string]string{
	".geojson": "geojson", ".json": "geojson",
	".wkt": "wkt",
	".svg": "svg",
	".xy":  "points", ".txt": "points", ".dat": "points", ".csv": "points",
}

// IsSketch reports whether path names a bare geometry file (by extension)
// rather than a case file.
func IsSketch(path string) bool {
	_, ok := sketchKinds[strings.ToLower(filepath.Ext(path))]
	return ok
}

// sketchRead says how to read a sketch file.
type sketchRead struct {
	scale float64  // metres per file unit
	flipY bool     // negate y, for any format (SVG drawings grow y downwards)
	tags  []string // SVG: tag of each loop, in path order
}

// utf8BOM is the byte-order mark some editors write at the start of a
// UTF-8 file (U+FEFF encoded).
var utf8BOM = []byte("\ufeff")

// readSketch reads a sketch file into one validated, oriented outline in
// metres. A GeoJSON or WKT file must hold exactly one polygon (with any
// number of holes); an SVG file is either raw path data or an SVG document
// whose shapes are read in document order, closed ones as loops and open
// strokes joined end to end into loops, each element's data-tag or id
// tagging its edges; a point file is one closed polyline, its title (if
// any) the loop's name and a unit in its header checked against r.scale.
//
// A UTF-8 byte-order mark at the start is dropped first, so that every
// reader sees the same text (an SVG document would otherwise be taken
// for path data, and JSON refuses it). r.flipY negates y in every format:
// the SVG reader does it itself; the outlines of the others, all lines,
// are mirrored afterwards by flipOutline.
func readSketch(path string, data []byte, r sketchRead) (geometry.Outline, error) {
	data = bytes.TrimPrefix(data, utf8BOM)
	kind := sketchKinds[strings.ToLower(filepath.Ext(path))]
	var outs []geometry.Outline
	var err error
	switch kind {
	case "geojson":
		outs, err = geometry.ReadGeoJSON(data)
	case "wkt":
		outs, err = geometry.ReadWKT(string(data), geometry.PolygonTags{})
	case "svg":
		// An SVG document (from a drawing program) or bare path data.
		opt := geometry.SVGOptions{Scale: 1, FlipY: r.flipY, Tags: r.tags}
		var o geometry.Outline
		if strings.HasPrefix(strings.TrimSpace(string(data)), "<") {
			o, err = geometry.ReadSVGDocument(bytes.NewReader(data), opt)
		} else {
			o, err = geometry.ReadSVGPath(string(data), opt)
		}
		outs = []geometry.Outline{o}
	case "points":
		// The file's numbers are read at r.scale metres to the unit, which
		// a unit named in its header must match.
		var f geometry.PointFile
		f, err = geometry.ReadPointFile(bytes.NewReader(data), geometry.PointOptions{Attr: geometry.Attr{Tag: "outer"}, Close: true, Unit: r.scale})
		if err == nil {
			// One line segment per edge, as the polygon readers make, so
			// that a spacing law places nodes edge by edge and every
			// corner of the drawing stays a node. The file's title, if
			// any, names the loop; its edges keep the tag "outer".
			name := f.Title
			if name == "" {
				name = "outer"
			}
			var loop geometry.Loop
			loop, err = edgeLoop(f.Polyline.Vertices(), "outer", name)
			if err == nil {
				var o geometry.Outline
				o, err = geometry.Outline{Outer: loop}.Normalise()
				outs = []geometry.Outline{o}
			}
		}
	default:
		return geometry.Outline{}, fmt.Errorf("%s: cvdeck reads sketches as %s", path, SketchExtensions())
	}
	if err != nil {
		return geometry.Outline{}, fmt.Errorf("%s: %w", path, err)
	}
	if len(outs) != 1 {
		return geometry.Outline{}, fmt.Errorf("%s holds %d polygons; a case meshes one outline (one outer loop with any number of holes)", path, len(outs))
	}
	o := outs[0]
	if r.flipY && kind != "svg" {
		if o, err = flipOutline(o); err != nil {
			return o, fmt.Errorf("%s: %w", path, err)
		}
	}
	if r.scale != 1 {
		if o, err = o.Scaled(r.scale); err != nil {
			return o, fmt.Errorf("%s: %w", path, err)
		}
	}
	return o, nil
}

// flipOutline mirrors an outline of lines and polylines in the x axis
// (y to −y), as SVGOptions.FlipY does for a drawing, and orients it
// again: mirroring turns every loop the other way round. Any other kind
// of segment (an arc, a spline) is refused, naming it: the sketch readers
// make none but lines and polylines, and mirroring another kind needs
// that kind's own geometry.
func flipOutline(o geometry.Outline) (geometry.Outline, error) {
	flip := func(li int, l geometry.Loop) (geometry.Loop, error) {
		r := l
		r.Segments = make([]geometry.Segment, len(l.Segments))
		for si, s := range l.Segments {
			var err error
			switch sg := s.(type) {
			case *geometry.Line:
				r.Segments[si], err = geometry.NewLine(sg.A[0], -sg.A[1], sg.B[0], -sg.B[1], sg.Attr())
			case *geometry.Polyline:
				pts := slices.Clone(sg.Vertices())
				for k := range pts {
					pts[k][1] = -pts[k][1]
				}
				r.Segments[si], err = geometry.NewPolyline(pts, sg.Attr())
			default:
				return r, fmt.Errorf("flip y: segment %d of loop %d (%q) is of kind %q; only lines and polylines can be flipped: %w", si, li, l.Name, s.Kind(), geometry.ErrFormat)
			}
			if err != nil {
				return r, fmt.Errorf("flip y: segment %d of loop %d (%q): %w", si, li, l.Name, err)
			}
		}
		return r, nil
	}
	var f geometry.Outline
	var err error
	if f.Outer, err = flip(0, o.Outer); err != nil {
		return o, err
	}
	for i, l := range o.Inner {
		fl, err := flip(i+1, l)
		if err != nil {
			return o, err
		}
		f.Inner = append(f.Inner, fl)
	}
	n, err := f.Normalise()
	if err != nil {
		return o, fmt.Errorf("flip y: %w", err)
	}
	return n, nil
}

// sketchTagsRefusal says, for a sketch file's path, why a tags list does
// not apply to it and where its format carries its tags instead; "" for
// an SVG sketch, whose loops tags names.
func sketchTagsRefusal(path string) string {
	const lead = "tags (the tag of each loop, in path order) applies to SVG sketches only; "
	switch sketchKinds[strings.ToLower(filepath.Ext(path))] {
	case "svg":
		return ""
	case "geojson":
		return lead + "a GeoJSON sketch tags its edges in its feature's properties: \"tag\" for every edge of the feature, \"edge_tags\": [{\"polygon\": 0, \"ring\": 0, \"from\": 0, \"to\": 2, \"tag\": \"wall\"}] for ranges of edges (edge k from position k to k+1 of the ring)"
	case "wkt":
		return lead + "a WKT sketch carries no tags: its loops are tagged outer, inner1, inner2, ... in text order; to tag edges, write the sketch as GeoJSON with the properties \"tag\" and \"edge_tags\""
	case "points":
		return lead + "an x-y point file is one loop whose edges are tagged outer (a title line names the loop); to tag edges apart, write the sketch as GeoJSON with the property \"edge_tags\""
	}
	return lead + "cvdeck reads sketches as " + SketchExtensions()
}

// unitAdvice adds to a point file's unit disagreement (geometry.UnitError)
// how to read the file in the unit its header names: with --scale for a
// bare sketch (caseUnit 0), with the sketch reference's scale for a case
// file whose lengths are caseUnit metres (the file's numbers are read at
// caseUnit × scale metres). Other errors pass unchanged.
func unitAdvice(err error, caseUnit float64) error {
	var ue *geometry.UnitError
	if !errors.As(err, &ue) || ue.ReadAt == 0 {
		return err
	}
	if caseUnit == 0 {
		return fmt.Errorf("%w; to read it in %s, give --scale %g", err, ue.Unit, ue.Metres)
	}
	return fmt.Errorf("%w; to read it in %s, give the sketch scale: %g (the case's lengths are in %g m)", err, ue.Unit, ue.Metres/caseUnit, caseUnit)
}

// SketchExtensions lists the sketch file extensions and their formats,
// for messages.
func SketchExtensions() string {
	return ".geojson/.json (GeoJSON), .wkt (WKT), .svg (SVG document or path data) or .xy/.txt/.dat/.csv (x y points)"
}

// decodeSketchRef reads a geometry section that points at a sketch file:
//
//	geometry:
//	  file: data/fins.geojson   # relative to the case file
//	  scale: 1                  # extra factor on the file's coordinates (after units)
//	  flip_y: false             # flip the y axis (any format; SVG drawings grow y downwards)
//	  tags: [duct, fin]         # SVG only: the tag of each loop, in path order
//	  spacing: {size: 2}        # the spacing of every edge (case units)
//
// The file's coordinates are in the case's units. tags is refused for
// the other formats, which carry their tags in the file or none (see
// sketchTagsRefusal), rather than ignored.
func decodeSketchRef(c *Case, g *geometrySpec, o *object, fv value) error {
	rel, err := fv.str()
	if err != nil {
		return err
	}
	r := sketchRead{scale: fv.d.scale}
	if v, ok := o.get("scale"); ok {
		f, err := v.positive()
		if err != nil {
			return err
		}
		r.scale *= f
	}
	if v, ok := o.get("flip_y"); ok {
		if r.flipY, err = v.boolean(); err != nil {
			return err
		}
	}
	if v, ok := o.get("tags"); ok {
		if why := sketchTagsRefusal(rel); why != "" {
			return v.errf("%s", why)
		}
		if r.tags, err = v.strings(); err != nil {
			return err
		}
	}
	var spacing *geometry.Spacing
	if v, ok := o.get("spacing"); ok {
		sp, err := decodeSpacing(v, c)
		if err != nil {
			return err
		}
		spacing = &sp
	}
	data, full, err := c.readInput(fv, rel)
	if err != nil {
		return err
	}
	out, err := readSketch(full, data, r)
	if err != nil {
		return fv.wrap(unitAdvice(err, fv.d.scale))
	}
	if spacing != nil {
		out = respace(out, *spacing)
	}
	for i, l := range out.Loops() {
		if l.Name == "" {
			l.Name = "outer"
			if i > 0 {
				l.Name = fmt.Sprintf("inner%d", i)
			}
		}
		ls := loopSpec{name: l.Name, segments: l.Segments, at: fv}
		for range l.Segments {
			ls.segAt = append(ls.segAt, fv)
		}
		g.loops = append(g.loops, ls)
		if err := g.addCurve(&curveSpec{name: l.Name, segments: l.Segments, closed: true, at: fv}); err != nil {
			return err
		}
	}
	return nil
}

// respace gives every segment that has no spacing law of its own the
// spacing sp, or, on a curve (a polyline of a sketch: a flattened SVG
// curve), more edges where sp would cut across its bends (curveEdges).
// A polyline is first cut at its sharp vertices (sharpVertices), the
// cusps and kinks of a drawing, which stay nodes: nodes placed by arc
// length along the whole polyline would cut the corner off there. sp
// then spaces each piece as a segment of its own.
func respace(o geometry.Outline, sp geometry.Spacing) geometry.Outline {
	fix := func(l geometry.Loop) geometry.Loop {
		r := geometry.Loop{Name: l.Name, Flipped: l.Flipped, Segments: make([]geometry.Segment, 0, len(l.Segments))}
		for _, s := range l.Segments {
			if !s.Attr().Spacing.KeepsVertices() {
				r.Segments = append(r.Segments, s)
				continue
			}
			r.Segments = append(r.Segments, spacePieces(s, sp)...)
		}
		return r
	}
	out := geometry.Outline{Outer: fix(o.Outer)}
	for _, l := range o.Inner {
		out.Inner = append(out.Inner, fix(l))
	}
	return out
}

// spacePieces gives the segment s, which keeps its own vertices, the
// spacing sp: a polyline is cut at its sharp vertices into pieces, each a
// line (two vertices) or a polyline given sp or, where sp would cut
// across its bends, as many equal edges as curveEdges asks for. Another
// segment (a line; a spline of a case, were one given) is given sp or
// curveEdges' count whole, as is a polyline whose pieces cannot be made
// (which a valid polyline's cannot fail).
func spacePieces(s geometry.Segment, sp geometry.Spacing) []geometry.Segment {
	a := s.Attr()
	a.Spacing = sp
	whole := func() []geometry.Segment {
		if v, ok := s.(interface{ Vertices() []orb.Point }); ok {
			a.Spacing = curveSpacing(v.Vertices(), s.Length(), sp)
		}
		return []geometry.Segment{s.WithAttr(a)}
	}
	pl, ok := s.(*geometry.Polyline)
	if !ok {
		return whole()
	}
	pts := pl.Vertices()
	cuts := append(append([]int{0}, sharpVertices(pts)...), len(pts)-1)
	var out []geometry.Segment
	for k := 0; k+1 < len(cuts); k++ {
		piece := pts[cuts[k] : cuts[k+1]+1]
		if len(piece) == 2 {
			l, err := geometry.NewLine(piece[0][0], piece[0][1], piece[1][0], piece[1][1], a)
			if err != nil {
				return whole()
			}
			out = append(out, l)
			continue
		}
		p, err := geometry.NewPolyline(piece, a)
		if err != nil {
			return whole()
		}
		pa := a
		pa.Spacing = curveSpacing(piece, p.Length(), sp)
		out = append(out, p.WithAttr(pa))
	}
	return out
}

// curveSpacing returns sp, or, where sp would cut across the bends of
// the curve through pts (of the given length), as many equal edges as
// curveEdges asks for.
func curveSpacing(pts []orb.Point, length float64, sp geometry.Spacing) geometry.Spacing {
	if n := curveEdges(pts); n > 0 {
		if e, err := sp.Edges(length); err == nil && float64(n) > e {
			if c, err := geometry.Count(n + 1); err == nil {
				return c
			}
		}
	}
	return sp
}

// sharpVertices returns the interior vertices of the polyline pts at
// which its direction turns by more than maxFaceTurn, in order. Between
// such vertices the polyline samples a smooth curve finely enough for
// the sketches' curve rule (no face turning by more than 10°), so nodes
// may be placed anywhere along it; at one, the direction jumps by more
// than one face of the mesh may turn, so any node placement that left
// the vertex out would cut across the drawing there, shortening a cusp
// or rounding a kink (the tip of a cusp inside one Bézier, where the
// curve doubles back, turns by nearly 180°). Keeping them costs no node
// the curve rule would not ask for: a curve flattened coarsely enough to
// turn by more than 10° at a vertex needs every one of its vertices.
func sharpVertices(pts []orb.Point) []int {
	var sharp []int
	for i := 1; i+1 < len(pts); i++ {
		ux, uy := pts[i][0]-pts[i-1][0], pts[i][1]-pts[i-1][1]
		vx, vy := pts[i+1][0]-pts[i][0], pts[i+1][1]-pts[i][1]
		if math.Abs(math.Atan2(ux*vy-uy*vx, ux*vx+uy*vy)) > maxFaceTurn {
			sharp = append(sharp, i)
		}
	}
	return sharp
}

// Curve resolution of sketches: a face of a curved boundary turns by at
// most maxFaceTurn, 10° (36 faces round a circle), so that a curve keeps
// its shape and area when the sketch's size is coarse beside its radius
// (common practice for walls; a finer size is kept). A vertex of a
// polyline turning by more than featureTurn, 60°, is a corner of the
// drawing, not a sample of a curve, and does not count in curveEdges;
// respace keeps every vertex turning by more than maxFaceTurn as a node
// anyway (sharpVertices), so its pieces have none.
const (
	maxFaceTurn = 10 * math.Pi / 180
	featureTurn = 60 * math.Pi / 180
)

// curveEdges returns the number of equal edges a polyline through pts
// needs so that none turns by more than maxFaceTurn where the polyline
// bends most: L κ_max / maxFaceTurn, with the curvature at each interior
// vertex taken as its turning angle over the mean length of its two edges
// (the discrete curvature of a polygonal curve; common practice). It is
// never more than the polyline's own edges, which already resolve the
// curve (a flattened SVG curve is within its tolerance), and 0 for a
// straight polyline.
func curveEdges(pts []orb.Point) int {
	if len(pts) < 3 {
		return 0
	}
	length, kmax := 0.0, 0.0
	for i := 1; i < len(pts); i++ {
		length += math.Hypot(pts[i][0]-pts[i-1][0], pts[i][1]-pts[i-1][1])
	}
	for i := 1; i+1 < len(pts); i++ {
		ux, uy := pts[i][0]-pts[i-1][0], pts[i][1]-pts[i-1][1]
		vx, vy := pts[i+1][0]-pts[i][0], pts[i+1][1]-pts[i][1]
		lu, lv := math.Hypot(ux, uy), math.Hypot(vx, vy)
		turn := math.Abs(math.Atan2(ux*vy-uy*vx, ux*vx+uy*vy))
		if lu == 0 || lv == 0 || turn > featureTurn {
			continue
		}
		kmax = max(kmax, turn/(0.5*(lu+lv)))
	}
	if kmax == 0 {
		return 0
	}
	// Less a hair, so that rounding does not add an edge to a curve that
	// needs a whole number of them.
	return min(int(math.Ceil(length*kmax/maxFaceTurn-1e-9)), len(pts)-1)
}

// SketchOptions say how `cvdeck mesh SKETCH` meshes a bare geometry file.
type SketchOptions struct {
	// Size is the target cell size in the sketch's units after Scale:
	// the length of every boundary edge, and of every cell unless MaxSize
	// is larger.
	Size float64
	// MaxSize is the largest cell size away from the boundary; 0 means
	// Size. Above Size, cells grow from the boundary's Size to it by
	// Growth.
	MaxSize float64
	// MinAngle (degrees) and Growth tune the unstructured mesher; 0 keeps
	// its defaults. Growth needs a MaxSize above Size: with every cell
	// at Size there is nothing to grow.
	MinAngle, Growth float64
	// Scale multiplies the sketch's coordinates to give metres.
	Scale float64
	// FlipY flips the y axis, in every sketch format (SVG drawings grow
	// y downwards; a GeoJSON, WKT or x-y file may come from one).
	FlipY bool
}

// SketchCase builds the case that meshes a bare sketch file with the
// unstructured mesher: edges of size Size, cells up to MaxSize (Size when
// not given), the given angle and growth, boundary tags from the file (GeoJSON "tag" and
// "edge_tags" properties) or one per loop. It is the case that `cvdeck init
// --from` writes out, run without writing it.
//
// The case exists only in memory, so it is known by a label rather than a
// file name (see sketchCaseLabel), and errors located in it are given
// against the sketch, with no line of a file the user cannot see (see
// Case.fromSketch).
func SketchCase(path string, so SketchOptions, lo LoadOptions) (*Case, error) {
	text, err := sketchCaseText(path, filepath.Base(path), so)
	if err != nil {
		return nil, err
	}
	c, err := Parse(filepath.Join(filepath.Dir(path), sketchCaseLabel(path)), []byte(text), lo)
	if err != nil {
		return nil, (&Case{File: filepath.Join(filepath.Dir(path), sketchCaseLabel(path)), sketch: path}).fromSketch(err)
	}
	c.sketch = path
	return c, nil
}

// sketchCaseLabel names the case made from a sketch and the flags, in the
// deck's manifest (case.file, the first input) and nowhere on disk.
func sketchCaseLabel(sketch string) string {
	return "(case made from " + filepath.Base(sketch) + " and the flags)"
}

// fromSketch gives an input error located in the in-memory case of a
// bare sketch run against the sketch file instead, without the line and
// column of the case text, and says where the case comes from. Other
// errors, and every error of a case read from a file, are returned as
// they are.
func (c *Case) fromSketch(err error) error {
	var ie *InputError
	if c.sketch == "" || !errors.As(err, &ie) || ie.File != c.File {
		return err
	}
	ie.File, ie.Line, ie.Col = c.sketch, 0, 0
	ie.Msg += " (in the case cvdeck makes from the sketch and the flags; `cvdeck init --from` writes it out to edit)"
	return err
}

// sketchCaseText writes the case file around a sketch referred to as rel.
func sketchCaseText(path, rel string, so SketchOptions) (string, error) {
	if so.Scale == 0 {
		so.Scale = 1
	}
	if !(so.Scale > 0) {
		return "", fmt.Errorf("%w: --scale must be positive, got %g", ErrInput, so.Scale)
	}
	if !(so.Size > 0) {
		return "", fmt.Errorf("%w: meshing a sketch needs --size, the target cell size in the sketch's units after --scale", ErrInput)
	}
	if so.MinAngle < 0 || so.MinAngle > unstructured.MaxMinAngle {
		return "", fmt.Errorf("%w: --min-angle %g: the smallest triangle angle the mesher can promise is between 0 and %g degrees", ErrInput, so.MinAngle, unstructured.MaxMinAngle)
	}
	if so.Growth != 0 && !(so.Growth >= 1) {
		return "", fmt.Errorf("%w: --growth %g: the size growth ratio away from the boundary is at least 1", ErrInput, so.Growth)
	}
	if so.MaxSize != 0 && !(so.MaxSize >= so.Size) {
		return "", fmt.Errorf("%w: --max-size %g is below --size %g; the largest cell size away from the boundary is at least the boundary's", ErrInput, so.MaxSize, so.Size)
	}
	if so.Growth != 0 && !(so.MaxSize > so.Size) {
		return "", fmt.Errorf("%w: --growth %g would change nothing: every cell is --size %g across unless --max-size is larger; give --max-size too, the largest cell size the growth may reach", ErrInput, so.Growth, so.Size)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return "", fmt.Errorf("%w: %w", ErrInput, err)
	}
	// Read it once here so that a bad sketch fails with the sketch's own
	// error, located at its ring and vertex.
	o, err := readSketch(path, data, sketchRead{scale: so.Scale, flipY: so.FlipY})
	if err != nil {
		return "", fmt.Errorf("%w: %w", ErrInput, unitAdvice(err, 0))
	}
	// A cell larger than the whole sketch cannot be meant: it is a
	// mistaken unit (--size in millimetres with --scale 0.001, say), and
	// would mesh the sketch with its corners alone.
	if extent := outlineSize(o); so.Size > extent {
		return "", fmt.Errorf("%w: --size %g m is larger than the whole sketch %s, which spans %.4g m corner to corner (the diagonal of its bounding box, read at --scale %g m per unit); --size is in metres after --scale: give it below that, e.g. %.3g (a fiftieth of the sketch, as `cvdeck init --from` picks)", ErrInput, so.Size, filepath.Base(path), extent, so.Scale, extent/50)
	}
	name := strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
	var b strings.Builder
	fmt.Fprintf(&b, "# Mesh of the sketch %s, made by cvdeck init --from; edit freely.\n", filepath.Base(path))
	fmt.Fprintf(&b, "name: %q\nunits: m\n", name)
	fmt.Fprintf(&b, "parameters:\n  size: %g        # target cell size, m\n", so.Size)
	if so.MaxSize > so.Size {
		fmt.Fprintf(&b, "  max_size: %g    # largest cell size away from the boundary, m\n", so.MaxSize)
	}
	fmt.Fprintf(&b, "geometry:\n  file: %q\n  scale: %g\n", rel, so.Scale)
	if so.FlipY {
		b.WriteString("  flip_y: true\n")
	}
	b.WriteString("  spacing: {size: size}\n")
	if so.MaxSize > so.Size {
		b.WriteString("mesh:\n  unstructured:\n    max_size: max_size\n")
	} else {
		b.WriteString("mesh:\n  unstructured:\n    max_size: size\n")
	}
	if so.MinAngle > 0 {
		fmt.Fprintf(&b, "    min_angle: %g\n", so.MinAngle)
	}
	if so.Growth > 0 {
		fmt.Fprintf(&b, "    growth: %g\n", so.Growth)
	}
	var kinds []string
	for _, k := range bc.Kinds() {
		kinds = append(kinds, k.String())
	}
	b.WriteString("# boundaries:           # give each boundary tag of the sketch a condition (kinds: " + strings.Join(kinds, ", ") + ")\n")
	for _, tag := range outlineTags(o) {
		fmt.Fprintf(&b, "#   %s: {kind: wall-slip}\n", yamlKey(tag))
	}
	return b.String(), nil
}

// InitFromSketch writes dir/<sketch name>.yaml, a case file around the
// sketch (copied beside it), for further editing; so.Size (metres, after
// so.Scale) defaults to a fiftieth of the sketch's size. Existing files are not overwritten.
func InitFromSketch(sketch, dir string, so SketchOptions) (string, error) {
	if !IsSketch(sketch) {
		return "", fmt.Errorf("%w: %s is not a sketch file: cvdeck reads %s", ErrInput, sketch, SketchExtensions())
	}
	data, err := os.ReadFile(sketch)
	if err != nil {
		return "", fmt.Errorf("%w: %w", ErrInput, err)
	}
	if so.Scale == 0 {
		so.Scale = 1
	}
	if so.Size == 0 {
		o, err := readSketch(sketch, data, sketchRead{scale: so.Scale, flipY: so.FlipY})
		if err != nil {
			return "", fmt.Errorf("%w: %w", ErrInput, unitAdvice(err, 0))
		}
		so.Size = outlineSize(o) / 50
	}
	text, err := sketchCaseText(sketch, filepath.Base(sketch), so)
	if err != nil {
		return "", err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", err
	}
	casePath := filepath.Join(dir, strings.TrimSuffix(filepath.Base(sketch), filepath.Ext(sketch))+".yaml")
	copyPath := filepath.Join(dir, filepath.Base(sketch))
	for _, p := range []string{casePath, copyPath} {
		if _, err := os.Stat(p); err == nil {
			return "", fmt.Errorf("%w: %s exists already; remove it or choose another folder", ErrInput, p)
		}
	}
	if err := os.WriteFile(copyPath, data, 0o644); err != nil {
		return "", err
	}
	if err := os.WriteFile(casePath, []byte(text), 0o644); err != nil {
		return "", err
	}
	return casePath, nil
}

// outlineTags returns the boundary tags of the outline, each once, in loop
// and segment order.
func outlineTags(o geometry.Outline) []string {
	var tags []string
	for _, l := range o.Loops() {
		for _, sg := range l.Segments {
			if t := sg.Attr().Tag; t != "" && !slices.Contains(tags, t) {
				tags = append(tags, t)
			}
		}
	}
	return tags
}

// yamlKey writes a tag as a YAML mapping key, quoted unless it is a plain
// word.
func yamlKey(tag string) string {
	for _, r := range tag {
		if !(r == '_' || r == '-' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9') {
			return fmt.Sprintf("%q", tag)
		}
	}
	return tag
}

// outlineSize is the diagonal of the outer loop's bounding box, taken
// over the vertices of its lines and polylines (exact for them) and the
// ends and midpoints of other segments (an arc's box may be a little
// larger).
func outlineSize(o geometry.Outline) float64 {
	var lo, hi [2]float64
	first := true
	add := func(p orb.Point) {
		if first {
			lo, hi, first = p, p, false
		}
		lo = [2]float64{min(lo[0], p[0]), min(lo[1], p[1])}
		hi = [2]float64{max(hi[0], p[0]), max(hi[1], p[1])}
	}
	for _, s := range o.Outer.Segments {
		switch sg := s.(type) {
		case *geometry.Line:
			add(sg.A)
			add(sg.B)
			continue
		case *geometry.Polyline:
			for _, p := range sg.Vertices() {
				add(p)
			}
			continue
		}
		for _, f := range []float64{0, 0.5, 1} {
			add(s.At(f))
		}
	}
	return dist(lo, hi)
}

// edgeLoop makes a closed loop named name of one line per edge of the
// closed vertex list (first == last), every edge tagged tag.
func edgeLoop(pts []orb.Point, tag, name string) (geometry.Loop, error) {
	loop := geometry.Loop{Name: name}
	for k := 0; k+1 < len(pts); k++ {
		a, b := pts[k], pts[k+1]
		if a == b {
			continue
		}
		l, err := geometry.NewLine(a[0], a[1], b[0], b[1], geometry.Attr{Tag: tag})
		if err != nil {
			return loop, fmt.Errorf("edge %d (vertex %d to %d): %w", k, k, k+1, err)
		}
		loop.Segments = append(loop.Segments, l)
	}
	return loop, nil
}
