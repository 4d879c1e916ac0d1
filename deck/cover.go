package deck

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"cvdeck/mesh/structured"
)

// checkCover checks that a structured mesh fills the outline the case
// gives, before anything is written, and returns notes on what the
// outline's loops mean for the mesh. The rule:
//
//   - A segment of the outline is used when it is on a block side (it is,
//     or is in, one of the curves a side names) or on the curve a grown
//     grid grows from. A grid's body is the loop it grows from as a whole
//     (an O- or C-grid from a loop).
//   - A segment that is not used may still lie along the mesh's boundary,
//     as a straight wall can lie along a grown grid's start or end line:
//     then its nodes, and its curve halfway between them, lie on boundary
//     faces (within the outline's closure tolerance plus the segment's
//     sagitta and the faces' own, κL²/8 for a face of length L on the
//     segment's curvature κ, since the faces may divide the curve
//     otherwise). Its faces take the tags of what made them, which a note
//     gives when they are not the segment's own.
//   - With blocks, the outline is the region to mesh: every segment of
//     every loop must be used or lie along the boundary, and the cells'
//     areas must add up to the area of the discretised outline (the
//     polygon through the nodes the block sides also take) within the
//     tolerance of areas. When the outer loop is itself a grown grid's
//     body the mesh lies outside the outline, which then has no area to
//     match.
//   - A grown grid that does not grow from the outer loop must lie inside
//     it: every node inside the discretised outer loop, or within its
//     tolerance (see outerRing) of it. A grid's outer boundary is made by
//     the growth, so the outer loop can only bound it.
//   - Without blocks, every inner loop must be a grid's body (a grid
//     covers no other body); the outer loop's segments that neither a grid
//     grows from nor the grids reach only bound the grids, which a note
//     says.
//   - A boundary condition on a tag that only unused segments carry, and
//     that no face of the mesh has, is refused, saying why.
func (c *Case) checkCover(m *mesh.Mesh) ([]string, error) {
	cv, err := newCoverage(c, m)
	if err != nil {
		return nil, err
	}
	grids, err := cv.grownGrids(m)
	if err != nil {
		return nil, err
	}
	var outer *outerRing
	if len(grids) > 0 && !cv.bodies[0] {
		if outer, err = cv.outerRing(); err != nil {
			return nil, err
		}
		for _, gr := range grids {
			if err := cv.inside(m, gr, outer); err != nil {
				return nil, err
			}
		}
	}
	var notes []string
	if len(c.Mesh.blocks) > 0 {
		err = cv.blocksCover(m)
	} else {
		notes, err = cv.grownOnly(m, grids, outer)
	}
	if err != nil {
		return nil, err
	}
	if err := cv.lostTags(m, grids); err != nil {
		return nil, err
	}
	return append(cv.alongNotes(), notes...), nil
}

// coverage is what checkCover knows of the outline and of what the mesh
// uses of it.
type coverage struct {
	c *Case
	g *geometrySpec
	// disc is the discretised outline and size its bounding-box diagonal.
	disc geometry.DiscreteOutline
	size float64
	// used holds the segments on a block side or grown from.
	used map[geometry.Segment]bool
	// along holds the segments not used that lie along the mesh's
	// boundary, with the tags of the faces along them.
	along map[geometry.Segment][]string
	// names holds the segments that have a name of their own.
	names map[geometry.Segment]string
	// bodies holds the indices of the loops a grid grows from as a whole.
	bodies map[int]bool
	// alongArea bounds the area by which the faces along the segments of
	// along may differ from the segments' own chords (see newCoverage).
	alongArea float64
}

// newCoverage finds what the case's blocks and grown grids use of the
// outline, and which unused segments lie along the mesh's boundary.
func newCoverage(c *Case, m *mesh.Mesh) (*coverage, error) {
	g := c.Geometry
	cv := &coverage{c: c, g: g, used: map[geometry.Segment]bool{}, along: map[geometry.Segment][]string{},
		names: map[geometry.Segment]string{}, bodies: map[int]bool{}}
	var err error
	if cv.disc, err = g.shape.Discretise(); err != nil {
		return nil, g.locate(err)
	}
	b := orb.Bound{Min: cv.disc.Loops[0].Points[0], Max: cv.disc.Loops[0].Points[0]}
	for _, l := range cv.disc.Loops {
		for _, p := range l.Points {
			b = b.Extend(p)
		}
	}
	cv.size = dist(b.Min, b.Max)
	for _, name := range g.order {
		if cs := g.curves[name]; !cs.closed && len(cs.segments) == 1 {
			cv.names[cs.segments[0]] = name
		}
	}
	for _, bs := range c.Mesh.blocks {
		for _, side := range bs.sides {
			for _, sc := range side {
				for _, s := range sc.curve.segments {
					cv.used[s] = true
				}
			}
		}
	}
	for _, gs := range c.Mesh.grow {
		for _, s := range gs.from.segments {
			cv.used[s] = true
		}
		for l, ls := range g.loops {
			if g.curves[ls.name] == gs.from {
				cv.bodies[l] = true
			}
		}
	}
	var bnd *boundaryIndex
	for _, ls := range g.loops {
		for k, s := range ls.segments {
			if cv.used[s] {
				continue
			}
			if bnd == nil {
				bnd = newBoundaryIndex(m)
			}
			nodes, mids, sag, kappa, err := segmentCurve(s)
			if err != nil {
				return nil, ls.segAt[k].wrap(err)
			}
			if tags, ok := bnd.along(nodes, mids, geometry.ClosureTolerance*cv.size+sag, kappa); ok {
				cv.along[s] = tags
				// The area between the segment's chords and the faces
				// along it, which may divide the same curve otherwise:
				// within the curve's length times the larger sagitta of
				// the two, (2/3) of it each side (a parabolic segment's
				// area, elementary geometry).
				cv.alongArea += s.Length() * (sag + bnd.sagAlong(nodes, kappa))
			}
		}
	}
	return cv, nil
}

// uncovered returns the indices of loop l's segments that are neither
// used nor along the mesh's boundary.
func (cv *coverage) uncovered(l int) []int {
	var ks []int
	for k, s := range cv.g.loops[l].segments {
		if _, along := cv.along[s]; !cv.used[s] && !along {
			ks = append(ks, k)
		}
	}
	return ks
}

// alongNotes says which segments lie along the mesh's boundary without
// being used, where the faces there carry other tags than theirs.
func (cv *coverage) alongNotes() []string {
	var notes []string
	for l, ls := range cv.g.loops {
		for k, s := range ls.segments {
			tags, ok := cv.along[s]
			if !ok || slices.Contains(tags, loopTag(l, ls, s)) {
				continue
			}
			quoted := make([]string, len(tags))
			for i, t := range tags {
				quoted[i] = fmt.Sprintf("%q", t)
			}
			notes = append(notes, fmt.Sprintf("%s is no block side and no grown grid grows from it, but it lies along the mesh's boundary, whose faces there are tagged %s: its own tag %q is not theirs",
				cv.segments(l, []int{k}), andList(quoted), loopTag(l, ls, s)))
		}
	}
	return notes
}

// segments names segments ks of loop l for a message: by their names
// where they have one, else by their place in the loop and their tag,
// each with its line in the case file.
func (cv *coverage) segments(l int, ks []int) string {
	ls := cv.g.loops[l]
	if len(ks) == len(ls.segments) {
		return fmt.Sprintf("the whole loop %q (line %d)", ls.name, ls.at.n.Line)
	}
	parts := make([]string, len(ks))
	for i, k := range ks {
		s := ls.segments[k]
		if name, ok := cv.names[s]; ok {
			parts[i] = fmt.Sprintf("%q (line %d)", name, ls.segAt[k].n.Line)
		} else {
			parts[i] = fmt.Sprintf("%d (tag %s, line %d)", k+1, loopTag(l, ls, s), ls.segAt[k].n.Line)
		}
	}
	what := "segment"
	if len(ks) > 1 {
		what = "segments"
	}
	return fmt.Sprintf("%s %s of loop %q", what, andList(parts), ls.name)
}

// loopTag is the boundary tag the edges of segment s of loop l take (see
// geometry.Loop.Discretise).
func loopTag(l int, ls loopSpec, s geometry.Segment) string {
	if t := s.Attr().Tag; t != "" {
		return t
	}
	if ls.name != "" {
		return ls.name
	}
	if l == 0 {
		return "outer"
	}
	return fmt.Sprintf("inner%d", l)
}

// andList joins words as "a", "a and b" or "a, b and c".
func andList(w []string) string {
	if len(w) <= 1 {
		return strings.Join(w, "")
	}
	return strings.Join(w[:len(w)-1], ", ") + " and " + w[len(w)-1]
}

// blocksCover checks that a mesh with blocks reaches every segment of
// the outline and covers the outline's area.
func (cv *coverage) blocksCover(m *mesh.Mesh) error {
	var missing []string
	var first *value
	for l := range cv.g.loops {
		ks := cv.uncovered(l)
		if len(ks) == 0 {
			continue
		}
		missing = append(missing, cv.segments(l, ks))
		if first == nil {
			at := cv.g.loops[l].segAt[ks[0]]
			first = &at
		}
	}
	who := "the blocks"
	if len(cv.c.Mesh.grow) > 0 {
		who = "the blocks and grown grids"
	}
	var area string
	areaOK := true
	if !cv.bodies[0] {
		have, want, tol, err := cv.areas(m)
		if err != nil {
			return err
		}
		areaOK = math.Abs(have-want) <= tol
		area = fmt.Sprintf("%s cover %s of the outline's %s", who, cv.c.area(have), cv.c.area(want))
		if !areaOK && len(missing) == 0 {
			area += fmt.Sprintf(", %s apart, more than the %s that round-off and sliding sides allow", cv.c.area(math.Abs(have-want)), cv.c.area(tol))
		}
	}
	if len(missing) == 0 && areaOK {
		return nil
	}
	open := cv.openTags(m)
	if len(missing) > 0 {
		msg := fmt.Sprintf("the mesh does not fill the outline: no block side and no grown grid uses %s, and the mesh's boundary does not reach there", strings.Join(missing, "; "))
		if area != "" {
			msg += "; " + area
		}
		msg += open + ". Every segment of the outline must be on a block side (named in a block's south, east, north or west, alone or in a curve) or on the curve a grown grid grows from: add the blocks that reach them, or take them out of the outline"
		return first.errf("%s", msg)
	}
	return cv.c.Mesh.at.errf("the mesh does not fill the outline: %s%s. The mesh reaches every segment of the outline, so blocks overlap, one lies outside the outline, or a gap between blocks is left open: check each block's sides against the outline", area, open)
}

// openTags says which boundary tags of the mesh no outline segment and no
// grown grid carries: sides meant to be shared by two blocks that lie
// open. It returns "" when there are none.
func (cv *coverage) openTags(m *mesh.Mesh) string {
	known := map[string]bool{}
	for l, ls := range cv.g.loops {
		for _, s := range ls.segments {
			known[loopTag(l, ls, s)] = true
		}
	}
	for _, gs := range cv.c.Mesh.grow {
		known[gs.opt.OuterTag], known[gs.opt.StartTag], known[gs.opt.EndTag] = true, true, true
	}
	var open []string
	for t, tag := range m.Tags {
		if !known[tag] {
			open = append(open, fmt.Sprintf("%q (%d faces)", tag, m.TagStart[t+1]-m.TagStart[t]))
		}
	}
	if len(open) == 0 {
		return ""
	}
	return fmt.Sprintf("; the mesh's boundary has faces tagged %s, which no outline segment carries: there a block side meant to be shared lies open", andList(open))
}

// areas returns the mesh's area, the discretised outline's, and the
// largest difference between them that is not a gap or an overlap.
//
// The mesh's area is the sum of its cells' signed shoelace areas, added
// with Neumaier's compensated summation, so that the sum adds no more
// than a few ulps; each cell's area, from vertices shifted to its first,
// is good to a few ulps times its aspect ratio, which stays below 1e-9
// of the cell for cells up to a million times longer than thick. The
// outline's shoelace over its M nodes is good to about 2·M·ε·D², D its
// bounding-box diagonal. So the tolerance is 1e-9 of the outline's area
// plus 2·M·ε·D², plus what sliding sides may change: a node that slides
// along a side's polyline (by up to about one edge) cuts off, or fills
// in, at most the triangle of the polyline's corner it passes, whose
// area is half the cross product of the corner's two edges; twice their
// sum over every sliding side is allowed; and, for each segment that lies
// along the boundary divided otherwise, its length times the larger of
// its chords' and the faces' sagittas (alongArea). A missing block is far
// larger than all of this in any real case.
func (cv *coverage) areas(m *mesh.Mesh) (have, want, tol float64, err error) {
	want = cv.disc.Area()
	nodes := 0
	for _, l := range cv.disc.Loops {
		nodes += len(l.Points)
	}
	const eps = 0x1p-52
	tol = 1e-9*math.Abs(want) + 2*float64(nodes)*eps*cv.size*cv.size
	for _, bs := range cv.c.Mesh.blocks {
		if bs.smooth == nil {
			continue
		}
		for s, sc := range bs.smooth.opt.Sides {
			if sc.Mode != structured.Slide {
				continue
			}
			ch, err := sideChain(bs.sides[s])
			if err != nil {
				return 0, 0, 0, err
			}
			p := ch.Points
			for k := 1; k+1 < len(p); k++ {
				tol += math.Abs((p[k][0]-p[k-1][0])*(p[k+1][1]-p[k][1]) - (p[k][1]-p[k-1][1])*(p[k+1][0]-p[k][0]))
			}
		}
	}
	return neumaierSum(m.Geo.CellArea), want, tol + cv.alongArea, nil
}

// neumaierSum adds xs with Neumaier's improvement of Kahan's compensated
// summation (Neumaier 1974): the error does not grow with len(xs).
func neumaierSum(xs []float64) float64 {
	s, comp := 0.0, 0.0
	for _, x := range xs {
		t := s + x
		if math.Abs(s) >= math.Abs(x) {
			comp += (s - t) + x
		} else {
			comp += (x - t) + s
		}
		s = t
	}
	return s + comp
}

// segmentSamples returns a segment's nodes, the points of its curve halfway
// between consecutive nodes (by arc length), and its sagitta: the largest
// distance of those halfway points from the chord between the two nodes.
// A segment kept at its own vertices is straight between them.
func segmentSamples(s geometry.Segment) (nodes, mids []orb.Point, sag float64, err error) {
	nodes, mids, sag, _, err = segmentCurve(s)
	return nodes, mids, sag, err
}

// segmentCurve is segmentSamples, with the largest curvature of the
// segment as its chords show it, κ = 8 s / L² for a chord of length L
// whose halfway point lies s off it (the sagitta of a circular arc, s ≈
// κ L²/8; elementary geometry), so that a caller can bound how far the
// chords of another division of the same curve lie from it.
func segmentCurve(s geometry.Segment) (nodes, mids []orb.Point, sag, kappa float64, err error) {
	sp := s.Attr().Spacing
	if sp.KeepsVertices() {
		if nodes, err = geometry.DiscretiseSegment(s); err != nil {
			return nil, nil, 0, 0, err
		}
		for k := 0; k+1 < len(nodes); k++ {
			mids = append(mids, orb.Point{(nodes[k][0] + nodes[k+1][0]) / 2, (nodes[k][1] + nodes[k+1][1]) / 2})
		}
		return nodes, mids, 0, 0, nil
	}
	f, err := sp.Fractions(s.Length())
	if err != nil {
		return nil, nil, 0, 0, err
	}
	nodes = make([]orb.Point, len(f))
	for k, fk := range f {
		nodes[k] = s.At(fk)
	}
	for k := 0; k+1 < len(f); k++ {
		mid := s.At((f[k] + f[k+1]) / 2)
		mids = append(mids, mid)
		sk := geometry.SegmentDistance(mid, nodes[k], nodes[k+1])
		sag = math.Max(sag, sk)
		if l := dist(nodes[k], nodes[k+1]); l > 0 {
			kappa = math.Max(kappa, 8*sk/(l*l))
		}
	}
	return nodes, mids, sag, kappa, nil
}

// grownGrid is one grown grid and its blocks in the mesh.
type grownGrid struct {
	spec   *growSpec
	blocks []mesh.Block
}

// grownGrids finds each grown grid's blocks in the mesh: they follow the
// case's blocks in the order of the grow list, one each, but three for a
// C-grid (its wake's two blocks and the body's; see
// structured.MarchCGrid).
func (cv *coverage) grownGrids(m *mesh.Mesh) ([]grownGrid, error) {
	ms := cv.c.Mesh
	next := len(ms.blocks)
	var out []grownGrid
	for i := range ms.grow {
		gs := &ms.grow[i]
		n := 1
		if gs.shape == "c" {
			n = 3
		}
		if next+n > len(m.Blocks) {
			return nil, fmt.Errorf("deck: the mesh has %d blocks, fewer than the %d blocks and grown grids make", len(m.Blocks), next+n)
		}
		out = append(out, grownGrid{spec: gs, blocks: m.Blocks[next : next+n]})
		next += n
	}
	return out, nil
}

// outerRing is the discretised outer loop as written, each edge knowing
// its segment, with the tolerance of the inside test.
type outerRing struct {
	*edgeIndex
	// seg[e] is the loop segment of edge e.
	seg []int
	// tol is how far outside the polygon a node may lie and still be
	// inside: the closure tolerance of the outline (1e-9 of its size) plus
	// the largest sagitta of its edges, the distance by which a node on
	// the outer loop's true curve (a grid grown from a curve laid along
	// it) may stand outside the polygon of its chords.
	tol float64
}

func (cv *coverage) outerRing() (*outerRing, error) {
	ls := cv.g.loops[0]
	d, starts, err := ls.loop().Discretise()
	if err != nil {
		return nil, cv.g.locate(err)
	}
	n := len(d.Points)
	r := &outerRing{seg: make([]int, n)}
	ends := make([]orb.Point, n)
	for e := range n {
		ends[e] = d.Points[(e+1)%n]
	}
	r.edgeIndex = newEdgeIndex(d.Points, ends)
	sag := 0.0
	for k, s := range ls.segments {
		end := n
		if k+1 < len(starts) {
			end = starts[k+1]
		}
		for e := starts[k]; e < end; e++ {
			r.seg[e] = k
		}
		_, _, sk, err := segmentSamples(s)
		if err != nil {
			return nil, ls.segAt[k].wrap(err)
		}
		sag = math.Max(sag, sk)
	}
	r.tol = geometry.ClosureTolerance*cv.size + sag
	return r, nil
}

// inside refuses a grown grid with a node outside the outer loop, saying
// how far past the loop the farthest one lies, where, and by which
// segment.
func (cv *coverage) inside(m *mesh.Mesh, gr grownGrid, outer *outerRing) error {
	far, at, edge, out, total := 0.0, orb.Point{}, -1, 0, 0
	for _, b := range gr.blocks {
		for _, n := range b.Node {
			total++
			p := m.Nodes[n]
			if outer.inside(p) {
				continue
			}
			d, e := outer.nearest(p, nil)
			if d <= outer.tol {
				continue
			}
			out++
			if d > far {
				far, at, edge = d, p, e
			}
		}
	}
	if out == 0 {
		return nil
	}
	gs := gr.spec
	c := cv.c
	return gs.at.errf("grown grid %q reaches %s past the outer loop %q: its node at %s lies that far outside %s (%d of its %d nodes lie outside). A grown grid's outer boundary is made by the growth and must lie inside the outer loop (within %s): make the grid smaller (outer_distance%s, layers or growth) or the loop larger",
		gs.opt.Name, c.length(far), cv.g.loops[0].name, c.point(at, geometry.ClosureTolerance*cv.size), cv.segments(0, []int{outer.seg[edge]}), out, total, c.length(outer.tol), c.outerDistanceNow(gs))
}

// outerDistanceNow gives a grid's outer distance, when the case gives it,
// for a message.
func (c *Case) outerDistanceNow(gs *growSpec) string {
	if gs.opt.OuterDistance > 0 {
		return fmt.Sprintf(", now %s", c.length(gs.opt.OuterDistance))
	}
	return ""
}

// grownOnly checks a mesh made of grown grids alone against the
// outline's loops: every inner loop must be a grid's body, and the outer
// loop's segments that the grids do not reach only bound them, which a
// note says.
func (cv *coverage) grownOnly(m *mesh.Mesh, grids []grownGrid, outer *outerRing) ([]string, error) {
	for l := 1; l < len(cv.g.loops); l++ {
		if ks := cv.uncovered(l); len(ks) > 0 {
			at := cv.g.loops[l].segAt[ks[0]]
			return nil, at.errf("no grown grid grows from %s: a grown grid covers only the body it grows from, so the mesh would leave this inner loop out. Grow a grid from the loop (from: %s), or take it out of the outline",
				cv.segments(l, ks), cv.g.loops[l].name)
		}
	}
	ks := cv.uncovered(0)
	if outer == nil || len(ks) == 0 {
		return nil, nil // the grids reach the whole outer loop, or it is a body
	}
	loose := map[int]bool{}
	for _, k := range ks {
		loose[k] = true
	}
	var names []string
	gap := math.Inf(1)
	for _, gr := range grids {
		names = append(names, fmt.Sprintf("%q", gr.spec.opt.Name))
		for _, b := range gr.blocks {
			for _, n := range perimeter(b) {
				d, _ := outer.nearest(m.Nodes[n], func(e int) bool { return loose[outer.seg[e]] })
				gap = math.Min(gap, d)
			}
		}
	}
	what, bounds, it, is := fmt.Sprintf("outer loop %q", cv.g.loops[0].name), "bounds", "it", "it is"
	if len(ks) < len(cv.g.loops[0].segments) {
		what = cv.segments(0, ks)
		if len(ks) > 1 {
			bounds, it, is = "bound", "them", "they are"
		}
	}
	grid := "grown grid "
	if len(names) > 1 {
		grid = "grown grids "
	}
	reach := fmt.Sprintf("which comes no closer to %s than %s", it, cv.c.length(gap))
	if gap <= outer.tol {
		reach = "which reaches " + it
	}
	return []string{fmt.Sprintf("%s only %s %s%s, %s: %s no boundary of the mesh; the grids' own boundaries are tagged %s",
		what, bounds, grid, andList(names), reach, is, andList(grownTags(grids)))}, nil
}

// grownTags returns the tags the grown grids give their boundaries, quoted,
// each once.
func grownTags(grids []grownGrid) []string {
	var own []string
	seen := map[string]bool{}
	for _, gr := range grids {
		for _, t := range []string{gr.spec.opt.OuterTag, gr.spec.opt.StartTag, gr.spec.opt.EndTag} {
			if t != "" && !seen[t] {
				seen[t] = true
				own = append(own, fmt.Sprintf("%q", t))
			}
		}
	}
	return own
}

// lostTags refuses a boundary condition on a tag that no face of the mesh
// has and that only unused segments of the outline carry (segments the
// grids only bound, or that lie along faces tagged otherwise), saying
// which segments and why.
func (cv *coverage) lostTags(m *mesh.Mesh, grids []grownGrid) error {
	b := cv.c.Boundaries
	if b == nil {
		return nil
	}
	o, err := b.at.object()
	if err != nil {
		return err
	}
	for _, cond := range b.conditions {
		if _, _, ok := m.TagRange(cond.Tag); ok {
			continue
		}
		var segs, faces []string
		seen := map[string]bool{}
		for l, ls := range cv.g.loops {
			var ks []int
			for k, s := range ls.segments {
				if !cv.used[s] && loopTag(l, ls, s) == cond.Tag {
					ks = append(ks, k)
					for _, t := range cv.along[s] {
						if !seen[t] {
							seen[t] = true
							faces = append(faces, fmt.Sprintf("%q", t))
						}
					}
				}
			}
			if len(ks) > 0 {
				segs = append(segs, cv.segments(l, ks))
			}
		}
		if len(segs) == 0 {
			continue // a tag of no outline segment: bc.Assign says so
		}
		why := ""
		if len(faces) > 0 {
			why = fmt.Sprintf("; the mesh's faces there are tagged %s", andList(faces))
		}
		if len(cv.c.Mesh.blocks) == 0 {
			why += fmt.Sprintf("; the grown grids' boundaries are made by the growth and tagged by outer_tag, start_tag and end_tag (here %s)", andList(grownTags(grids)))
		}
		at, _ := o.get(cond.Tag)
		return at.errf("tag %q is on no face of the mesh: it is carried only by %s, which no block side uses and no grown grid grows from%s. The mesh's tags are %s: put the condition on one of them, or drop it",
			cond.Tag, strings.Join(segs, "; "), why, strings.Join(m.Tags, ", "))
	}
	return nil
}

// perimeter returns the mesh nodes on the four sides of a block.
func perimeter(b mesh.Block) []int32 {
	out := make([]int32, 0, 2*(b.NI+b.NJ))
	for i := range b.NI {
		out = append(out, b.Node[i], b.Node[(b.NJ-1)*b.NI+i])
	}
	for j := 1; j+1 < b.NJ; j++ {
		out = append(out, b.Node[j*b.NI], b.Node[j*b.NI+b.NI-1])
	}
	return out
}

// area formats an area in square metres in the case's units.
func (c *Case) area(a float64) string {
	s := unitScale[c.Units]
	return fmt.Sprintf("%.6g %s²", a/(s*s), c.Units)
}

// length formats a length in metres in the case's units.
func (c *Case) length(d float64) string {
	return fmt.Sprintf("%.4g %s", d/unitScale[c.Units], c.Units)
}

// point formats a point in metres in the case's units, each coordinate
// rounded to a multiple of q metres so that round-off shows as zero.
func (c *Case) point(p orb.Point, q float64) string {
	s := unitScale[c.Units]
	x, y := math.Round(p[0]/q)*q+0, math.Round(p[1]/q)*q+0 // +0 turns -0 into 0
	return fmt.Sprintf("(%.6g, %.6g) %s", x/s, y/s, c.Units)
}

// boundaryIndex holds the mesh's boundary faces for nearest-face queries.
type boundaryIndex struct {
	*edgeIndex
	tag []string // the tag of each face, "" for none
}

// sagAlong is the largest sagitta, kappa L²/8, of the faces nearest to
// the points.
func (bi *boundaryIndex) sagAlong(pts []orb.Point, kappa float64) float64 {
	s := 0.0
	for _, p := range pts {
		if _, e := bi.nearest(p, nil); e >= 0 {
			l := dist(bi.a[e], bi.b[e])
			s = math.Max(s, kappa*l*l/8)
		}
	}
	return s
}

func newBoundaryIndex(m *mesh.Mesh) *boundaryIndex {
	nb := m.NumBoundary()
	a, b := make([]orb.Point, nb), make([]orb.Point, nb)
	bi := &boundaryIndex{tag: make([]string, nb)}
	for k := range nb {
		f := m.NumInterior + k
		a[k], b[k] = m.Nodes[m.FaceNodes[f][0]], m.Nodes[m.FaceNodes[f][1]]
		if t := m.FaceTag[f]; t >= 0 {
			bi.tag[k] = m.Tags[t]
		}
	}
	bi.edgeIndex = newEdgeIndex(a, b)
	return bi
}

// along reports whether every node and halfway point of a segment lies
// within tol of a boundary face, and returns the tags of the faces
// nearest the halfway points, sorted (the nodes at the ends meet the
// neighbouring segments' faces too).
func (bi *boundaryIndex) along(nodes, mids []orb.Point, tol, kappa float64) ([]string, bool) {
	// Within tol of the nearest face, or of the curve of curvature kappa
	// through the face's ends, which lies up to kappa L²/8 off a face of
	// length L (the face may divide the same curve otherwise).
	near := func(p orb.Point) (int, bool) {
		d, e := bi.nearest(p, nil)
		if e < 0 {
			return e, false
		}
		l := dist(bi.a[e], bi.b[e])
		return e, d <= tol+kappa*l*l/8
	}
	for _, p := range nodes {
		if _, ok := near(p); !ok {
			return nil, false
		}
	}
	seen := map[string]bool{}
	var tags []string
	for _, p := range mids {
		e, ok := near(p)
		if !ok {
			return nil, false
		}
		if t := bi.tag[e]; !seen[t] {
			seen[t] = true
			tags = append(tags, t)
		}
	}
	sort.Strings(tags)
	return tags, true
}

// edgeIndex is a set of straight edges binned into horizontal strips, so
// that an inside test or a nearest-edge search looks at the edges near
// the point rather than at all of them.
type edgeIndex struct {
	a, b []orb.Point // edge e runs from a[e] to b[e]
	box  orb.Bound
	// strip[k] holds the edges that reach into [lo+k·h, lo+(k+1)·h).
	strip [][]int32
	lo, h float64
}

func newEdgeIndex(a, b []orb.Point) *edgeIndex {
	x := &edgeIndex{a: a, b: b, box: orb.Bound{Min: a[0], Max: a[0]}}
	for e := range a {
		x.box = x.box.Extend(a[e]).Extend(b[e])
	}
	// About one edge a strip on average, at most 1024 strips: a long edge
	// is listed in every strip it crosses.
	n := max(1, min(len(a), 1024))
	x.lo = x.box.Min[1]
	x.h = (x.box.Max[1] - x.lo) / float64(n)
	x.strip = make([][]int32, n)
	for e := range a {
		lo, hi := x.stripOf(math.Min(a[e][1], b[e][1])), x.stripOf(math.Max(a[e][1], b[e][1]))
		for k := lo; k <= hi; k++ {
			x.strip[k] = append(x.strip[k], int32(e))
		}
	}
	return x
}

// stripOf returns the strip holding height y, clamped to the strips.
func (x *edgeIndex) stripOf(y float64) int {
	if !(x.h > 0) {
		return 0
	}
	return max(0, min(len(x.strip)-1, int((y-x.lo)/x.h)))
}

// inside reports whether p lies inside the closed loops the edges make,
// by the parity of the crossings of a ray towards +x (each edge taken as
// holding its lower end and not its upper one, so that a ray through a
// vertex counts once).
func (x *edgeIndex) inside(p orb.Point) bool {
	if p[1] < x.box.Min[1] || p[1] > x.box.Max[1] {
		return false
	}
	in := false
	for _, e := range x.strip[x.stripOf(p[1])] {
		a, b := x.a[e], x.b[e]
		if (a[1] > p[1]) != (b[1] > p[1]) {
			if a[0]+(p[1]-a[1])*(b[0]-a[0])/(b[1]-a[1]) > p[0] {
				in = !in
			}
		}
	}
	return in
}

// nearest returns the distance from p to the nearest edge for which keep
// is true (every edge, for a nil keep), and that edge (-1 when none is
// kept); strips are searched outwards from p's until they lie farther
// than the nearest edge found.
func (x *edgeIndex) nearest(p orb.Point, keep func(e int) bool) (float64, int) {
	best, edge := math.Inf(1), -1
	s := x.stripOf(p[1])
	for t := 0; ; t++ {
		strips := []int{s - t, s + t}
		if t == 0 {
			strips = strips[:1]
		}
		gap, searched := math.Inf(1), false
		for _, k := range strips {
			if k < 0 || k >= len(x.strip) {
				continue
			}
			searched = true
			lo, hi := x.lo+float64(k)*x.h, x.lo+float64(k+1)*x.h
			gap = math.Min(gap, math.Max(0, math.Max(lo-p[1], p[1]-hi)))
			for _, e := range x.strip[k] {
				if keep != nil && !keep(int(e)) {
					continue
				}
				if d := geometry.SegmentDistance(p, x.a[e], x.b[e]); d < best {
					best, edge = d, int(e)
				}
			}
		}
		// The strips further out lie farther still.
		if !searched || gap > best {
			break
		}
	}
	return best, edge
}
