package unstructured

import (
	"fmt"
	"math"
	"slices"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"github.com/paulmach/orb"
)

// frontTag is the internal tag of the edges between the boundary layers
// and the triangles: they are constrained but never split, and they are
// interior faces of the final mesh. The NUL byte keeps it apart from any
// user tag.
const frontTag = "\x00layer-front"

// Fan and corner parameters (common practice, chosen on test shapes).
const (
	// fanTurn: wall corners turning away from the domain by more than this
	// get a fan of rays instead of one averaged normal.
	fanTurn = 40 * math.Pi / 180
	// fanMaxStep is the largest angle between two rays of a fan.
	fanMaxStep = 25 * math.Pi / 180
	// fanMinStep is the least angle between two rays of a fan.
	fanMinStep = 2 * math.Pi / 180
	// fanSpread and fanSpreadPoints: the rays of the fanSpreadPoints − 1
	// wall points on each side of a fan lean towards it (see fanLean).
	fanSpread       = 2.5
	fanSpreadPoints = 4
	// slideCos: a layer whose wall ends beside a non-wall edge at most
	// acos(slideCos) from the layer normal grows along that edge.
	slideCos = 0.64 // cos 50°
	// gapShare is the share of the free distance along a ray, to the
	// nearest other boundary, that the layers may take, so layers of
	// opposite walls stop short of each other.
	gapShare = 0.45
	// gapSpacing is the least gap, in wall spacings, left between the
	// layers and another boundary.
	gapSpacing = 0.3
	// crossShare is the share of the distance to the point where two
	// neighbouring rays cross that the layers may take.
	crossShare = 0.8
)

// ray is one extrusion line of the boundary layers: from wall point base
// along unit direction dir, node k at distance scale·s_k.
type ray struct {
	base  int32
	dir   orb.Point
	scale float64
	spec  int     // index into the layer requests
	limit float64 // largest distance the layers may reach along the ray
	// limitWhy is what sets limit: StopGap, StopSlide or StopCross.
	limitWhy StopReason
	zero     bool // layers must end here (a wall end that cannot slide)
	// slide ≥ 0: the ray runs along input edge slide (a non-wall edge at a
	// wall end) and its layer faces are boundary faces with that tag.
	slide int32
	n     int        // layer count after limits
	why   StopReason // what last lowered n below the count asked, or StopNone
	nodes []int32    // node ids, nodes[0] = base
	// tie ≥ 1: the ray belongs to tied corner tie−1 (see tieCorner): its
	// corner ray when tieJ = 0, else the ray of zone point tieJ, which
	// ends on the bisector after tieJ layers. meet: it ends there now,
	// at a node shared with the zone ray j of the other wall.
	tie  int32
	tieJ int
	meet bool
}

// layerPlan is the boundary-layer part of a mesh and the outline of the
// region the triangles fill.
type layerPlan struct {
	nodes     []orb.Point
	cellStart []int32
	cellNodes []int32
	edges     []mesh.TaggedEdge // boundary faces of layer cells, tags of g
	front     geometry.DiscreteOutline
	frontID   [][]int32 // node id of each front point, per loop
}

// heights returns s_0..s_n, the distances of the layer nodes from the
// wall: s_k = h₁(Gᵏ − 1)/(G − 1), the geometric series of first height h₁
// and ratio G (s_k = k·h₁ when G = 1); n is Count or, without a count, the
// most layers whose total stays within Thickness.
func heights(l Layers) []float64 {
	s := []float64{0}
	h, total := l.FirstHeight, 0.0
	for k := 0; ; k++ {
		if l.Count > 0 && k == l.Count {
			break
		}
		if l.Count == 0 && (total+h > l.Thickness*(1+1e-12) || k == 200) {
			break
		}
		total += h
		s = append(s, total)
		h *= l.Growth
	}
	return s
}

// wallSpecs returns, per tag of g, the index of the layer request whose
// walls carry it (the one with the thinnest first layer when several
// name it), or −1; an error names a request's tag that no edge carries.
func wallSpecs(g *pslg, opt Options) ([]int, error) {
	specOf := make([]int, len(g.tags))
	for i := range specOf {
		specOf[i] = -1
	}
	for li, l := range opt.Layers {
		for _, tag := range l.Tags {
			found := false
			for ti, name := range g.tags {
				if name == tag {
					found = true
					if specOf[ti] < 0 || l.FirstHeight < opt.Layers[specOf[ti]].FirstHeight {
						specOf[ti] = li
					}
				}
			}
			if !found {
				return nil, fmt.Errorf("layers %d: no boundary edge is tagged %q; tags are %q", li, tag, g.tags)
			}
		}
	}
	return specOf, nil
}

// buildLayers plans quadrilateral layers on the input edges whose tag is
// in a layer request (Options.Layers):
//
//   - every wall point gets a ray along the averaged normal of its two
//     wall edges, lengthened by 1/cos of the half-turn so each layer keeps
//     its height from both edges; corners turning away from the domain by
//     more than fanTurn get a fan of rays about fanStep apart (fanPlan),
//     whose innermost cells are triangles, and the rays of the next
//     fanSpreadPoints − 1 wall points on either side lean towards the
//     fan (fanLean), which takes the rest of the turn;
//   - at the end of a wall beside a non-wall edge the ray runs along that
//     edge when it lies within 50° of the normal (layers slide along
//     inflow and outflow edges), otherwise the layers taper to nothing;
//   - at a tied concave corner (ties, from gradeCorners) the corner's own
//     ray gets no layers and the ray of zone point j at most j, ending on
//     the bisector at a node both walls share, so that the layers of the
//     two walls meet along the bisector in mirror-image triangles; when
//     the zone is shorter than the stack, rays farther out whose stack
//     would cross the bisector stop a layer below it, and where some zone
//     ray gets fewer layers (see tieCaps) the walls stop sharing nodes
//     from there on;
//   - layer termination: each ray's layers stop at gapShare of the
//     distance to the nearest other boundary edge and crossShare of the
//     distance to where it crosses a neighbouring ray, and neighbouring
//     rays differ by at most one layer; a layer that ends is closed by a
//     triangle;
//   - any cell that would still be inverted or not convex, and any front
//     edge that crosses another, lowers the layer count of its rays, until
//     none is left.
//
// The result is the layer cells and the outline of the remaining region,
// whose edges along the layers' top are tagged frontTag, and a report per
// layer request of the layers built on its wall faces and why some got
// fewer than asked (see LayerReport). Each ray keeps the reason that last
// lowered its count, so the report follows the steps above.
func buildLayers(g *pslg, opt Options, ties []tieCorner) (*layerPlan, []LayerReport, error) {
	specOf, err := wallSpecs(g, opt)
	if err != nil {
		return nil, nil, err
	}
	wall := func(e int32) int { return specOf[g.edgeTag[e]] }
	hs := make([][]float64, len(opt.Layers))
	for i, l := range opt.Layers {
		hs[i] = heights(l)
	}

	// Rays, loop by loop, in loop order; raysAt[i] are the rays of point i.
	var rays []ray
	raysAt := make([][2]int32, len(g.pts)) // [first, end) into rays
	for i := range g.pts {
		p := int32(i)
		in, out := g.prevPt[p], p
		vin, vout := wall(in), wall(out)
		first := int32(len(rays))
		pp, pa, pb := g.pts[p], g.pts[in], g.pts[g.nextPt[p]]
		d1 := unit(orb.Point{pp[0] - pa[0], pp[1] - pa[1]})
		d2 := unit(orb.Point{pb[0] - pp[0], pb[1] - pp[1]})
		n1, n2 := orb.Point{-d1[1], d1[0]}, orb.Point{-d2[1], d2[0]}
		switch {
		case vin >= 0 && vout >= 0:
			spec := vin
			if opt.Layers[vout].FirstHeight < opt.Layers[vin].FirstHeight {
				spec = vout
			}
			turn := math.Atan2(d1[0]*d2[1]-d1[1]*d2[0], d1[0]*d2[0]+d1[1]*d2[1])
			if turn < -fanTurn {
				m, theta := fanPlan(turn, fanStep(hs[spec], pp, pa, pb))
				// From n1 turned a lean towards n2, to n2 turned a lean back;
				// the first and last rays keep the heights above their walls.
				lean := fanLean(0, theta)
				for r := 0; r <= m; r++ {
					sc := 1.0
					if r == 0 || r == m {
						sc = 1 / math.Cos(lean)
					}
					rays = append(rays, ray{base: p, dir: rotate(n1, -lean-theta*float64(r)), scale: sc, spec: spec, slide: -1})
				}
			} else {
				n := unit(orb.Point{n1[0] + n2[0], n1[1] + n2[1]})
				c := math.Max(0.5, n[0]*n1[0]+n[1]*n1[1])
				rays = append(rays, ray{base: p, dir: n, scale: 1 / c, spec: spec, slide: -1})
			}
		case vin >= 0:
			// The wall ends at p; the next edge is not a wall.
			r := ray{base: p, dir: n1, scale: 1, spec: vin, slide: -1}
			if d2[0]*n1[0]+d2[1]*n1[1] >= slideCos {
				r.dir, r.slide = d2, out
			} else {
				r.zero = true
			}
			rays = append(rays, r)
		case vout >= 0:
			// The wall starts at p after a non-wall edge.
			back := orb.Point{-d1[0], -d1[1]}
			r := ray{base: p, dir: n2, scale: 1, spec: vout, slide: -1}
			if back[0]*n2[0]+back[1]*n2[1] >= slideCos {
				r.dir, r.slide = back, in
			} else {
				r.zero = true
			}
			rays = append(rays, r)
		}
		raysAt[i] = [2]int32{first, int32(len(rays))}
	}
	if len(rays) == 0 {
		return nil, nil, nil
	}
	// A tied corner and its zone points each have one ray (the corner is
	// concave, the zone points lie inside straight wall edges).
	for ti, t := range ties {
		rays[raysAt[t.p][0]].tie = int32(ti + 1)
		for side := range 2 {
			for j, pt := range t.side[side] {
				r := &rays[raysAt[pt][0]]
				r.tie, r.tieJ = int32(ti+1), j+1
			}
		}
	}
	// The wall points beside each fan lean towards it (see fanLean); a
	// point between two fans leans by the sum.
	for i := range g.pts {
		p := int32(i)
		if raysAt[p][1]-raysAt[p][0] < 2 {
			continue
		}
		a, b := rays[raysAt[p][0]].dir, rays[raysAt[p][0]+1].dir
		theta := math.Acos(math.Max(-1, math.Min(1, a[0]*b[0]+a[1]*b[1])))
		for side, sign := range [2]float64{-1, 1} {
			q := p
			for j := 1; j < fanSpreadPoints; j++ {
				if side == 0 {
					q = g.prevPt[q]
				} else {
					q = g.nextPt[q]
				}
				if raysAt[q][1]-raysAt[q][0] != 1 {
					break
				}
				r := &rays[raysAt[q][0]]
				if r.zero || r.slide >= 0 || r.tie != 0 || wall(g.prevPt[q]) < 0 || wall(q) < 0 {
					break
				}
				// Before the fan the lean turns clockwise (the fan's way),
				// after it back.
				lean := fanLean(j, theta)
				r.dir = rotate(r.dir, sign*lean)
				r.scale /= math.Cos(lean)
			}
		}
	}
	// connected(j): rays j and j+1 of the same loop bound layer cells: a fan
	// at one point, or the two ends of a wall edge.
	nextRay := func(j int32) int32 {
		p := rays[j].base
		if j+1 < raysAt[p][1] {
			return j + 1
		}
		q := g.nextPt[p]
		if raysAt[q][1] > raysAt[q][0] {
			return raysAt[q][0]
		}
		return -1
	}
	connected := func(j int32) (int32, bool) {
		k := nextRay(j)
		if k < 0 {
			return -1, false
		}
		if rays[k].base == rays[j].base {
			return k, true
		}
		return k, wall(rays[j].base) >= 0
	}

	// Limits: free distance to other boundary edges, crossing of
	// neighbouring rays, the length of a slide edge.
	grid := newEdgeGrid(g)
	var near []int32
	for j := range rays {
		r := &rays[j]
		r.limit = math.Inf(1)
		o := g.pts[r.base]
		pa, pb := g.pts[g.prevPt[r.base]], g.pts[g.nextPt[r.base]]
		spacing := 0.5 * (math.Hypot(o[0]-pa[0], o[1]-pa[1]) + math.Hypot(o[0]-pb[0], o[1]-pb[1]))
		// Hits farther than reach cannot limit the layers.
		need := r.scale * hs[r.spec][len(hs[r.spec])-1]
		reach := math.Max(need/gapShare, 2*need+gapSpacing*spacing)
		near = grid.along(near[:0], o, orb.Point{o[0] + reach*r.dir[0], o[1] + reach*r.dir[1]})
		for _, e := range near {
			a, b := e, g.nextPt[e]
			if a == r.base || b == r.base {
				continue
			}
			if t, ok := rayHit(o, r.dir, g.pts[a], g.pts[b]); ok {
				// Leave a gap of at least gapSpacing wall spacings, so the
				// triangles between two fronts are not slivers.
				r.lower(math.Min(gapShare*t, 0.5*(t-gapSpacing*spacing)), StopGap)
			}
		}
		if r.slide >= 0 {
			a, b := g.pts[r.slide], g.pts[g.nextPt[r.slide]]
			r.lower(gapShare*math.Hypot(b[0]-a[0], b[1]-a[1]), StopSlide)
		}
	}
	for j := range rays {
		k, ok := connected(int32(j))
		if !ok || rays[k].base == rays[j].base || (rays[j].tie != 0 && rays[j].tie == rays[k].tie) {
			continue // a fan, or a tied corner's rays that meet by design
		}
		if t, s, ok := rayCross(g.pts[rays[j].base], rays[j].dir, g.pts[rays[k].base], rays[k].dir); ok {
			rays[j].lower(crossShare*t, StopCross)
			rays[k].lower(crossShare*s, StopCross)
		}
	}
	for _, t := range ties {
		c := &rays[raysAt[t.p][0]]
		if len(t.side[0]) == len(hs[c.spec])-1 {
			continue // the zone holds the whole stack
		}
		for side := range 2 {
			// The points beyond the zone, outwards from its last point.
			q := t.side[side][len(t.side[side])-1]
			for range len(g.pts) {
				if side == 0 {
					q = g.prevPt[q]
				} else {
					q = g.nextPt[q]
				}
				lo, hi := raysAt[q][0], raysAt[q][1]
				if lo != hi-1 || rays[lo].tie != 0 {
					break // a wall end, a fan or another corner
				}
				r := &rays[lo]
				_, d, ok := rayCross(g.pts[c.base], c.dir, g.pts[r.base], r.dir)
				s := hs[r.spec]
				if !ok || d >= r.scale*s[len(s)-1] {
					break // the whole stack stays below the bisector
				}
				// The top stays a layer below the bisector, where the other
				// wall's rays end as near.
				k := 0
				for k+2 < len(s) && r.scale*s[k+2] <= d {
					k++
				}
				r.lower(r.scale*s[k], StopCorner)
			}
		}
	}
	for j := range rays {
		r := &rays[j]
		s := hs[r.spec]
		r.n, r.why = 0, StopNone
		if r.tie != 0 && r.tieJ == 0 {
			if len(s) > 1 {
				r.why = StopCorner
			}
			continue
		}
		if r.zero {
			if len(s) > 1 {
				r.why = StopWallEnd
			}
			continue
		}
		for r.n+1 < len(s) && r.scale*s[r.n+1] <= r.limit {
			r.n++
		}
		if r.n+1 < len(s) {
			r.why = r.limitWhy
		}
		if r.tie != 0 && r.n > r.tieJ {
			r.n, r.why = r.tieJ, StopCorner
		}
	}

	for {
		smoothCounts(rays, connected)
		for tieCaps(rays, ties, raysAt) {
			smoothCounts(rays, connected)
		}
		plan, bad := assemble(g, rays, hs, raysAt, connected, wall, ties)
		crossing := false
		if len(bad) == 0 {
			// Layers of different walls may still overlap where their
			// fans and sides meet: lower the rays at crossing front edges.
			bad = crossingRays(plan, rays, int32(len(g.pts)))
			if len(bad) == 0 {
				return plan, layerReports(g, opt, hs, rays, raysAt, nextRay, wall, plan.nodes), nil
			}
			crossing = true
		}
		why := StopFold
		if crossing {
			why = StopOverlap
		}
		lowered := false
		for _, j := range bad {
			if rays[j].n > 0 {
				rays[j].n--
				rays[j].why = why
				lowered = true
			}
		}
		if !lowered {
			// Every layer count is already zero where the trouble is.
			if crossing {
				// The outline itself crosses: the triangulation says where.
				return plan, layerReports(g, opt, hs, rays, raysAt, nextRay, wall, plan.nodes), nil
			}
			return nil, nil, fmt.Errorf("boundary layers at %s: cells are inverted even with no layers there (internal error)", g.where(rays[bad[0]].base))
		}
	}
}

// lower brings the ray's limit down to d, if that is lower, and records why.
func (r *ray) lower(d float64, why StopReason) {
	if d < r.limit {
		r.limit, r.limitWhy = d, why
	}
}

// fanPlan returns the number of steps m and the step θ of a fan at a
// corner turning by |turn|, with at most step between rays: the fan's own
// rays cover |turn| − 2·fanLean(0, θ), the rest of the turn being taken
// by the leaning rays beside it, so |turn| = (m + 2ā)θ with
// ā = fanLean(0, 1), and m = ⌈|turn|/step − 2ā⌉ (at least 1). The 1e-9
// keeps a step that divides the turn so (see gradeCorners, whose wall
// spacing gives fanStep that step) from adding a ray by rounding.
func fanPlan(turn, step float64) (int, float64) {
	a := fanLean(0, 1)
	m := max(1, int(math.Ceil(math.Abs(turn)/step-2*a-1e-9)))
	return m, math.Abs(turn) / (float64(m) + 2*a)
}

// fanLean returns the lean towards a fan of step θ of the ray of the j-th
// wall point beside it (j = 0 is the fan's own first or last ray, leaning
// from its wall's normal towards the other wall):
//
//	lean_j = θ Σ_{i=j+1}^{M−1} q^(−i),   q = fanSpread, M = fanSpreadPoints
//
// so the column between points j−1 and j widens by about θ s / q^j at
// the height s above the wall: the top of the first column is about 1/q
// as wide as a fan sector's, of the next 1/q of that, until the wall
// spacing takes over. The fan's top cells then differ from the column
// beside them by about q, not by √((s_n + s_{n−1})/s₁) as with straight
// columns at fanSpacing (8.5 for 12 layers growing by 1.2), and the
// front does not jump from a fan sector's width to the wall spacing in
// one edge (our own construction). A leaning ray keeps the layer heights
// normal to the wall by lengthening its steps by 1/cos(lean).
func fanLean(j int, theta float64) float64 {
	l := 0.0
	for i := fanSpreadPoints - 1; i > j; i-- {
		l += math.Pow(fanSpread, -float64(i))
	}
	return theta * l
}

// fanStep returns the angle between the rays of the fan at wall point p,
// between wall points a before and b after it, for layers whose tops lie
// at heights s (s[0] = 0, see heights).
// Beside the fan, the wall columns are Δ wide (the shorter wall edge at
// p); a fan of step θ has innermost triangles of area s₁²θ/2 next to
// first-layer cells of area s₁Δ, and top cells of area
// θ(s_n² − s_{n−1}²)/2 next to column cells of area (s_n − s_{n−1})Δ.
// Their area ratios, 2Δ/(s₁θ) and θ(s_n + s_{n−1})/(2Δ), multiply to
// (s_n + s_{n−1})/s₁ whatever θ is, so the step that makes them equal,
// θ = 2Δ/√(s₁(s_n + s_{n−1})), keeps the larger one least,
// √((s_n + s_{n−1})/s₁) (our own estimate; growth across faces is a
// quality metric, see the quality package; fanSpacing is the inverse).
// It is held within [fanMinStep, fanMaxStep]: on coarse walls the step
// is fanMaxStep (gradeCorners then makes the spacing beside the fan
// fanSpacing of the step), and where refinement makes the wall spacing
// tiny beside a thick stack of layers (the cosine-clustered trailing
// edge of an aerofoil) the fan gets more rays.
func fanStep(s []float64, p, a, b orb.Point) float64 {
	if len(s) < 2 {
		return fanMaxStep // no layers
	}
	d := math.Min(math.Hypot(p[0]-a[0], p[1]-a[1]), math.Hypot(b[0]-p[0], b[1]-p[1]))
	n := len(s) - 1
	if !(d > 0 && s[1] > 0) {
		return fanMaxStep
	}
	return math.Min(fanMaxStep, math.Max(fanMinStep, 2*d/math.Sqrt(s[1]*(s[n]+s[n-1]))))
}

// edgeGrid buckets the input edges in a uniform grid by their bounding
// boxes, so the edges near a segment are found without scanning them all.
type edgeGrid struct {
	g       *pslg
	x0, y0  float64
	inv     float64
	nx, ny  int
	start   []int32 // CSR: edges of cell c are edge[start[c]:start[c+1]]
	edge    []int32
	stamp   []int32 // per edge: last query that returned it
	queries int32
}

// newEdgeGrid makes cells about twice the mean edge length, at most 1024
// along a side.
func newEdgeGrid(g *pslg) *edgeGrid {
	b := orb.MultiPoint(g.pts).Bound()
	total := 0.0
	for e := range g.pts {
		p, q := g.pts[e], g.pts[g.nextPt[e]]
		total += math.Hypot(q[0]-p[0], q[1]-p[1])
	}
	w := math.Max(b.Max[0]-b.Min[0], b.Max[1]-b.Min[1])
	cell := math.Max(2*total/float64(len(g.pts)), w/1024)
	eg := &edgeGrid{g: g, x0: b.Min[0], y0: b.Min[1], inv: 1 / cell, stamp: make([]int32, len(g.pts))}
	eg.nx = int((b.Max[0]-b.Min[0])*eg.inv) + 1
	eg.ny = int((b.Max[1]-b.Min[1])*eg.inv) + 1
	count := make([]int32, eg.nx*eg.ny+1)
	eg.each(func(e int32, c int) { count[c+1]++ })
	for c := 0; c < eg.nx*eg.ny; c++ {
		count[c+1] += count[c]
	}
	eg.start = append([]int32(nil), count...)
	eg.edge = make([]int32, count[eg.nx*eg.ny])
	eg.each(func(e int32, c int) { eg.edge[count[c]] = e; count[c]++ })
	return eg
}

// cellRange returns the cells covering the box of p and q, clamped.
func (eg *edgeGrid) cellRange(p, q orb.Point) (i0, j0, i1, j1 int) {
	clamp := func(v float64, n int) int { return min(max(int(v), 0), n-1) }
	i0 = clamp((math.Min(p[0], q[0])-eg.x0)*eg.inv, eg.nx)
	i1 = clamp((math.Max(p[0], q[0])-eg.x0)*eg.inv, eg.nx)
	j0 = clamp((math.Min(p[1], q[1])-eg.y0)*eg.inv, eg.ny)
	j1 = clamp((math.Max(p[1], q[1])-eg.y0)*eg.inv, eg.ny)
	return
}

// each calls f for every edge and every cell its box covers, in order.
func (eg *edgeGrid) each(f func(e int32, c int)) {
	for e := range eg.g.pts {
		i0, j0, i1, j1 := eg.cellRange(eg.g.pts[e], eg.g.pts[eg.g.nextPt[e]])
		for j := j0; j <= j1; j++ {
			for i := i0; i <= i1; i++ {
				f(int32(e), j*eg.nx+i)
			}
		}
	}
}

// along appends to out, once each and in cell order, the edges in the
// cells covering the box of segment pq.
func (eg *edgeGrid) along(out []int32, p, q orb.Point) []int32 {
	eg.queries++
	i0, j0, i1, j1 := eg.cellRange(p, q)
	for j := j0; j <= j1; j++ {
		for i := i0; i <= i1; i++ {
			c := j*eg.nx + i
			for _, e := range eg.edge[eg.start[c]:eg.start[c+1]] {
				if eg.stamp[e] != eg.queries {
					eg.stamp[e] = eg.queries
					out = append(out, e)
				}
			}
		}
	}
	return out
}

// crossingRays returns the rays whose layer tops end front edges that
// cross another front edge (the front is the outline of the region left
// for the triangles, so a crossing means overlapping layers). Front edges
// are bucketed in a uniform grid of cells twice their mean length, and the
// crossing test is exact (orient2d). Crossings between points that are not
// layer nodes (id < firstLayer) are left for the triangulation to report.
func crossingRays(p *layerPlan, rays []ray, firstLayer int32) []int32 {
	type edge struct{ a, b int32 }
	var edges []edge
	for _, ids := range p.frontID {
		for k := range ids {
			edges = append(edges, edge{ids[k], ids[(k+1)%len(ids)]})
		}
	}
	if len(edges) == 0 {
		return nil
	}
	var bound orb.Bound = orb.MultiPoint{p.nodes[edges[0].a]}.Bound()
	total := 0.0
	for _, e := range edges {
		a, b := p.nodes[e.a], p.nodes[e.b]
		bound = bound.Extend(a)
		total += math.Hypot(b[0]-a[0], b[1]-a[1])
	}
	cell := 2 * total / float64(len(edges))
	w := math.Max(bound.Max[0]-bound.Min[0], bound.Max[1]-bound.Min[1])
	cell = math.Max(cell, w/2048)
	nx := int((bound.Max[0]-bound.Min[0])/cell) + 1
	ny := int((bound.Max[1]-bound.Min[1])/cell) + 1
	buckets := map[int][]int32{}
	span := func(e edge) (i0, j0, i1, j1 int) {
		a, b := p.nodes[e.a], p.nodes[e.b]
		i0 = int((math.Min(a[0], b[0]) - bound.Min[0]) / cell)
		i1 = int((math.Max(a[0], b[0]) - bound.Min[0]) / cell)
		j0 = int((math.Min(a[1], b[1]) - bound.Min[1]) / cell)
		j1 = int((math.Max(a[1], b[1]) - bound.Min[1]) / cell)
		return min(i0, nx-1), min(j0, ny-1), min(i1, nx-1), min(j1, ny-1)
	}
	for k, e := range edges {
		i0, j0, i1, j1 := span(e)
		for j := j0; j <= j1; j++ {
			for i := i0; i <= i1; i++ {
				buckets[j*nx+i] = append(buckets[j*nx+i], int32(k))
			}
		}
	}
	rayOf := make(map[int32]int32)
	for j := range rays {
		for k := 1; k < len(rays[j].nodes); k++ {
			rayOf[rays[j].nodes[k]] = int32(j)
		}
	}
	var out []int32
	seen := map[[2]int32]bool{}
	keys := make([]int, 0, len(buckets))
	for key := range buckets {
		keys = append(keys, key)
	}
	slices.Sort(keys)
	for _, key := range keys {
		list := buckets[key]
		for x := 0; x < len(list); x++ {
			for y := x + 1; y < len(list); y++ {
				e, f := edges[list[x]], edges[list[y]]
				if e.a == f.a || e.a == f.b || e.b == f.a || e.b == f.b {
					continue
				}
				pair := [2]int32{list[x], list[y]}
				if seen[pair] || !segmentsMeet(p.nodes[e.a], p.nodes[e.b], p.nodes[f.a], p.nodes[f.b]) {
					continue
				}
				seen[pair] = true
				for _, id := range [...]int32{e.a, e.b, f.a, f.b} {
					if j, ok := rayOf[id]; ok && id >= firstLayer {
						out = append(out, j)
					}
				}
			}
		}
	}
	return out
}

// segmentsMeet reports whether the closed segments ab and cd share a
// point (exact orientation tests).
func segmentsMeet(a, b, c, d orb.Point) bool {
	o1, o2 := orient2d(a, b, c), orient2d(a, b, d)
	o3, o4 := orient2d(c, d, a), orient2d(c, d, b)
	if ((o1 > 0 && o2 < 0) || (o1 < 0 && o2 > 0)) && ((o3 > 0 && o4 < 0) || (o3 < 0 && o4 > 0)) {
		return true
	}
	on := func(p, q, r orb.Point) bool { // r on segment pq, given collinear
		return math.Min(p[0], q[0]) <= r[0] && r[0] <= math.Max(p[0], q[0]) &&
			math.Min(p[1], q[1]) <= r[1] && r[1] <= math.Max(p[1], q[1])
	}
	return (o1 == 0 && on(a, b, c)) || (o2 == 0 && on(a, b, d)) || (o3 == 0 && on(c, d, a)) || (o4 == 0 && on(c, d, b))
}

// tieCaps marks the zone rays of tied corners that end on the bisector
// at a shared node (meet), and reports whether it lowered any count.
// Walking out from each corner, zone ray j of both walls meets while
// both have j layers (they have at most j) and every ray nearer the
// corner met. After the first j where they do not, the two walls' tops
// may not both reach the bisector at one j, where they would coincide
// without sharing a node: both are lowered to j − 1 layers there.
func tieCaps(rays []ray, ties []tieCorner, raysAt [][2]int32) bool {
	lowered := false
	for _, t := range ties {
		chain := true
		for j := 1; j <= len(t.side[0]); j++ {
			a, b := &rays[raysAt[t.side[0][j-1]][0]], &rays[raysAt[t.side[1][j-1]][0]]
			a.meet, b.meet = false, false
			both := a.n >= j && b.n >= j
			switch {
			case chain && both:
				a.meet, b.meet = true, true
			case chain:
				chain = false
			case both:
				a.n, a.why = j-1, StopCorner
				b.n, b.why = j-1, StopCorner
				lowered = true
			}
		}
	}
	return lowered
}

// smoothCounts lowers layer counts until connected rays differ by at most
// one layer. A ray lowered so takes the reason of the neighbour that
// lowered it (see causeOf), so that the report names the first cause, not
// the smoothing that spreads it.
func smoothCounts(rays []ray, connected func(int32) (int32, bool)) {
	for changed := true; changed; {
		changed = false
		for j := range rays {
			k, ok := connected(int32(j))
			if !ok {
				continue
			}
			a, b := &rays[j], &rays[k]
			if a.n > b.n+1 {
				a.n, a.why, changed = b.n+1, causeOf(b), true
			}
			if b.n > a.n+1 {
				b.n, b.why, changed = a.n+1, causeOf(a), true
			}
		}
	}
}

// assemble makes the nodes, cells, boundary faces and front outline for
// the current layer counts. It returns the rays of cells that came out
// inverted or not convex. The zone rays of tied corners that meet end
// at one node per corner and layer, on the corner's ray at that layer's
// height; the front then runs down the bisector and back, and that
// spike (a, b, a) is cut from it.
func assemble(g *pslg, rays []ray, hs [][]float64, raysAt [][2]int32, connected func(int32) (int32, bool), wall func(int32) int, ties []tieCorner) (*layerPlan, []int32) {
	p := &layerPlan{nodes: append([]orb.Point(nil), g.pts...), cellStart: []int32{0}}
	shared := map[[2]int32]int32{} // (tie, layer) → node
	for j := range rays {
		r := &rays[j]
		r.nodes = append(r.nodes[:0], r.base)
		o := g.pts[r.base]
		for k := 1; k <= r.n; k++ {
			if r.meet && k == r.tieJ {
				key := [2]int32{r.tie, int32(k)}
				id, ok := shared[key]
				if !ok {
					c := &rays[raysAt[ties[r.tie-1].p][0]]
					at, d := g.pts[c.base], c.scale*hs[c.spec][k]
					id = int32(len(p.nodes))
					p.nodes = append(p.nodes, orb.Point{at[0] + d*c.dir[0], at[1] + d*c.dir[1]})
					shared[key] = id
				}
				r.nodes = append(r.nodes, id)
				continue
			}
			d := r.scale * hs[r.spec][k]
			p.nodes = append(p.nodes, orb.Point{o[0] + d*r.dir[0], o[1] + d*r.dir[1]})
			r.nodes = append(r.nodes, int32(len(p.nodes)-1))
		}
	}
	var bad []int32
	addCell := func(j, k int32, ids ...int32) {
		// Drop repeated nodes (the fan's shared wall point).
		c := ids[:0]
		for i, v := range ids {
			if i > 0 && v == c[len(c)-1] {
				continue
			}
			c = append(c, v)
		}
		if len(c) > 1 && c[len(c)-1] == c[0] {
			c = c[:len(c)-1]
		}
		for i := range c {
			a, b, d := p.nodes[c[i]], p.nodes[c[(i+1)%len(c)]], p.nodes[c[(i+2)%len(c)]]
			if orient2d(a, b, d) <= 0 {
				bad = append(bad, j, k)
				return
			}
		}
		p.cellNodes = append(p.cellNodes, c...)
		p.cellStart = append(p.cellStart, int32(len(p.cellNodes)))
	}
	for j := range rays {
		a := &rays[j]
		kk, ok := connected(int32(j))
		if !ok {
			continue
		}
		b := &rays[kk]
		m := min(a.n, b.n)
		for k := 0; k < m; k++ {
			addCell(int32(j), kk, a.nodes[k], b.nodes[k], b.nodes[k+1], a.nodes[k+1])
		}
		switch {
		case a.n > m:
			addCell(int32(j), kk, a.nodes[m], b.nodes[m], a.nodes[m+1])
		case b.n > m:
			addCell(int32(j), kk, a.nodes[m], b.nodes[m], b.nodes[m+1])
		}
		if a.base != b.base && max(a.n, b.n) > 0 {
			// The wall face of the lowest cell.
			p.edges = append(p.edges, mesh.TaggedEdge{A: a.base, B: b.base, Tag: g.edgeTag[a.base]})
		}
	}
	for j := range rays {
		r := &rays[j]
		if r.slide < 0 {
			continue
		}
		for k := 0; k < r.n; k++ {
			p.edges = append(p.edges, mesh.TaggedEdge{A: r.nodes[k], B: r.nodes[k+1], Tag: g.edgeTag[r.slide]})
		}
	}
	if len(bad) > 0 {
		return nil, bad
	}

	// The front: each loop with its wall points replaced by the tops of
	// their rays.
	for l := 0; l < int(g.loopOf[len(g.loopOf)-1])+1; l++ {
		var loop geometry.DiscreteLoop
		var ids []int32
		emit := func(id int32, tag string) {
			n := len(ids)
			if n > 0 && ids[n-1] == id {
				loop.Tags[n-1] = tag
				return
			}
			if n > 1 && ids[n-2] == id {
				// A spike down a tied corner's bisector and back.
				ids, loop.Points, loop.Tags = ids[:n-1], loop.Points[:n-1], loop.Tags[:n-1]
				loop.Tags[n-2] = tag
				return
			}
			ids = append(ids, id)
			loop.Points = append(loop.Points, p.nodes[id])
			loop.Tags = append(loop.Tags, tag)
		}
		for i := range g.pts {
			if int(g.loopOf[i]) != l {
				continue
			}
			pt := int32(i)
			lo, hi := raysAt[pt][0], raysAt[pt][1]
			if lo == hi {
				emit(pt, g.tags[g.edgeTag[pt]])
				continue
			}
			for j := lo; j < hi; j++ {
				r := &rays[j]
				top := r.nodes[r.n]
				tag := frontTag
				if j == hi-1 {
					tag = g.tags[g.edgeTag[pt]]
					if wall(pt) >= 0 {
						if k, ok := connected(j); ok && (r.n > 0 || rays[k].n > 0) {
							tag = frontTag
						}
					}
				}
				emit(top, tag)
			}
		}
		// The same across the loop's start: a repeated point, or a spike
		// whose tip is the last point or the first.
		for {
			n := len(ids)
			if n > 1 && ids[n-1] == ids[0] {
				ids, loop.Points, loop.Tags = ids[:n-1], loop.Points[:n-1], loop.Tags[:n-1]
			} else if n > 2 && ids[n-2] == ids[0] {
				ids, loop.Points, loop.Tags = ids[:n-2], loop.Points[:n-2], loop.Tags[:n-2]
			} else if n > 2 && ids[n-1] == ids[1] {
				ids, loop.Points, loop.Tags = ids[1:n-1], loop.Points[1:n-1], loop.Tags[1:n-1]
			} else {
				break
			}
		}
		p.front.Loops = append(p.front.Loops, loop)
		p.frontID = append(p.frontID, ids)
	}
	return p, nil
}

func unit(v orb.Point) orb.Point {
	l := math.Hypot(v[0], v[1])
	if l == 0 {
		return v
	}
	return orb.Point{v[0] / l, v[1] / l}
}

func rotate(v orb.Point, a float64) orb.Point {
	s, c := math.Sincos(a)
	return orb.Point{c*v[0] - s*v[1], s*v[0] + c*v[1]}
}

// rayHit returns the distance t > 0 at which the ray o + t·d meets the
// segment ab.
func rayHit(o, d, a, b orb.Point) (float64, bool) {
	ex, ey := b[0]-a[0], b[1]-a[1]
	den := d[0]*ey - d[1]*ex
	if den == 0 {
		return 0, false
	}
	ax, ay := a[0]-o[0], a[1]-o[1]
	t := (ax*ey - ay*ex) / den
	u := (ax*d[1] - ay*d[0]) / den
	if t <= 0 || u < 0 || u > 1 {
		return 0, false
	}
	return t, true
}

// rayCross returns where the rays a + t·u and b + s·v cross, if both
// parameters are positive.
func rayCross(a, u, b, v orb.Point) (t, s float64, ok bool) {
	den := u[0]*v[1] - u[1]*v[0]
	if den == 0 {
		return 0, 0, false
	}
	bx, by := b[0]-a[0], b[1]-a[1]
	t = (bx*v[1] - by*v[0]) / den
	s = (bx*u[1] - by*u[0]) / den
	return t, s, t > 0 && s > 0
}

// StopReason says why a wall face got fewer boundary layers than asked.
type StopReason int

// The reasons, in the order buildLayers applies its limits (StopCorner,
// which the tied corners set, came last).
const (
	// StopNone: the face got every layer asked for.
	StopNone StopReason = iota
	// StopGap: another boundary lies across from the wall, and the layers
	// may take only gapShare of the free distance to it (less in narrow
	// gaps, so that a few cells fit between two fronts).
	StopGap
	// StopSlide: at a wall end the layers grow along the next edge, and
	// may cover only gapShare of that edge's first piece.
	StopSlide
	// StopCross: the rays of neighbouring wall points cross (a concave
	// wall), and the layers stop at crossShare of the way to the crossing.
	StopCross
	// StopWallEnd: the wall ends beside an edge too far from the layer
	// direction to grow along, so the layers taper to none there.
	StopWallEnd
	// StopFold: with more layers some cell would be inverted or not convex.
	StopFold
	// StopOverlap: with more layers the front would cross the front of
	// layers grown from elsewhere.
	StopOverlap
	// StopNeighbour: a neighbouring wall of another request asks for
	// fewer layers, and neighbours differ by at most one.
	StopNeighbour
	// StopCorner: at a concave corner the layers of the two walls meet
	// along its bisector, so the faces beside it carry only the layers
	// below the bisector (the rest of the stack belongs to the other
	// wall's faces; see gradeCorners).
	StopCorner
)

// String says the reason in plain words, to follow "fewer where".
func (r StopReason) String() string {
	switch r {
	case StopNone:
		return "nothing stopped them"
	case StopGap:
		return fmt.Sprintf("another boundary is near (the layers take at most %.0f%% of the distance to it)", 100*gapShare)
	case StopSlide:
		return fmt.Sprintf("the wall ends beside a short edge that the layers grow along (they cover at most %.0f%% of its first piece)", 100*gapShare)
	case StopCross:
		return fmt.Sprintf("neighbouring rays cross (the layers stop at %.0f%% of the distance to the crossing)", 100*crossShare)
	case StopWallEnd:
		return "the wall ends beside an edge more than 50° off the layer direction, so the layers taper to none"
	case StopFold:
		return "cells would fold (come out inverted or not convex)"
	case StopOverlap:
		return "the layers would overlap layers grown from another part of the walls (across a gap, or at a corner where another wall's layers meet them)"
	case StopNeighbour:
		return "a neighbouring wall asks for fewer layers (neighbours differ by at most one)"
	case StopCorner:
		return "the layers of two walls meet along the bisector of a concave corner (the faces beside it carry the layers below the bisector)"
	}
	return fmt.Sprintf("StopReason(%d)", int(r))
}

// causeOf is the reason to pass on from ray r to a neighbour that r
// lowers: r's own, or, when r has every layer its request asks for,
// StopNeighbour.
func causeOf(r *ray) StopReason {
	if r.why == StopNone {
		return StopNeighbour
	}
	return r.why
}

// LayerReport compares the boundary layers built for one layer request
// with the layers it asked for. It counts wall faces, the outline's edges
// tagged with one of the request's Tags as the corner grading cut them
// (see gradeCorners), and the layers on a face are the quadrilaterals
// stacked on it (a thinner layer request on the same tag takes its
// faces; a face with no layers may be split by refinement, so the mesh
// can have more faces there).
type LayerReport struct {
	// Tags are the request's wall tags.
	Tags []string
	// Asked is the layer count asked for: Count, or as many layers as fit
	// within Thickness.
	Asked int
	// Faces is the number of wall faces; Full of them got all Asked
	// layers.
	Faces, Full int
	// Min and Max are the fewest and the most layers on a wall face (0
	// when there are no faces).
	Min, Max int
	// Short says why the other faces got fewer: one entry per reason, the
	// reason of the most faces first. The reason of a face is what
	// lowered the smaller count of its two ends; where smoothing lowered
	// it, the reason that started the smoothing.
	Short []Shortfall
	// Top is the thickness of the last of Max layers, h₁ G^(Max−1) (see
	// heights), in metres; 0 when none was built.
	Top float64
	// FrontMin and FrontMax are the shortest and the longest edge of the
	// layers' top where two neighbouring rays carry the same number of
	// layers (the edges the triangles are built on, over wall faces and
	// fan sectors alike), in metres; TopJump is the largest ratio, either
	// way round, between the area of the top layer cell under such an
	// edge and that of the equilateral triangle on it, √3 f²/4: an
	// estimate, for near-equilateral triangles, of the area jump the
	// growth metric meets across the top of the layers. All three are 0
	// when no layer was built.
	FrontMin, FrontMax, TopJump float64

	built []int // layers on each wall face, in outline order
}

// Shortfall counts the wall faces that got fewer layers for one reason.
type Shortfall struct {
	Reason StopReason
	Faces  int
}

// layerReports tallies the layers on every wall face: the face from point
// e to the next has the last ray of e and the first of the next point as
// its sides, and min of their counts quadrilaterals on it (see assemble).
// It measures the top of the layers on the assembled nodes.
func layerReports(g *pslg, opt Options, hs [][]float64, rays []ray, raysAt [][2]int32, nextRay func(int32) int32, wall func(int32) int, nodes []orb.Point) []LayerReport {
	reps := make([]LayerReport, len(opt.Layers))
	for i, l := range opt.Layers {
		reps[i] = LayerReport{Tags: slices.Clone(l.Tags), Asked: len(hs[i]) - 1}
	}
	for e := range g.pts {
		li := wall(int32(e))
		if li < 0 {
			continue
		}
		a := &rays[raysAt[e][1]-1]
		b := &rays[nextRay(raysAt[e][1]-1)]
		lo := a
		if b.n < a.n || (b.n == a.n && a.why == StopNone) {
			lo = b
		}
		rep := &reps[li]
		rep.built = append(rep.built, lo.n)
		if lo.n >= rep.Asked {
			rep.Full++
			continue
		}
		why := causeOf(lo)
		k := slices.IndexFunc(rep.Short, func(s Shortfall) bool { return s.Reason == why })
		if k < 0 {
			rep.Short = append(rep.Short, Shortfall{Reason: why})
			k = len(rep.Short) - 1
		}
		rep.Short[k].Faces++
	}
	for i := range reps {
		finishReport(&reps[i])
		if n := reps[i].Max; n > 0 {
			reps[i].Top = hs[i][n] - hs[i][n-1]
		}
		reps[i].FrontMin = math.Inf(1)
	}
	// The top edges: between two rays that bound layer cells (a fan's
	// neighbouring rays, or the two ends of a wall face) and carry the
	// same count n, from top node to top node, over the quadrilateral of
	// layer n.
	for j := range rays {
		a := &rays[j]
		k := nextRay(int32(j))
		if k < 0 || a.n == 0 || (rays[k].base != a.base && wall(a.base) < 0) {
			continue
		}
		b := &rays[k]
		if b.n != a.n {
			continue
		}
		n := a.n
		p, q := nodes[a.nodes[n]], nodes[b.nodes[n]]
		f := math.Hypot(q[0]-p[0], q[1]-p[1])
		area, _ := mesh.PolygonAreaCentroid(nodes, []int32{a.nodes[n-1], b.nodes[n-1], b.nodes[n], a.nodes[n]})
		area = math.Abs(area)
		rep := &reps[a.spec]
		rep.FrontMin, rep.FrontMax = math.Min(rep.FrontMin, f), math.Max(rep.FrontMax, f)
		if e := math.Sqrt(3) / 4 * f * f / area; area > 0 {
			rep.TopJump = math.Max(rep.TopJump, math.Max(e, 1/e))
		}
	}
	for i := range reps {
		if math.IsInf(reps[i].FrontMin, 1) {
			reps[i].FrontMin = 0
		}
	}
	return reps
}

// finishReport sets the face count, Min and Max from the per-face counts
// and orders Short by faces, then by reason.
func finishReport(r *LayerReport) {
	r.Faces = len(r.built)
	if r.Faces > 0 {
		r.Min, r.Max = slices.Min(r.built), slices.Max(r.built)
	}
	slices.SortFunc(r.Short, func(a, b Shortfall) int {
		if a.Faces != b.Faces {
			return b.Faces - a.Faces
		}
		return int(a.Reason - b.Reason)
	})
}
