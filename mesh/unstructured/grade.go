package unstructured

import (
	"fmt"
	"math"
	"slices"

	"github.com/paulmach/orb"
)

// Corner grading parameters (see gradeCorners).
const (
	// gradeSkew: a layered wall point whose first layer's face skewness
	// would exceed gradeSkew (see skewAt) gets a finer wall spacing beside
	// it. It is short of the everyday fail level 1 by the estimate's
	// error: on the high-lift sample, points estimated at up to 1 left
	// cells of 0.96, at up to 0.8 cells of 0.72.
	gradeSkew = 0.8
	// aimSkew is the first layer's face skewness the corner spacing is
	// chosen for, the everyday warn level.
	aimSkew = 0.5
	// kinkRatio: a point turning less than a fan or a tie is a corner for
	// the skewness rule only where it turns kinkRatio times as much as
	// either neighbour, a kink between straighter edges; along a curve
	// (an aerofoil's nose, a cylinder) the turns change slowly and the
	// user's spacing stays. Grading there too would pass the skewness
	// check on curved walls under thin layers, at the cost of many wall
	// points: +15% cells on the high-lift sample, 7.7 times the cells on
	// the cylinder sample under a 1 µm first layer.
	kinkRatio = 2.0
	// tieMinTurn and tieMaxTurn bound the concave turns whose two walls'
	// layers are tied along the corner's bisector. Below 15° the tie's
	// mirror-image triangles, with an angle of φ/2 at the bisector, would
	// pass the everyday warn level 0.9 of equiangle skewness,
	// (60° − φ/2)/60°; there the single averaged ray at the corner keeps
	// stacks up to crossShare·s₁/sin²(φ/2) ≈ 47 s₁ deep with the spacing
	// that aimSkew asks for (where the rays beside it cross). Above 120°
	// (a notch sharper than 60°) the walls' other sides are too near for
	// a stack, and the ray's lengthening is held at 2 (see buildLayers).
	tieMinTurn = 15 * math.Pi / 180
	tieMaxTurn = 120 * math.Pi / 180
	// gradeRoom: a zone point goes on a wall edge only if the rest of
	// the edge is at least gradeRoom times the next graded piece long, so
	// no sliver piece is left beside the edge's far point.
	gradeRoom = 0.5
	// snapShare: where a tied corner's wall edge ends within snapShare of
	// a zone piece of the next zone point, its far point serves as that
	// zone point (the shared node on the bisector is then off the ray by
	// at most snapShare of a column).
	snapShare = 0.25
	// rampSlope: where a wall's layers taper to none at its end, zone
	// point j goes s_j·rampSlope from the end, so that the stack, one layer
	// more per wall point, ramps up at 45° in cells about as wide as high.
	rampSlope = 1.0
)

// tieCorner is a concave corner whose walls' layers meet along its
// bisector (see gradeCorners): p is the corner point, side[0] the zone
// points on the wall before it (nearest first), side[1] those after it,
// both J long. Zone point j lies where the bisector is s_j above the wall.
type tieCorner struct {
	p    int32
	side [2][]int32
}

// skewAt estimates the face skewness (see the quality package) of the
// face on the ray of a wall point whose wall turns by phi, between two
// first-layer cells of height s1 on wall pieces d long: the two cells are
// near mirror images across the ray, their centroids lie about d/2 along
// the walls, and the line joining them crosses the ray (sin|φ|/4)·d
// from the midpoint of the face, which is about s1 long:
//
//	skewness ≈ |sin φ| · d / (4 s₁)
//
// (our own estimate for d ≫ s₁; the tests measure it with the quality
// package). A 90° corner on pieces 40 first heights long gives 10.
func skewAt(phi, d, s1 float64) float64 {
	return math.Abs(math.Sin(phi)) * d / (4 * s1)
}

// fanSpacing returns the wall spacing beside a fan of step theta for
// layers at heights s (s[0] = 0): the spacing Δ for which the innermost
// fan triangle (area s₁²θ/2) and the top fan cell (area
// θ(s_n² − s_{n−1}²)/2) differ from the wall cells beside them (areas
// s₁Δ and (s_n − s_{n−1})Δ) by the same ratio, which is then the least
// that both can have,
//
//	Δ = (θ/2) √(s₁ (s_n + s_{n−1})),   ratio √((s_n + s_{n−1})/s₁)
//
// (our own estimate; see fanStep, its inverse). The rays leaning towards
// the fan (fanLean) then widen the columns' tops, so that only the
// innermost cells keep that ratio.
func fanSpacing(s []float64, theta float64) float64 {
	n := len(s) - 1
	return theta / 2 * math.Sqrt(s[1]*(s[n]+s[n-1]))
}

// gradeCorners returns the outline with wall points added beside the
// corners of layered walls (Options.Layers), so that the layer cells
// there stay within the everyday quality limits, and the concave corners
// whose layers are tied. The corners are the points between two layered
// wall edges whose stacks match (sameStacks: a corner between stacks of
// different heights keeps its spacing, since spacing graded for one
// gives the other's cells near-flat corners) that are
//
//   - convex by more than fanTurn, where the layers fan out: the spacing
//     beside the fan is fanSpacing of the fan's step, so the fan's
//     innermost triangles differ in area from the first wall cells by
//     about √((s_n + s_{n−1})/s₁) (8.5 for 12 layers growing by 1.2,
//     where 209 was measured at a 90° corner on pieces 40 first heights
//     long);
//   - concave by tieMinTurn to tieMaxTurn, both walls under one layer
//     request: the layers of both walls meet along the corner's bisector,
//     the way a structured grid turns a concave corner. Zone points go at
//     x_j = s_j tan(φ/2) from the corner on both walls, j = 1…n, where
//     the bisector is s_j above the wall: the ray of zone point j ends on
//     the bisector after j layers, at a node both walls share, and the
//     cells beside the bisector are mirror-image triangles (face skewness
//     0; see buildLayers);
//   - a kink (kinkRatio) turned so that the first layer's face skewness
//     would exceed gradeSkew (skewAt with the point's mean wall piece):
//     the spacing beside it is 4·aimSkew·s₁/|sin φ|, which gives aimSkew;
//
// and the wall ends where the layers taper to none (the next edge lies
// too far off the layer normal to slide along, see buildLayers): zone
// points at s_j·rampSlope from the end, so that the stack, one layer more
// per wall point, ramps up at 45° in cells about as wide as high.
//
// Beside a corner the spacing is laid down exactly (the zone points, or
// one point at the corner spacing) and then grows along the walls at the
// mesher's growth ratio G, the spacing a piece starting at arc distance
// d from the last zone point having h(d) = h₀ + (G−1)d with h₀ = G times
// the last zone piece (geometric growth, common practice). Where several
// corners reach a wall edge its spacing is the least of theirs, and each
// edge, or what the zones leave of it, is cut into N = round(∫ dx/h)
// pieces of equal ∫ dx/h (equidistribution, common practice), so the
// outline's points stay where they are and every piece keeps its edge's
// tag. The grading follows a wall until it ends at an edge without
// layers, or until h exceeds the wall's longest edge.
//
// A zone needs room on the corner's first wall edges: each zone point
// must leave gradeRoom of the next piece before the edge's far point, or
// half the edge when its far point is a corner too; where the far point
// lies within snapShare of a zone piece of the next zone point, it is
// that zone point (so a 12-layer stack on an edge 1% shorter than the
// stack's zone still ties all 12 layers). A concave corner whose zone
// cannot hold even its first point is graded by the skewness rule.
//
// The result has the same loops and tags, the added points in loop
// order with user[i] set (see pslg.where); without corners it is g.
// sameStacks reports whether two layer requests grow stacks of about the
// same heights near the wall, so that one graded spacing serves both:
// first heights within a factor 1.5 of each other and growth ratios
// within 5% (the layers of the two walls then differ in height by no
// more than neighbouring cells of one stack grow in a couple of layers;
// our own bound, checked on the step with 0.5 and 0.4 mm first heights).
func sameStacks(a, b Layers) bool {
	ha, hb := math.Max(a.FirstHeight, b.FirstHeight), math.Min(a.FirstHeight, b.FirstHeight)
	ga, gb := growthOf(a), growthOf(b)
	return ha <= 1.5*hb && math.Abs(ga-gb) <= 0.05*math.Max(ga, gb)
}

// growthOf is a request's layer growth ratio, its default when not given.
func growthOf(l Layers) float64 {
	if l.Growth == 0 {
		return DefaultGrowth
	}
	return l.Growth
}

func gradeCorners(g *pslg, opt Options, specOf []int) (*pslg, []tieCorner, error) {
	wall := func(e int32) int { return specOf[g.edgeTag[e]] }
	hs := make([][]float64, len(opt.Layers))
	for i, l := range opt.Layers {
		hs[i] = heights(l)
	}
	edgeLen := func(e int32) float64 {
		a, b := g.pts[e], g.pts[g.nextPt[e]]
		return math.Hypot(b[0]-a[0], b[1]-a[1])
	}
	// turnAt is the outline's turn at point p, positive to the left.
	turnAt := func(p int32) float64 {
		pp, pa, pb := g.pts[p], g.pts[g.prevPt[p]], g.pts[g.nextPt[p]]
		d1 := orb.Point{pp[0] - pa[0], pp[1] - pa[1]}
		d2 := orb.Point{pb[0] - pp[0], pb[1] - pp[1]}
		return math.Atan2(d1[0]*d2[1]-d1[1]*d2[0], d1[0]*d2[0]+d1[1]*d2[1])
	}

	// corner says how point p is graded: zone[0] are the distances from
	// p of the zone points on the wall before p, zone[1] after it; the
	// spacing grows from h0[side] at the last zone point (or at p).
	type corner struct {
		p    int32
		tie  bool
		zone [2][]float64
		h0   [2]float64
		// snap[side]: the last zone point is the far point of the edge.
		snap [2]bool
	}
	var corners []corner
	isCorner := make([]bool, len(g.pts))
	type kind struct {
		turn  float64
		spec  int
		delta float64 // corner spacing, or 0 for a tie or a ramp
		tie   bool
		ramp  int // 1 + the side of the wall whose layers taper at p, or 0
	}
	kinds := make([]kind, len(g.pts))
	for i := range g.pts {
		p := int32(i)
		in := g.prevPt[p]
		vin, vout := wall(in), wall(p)
		if (vin < 0) != (vout < 0) {
			// A wall end: its layers taper to none at p unless they slide
			// along the next edge (the test of buildLayers).
			side, spec := 0, vin
			if vin < 0 {
				side, spec = 1, vout
			}
			pp, pa, pb := g.pts[p], g.pts[in], g.pts[g.nextPt[p]]
			d1 := unit(orb.Point{pp[0] - pa[0], pp[1] - pa[1]})
			d2 := unit(orb.Point{pb[0] - pp[0], pb[1] - pp[1]})
			slide := d2[0]*(-d1[1]) + d2[1]*d1[0] // d2 · n1
			if side == 1 {
				slide = -d1[0]*(-d2[1]) - d1[1]*d2[0] // −d1 · n2
			}
			if len(hs[spec]) > 1 && slide < slideCos {
				kinds[p] = kind{spec: spec, ramp: side + 1}
				isCorner[p] = true
			}
			continue
		}
		if vin < 0 {
			continue
		}
		spec := vin
		if opt.Layers[vout].FirstHeight < opt.Layers[vin].FirstHeight {
			spec = vout
		}
		s := hs[spec]
		if len(s) < 2 {
			continue
		}
		turn := turnAt(p)
		k := kind{turn: turn, spec: spec}
		if !sameStacks(opt.Layers[vin], opt.Layers[vout]) {
			// Two layer requests of different heights meet here: spacing
			// graded for one of them gives the other's cells near-flat
			// corners, so the corner keeps the spacing it has.
			continue
		}
		switch {
		case turn < -fanTurn:
			_, theta := fanPlan(turn, fanMaxStep)
			k.delta = fanSpacing(s, theta)
		case turn >= tieMinTurn && turn <= tieMaxTurn && vin == vout:
			k.tie = true
		case math.Abs(turn) >= kinkRatio*max(math.Abs(turnAt(in)), math.Abs(turnAt(g.nextPt[p]))) &&
			skewAt(turn, 0.5*(edgeLen(in)+edgeLen(p)), s[1]) > gradeSkew:
			k.delta = 4 * aimSkew * s[1] / math.Abs(math.Sin(turn))
		default:
			continue
		}
		kinds[p] = k
		isCorner[p] = true
	}
	G := opt.Growth
	for i := range g.pts {
		p := int32(i)
		if !isCorner[p] {
			continue
		}
		k := kinds[p]
		s := hs[k.spec]
		// room[0]: the wall edge before p, room[1]: after it.
		var room [2]float64
		var farCorner [2]bool
		for side, e := range [2]int32{g.prevPt[p], p} {
			far := g.nextPt[e]
			if side == 0 {
				far = e
			}
			room[side] = edgeLen(e)
			if farCorner[side] = isCorner[far]; farCorner[side] {
				room[side] /= 2
			}
		}
		c := corner{p: p}
		lg := opt.Layers[k.spec].Growth
		// zoneFits returns how many zone points at x_j = s_j·f fit on
		// side's edge, and whether the last of them is its far point.
		zoneFits := func(side int, f float64) (int, bool) {
			j := 0
			for j+1 < len(s) {
				x, prev := s[j+1]*f, s[j]*f
				if x+gradeRoom*lg*(x-prev) > room[side] {
					break
				}
				j++
			}
			if !farCorner[side] && j+1 < len(s) {
				x, prev := s[j+1]*f, s[j]*f
				if math.Abs(room[side]-x) <= snapShare*(x-prev) {
					return j + 1, true
				}
			}
			return j, false
		}
		// setZone lays zone points 1…j at s_j·f on side.
		setZone := func(side, j int, f float64, snap bool) {
			for i := 1; i <= j; i++ {
				c.zone[side] = append(c.zone[side], s[i]*f)
			}
			if c.snap[side] = snap; snap {
				c.zone[side][j-1] = room[side]
			}
			c.h0[side] = G * (s[j] - s[j-1]) * f
		}
		if k.ramp > 0 {
			if j, snap := zoneFits(k.ramp-1, rampSlope); j > 0 {
				setZone(k.ramp-1, j, rampSlope, snap)
				corners = append(corners, c)
			}
			continue
		}
		if k.tie {
			tan := math.Tan(k.turn / 2)
			j0, snap0 := zoneFits(0, tan)
			j1, snap1 := zoneFits(1, tan)
			if jz := min(j0, j1); jz > 0 {
				c.tie = true
				setZone(0, jz, tan, snap0 && j0 == jz)
				setZone(1, jz, tan, snap1 && j1 == jz)
				corners = append(corners, c)
				continue
			}
			// No room for a tie: grade by the skewness rule, if at all.
			d := 0.5 * (edgeLen(g.prevPt[p]) + edgeLen(p))
			if skewAt(k.turn, d, s[1]) <= gradeSkew {
				continue
			}
			k.delta = 4 * aimSkew * s[1] / math.Abs(math.Sin(k.turn))
		}
		for side := range 2 {
			if k.delta*(1+gradeRoom*G) <= room[side] {
				c.zone[side] = []float64{k.delta}
				c.h0[side] = G * k.delta
			} else {
				c.h0[side] = k.delta
			}
		}
		corners = append(corners, c)
	}
	if len(corners) == 0 {
		return g, nil, nil
	}

	// The spacing on each wall edge is the least of lines h = a + b·x in
	// the distance x from the edge's first point, one per corner reaching
	// it; zones take the ends of the edges next to their corners. The
	// lines of corners after an edge (in loop order) all have slope 1−G,
	// those of corners before it G−1, so only the lowest of each kind
	// matters: line[e][0] and line[e][1] (a = +Inf for none).
	line := make([][2]spacingLine, len(g.pts))
	for e := range line {
		line[e] = [2]spacingLine{{math.Inf(1), 0}, {math.Inf(1), 0}}
	}
	lo := make([]float64, len(g.pts))
	hi := make([]float64, len(g.pts))
	for e := range g.pts {
		hi[e] = edgeLen(int32(e))
	}
	longest := make(map[int32]float64) // per loop: its longest wall edge
	for e := range g.pts {
		if wall(int32(e)) >= 0 {
			l := g.loopOf[e]
			longest[l] = math.Max(longest[l], hi[e])
		}
	}
	k := G - 1
	for _, c := range corners {
		if z := c.zone[1]; len(z) > 0 {
			lo[c.p] = z[len(z)-1]
		}
		if z := c.zone[0]; len(z) > 0 {
			e := g.prevPt[c.p]
			hi[e] = edgeLen(e) - z[len(z)-1]
		}
		limit := longest[g.loopOf[c.p]]
		for side := range 2 {
			// dist is the arc distance from the cone's apex (the last zone
			// point) to the near end of edge e.
			e, dist := c.p, 0.0
			if side == 0 {
				e = g.prevPt[c.p]
			}
			if z := c.zone[side]; len(z) > 0 {
				dist = -z[len(z)-1]
			}
			for steps := 0; steps < len(g.pts) && wall(e) >= 0; steps++ {
				l := edgeLen(e)
				h := c.h0[side] + k*dist
				nl := spacingLine{h, k}
				if side == 0 {
					nl = spacingLine{h + k*l, -k}
				}
				// A walk stops at a line of its kind no higher at the edge's
				// near end: parallel, it stays no higher beyond.
				if h >= line[e][side].a+line[e][side].b*(l*float64(1-side)) {
					break
				}
				line[e][side] = nl
				dist += l
				if h > limit {
					break
				}
				if side == 1 {
					e = g.nextPt[e]
				} else {
					e = g.prevPt[e]
				}
				if e == c.p || (side == 0 && e == g.prevPt[c.p]) {
					break // round the whole loop
				}
			}
		}
	}

	// The added points of each edge, by distance from its first point.
	add := make([][]float64, len(g.pts))
	// A snapped zone point is the edge's far point already.
	zoneAdds := func(c corner, side int) []float64 {
		z := c.zone[side]
		if c.snap[side] {
			z = z[:len(z)-1]
		}
		return z
	}
	for _, c := range corners {
		add[c.p] = append(add[c.p], zoneAdds(c, 1)...)
	}
	// Every added wall point brings a column of layer cells: the points
	// are held to what the cell limit leaves room for before they are
	// made (a growth ratio near 1 keeps the corners' fine spacing along
	// whole walls).
	deepest := 0
	for _, s := range hs {
		deepest = max(deepest, len(s)-1)
	}
	room := opt.MaxCells / (deepest + 1)
	for e := range g.pts {
		var ls []spacingLine
		for _, l := range line[e] {
			if !math.IsInf(l.a, 1) {
				ls = append(ls, l)
			}
		}
		if len(ls) > 0 && hi[e] > lo[e] {
			x, ok := equidistribute(ls, lo[e], hi[e], room)
			if !ok {
				return nil, nil, fmt.Errorf("boundary layers: grading the wall spacing towards the walls' corners asks for more than %d wall points (counted to the edge after %s), whose %d layers would take the cell count above the limit of %d; the spacing at a corner follows the first-layer height and grows away from it by the growth ratio %g: raise that ratio or the cell limit", opt.MaxCells/(deepest+1), g.where(int32(e)), deepest, opt.MaxCells, G)
			}
			room -= len(x)
			add[e] = append(add[e], x...)
		}
	}
	for _, c := range corners {
		e := g.prevPt[c.p]
		l := edgeLen(e)
		z := zoneAdds(c, 0)
		for j := len(z) - 1; j >= 0; j-- {
			add[e] = append(add[e], l-z[j])
		}
	}
	total := 0
	for e := range add {
		total += len(add[e])
	}
	if total == 0 {
		return g, nil, nil
	}

	// The new outline, loop by loop in the old order.
	n := len(g.pts) + total
	out := &pslg{
		pts:     make([]orb.Point, 0, n),
		nextPt:  make([]int32, 0, n),
		prevPt:  make([]int32, 0, n),
		loopOf:  make([]int32, 0, n),
		edgeTag: make([]int16, 0, n),
		tags:    g.tags,
		user:    make([]int32, 0, n),
	}
	newID := make([]int32, len(g.pts))
	first := int32(0)
	for i := range g.pts {
		if i > 0 && g.loopOf[i] != g.loopOf[i-1] {
			// Close the previous loop.
			last := int32(len(out.pts)) - 1
			out.nextPt[last], out.prevPt[first] = first, last
			first = int32(len(out.pts))
		}
		push := func(p orb.Point, user int32) {
			id := int32(len(out.pts))
			out.pts = append(out.pts, p)
			out.nextPt = append(out.nextPt, id+1)
			out.prevPt = append(out.prevPt, id-1)
			out.loopOf = append(out.loopOf, g.loopOf[i])
			out.edgeTag = append(out.edgeTag, g.edgeTag[i])
			out.user = append(out.user, user)
		}
		newID[i] = int32(len(out.pts))
		push(g.pts[i], int32(i))
		a, b := g.pts[i], g.pts[g.nextPt[i]]
		length := edgeLen(int32(i))
		for _, x := range add[i] {
			t := x / length
			push(orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}, -1-int32(i))
		}
	}
	last := int32(len(out.pts)) - 1
	out.nextPt[last], out.prevPt[first] = first, last

	var ties []tieCorner
	for _, c := range corners {
		if !c.tie {
			continue
		}
		// The zone points follow each other in the new loop, a snapped one
		// being the next outline point.
		t := tieCorner{p: newID[c.p]}
		for j := range c.zone[1] {
			t.side[1] = append(t.side[1], newID[c.p]+1+int32(j))
		}
		e := g.prevPt[c.p]
		end := newID[e] + int32(len(add[e])) // the last point of edge e
		for j := range c.zone[0] {
			t.side[0] = append(t.side[0], end-int32(j))
		}
		ties = append(ties, t)
	}
	return out, ties, nil
}

// spacingLine is the wall spacing h(x) = a + b·x along one edge, x the
// distance from the edge's first point.
type spacingLine struct{ a, b float64 }

// equidistribute returns the points that cut [lo, hi] into N pieces of
// equal ∫ dx/h, N = round(∫_lo^hi dx/h) (at least 1), where h(x) is the
// least of the lines (all positive on [lo, hi]), or false when there
// would be more than most points. Between the lines' crossings h is one
// line, and ∫ dx/(a + bx) from x₀ to x₁ is ln(h(x₁)/h(x₀))/b, or
// (x₁ − x₀)/a when b = 0.
func equidistribute(lines []spacingLine, lo, hi float64, most int) ([]float64, bool) {
	lowest := func(x float64) spacingLine {
		best := lines[0]
		for _, l := range lines[1:] {
			if l.a+l.b*x < best.a+best.b*x {
				best = l
			}
		}
		return best
	}
	cuts := []float64{lo, hi}
	for i := range lines {
		for j := i + 1; j < len(lines); j++ {
			if db := lines[i].b - lines[j].b; db != 0 {
				if x := (lines[j].a - lines[i].a) / db; x > lo && x < hi {
					cuts = append(cuts, x)
				}
			}
		}
	}
	slices.Sort(cuts)
	// piece: h = h0 + b(x − x0) on [x0, x1], with its ∫ dx/h.
	type piece struct{ x0, x1, h0, b, integral float64 }
	var pieces []piece
	total := 0.0
	for i := 0; i+1 < len(cuts); i++ {
		x0, x1 := cuts[i], cuts[i+1]
		if x1 <= x0 {
			continue
		}
		l := lowest(0.5 * (x0 + x1))
		p := piece{x0: x0, x1: x1, h0: l.a + l.b*x0, b: l.b}
		if p.b == 0 {
			p.integral = (x1 - x0) / p.h0
		} else {
			p.integral = math.Log((p.h0+p.b*(x1-x0))/p.h0) / p.b
		}
		pieces = append(pieces, p)
		total += p.integral
	}
	if !(total <= float64(most)+1) {
		return nil, false
	}
	n := max(1, int(math.Round(total)))
	pts := make([]float64, 0, n-1)
	k, acc := 0, 0.0
	for i := 1; i < n; i++ {
		target := total * float64(i) / float64(n)
		for k < len(pieces)-1 && acc+pieces[k].integral < target {
			acc += pieces[k].integral
			k++
		}
		p := pieces[k]
		r := target - acc
		x := p.x0 + p.h0*r
		if p.b != 0 {
			x = p.x0 + p.h0*math.Expm1(p.b*r)/p.b
		}
		pts = append(pts, math.Min(math.Max(x, p.x0), p.x1))
	}
	return pts, true
}
