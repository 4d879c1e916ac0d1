// Package unstructured is cvdeck's unstructured mesher: robust Delaunay
// triangulation, constrained edges, quality refinement with a size field,
// boundary layers and an optional quad-dominant pass, turning a
// discretised outline into a mesh.Mesh.
//
// The pieces, each with its source:
//
//   - predicates: Shewchuk's adaptive-precision orient2d and incircle
//     (1997), exact for every float64 input;
//   - Delaunay: Bowyer–Watson insertion (1981) in Hilbert-curve order with
//     a visibility walk, ghost triangles at the hull, flat int32 arrays;
//   - constrained edges: recovery by flips (Sloan 1993), Lawson flips to the
//     constrained Delaunay triangulation, inside and outside by parity;
//   - refinement: Ruppert (1995) as presented by Shewchuk (2002), with
//     concentric-shell segment splits and the sharp-corner rule for small
//     input angles, and a size field of cones from the boundary spacing,
//     growth ratio, regions and maximum size;
//   - boundary layers: the wall spacing graded towards corners (by
//     equidistribution, keeping the outline's points), rays along
//     averaged wall normals with fans at convex corners and the rays
//     beside a fan leaning towards it, the layers of two walls meeting
//     along the bisector of a concave corner, layers sliding along
//     neighbouring edges or ramping down at wall ends, termination by
//     free distance and crossings;
//   - quad-dominant: greedy pairing of triangles by angle quality.
package unstructured

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"cvdeck/geometry"
	"cvdeck/internal/hugepage"
	"cvdeck/mesh"
	"github.com/paulmach/orb"
)

// Mesh meshes the region inside the outline's outer loop and outside its
// inner loops; it is MeshWithReport without the report.
func Mesh(out geometry.DiscreteOutline, opt Options) (*mesh.Mesh, error) {
	m, _, err := MeshWithReport(out, opt)
	return m, err
}

// Report tells what the mesher built where that may differ from what was
// asked.
type Report struct {
	// Layers has one entry per Options.Layers request, in order.
	Layers []LayerReport
}

// MeshWithReport meshes the region inside the outline's outer loop and
// outside its inner loops, and reports the boundary layers built. The
// outline's points and edges are kept (refinement may split edges; the
// pieces keep the edge's tag), every boundary face carries its edge's
// tag, and cells are counter-clockwise.
//
// The steps: validate and flatten the outline; boundary layers when asked
// for, on walls whose spacing is first graded toward their corners
// (gradeCorners), which leave a smaller region whose top edges may not
// be split;
// an estimate of the cell count from the size field, refused above
// MaxCells before anything large is allocated (a *CellLimitError); the
// constrained Delaunay triangulation of the region; Delaunay refinement
// to the minimum angle and the size field (see refiner and sizeField);
// quad pairing when asked for; mesh.Build.
//
// Node order: the outline's points first, loop by loop in outline order,
// then the other nodes (the points the corner grading adds on walls
// among them) in the order the cells first use them. Cell order: along a
// Hilbert curve (see localOrder).
func MeshWithReport(out geometry.DiscreteOutline, opt Options) (*mesh.Mesh, *Report, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, nil, fmt.Errorf("unstructured: %w", err)
	}
	g, err := flatten(out)
	if err != nil {
		return nil, nil, fmt.Errorf("unstructured: %w", err)
	}
	rep := &Report{}
	region := g
	limit := opt.MaxCells
	var plan *layerPlan
	if len(opt.Layers) > 0 {
		var specOf []int
		if specOf, err = wallSpecs(g, opt); err != nil {
			return nil, nil, fmt.Errorf("unstructured: %w", err)
		}
		var walls *pslg
		var ties []tieCorner
		if walls, ties, err = gradeCorners(g, opt, specOf); err != nil {
			return nil, nil, fmt.Errorf("unstructured: %w", err)
		}
		if plan, rep.Layers, err = buildLayers(walls, opt, ties); err != nil {
			return nil, nil, fmt.Errorf("unstructured: %w", err)
		}
		if plan != nil {
			plan.userFirst(walls)
			nl := len(plan.cellStart) - 1
			if nl >= opt.MaxCells {
				return nil, nil, fmt.Errorf("unstructured: the boundary layers alone have %d cells, above the limit of %d; raise the limit or use fewer layers", nl, opt.MaxCells)
			}
			// The triangles may have what the layers leave of the limit.
			opt.MaxCells -= nl
			if region, err = flatten(plan.front); err != nil {
				return nil, nil, fmt.Errorf("unstructured: the outline left after the boundary layers is not valid (use fewer or thinner layers): %w", err)
			}
		}
	}
	tr, err := triangulateOutline(region, g, opt)
	if err != nil {
		var big *CellLimitError
		switch {
		case errors.As(err, &big):
			// Quote the limit the caller set, with the layer cells in the
			// estimate, rather than what the layers leave of it.
			big.LayerCells = limit - opt.MaxCells
			big.Estimate += float64(big.LayerCells)
			big.Limit = limit
			return nil, nil, err
		case errors.Is(err, errTooMany):
			return nil, nil, fmt.Errorf("unstructured: %w", refineError(err, limit))
		case plan != nil:
			return nil, nil, fmt.Errorf("unstructured: meshing the region left by the boundary layers (their top is loop points there; use fewer or thinner layers): %w", err)
		}
		return nil, nil, err
	}
	in := localOrder(meshInput(g, region, plan, tr, opt.QuadDominant), len(g.pts))
	tr = nil
	m, err := mesh.Build(in)
	if err != nil {
		return nil, nil, fmt.Errorf("unstructured: building the mesh: %w", err)
	}
	return m, rep, nil
}

// triangulateOutline returns the refined constrained Delaunay
// triangulation of the flattened region outline; orig is the user's
// outline (for near-tag regions).
func triangulateOutline(region, orig *pslg, opt Options) (*triangulation, error) {
	size, err := newSizeField(region, orig, opt)
	if err != nil {
		return nil, fmt.Errorf("unstructured: %w", err)
	}
	est := size.estimateTriangles(region)
	if est.total > float64(opt.MaxCells) {
		return nil, est.limitError(region, orig, size, opt)
	}
	capTri := int(math.Min(1.15*est.total, float64(opt.MaxCells))) + 4*len(region.pts) + 16
	pts := make([]orb.Point, len(region.pts), capTri/2+len(region.pts))
	copy(pts, region.pts)
	g2 := *region
	g2.pts = pts
	tr, err := constrainedTriangulation(&g2, capTri)
	if err != nil {
		return nil, fmt.Errorf("unstructured: %w", err)
	}
	// Ghost and outside triangles are not cells; allow for them in the
	// cell limit.
	r := newRefiner(tr, region, size, opt.MinAngle, opt.MaxCells+4*len(region.pts)+16)
	r.frozen = region.tagIndex(frontTag)
	if err := r.run(); err != nil {
		// MeshWithReport words errTooMany with the caller's limit.
		return nil, fmt.Errorf("unstructured: %w", err)
	}
	return tr, nil
}

// tagIndex returns the index of the tag name, or noSeg.
func (g *pslg) tagIndex(name string) int16 {
	for i, t := range g.tags {
		if t == name {
			return int16(i)
		}
	}
	return noSeg
}

// newSizeField builds the size field of the options over the outline.
func newSizeField(g, orig *pslg, opt Options) (*sizeField, error) {
	s := &sizeField{slope: opt.Growth - 1, maxSize: opt.MaxSize}
	for i, p := range g.pts {
		a, c := g.pts[g.prevPt[i]], g.pts[g.nextPt[i]]
		h := 0.5 * (math.Hypot(p[0]-a[0], p[1]-a[1]) + math.Hypot(p[0]-c[0], p[1]-c[1]))
		s.src = append(s.src, sizeSource{p: p, h: h, from: fromTag(g.edgeTag[i])})
	}
	for ri, r := range opt.Regions {
		switch r.Shape {
		case Box:
			s.boxes = append(s.boxes, r)
			s.boxFrom = append(s.boxFrom, int32(ri))
		case Circle:
			s.circles = append(s.circles, r)
			s.circleFrom = append(s.circleFrom, int32(ri))
		case NearTag:
			found := false
			for e, ti := range orig.edgeTag {
				if orig.tags[ti] != r.Tag {
					continue
				}
				found = true
				// Sample the edge at most Size apart so the cone union
				// follows the edge, not just its end points.
				a, b := orig.pts[e], orig.pts[orig.nextPt[e]]
				l := math.Hypot(b[0]-a[0], b[1]-a[1])
				n := int(math.Ceil(l / r.Size))
				if n > 1000 {
					n = 1000
				}
				for k := 0; k < max(n, 1); k++ {
					t := float64(k) / float64(max(n, 1))
					s.src = append(s.src, sizeSource{p: orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}, h: r.Size, r: r.Distance, from: int32(ri)})
				}
			}
			if !found {
				return nil, fmt.Errorf("region %d (near-tag): no boundary edge is tagged %q; tags are %q", ri, r.Tag, orig.tags)
			}
		}
	}
	s.build(orb.MultiPoint(g.pts).Bound())
	return s, nil
}

// cellEstimate is the triangle count the size field asks for, and the
// part of it from each thing that sets the size (keyed by
// sizeSource.from, see sizeField.sizeAt).
type cellEstimate struct {
	total float64
	by    map[int32]float64
}

// estimateTriangles estimates the triangle count of the refined mesh: the
// integral over the domain of 1/(0.41·h²), 0.41·h² being the mean
// triangle area refinement gives for the size target h (measured on the
// benchmark channel; an equilateral triangle of edge h has
// √3/4·h² ≈ 0.43·h²), plus two per outline point. The integral is a
// midpoint sum on a 128 × 128 grid over the outline's bounding box,
// counting the samples inside the outline by the even-odd rule; each
// sample's part is booked to what sets the size there.
func (s *sizeField) estimateTriangles(g *pslg) cellEstimate {
	b := orb.MultiPoint(g.pts).Bound()
	const n = 128
	dx, dy := (b.Max[0]-b.Min[0])/n, (b.Max[1]-b.Min[1])/n
	est := cellEstimate{by: map[int32]float64{}}
	// Crossings of each sample row with the outline edges, by row.
	xs := make([]float64, 0, 64)
	for j := 0; j < n; j++ {
		y := b.Min[1] + (float64(j)+0.5)*dy
		xs = xs[:0]
		for e := range g.pts {
			p, q := g.pts[e], g.pts[g.nextPt[e]]
			if (p[1] <= y) != (q[1] <= y) {
				xs = append(xs, p[0]+(y-p[1])/(q[1]-p[1])*(q[0]-p[0]))
			}
		}
		for i := 0; i < n; i++ {
			x := b.Min[0] + (float64(i)+0.5)*dx
			c := 0
			for _, xc := range xs {
				if xc < x {
					c++
				}
			}
			if c%2 == 1 {
				h, from := s.sizeAt(orb.Point{x, y})
				part := dx * dy / (0.41 * h * h)
				est.total += part
				est.by[from] += part
			}
		}
	}
	est.total += 2 * float64(len(g.pts))
	return est
}

// CellLimitError refuses a mesh whose estimated cell count is above the
// limit (Options.MaxCells), before the triangulation is allocated. It
// names what asks for most of the cells, so that the user knows which
// size to change, and by about how much.
type CellLimitError struct {
	// Estimate is the estimated cell count, LayerCells of them in the
	// boundary layers (counted exactly); Limit is Options.MaxCells.
	Estimate   float64
	LayerCells int
	Limit      int
	// What sets the size where most cells are: Region ≥ 0 is an index
	// into Options.Regions; otherwise Tag names the boundary whose
	// spacing it is (LayerTop: the top of the boundary layers, spaced as
	// their walls), or, with neither, MaxSize (or, without one, the
	// spacing grown out from the boundary).
	Region   int
	Tag      string
	LayerTop bool
	// Size is that size (m): the region's size, the boundary's finest
	// spacing, or the maximum size.
	Size float64
	// Part is the estimated cells where it sets the size.
	Part float64
	// Fit is the size that brings the estimate within the limit, the
	// other sizes kept: found by estimating again with other sizes for a
	// region or the maximum size, and, for a boundary's spacing (which
	// moves the outline's points), taking that part's cells to go as
	// 1/size². 0 when the other sizes alone ask for more than the limit.
	Fit float64
}

func (e *CellLimitError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "unstructured: the sizes ask for about %.3g cells", e.Estimate)
	if e.LayerCells > 0 {
		fmt.Fprintf(&b, " (%d of them in the boundary layers)", e.LayerCells)
	}
	fmt.Fprintf(&b, ", above the limit of %d; %s asks for about %.3g of them", e.Limit, e.Driver(), e.Part)
	if e.Fit > 0 {
		fmt.Fprintf(&b, ": a size of about %.3g m instead of %.3g m would fit, or raise the limit", RoundUp3(e.Fit), e.Size)
	} else {
		b.WriteString(", and the rest alone is above the limit: coarsen the other sizes too, or raise the limit")
	}
	return b.String()
}

// Driver names what asks for most of the cells, in metres.
func (e *CellLimitError) Driver() string {
	switch {
	case e.Region >= 0:
		return fmt.Sprintf("region %d (size %.3g m)", e.Region, e.Size)
	case e.LayerTop:
		return fmt.Sprintf("the spacing along the top of the boundary layers (%.3g m at the finest, as on their walls)", e.Size)
	case e.Tag != "":
		return fmt.Sprintf("the boundary spacing along %q (%.3g m at the finest)", e.Tag, e.Size)
	case !math.IsInf(e.Size, 1):
		return fmt.Sprintf("the maximum size (%.3g m)", e.Size)
	}
	return "the size grown out from the boundary spacing"
}

// limitError makes the refusal of an estimate above opt.MaxCells over the
// region g (orig is the user's outline, for near-tag regions): what sets
// the size where the most cells are, and the size that would fit.
func (est cellEstimate) limitError(g, orig *pslg, size *sizeField, opt Options) *CellLimitError {
	keys := make([]int32, 0, len(est.by))
	for k := range est.by {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	top := keys[0]
	for _, k := range keys {
		if est.by[k] > est.by[top] {
			top = k
		}
	}
	e := &CellLimitError{Estimate: est.total, Limit: opt.MaxCells, Region: -1, Part: est.by[top]}
	switch {
	case top >= 0:
		e.Region = int(top)
		e.Size = opt.Regions[top].Size
	case top == fromMaxSize:
		e.Size = opt.MaxSize
	default:
		t := int16(-1 - top)
		if g.tags[t] == frontTag {
			e.LayerTop = true
		} else {
			e.Tag = g.tags[t]
		}
		e.Size = math.Inf(1)
		for i, p := range g.pts {
			if g.edgeTag[i] == t {
				q := g.pts[g.nextPt[i]]
				e.Size = math.Min(e.Size, math.Hypot(q[0]-p[0], q[1]-p[1]))
			}
		}
		// Part·(Size/Fit)² + rest = MaxCells.
		if room := float64(opt.MaxCells) - (est.total - e.Part); room > 0 && !math.IsInf(e.Size, 1) {
			e.Fit = e.Size * math.Sqrt(e.Part/room)
		}
		return e
	}
	// The estimate falls as the driver's size grows: double the size
	// until it fits, then halve the bracket (on a log scale) to 0.1%.
	with := func(h float64) float64 {
		o := opt
		if top >= 0 {
			o.Regions = slices.Clone(opt.Regions)
			o.Regions[top].Size = h
		} else {
			o.MaxSize = h
		}
		f := size
		if top < 0 || o.Regions[top].Shape == NearTag {
			var err error
			if f, err = newSizeField(g, orig, o); err != nil {
				return math.Inf(1)
			}
		} else {
			c := *size
			c.boxes, c.circles = slices.Clone(size.boxes), slices.Clone(size.circles)
			for i, k := range c.boxFrom {
				c.boxes[i] = o.Regions[k]
			}
			for i, k := range c.circleFrom {
				c.circles[i] = o.Regions[k]
			}
			f = &c
		}
		return f.estimateTriangles(g).total
	}
	limit := float64(opt.MaxCells)
	if with(math.Inf(1)) > limit {
		return e
	}
	lo, hi := e.Size, 2*e.Size
	for k := 0; with(hi) > limit; k++ {
		if k == 60 {
			return e
		}
		lo, hi = hi, 2*hi
	}
	for hi/lo > 1.001 {
		if mid := math.Sqrt(lo * hi); with(mid) > limit {
			lo = mid
		} else {
			hi = mid
		}
	}
	e.Fit = hi
	return e
}

// RoundUp3 rounds a positive x up to three significant digits, so that a
// size quoted as the least that fits does fit as written.
func RoundUp3(x float64) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return x
	}
	p := math.Pow(10, math.Floor(math.Log10(x))-2)
	return math.Ceil(x/p*(1-1e-12)) * p
}

// userFirst renumbers the plan's nodes so that the caller's outline
// points come first, in their order (see pslg.user), then the points the
// corner grading added, in loop order, then the layer nodes; g is the
// outline the plan was built on. Without added points it does nothing.
func (p *layerPlan) userFirst(g *pslg) {
	if g.user == nil {
		return
	}
	newID := make([]int32, len(p.nodes))
	nu := int32(0)
	for _, u := range g.user {
		if u >= 0 {
			nu++
		}
	}
	added := nu
	for i, u := range g.user {
		if u >= 0 {
			newID[i] = u
		} else {
			newID[i] = added
			added++
		}
	}
	for i := len(g.pts); i < len(p.nodes); i++ {
		newID[i] = int32(i)
	}
	nodes := make([]orb.Point, len(p.nodes))
	for i, q := range p.nodes {
		nodes[newID[i]] = q
	}
	p.nodes = nodes
	for i, v := range p.cellNodes {
		p.cellNodes[i] = newID[v]
	}
	for i := range p.edges {
		p.edges[i].A, p.edges[i].B = newID[p.edges[i].A], newID[p.edges[i].B]
	}
	for _, ids := range p.frontID {
		for i, v := range ids {
			ids[i] = newID[v]
		}
	}
}

// meshInput assembles the mesh: the layer plan's nodes and cells (when
// there are layers) and the inside triangles. Nodes are the outline's
// points, then layer nodes, then the points refinement inserted, in order;
// cells are the layer cells, then the triangles in slot order. Every
// segment half-edge of an inside triangle is a boundary face with its tag,
// except the layers' front, which is interior. With quads, triangles
// paired by pairQuads become one quadrilateral cell, at the place of the
// lower-numbered triangle.
func meshInput(g, region *pslg, plan *layerPlan, tr *triangulation, quads bool) mesh.Input {
	nr := int32(len(region.pts))
	in := mesh.Input{Tags: g.tags}
	var nodeOf func(v int32) int32
	tagOf := make([]int16, len(region.tags))
	for i, name := range region.tags {
		tagOf[i] = g.tagIndex(name)
	}
	if plan == nil {
		in.Nodes = tr.pts
		nodeOf = func(v int32) int32 { return v }
		in.CellStart = []int32{0}
	} else {
		var ids []int32
		for _, l := range plan.frontID {
			ids = append(ids, l...)
		}
		base := int32(len(plan.nodes))
		in.Nodes = append(plan.nodes, tr.pts[nr:]...)
		nodeOf = func(v int32) int32 {
			if v < nr {
				return ids[v]
			}
			return base + v - nr
		}
		in.CellStart = plan.cellStart
		in.CellNodes = plan.cellNodes
		in.Edges = plan.edges
	}
	nt := tr.numTri()
	var partner []int32
	if quads {
		partner = tr.pairQuads()
	}
	// Room for every inside triangle, so that the cell arrays are made
	// once at their size rather than grown by doubling.
	inside := 0
	for t := int32(0); t < nt; t++ {
		if tr.flag[t]&flagInside != 0 {
			inside++
		}
	}
	in.CellNodes = hugepage.Grow(in.CellNodes, 3*inside)
	in.CellStart = hugepage.Grow(in.CellStart, inside)
	for t := int32(0); t < nt; t++ {
		if tr.flag[t]&flagInside == 0 {
			continue
		}
		for k := int32(0); k < 3; k++ {
			if s := tr.seg[3*t+k]; s != noSeg && tagOf[s] >= 0 {
				in.Edges = append(in.Edges, mesh.TaggedEdge{A: nodeOf(tr.v[3*t+k]), B: nodeOf(tr.v[next(3*t+k)]), Tag: tagOf[s]})
			}
		}
		if partner != nil && partner[t] >= 0 {
			e := partner[t]
			if tr.adj[e]/3 < t {
				continue // emitted with its partner
			}
			// Triangles a b c and b a d across e = a→b make a d b c.
			in.CellNodes = append(in.CellNodes, nodeOf(tr.v[e]), nodeOf(tr.v[prev(tr.adj[e])]), nodeOf(tr.v[next(e)]), nodeOf(tr.v[prev(e)]))
		} else {
			in.CellNodes = append(in.CellNodes, nodeOf(tr.v[3*t]), nodeOf(tr.v[3*t+1]), nodeOf(tr.v[3*t+2]))
		}
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	return in
}

// localOrder renumbers the cells of in along a Hilbert curve through their
// vertex averages (see hilbertOrder), and the nodes after the first fixed
// ones in the order the renumbered cells first use them. Refinement
// inserts points, and so makes cells, all over the region; in curve order
// cells that are near each other in the plane are mostly near each other
// in memory too, which every later sweep over cells and faces (the quality
// checks, the writers, a solver's loops) reads faster: on the 1.77M cells
// of the high-lift sample refined 8 times the quality checks take 0.32 s
// instead of 0.62–0.71 s (space-filling-curve ordering, common practice).
func localOrder(in mesh.Input, fixed int) mesh.Input {
	nc := len(in.CellStart) - 1
	mid := hugepage.Make[orb.Point](nc)
	for c := range mid {
		nodes := in.CellNodes[in.CellStart[c]:in.CellStart[c+1]]
		var x, y float64
		for _, v := range nodes {
			x += in.Nodes[v][0]
			y += in.Nodes[v][1]
		}
		mid[c] = orb.Point{x / float64(len(nodes)), y / float64(len(nodes))}
	}
	order := hilbertOrder(mid)
	newID := make([]int32, len(in.Nodes))
	for v := range newID {
		newID[v] = -1
		if v < fixed {
			newID[v] = int32(v)
		}
	}
	out := mesh.Input{Nodes: hugepage.Make[orb.Point](len(in.Nodes)), CellStart: hugepage.Make[int32](nc + 1)[:1], CellNodes: hugepage.Make[int32](len(in.CellNodes))[:0], Tags: in.Tags}
	copy(out.Nodes, in.Nodes[:fixed])
	next := int32(fixed)
	for _, c := range order {
		for _, v := range in.CellNodes[in.CellStart[c]:in.CellStart[c+1]] {
			if newID[v] < 0 {
				newID[v] = next
				out.Nodes[next] = in.Nodes[v]
				next++
			}
			out.CellNodes = append(out.CellNodes, newID[v])
		}
		out.CellStart = append(out.CellStart, int32(len(out.CellNodes)))
	}
	// Nodes no cell uses (none from the mesher) keep their relative order
	// at the end, so that nothing is lost.
	for v, id := range newID {
		if id < 0 {
			newID[v] = next
			out.Nodes[next] = in.Nodes[v]
			next++
		}
	}
	out.Edges = make([]mesh.TaggedEdge, len(in.Edges))
	for i, e := range in.Edges {
		out.Edges[i] = mesh.TaggedEdge{A: newID[e.A], B: newID[e.B], Tag: e.Tag}
	}
	return out
}
