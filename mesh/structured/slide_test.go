package structured

import (
	"math"
	"testing"

	"github.com/paulmach/orb"
)

// TestSliderFollowsTheCurve: a side of 9 nodes 10° apart on a circle of
// radius R is rebuilt between its nodes within a twentieth of the chords'
// sagitta R (1 − cos 5°) (elementary geometry), so nodes slid along it stay
// on the wall; a side of two straight legs meeting at a right-angled
// corner is rebuilt as the legs themselves, with no overshoot at the
// corner; and along a straight side of uneven spacing the curve is the
// line.
func TestSliderFollowsTheCurve(t *testing.T) {
	const R = 0.1
	var arc []orb.Point
	for k := range 9 {
		a := float64(k) * 10 * math.Pi / 180
		arc = append(arc, orb.Point{R * math.Cos(a), R * math.Sin(a)})
	}
	sagitta := R * (1 - math.Cos(5*math.Pi/180))
	worst := 0.0
	sl := &slider{poly: arc}
	sl.fit()
	for e := 0; e+1 < len(arc); e++ {
		for q := 1; q < 10; q++ {
			p := sl.at(sl.cum[e]+float64(q)/10*(sl.cum[e+1]-sl.cum[e]), e)
			worst = math.Max(worst, math.Abs(math.Hypot(p[0], p[1])-R))
		}
	}
	if worst > sagitta/20 {
		t.Errorf("the arc is rebuilt within %.3g m of the circle, want within %.3g (a twentieth of the chords' sagitta %.3g)", worst, sagitta/20, sagitta)
	}

	corner := &slider{poly: []orb.Point{{0, 0}, {0.3, 0}, {0.7, 0}, {1, 0}, {1, 0.4}, {1, 1}}}
	corner.fit()
	for e := 0; e+1 < len(corner.poly); e++ {
		for q := 1; q < 10; q++ {
			p := corner.at(corner.cum[e]+float64(q)/10*(corner.cum[e+1]-corner.cum[e]), e)
			if off := math.Min(math.Abs(p[1])+math.Max(0, p[0]-1), math.Abs(p[0]-1)+math.Max(0, -p[1])); off > 1e-15 {
				t.Errorf("segment %d: (%g, %g) is %.3g off the two legs", e, p[0], p[1], off)
			}
		}
	}

	line := &slider{poly: []orb.Point{{0, 0}, {0.1, 0.05}, {0.5, 0.25}, {0.6, 0.3}, {2, 1}}}
	line.fit()
	for e := 0; e+1 < len(line.poly); e++ {
		p := line.at(line.cum[e]+0.37*(line.cum[e+1]-line.cum[e]), e)
		if off := math.Abs(p[1] - 0.5*p[0]); off > 1e-15 {
			t.Errorf("straight side, segment %d: (%g, %g) is %.3g off the line y = x/2", e, p[0], p[1], off)
		}
	}
}
