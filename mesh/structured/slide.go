package structured

import (
	"math"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// slider lets the nodes of one side move along the side's original
// curve during smoothing. The curve is known only by the side's nodes as
// they were, so between them it is rebuilt as a cubic Hermite curve whose
// tangent at each node is the chord-length difference (P_{k+1} −
// P_{k−1}) / (s_{k+1} − s_{k−1}) (the Catmull–Rom choice for uneven
// spacing; common practice), which follows a smooth wall to third order
// in the spacing where the chords between the nodes cut below it by
// s²/(8R) (a node slid a tenth of a 5 mm spacing along a 0.1 m radius
// would leave the wall by about 3 µm on the chord, by nanometres on the
// cubic). The cubic is taken only through the nodes where the outline's
// curve runs on (Block.Smooth: inner nodes of an arc, a spline or a NACA
// surface) and that turn by no more than sideCorner; at every other node
// (a joint between two segments, a vertex of a line or polyline, a sharp
// turn) the tangents on either side are the chords' own, so the curve is
// the straight chord there and a straight segment stays straight.
type slider struct {
	side mesh.Side
	poly []orb.Point // the side as it was, in increasing index
	// smooth[k] says whether the outline's curve runs smoothly through
	// node k (Block.Smooth); nil means nowhere.
	smooth []bool
	cum    []float64 // arc length at each polyline point
	// tanOut[e] and tanIn[e] are the curve's tangents (d/ds) at the start
	// and the end of segment e, from poly[e] to poly[e+1].
	tanOut, tanIn []orb.Point
	s             []float64 // present arc-length position of each side node
	fan           [5]int    // flat offsets of the node's neighbours, counter-clockwise
	in            int       // flat offset of the interior neighbour
}

// sideCorner is the turn at a side node above which the side is taken to
// have a corner there rather than a curve (slider).
const sideCorner = 15 * math.Pi / 180

// fit sets the slider's arc lengths and the tangents of its curve from
// poly.
func (sl *slider) fit() {
	n := len(sl.poly)
	sl.cum = make([]float64, n)
	for k := 1; k < n; k++ {
		sl.cum[k] = sl.cum[k-1] + dist(sl.poly[k-1], sl.poly[k])
	}
	chord := func(e int) orb.Point {
		a, b := sl.poly[e], sl.poly[e+1]
		l := sl.cum[e+1] - sl.cum[e]
		return orb.Point{(b[0] - a[0]) / l, (b[1] - a[1]) / l}
	}
	sl.tanOut, sl.tanIn = make([]orb.Point, n-1), make([]orb.Point, n-1)
	for e := 0; e+1 < n; e++ {
		sl.tanOut[e], sl.tanIn[e] = chord(e), chord(e)
	}
	// The smooth nodes, where the cubic runs through with the
	// chord-length difference as its tangent.
	smooth := make([]bool, n)
	for k := 1; k+1 < n; k++ {
		u, v := chord(k-1), chord(k)
		if k >= len(sl.smooth) || !sl.smooth[k] || math.Abs(math.Atan2(u[0]*v[1]-u[1]*v[0], u[0]*v[0]+u[1]*v[1])) > sideCorner {
			continue // a corner or a straight piece: the chords' own tangents
		}
		smooth[k] = true
		a, b := sl.poly[k-1], sl.poly[k+1]
		d := sl.cum[k+1] - sl.cum[k-1]
		t := orb.Point{(b[0] - a[0]) / d, (b[1] - a[1]) / d}
		sl.tanIn[k-1], sl.tanOut[k] = t, t
	}
	// At a node that is not smooth (an end of the side, a joint between
	// segments) beside a smooth one, the segment towards it is still a
	// chord of the curve: its tangent there is that of the parabola
	// through the node and the curve's next two, so that it follows the
	// curve as the inner segments do.
	for k := range n {
		if smooth[k] {
			continue
		}
		if k+2 < n && smooth[k+1] {
			sl.tanOut[k] = endTangent(sl.poly[k], sl.poly[k+1], sl.poly[k+2], sl.cum[k+1]-sl.cum[k], sl.cum[k+2]-sl.cum[k+1])
		}
		if k >= 2 && smooth[k-1] {
			t := endTangent(sl.poly[k], sl.poly[k-1], sl.poly[k-2], sl.cum[k]-sl.cum[k-1], sl.cum[k-1]-sl.cum[k-2])
			sl.tanIn[k-1] = orb.Point{-t[0], -t[1]}
		}
	}
}

// endTangent is the derivative at p0 of the parabola through p0, p1, p2,
// parametrised by arc length with p1 at h1 and p2 at h1 + h2 (the
// one-sided three-point difference, from memory):
// P'(0) = −(2h1 + h2)/(h1 (h1 + h2)) p0 + (h1 + h2)/(h1 h2) p1 − h1/(h2 (h1 + h2)) p2.
func endTangent(p0, p1, p2 orb.Point, h1, h2 float64) orb.Point {
	c0 := -(2*h1 + h2) / (h1 * (h1 + h2))
	c1 := (h1 + h2) / (h1 * h2)
	c2 := -h1 / (h2 * (h1 + h2))
	return orb.Point{c0*p0[0] + c1*p1[0] + c2*p2[0], c0*p0[1] + c1*p1[1] + c2*p2[1]}
}

func newSlider(b *Block, side mesh.Side) *slider {
	ni := b.NI
	sl := &slider{side: side, poly: b.SidePoints(side), smooth: b.Smooth[side]}
	sl.fit()
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

// at returns the point of the side's curve at arc length t (measured
// along the chords), searching from segment e: the cubic Hermite
// interpolant of the segment's end points and tangents (see slider).
func (sl *slider) at(t float64, e int) orb.Point {
	for e+2 < len(sl.cum) && sl.cum[e+1] < t {
		e++
	}
	a, b := sl.poly[e], sl.poly[e+1]
	l := sl.cum[e+1] - sl.cum[e]
	u := (t - sl.cum[e]) / l
	u2, u3 := u*u, u*u*u
	h00, h10, h01, h11 := 2*u3-3*u2+1, u3-2*u2+u, -2*u3+3*u2, u3-u2
	ta, tb := sl.tanOut[e], sl.tanIn[e]
	return orb.Point{
		h00*a[0] + h10*l*ta[0] + h01*b[0] + h11*l*tb[0],
		h00*a[1] + h10*l*ta[1] + h01*b[1] + h11*l*tb[1],
	}
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
