package structured

import (
	"math"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// slider lets the nodes of one side move along the side's original
// polyline during smoothing.
type slider struct {
	side mesh.Side
	poly []orb.Point // the side as it was, in increasing index
	cum  []float64   // arc length at each polyline point
	s    []float64   // present arc-length position of each side node
	fan  [5]int      // flat offsets of the node's neighbours, counter-clockwise
	in   int         // flat offset of the interior neighbour
}

func newSlider(b *Block, side mesh.Side) *slider {
	ni := b.NI
	sl := &slider{side: side, poly: b.SidePoints(side)}
	sl.cum = make([]float64, len(sl.poly))
	for k := 1; k < len(sl.poly); k++ {
		sl.cum[k] = sl.cum[k-1] + dist(sl.poly[k-1], sl.poly[k])
	}
	sl.s = append([]float64(nil), sl.cum...)
	switch side {
	case mesh.South:
		sl.fan, sl.in = [5]int{1, 1 + ni, ni, ni - 1, -1}, ni
	case mesh.North:
		sl.fan, sl.in = [5]int{-1, -1 - ni, -ni, 1 - ni, 1}, -ni
	case mesh.West:
		sl.fan, sl.in = [5]int{-ni, 1 - ni, 1, ni + 1, ni}, 1
	default:
		sl.fan, sl.in = [5]int{ni, ni - 1, -1, -ni - 1, -ni}, -1
	}
	return sl
}

// at returns the polyline point at arc length t, searching from segment e.
func (sl *slider) at(t float64, e int) orb.Point {
	for e+2 < len(sl.cum) && sl.cum[e+1] < t {
		e++
	}
	a, b := sl.poly[e], sl.poly[e+1]
	u := (t - sl.cum[e]) / (sl.cum[e+1] - sl.cum[e])
	return orb.Point{a[0] + u*(b[0]-a[0]), a[1] + u*(b[1]-a[1])}
}

// segment returns the polyline segment holding arc length t.
func (sl *slider) segment(t float64) int {
	e := 0
	for e+2 < len(sl.cum) && sl.cum[e+1] < t {
		e++
	}
	return e
}

// fanAllows reports whether boundary node k may move to (px, py): in
// starMode the four triangles it forms with consecutive fan neighbours must
// stay positive, in areaMode its two cells (each the sum of two of those
// triangles), in freeMode anything goes.
func (s *smoother) fanAllows(k int, fan *[5]int, px, py float64) bool {
	var c [4]float64
	for f := range c {
		a, b := k+fan[f], k+fan[f+1]
		ax, ay := s.x[a]-px, s.y[a]-py
		bx, by := s.x[b]-px, s.y[b]-py
		c[f] = ax*by - bx*ay
	}
	switch s.mode {
	case starMode:
		return c[0] > 0 && c[1] > 0 && c[2] > 0 && c[3] > 0
	case areaMode:
		return c[0]+c[1] > 0 && c[2]+c[3] > 0
	}
	return true
}

// slide moves each inner node of the side half-way towards the foot of the
// perpendicular from its interior neighbour onto the polyline, staying
// between its two side neighbours, and returns the largest squared move
// over the squared distance to the nearer side neighbour.
func (s *smoother) slide(sl *slider) float64 {
	b := s.b
	n := len(sl.s)
	worst := 0.0
	for k := 1; k+1 < n; k++ {
		w := b.SideNode(sl.side, k)
		p := orb.Point{s.x[w+sl.in], s.y[w+sl.in]}
		lo, hi := sl.s[k-1], sl.s[k+1]
		foot, best := sl.s[k], math.Inf(1)
		for e := sl.segment(lo); e+1 < len(sl.cum) && sl.cum[e] <= hi; e++ {
			a, c := sl.poly[e], sl.poly[e+1]
			ex, ey := c[0]-a[0], c[1]-a[1]
			u := ((p[0]-a[0])*ex + (p[1]-a[1])*ey) / (ex*ex + ey*ey)
			t := math.Max(lo, math.Min(hi, sl.cum[e]+math.Max(0, math.Min(1, u))*(sl.cum[e+1]-sl.cum[e])))
			if d := dist(p, sl.at(t, e)); d < best {
				foot, best = t, d
			}
		}
		margin := 0.05 * (hi - lo)
		t := math.Max(lo+margin, math.Min(hi-margin, sl.s[k]+0.5*(foot-sl.s[k])))
		if t == sl.s[k] {
			continue
		}
		q := sl.at(t, sl.segment(math.Min(t, sl.s[k])))
		if !s.fanAllows(w, &sl.fan, q[0], q[1]) {
			s.damped++
			continue
		}
		d := dist(q, orb.Point{s.x[w], s.y[w]})
		gap := math.Min(sl.s[k]-lo, hi-sl.s[k])
		s.x[w], s.y[w] = q[0], q[1]
		sl.s[k] = t
		worst = math.Max(worst, d*d/(gap*gap))
	}
	return worst
}
