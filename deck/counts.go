package deck

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"cvdeck/bc"
	"cvdeck/geometry"
	"cvdeck/mesh"
)

// roundCounts gives every segment its whole edge count under the case's
// refinement factor r, all segments together.
//
// Each segment aims at a real number of edges: (N−1)·r for a law that
// fixes its count N, and L/h or the geometric-sum count for a size or
// growth law (whose lengths decodeSpacing has already refined). Rounding
// each aim alone can break what the case needs equal: a block's south side
// of three segments and its north side of one (3 × 41.6 rounds to 126 edges,
// 124.8 to 125). So the counts are chosen to satisfy every such equality —
// the opposite sides of each structured block, and the two tags of each
// periodic pair — and, among the counts that do, to lie closest to the
// aims (least sum of squared misses). For a side of several segments
// against one segment that is the largest-remainder split of a total
// within one edge of its aim: most often the rounded total, but where
// rounding the total would push a segment further off than the single
// segment's miss, the other whole number next to it. An equality is
// kept only where the case as written (r = 1) meets it; one it does not
// meet is left for the mesher to report as before. With r = 1 every count
// is the one the law gives on its own.
//
// A segment on several sides (a cut between blocks, a shared block edge,
// a periodic tag) is one unknown in all of them, so it gets one count.
// Segments that keep their own vertices are fixed.
func (c *Case) roundCounts() error {
	g := c.Geometry
	p, segs := c.countProblem()
	m, err := p.solve()
	if err != nil {
		return c.Mesh.at.errf("refining by %g: %v", c.Refine, err)
	}
	swap := map[geometry.Segment]geometry.Segment{}
	for i, v := range p.vars {
		if m[i] == v.has {
			continue
		}
		seg := segs[i]
		a := seg.Attr()
		sp, err := a.Spacing.WithEdges(m[i])
		if err != nil {
			return c.Mesh.at.errf("refining by %g, segment %s: %v", c.Refine, v.name, err)
		}
		a.Spacing = sp
		swap[seg] = seg.WithAttr(a)
	}
	if len(swap) == 0 {
		return nil
	}
	replace := func(list []geometry.Segment) {
		for k, s := range list {
			if n, ok := swap[s]; ok {
				list[k] = n
			}
		}
	}
	for _, l := range g.loops {
		replace(l.segments)
	}
	for _, name := range g.order {
		replace(g.curves[name].segments)
	}
	g.shape, err = g.outline()
	return err
}

// countProblem gathers the unknown edge counts (one per segment whose law
// has a count to choose, in order of definition) and the equalities
// between them; segs[i] is the segment of unknown i.
func (c *Case) countProblem() (*countProblem, []geometry.Segment) {
	g := c.Geometry
	p := &countProblem{}
	var segs []geometry.Segment
	index := map[geometry.Segment]int{}    // unknowns
	fixed := map[geometry.Segment]int{}    // edges of own-vertices segments, -1 when unknown
	names := map[geometry.Segment]string{} // the name a segment is known by
	for _, name := range g.order {
		cs := g.curves[name]
		for k, s := range cs.segments {
			if _, ok := names[s]; ok {
				continue
			}
			if len(cs.segments) == 1 {
				names[s] = fmt.Sprintf("%q", name)
			} else {
				names[s] = fmt.Sprintf("%d of %q", k+1, name)
			}
		}
	}
	add := func(s geometry.Segment) {
		if _, ok := index[s]; ok {
			return
		}
		if _, ok := fixed[s]; ok {
			return
		}
		sp := s.Attr().Spacing
		if sp.KeepsVertices() {
			pts, err := geometry.DiscretiseSegment(s)
			fixed[s] = len(pts) - 1
			if err != nil {
				fixed[s] = -1
			}
			return
		}
		v := countVar{name: names[s], min: sp.MinEdges()}
		e, err := sp.Edges(s.Length())
		k, err2 := sp.NodeCount(s.Length())
		if err != nil || err2 != nil {
			// A law that cannot be met is left for the mesher to report.
			fixed[s] = -1
			return
		}
		if sp.Counted() {
			v.target = e * c.Refine
			v.unrefined = int(e)
			v.has = int(e)
		} else {
			// The count as written is taken as round(aim/r): exact for a
			// size law (L/h scales by r) and with r = 1, near for a growth
			// law refined (its real count scales by about r), which may
			// so misjudge whether a side was equal as written.
			v.target, v.has = e, k-1
			v.unrefined = max(1, int(math.Round(e/c.Refine)))
		}
		index[s] = len(p.vars)
		p.vars = append(p.vars, v)
		segs = append(segs, s)
	}
	for _, l := range g.loops {
		for _, s := range l.segments {
			add(s)
		}
	}
	for _, name := range g.order {
		for _, s := range g.curves[name].segments {
			add(s)
		}
	}
	// row turns two runs of segments that need equal edge totals into an
	// equality, if the case as written meets it.
	row := func(what string, a, b []geometry.Segment) {
		r := countRow{what: what}
		coef := map[int]int{}
		unrefined := 0
		for sign, run := range [2][]geometry.Segment{a, b} {
			w := 1 - 2*sign
			for _, s := range run {
				if i, ok := index[s]; ok {
					coef[i] += w
					unrefined += w * p.vars[i].unrefined
					continue
				}
				if fixed[s] < 0 {
					return
				}
				r.constant += w * fixed[s]
				unrefined += w * fixed[s]
			}
		}
		if unrefined != 0 {
			return
		}
		for i, k := range coef {
			if k != 0 {
				r.terms = append(r.terms, countTerm{i, k})
			}
		}
		if len(r.terms) == 0 {
			return
		}
		sort.Slice(r.terms, func(x, y int) bool { return r.terms[x].v < r.terms[y].v })
		p.rows = append(p.rows, r)
	}
	if c.Mesh != nil {
		for _, bs := range c.Mesh.blocks {
			side := func(s mesh.Side) []geometry.Segment {
				var out []geometry.Segment
				for _, sc := range bs.sides[s] {
					out = append(out, sc.curve.segments...)
				}
				return out
			}
			for _, pair := range [2][2]mesh.Side{{mesh.South, mesh.North}, {mesh.West, mesh.East}} {
				a, b := side(pair[0]), side(pair[1])
				row(fmt.Sprintf("block %q: %s %s and %s %s", bs.name, pair[0], runNames(a, names), pair[1], runNames(b, names)), a, b)
			}
		}
	}
	if c.Boundaries != nil {
		tagged := func(tag string) []geometry.Segment {
			var out []geometry.Segment
			for _, l := range g.loops {
				for _, s := range l.segments {
					if s.Attr().Tag == tag {
						out = append(out, s)
					}
				}
			}
			return out
		}
		for _, cond := range c.Boundaries.conditions {
			if cond.Kind == bc.Periodic {
				a, b := tagged(cond.Tag), tagged(cond.Partner)
				row(fmt.Sprintf("periodic tags %q %s and %q %s", cond.Tag, runNames(a, names), cond.Partner, runNames(b, names)), a, b)
			}
		}
	}
	return p, segs
}

// runNames lists the names of a run of segments, for messages.
func runNames(run []geometry.Segment, names map[geometry.Segment]string) string {
	s := make([]string, len(run))
	for i, seg := range run {
		s[i] = names[seg]
		if s[i] == "" {
			s[i] = "(unnamed " + seg.Kind() + ")"
		}
	}
	return "[" + strings.Join(s, ", ") + "]"
}

// countProblem is a set of whole edge counts to choose: each unknown near
// its target, every row's weighted sum zero.
type countProblem struct {
	vars []countVar
	rows []countRow
}

// countVar is one segment's unknown edge count.
type countVar struct {
	name      string  // for messages
	target    float64 // the real count aimed at
	min       int     // the fewest edges its law accepts
	unrefined int     // its count in the case as written (r = 1)
	has       int     // the count its law gives now
}

// countRow is the equality Σ coef·m + constant = 0.
type countRow struct {
	what     string
	terms    []countTerm
	constant int
}

type countTerm struct{ v, coef int }

// countSearchLimit bounds the search of one group of linked unknowns, so
// that a pathological case fails with a message instead of running on.
const countSearchLimit = 1 << 20

// solve returns a count for every unknown. Unknowns in no row are rounded
// alone (at least their minimum). The unknowns linked by rows are solved
// group by group: a depth-first search over counts within two of each
// target, the nearest first (ties to math.Round, as a law rounds alone),
// in which a row with one unknown left fixes that unknown, and a branch is
// cut when it cannot beat the best sum of squared misses found. The first
// best found wins, so the result does not depend on anything but the
// order of definition.
func (p *countProblem) solve() ([]int, error) {
	m := make([]int, len(p.vars))
	for i, v := range p.vars {
		m[i] = max(v.min, int(math.Round(v.target)))
	}
	for _, group := range p.groups() {
		if err := p.solveGroup(group, m); err != nil {
			return nil, err
		}
	}
	return m, nil
}

// groups splits the rows into groups that share no unknown (union-find
// over the unknowns), each in order of its first row.
func (p *countProblem) groups() [][]int {
	parent := make([]int, len(p.vars))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for _, r := range p.rows {
		for _, t := range r.terms[1:] {
			parent[find(t.v)] = find(r.terms[0].v)
		}
	}
	at := map[int]int{}
	var out [][]int
	for k, r := range p.rows {
		root := find(r.terms[0].v)
		g, ok := at[root]
		if !ok {
			g = len(out)
			at[root] = g
			out = append(out, nil)
		}
		out[g] = append(out[g], k)
	}
	return out
}

// solveGroup chooses the counts of the unknowns in the given rows,
// writing them into m.
func (p *countProblem) solveGroup(rows []int, m []int) error {
	var vars []int // the group's unknowns, in order of definition
	seen := map[int]bool{}
	for _, k := range rows {
		for _, t := range p.rows[k].terms {
			if !seen[t.v] {
				seen[t.v] = true
				vars = append(vars, t.v)
			}
		}
	}
	sort.Ints(vars)
	miss := func(i, k int) float64 { d := float64(k) - p.vars[i].target; return d * d }
	// nearest[i] is the count of unknown i nearest its target, floor[i]
	// the miss it has there: the least it can have.
	nearest, floor := map[int]int{}, map[int]float64{}
	for _, i := range vars {
		nearest[i] = max(p.vars[i].min, int(math.Round(p.vars[i].target)))
		floor[i] = miss(i, nearest[i])
	}
	set := map[int]bool{}
	cur := map[int]int{}
	// extra is the least a row adds to its free unknowns' misses above
	// their floors. At their nearest counts the row is off by D; each edge
	// it is moved by is one step of an unknown away from its nearest count
	// n, and the k-th step in direction d costs (2k − 1) + 2d(n − t). The
	// steps of one unknown grow dearer, so for a row of unit coefficients
	// the |D| cheapest steps are the least cost (infinite if there are too
	// few). A row with larger coefficients adds nothing.
	extra := func(r countRow) float64 {
		off := r.constant
		var free []countTerm
		for _, t := range r.terms {
			switch {
			case set[t.v]:
				off += t.coef * cur[t.v]
			case t.coef == 1 || t.coef == -1:
				free = append(free, t)
				off += t.coef * nearest[t.v]
			default:
				return 0
			}
		}
		if off == 0 || len(free) == 0 {
			return 0
		}
		need, dir := off, -1 // the sum must fall by off
		if off < 0 {
			need, dir = -off, 1
		}
		var steps []float64
		for _, t := range free {
			v, n, d := p.vars[t.v], nearest[t.v], dir*t.coef
			for k := 1; k <= need && n+d*k >= v.min; k++ {
				steps = append(steps, float64(2*k-1)+2*float64(d)*(float64(n)-v.target))
			}
		}
		if len(steps) < need {
			return math.Inf(1)
		}
		sort.Float64s(steps)
		sum := 0.0
		for _, c := range steps[:need] {
			sum += c
		}
		return sum
	}
	var best map[int]int
	bestCost := math.Inf(1)
	nodes := 0
	const eps = 1e-9
	var search func(cost float64)
	search = func(cost float64) {
		if nodes++; nodes > countSearchLimit {
			return
		}
		// Fix every unknown that a row with one unknown left decides.
		var forced []int
		defer func() {
			for _, i := range forced {
				delete(set, i)
			}
		}()
		for changed := true; changed; {
			changed = false
			for _, k := range rows {
				r := p.rows[k]
				sum, free, last := r.constant, 0, countTerm{}
				for _, t := range r.terms {
					if set[t.v] {
						sum += t.coef * cur[t.v]
					} else {
						free++
						last = t
					}
				}
				switch {
				case free == 0 && sum != 0:
					return
				case free == 1:
					if sum%last.coef != 0 {
						return
					}
					k := -sum / last.coef
					if k < p.vars[last.v].min {
						return
					}
					cur[last.v], set[last.v] = k, true
					forced = append(forced, last.v)
					cost += miss(last.v, k)
					changed = true
				}
			}
		}
		next, bound := -1, cost
		for _, i := range vars {
			if !set[i] {
				if next < 0 {
					next = i
				}
				bound += floor[i]
			}
		}
		most := 0.0
		for _, k := range rows {
			most = max(most, extra(p.rows[k]))
		}
		if bound+most >= bestCost-eps {
			return
		}
		if next < 0 {
			best = map[int]int{}
			for _, i := range vars {
				best[i] = cur[i]
			}
			bestCost = cost
			return
		}
		for _, k := range candidates(p.vars[next]) {
			cur[next], set[next] = k, true
			search(cost + miss(next, k))
			delete(set, next)
		}
	}
	search(0)
	if best == nil {
		var what, aims []string
		for _, k := range rows {
			what = append(what, p.rows[k].what)
		}
		for _, i := range vars {
			aims = append(aims, fmt.Sprintf("%s %.4g", p.vars[i].name, p.vars[i].target))
		}
		reason := "no whole edge counts near the refined ones"
		if nodes > countSearchLimit {
			reason = fmt.Sprintf("no whole edge counts found within %d trials", countSearchLimit)
		}
		return fmt.Errorf("%s keep these sides equal: %s (edges aimed at: %s); give counts that a factor scales to whole numbers, or another factor",
			reason, strings.Join(what, "; "), strings.Join(aims, ", "))
	}
	for i, k := range best {
		m[i] = k
	}
	return nil
}

// candidates lists the counts a search tries for an unknown: those within
// two of its target and at least its minimum, the nearest first, math.Round
// first among equals.
func candidates(v countVar) []int {
	r := int(math.Round(v.target))
	var out []int
	for k := int(math.Floor(v.target)) - 2; k <= int(math.Ceil(v.target))+2; k++ {
		if k >= v.min {
			out = append(out, k)
		}
	}
	if len(out) == 0 {
		out = append(out, v.min)
	}
	sort.SliceStable(out, func(a, b int) bool {
		da, db := math.Abs(float64(out[a])-v.target), math.Abs(float64(out[b])-v.target)
		if da != db {
			return da < db
		}
		return out[a] == r
	})
	return out
}
