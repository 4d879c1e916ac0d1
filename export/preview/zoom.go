package preview

import (
	"fmt"
	"math"

	"cvdeck/mesh"
)

// Zoom windows.
const (
	// A cell thinner than thinPx at the usual framing of a zoom window
	// (six cell sizes across), too thin for its shape to be read, is
	// framed closer, shapePx thick, around the place that crosses its
	// limit, so that its shape and its neighbours' can be seen.
	thinPx  = 4
	shapePx = 16
	// maxCrossings is how many crossed limits a zoom window lists.
	maxCrossings = 4
)

// zoomCells picks the cells to zoom in on, up to MaxZoomWindows, each
// outside the earlier windows: from in.Worst in its order; without it,
// spread over the failing cells (or, if none fail, the warning ones) by
// farthest-point sampling from the lowest-numbered one, so the windows
// show different places. It returns the cells and the regions framing
// them.
func zoomCells(m *mesh.Mesh, in Input) ([]int32, []view) {
	var out []int32
	var wins []view
	within := func(x, y float64) bool {
		for _, w := range wins {
			if x >= w.x0 && x <= w.x1 && y >= w.y0 && y <= w.y1 {
				return true
			}
		}
		return false
	}
	inside := func(c int32) bool {
		p := m.Geo.CellCentroid[c]
		return within(p[0], p[1])
	}
	// pick adds the window of cell c unless its middle lies in an
	// earlier window (two cells sharing the face that fails them).
	pick := func(c int32) {
		v := zoomView(m, c, focusOf(m, in, c), box{0, 0, zoomSize, zoomSize})
		if !within(v.cx, v.cy) {
			out = append(out, c)
			wins = append(wins, v)
		}
	}
	if in.Worst != nil {
		for _, c := range in.Worst {
			if len(out) < MaxZoomWindows && !inside(c) {
				pick(c)
			}
		}
		return out, wins
	}
	var cand []int32
	for _, want := range []Status{Fail, Warn} {
		for c, x := range in.Status {
			if x == want {
				cand = append(cand, int32(c))
			}
		}
		if len(cand) > 0 {
			break
		}
	}
	if len(cand) == 0 {
		return nil, nil
	}
	dist := make([]float64, len(cand))
	for i := range dist {
		dist[i] = math.Inf(1)
	}
	next := cand[0]
	// Each round takes the candidate farthest from those tried, so a
	// round per candidate tries them all.
	for range len(cand) {
		if len(out) == MaxZoomWindows {
			break
		}
		pick(next)
		p := m.Geo.CellCentroid[next]
		best, bestD := int32(-1), -1.0
		for i, c := range cand {
			q := m.Geo.CellCentroid[c]
			dist[i] = math.Min(dist[i], math.Hypot(q[0]-p[0], q[1]-p[1]))
			if dist[i] > bestD && !inside(c) {
				best, bestD = c, dist[i]
			}
		}
		if best < 0 {
			break
		}
		next = best
	}
	return out, wins
}

// zoomView frames cell c in a window of box b: a square six cell sizes
// (bounding-box sides) wide around the cell's middle; if the cell is then
// thinner than thinPx (its thickness taken as its area over its larger
// bounding-box side), a square in which it is shapePx thick, centred on
// focus; and in either case shrunk until it holds at most MaxZoomFaces
// faces.
func zoomView(m *mesh.Mesh, c int32, focus [2]float64, b box) view {
	x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, v := range m.Cell(int(c)) {
		p := m.Nodes[v]
		x0, x1 = math.Min(x0, p[0]), math.Max(x1, p[0])
		y0, y1 = math.Min(y0, p[1]), math.Max(y1, p[1])
	}
	cx, cy := 0.5*(x0+x1), 0.5*(y0+y1)
	ext := math.Max(math.Max(x1-x0, y1-y0), 1e-300)
	half := 3 * ext
	if thick := math.Abs(m.Geo.CellArea[c]) / ext; thick > 0 && thick*b.w/(2*half) < thinPx {
		half = thick * b.w / (2 * shapePx)
		cx, cy = focus[0], focus[1]
	}
	for {
		v := newView(b, cx-half, cy-half, cx+half, cy+half)
		n := 0
		for _, fn := range m.FaceNodes {
			a, q := m.Nodes[fn[0]], m.Nodes[fn[1]]
			if v.meets(a[0], a[1], q[0], q[1]) {
				if n++; n > MaxZoomFaces {
					break
				}
			}
		}
		if n <= MaxZoomFaces || half < 1e-300 {
			return v
		}
		half *= 0.5
	}
}

// crossing is one limit that a cell's value of a metric is past.
type crossing struct {
	metric *Metric
	value  float64
	limit  Limit
}

// crosses reports whether value v of metric mt is past limit l: above it,
// or below it for a metric where smaller is worse (at or below a limit of
// 0 then, as a zero area or length is a collapsed cell).
func crosses(mt *Metric, v float64, l Limit) bool {
	switch {
	case v != v || l.Value != l.Value:
		return false
	case mt.Lower:
		return v < l.Value || (l.Value == 0 && v == 0)
	}
	return v > l.Value
}

// crossingsOf lists the metrics whose value at cell c is past a limit,
// with the worst limit each is past, failures first, in metric order.
func crossingsOf(in Input, c int) []crossing {
	var out []crossing
	for _, want := range []Status{Fail, Warn} {
		for i := range in.Metrics {
			mt := &in.Metrics[i]
			if len(mt.Values) != in.Mesh.NumCells() {
				continue
			}
			v := mt.Values[c]
			worst, at := Pass, Limit{}
			for _, l := range mt.Limits {
				if l.Status > worst && crosses(mt, v, l) {
					worst, at = l.Status, l
				}
			}
			if worst == want {
				out = append(out, crossing{mt, v, at})
			}
		}
	}
	return out
}

// crossingLines writes the limits cell c is past, one a line, at most
// maxCrossings and a count of the rest; a failing cell past no metric's
// fail limit failed a connectivity check, which the report names.
func crossingLines(in Input, c int) []string {
	cr := crossingsOf(in, c)
	var lines []string
	for k, x := range cr {
		if k == maxCrossings {
			lines = append(lines, fmt.Sprintf("and %d more", len(cr)-k))
			break
		}
		word, cmp := "warn", ">"
		if x.limit.Status == Fail {
			word = "fail"
		}
		if x.metric.Lower {
			cmp = "<"
			if x.limit.Value == 0 {
				cmp = "≤"
			}
		}
		lines = append(lines, fmt.Sprintf("%s: %s %s %s %s", word, x.metric.Name,
			withUnit(x.value, x.metric.Unit), cmp, withUnit(x.limit.Value, x.metric.Unit)))
	}
	if in.Status != nil && in.Status[c] == Fail && (len(cr) == 0 || cr[0].limit.Status != Fail) {
		lines = append([]string{"fail: a connectivity check (see the report)"}, lines...)
	}
	return lines
}

// withUnit writes v in four significant digits with its unit: degrees
// against the number, other units after a space.
func withUnit(v float64, unit string) string {
	switch unit {
	case "":
		return short(v)
	case "°":
		return short(v) + unit
	}
	return short(v) + " " + unit
}

// severity is how far past its limit a crossing is: the ratio of the
// value to the limit, turned over where smaller is worse; +Inf where
// either is not positive (a collapsed cell, or a limit of 0).
func (x crossing) severity() float64 {
	v, l := x.value, x.limit.Value
	if x.metric.Lower {
		v, l = l, v
	}
	if v <= 0 || l <= 0 {
		return math.Inf(1)
	}
	return v / l
}

// focusOf is the place in cell c that a close zoom centres on: the
// midpoint of the cell's worst face for the metric with per-face values
// whose worst limit the cell is furthest past (non-orthogonality,
// skewness and face length are the values of a cell's worst face), else
// the midpoint of its shortest face, where a thin cell ends.
func focusOf(m *mesh.Mesh, in Input, c int32) [2]float64 {
	var faces []int
	for f := range m.FaceNodes {
		if m.Owner[f] == c || m.Neighbour[f] == c {
			faces = append(faces, f)
		}
	}
	var pick *crossing
	for _, x := range crossingsOf(in, int(c)) {
		if len(x.metric.FaceValues) != m.NumFaces() {
			continue
		}
		if pick == nil || (x.limit.Status == pick.limit.Status && x.severity() > pick.severity()) {
			pick = &x
		}
	}
	best := -1
	for _, f := range faces {
		switch {
		case best < 0:
			best = f
		case pick == nil:
			if m.Geo.FaceLength[f] < m.Geo.FaceLength[best] {
				best = f
			}
		case pick.metric.Lower && pick.metric.FaceValues[f] < pick.metric.FaceValues[best],
			!pick.metric.Lower && pick.metric.FaceValues[f] > pick.metric.FaceValues[best]:
			best = f
		}
	}
	if best < 0 {
		p := m.Geo.CellCentroid[c]
		return [2]float64{p[0], p[1]}
	}
	p := m.Geo.FaceMid[best]
	return [2]float64{p[0], p[1]}
}

// extentLines writes the region a zoom window shows, in metres, with the
// decimals its width asks for.
func extentLines(v view) []string {
	dec := spanDecimals(math.Max(v.x1-v.x0, v.y1-v.y0))
	return []string{
		fmt.Sprintf("x %s to %s m", fixed(v.x0, dec), fixed(v.x1, dec)),
		fmt.Sprintf("y %s to %s m", fixed(v.y0, dec), fixed(v.y1, dec)),
	}
}

// zoomTitle is the heading of zoom window k on cell c.
func zoomTitle(in Input, k int, c int32) string {
	st := "selected"
	if in.Status != nil {
		st = [...]string{"pass", "warn", "fail"}[in.Status[c]]
	}
	return fmt.Sprintf("zoom %d: cell %d (%s)", k+1, c, st)
}
