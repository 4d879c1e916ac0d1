package structured

import (
	"math"
	"testing"

	"github.com/paulmach/orb"
)

// TestSliderFollowsTheCurve: a side of 9 nodes 10° apart on an arc of
// radius R is rebuilt between its nodes within a twentieth of the chords'
// sagitta R (1 − cos 5°) (elementary geometry), so nodes slid along it stay
// on the wall; a side of two straight legs meeting at a right-angled
// corner is rebuilt as the legs themselves, with no overshoot at the
// corner, even if its nodes were marked smooth; along a straight side of
// uneven spacing the curve is the line; and a straight floor that meets
// the same arc at a joint turning by 5° stays straight up to the joint,
// while the arc beyond it keeps to its circle.
func TestSliderFollowsTheCurve(t *testing.T) {
	const R = 0.1
	var arc []orb.Point
	for k := range 9 {
		a := float64(k) * 10 * math.Pi / 180
		arc = append(arc, orb.Point{R * math.Cos(a), R * math.Sin(a)})
	}
	sagitta := R * (1 - math.Cos(5*math.Pi/180))
	worst := 0.0
	inner := func(n int) []bool {
		s := make([]bool, n)
		for k := 1; k+1 < n; k++ {
			s[k] = true
		}
		return s
	}
	sl := &slider{poly: arc, smooth: inner(len(arc))}
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

	corner := &slider{poly: []orb.Point{{0, 0}, {0.3, 0}, {0.7, 0}, {1, 0}, {1, 0.4}, {1, 1}}, smooth: inner(6)}
	corner.fit()
	for e := 0; e+1 < len(corner.poly); e++ {
		for q := 1; q < 10; q++ {
			p := corner.at(corner.cum[e]+float64(q)/10*(corner.cum[e+1]-corner.cum[e]), e)
			if off := math.Min(math.Abs(p[1])+math.Max(0, p[0]-1), math.Abs(p[0]-1)+math.Max(0, -p[1])); off > 1e-15 {
				t.Errorf("segment %d: (%g, %g) is %.3g off the two legs", e, p[0], p[1], off)
			}
		}
	}

	line := &slider{poly: []orb.Point{{0, 0}, {0.1, 0.05}, {0.5, 0.25}, {0.6, 0.3}, {2, 1}}, smooth: inner(5)}
	line.fit()
	for e := 0; e+1 < len(line.poly); e++ {
		p := line.at(line.cum[e]+0.37*(line.cum[e+1]-line.cum[e]), e)
		if off := math.Abs(p[1] - 0.5*p[0]); off > 1e-15 {
			t.Errorf("straight side, segment %d: (%g, %g) is %.3g off the line y = x/2", e, p[0], p[1], off)
		}
	}

	// The floor y = −R from x = −0.05 to 0 (the arc's start, rotated so
	// that it leaves the floor at its first chord's half-angle, 5°), then
	// the arc: the floor's nodes are not smooth, the arc's inner ones are.
	var joined []orb.Point
	var smooth []bool
	for k := range 5 {
		joined, smooth = append(joined, orb.Point{-0.05 + 0.0125*float64(k), -R}), append(smooth, false)
	}
	for k := 1; k < 9; k++ {
		a := -math.Pi/2 + float64(k)*10*math.Pi/180
		joined, smooth = append(joined, orb.Point{R * math.Cos(a), R * math.Sin(a)}), append(smooth, k < 8)
	}
	// The arc from (0, −R): centre (0, 0), first node at 10° from the
	// bottom, so the joint at (0, −R) turns by 5°.
	js := &slider{poly: joined, smooth: smooth}
	js.fit()
	worstArc := 0.0
	for e := 0; e+1 < len(joined); e++ {
		for q := 1; q < 10; q++ {
			p := js.at(js.cum[e]+float64(q)/10*(js.cum[e+1]-js.cum[e]), e)
			if e < 4 {
				if off := math.Abs(p[1] + R); off > 1e-15 {
					t.Errorf("floor segment %d: (%g, %g) is %.3g off the floor", e, p[0], p[1], off)
				}
				continue
			}
			worstArc = math.Max(worstArc, math.Abs(math.Hypot(p[0], p[1])-R))
		}
	}
	if worstArc > sagitta/20 {
		t.Errorf("the arc beyond the joint is rebuilt within %.3g m of its circle, want within %.3g", worstArc, sagitta/20)
	}
}
