package quality

import (
	"math"
	"testing"

	"github.com/paulmach/orb"
)

// Analytic values of single cells. Each expected value follows from the
// cell's angles and edges by hand; the definitions are those stated in
// cellShape's doc comment.
func TestSingleCellShapes(t *testing.T) {
	s3 := math.Sqrt(3)
	cases := []struct {
		name                     string
		nodes                    []orb.Point
		equiangle, aspect        float64
		minAngle, maxAngle, sjac float64
	}{
		// Equilateral triangle: all angles 60°, so equiangle skewness 0; the
		// aspect ratio l_max·P/(4√3 A) = 1·3/(4√3·√3/4) = 1.
		{"equilateral", []orb.Point{{0, 0}, {1, 0}, {0.5, s3 / 2}}, 0, 1, 60, 60, math.NaN()},
		// Right isosceles triangle: angles 90, 45, 45:
		// max((90−60)/120, (60−45)/60) = 0.25. Aspect ratio
		// √2·(2+√2)/(4√3·½) = (2√2+2)/(2√3).
		{"right isosceles", []orb.Point{{0, 0}, {1, 0}, {0, 1}}, 0.25, (2*math.Sqrt2 + 2) / (2 * s3), 45, 90, math.NaN()},
		// 60° rhombus: angles 60, 120: (120−90)/90 = (90−60)/90 = 1/3; all
		// edges equal, aspect ratio 1; scaled Jacobian sin 60° = √3/2.
		{"rhombus 60", []orb.Point{{0, 0}, {1, 0}, {1.5, s3 / 2}, {0.5, s3 / 2}}, 1.0 / 3, 1, 60, 120, s3 / 2},
		// Unit square: equiangle 0, aspect 1, scaled Jacobian 1.
		{"square", []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}}, 0, 1, 90, 90, 1},
		// 1 × 0.1 rectangle: aspect ratio (1+1)/(0.1+0.1) = 10.
		{"rectangle", []orb.Point{{0, 0}, {1, 0}, {1, 0.1}, {0, 0.1}}, 0, 10, 90, 90, 1},
		// Regular hexagon: all angles 120° = θe, equiangle 0, aspect 1.
		{"hexagon", hexagon(), 0, 1, 120, 120, math.NaN()},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			idx := make([]int32, len(tc.nodes))
			for i := range idx {
				idx[i] = int32(i)
			}
			// Far from the origin as well: the metrics must not lose digits.
			for _, shift := range []float64{0, 1e6} {
				nodes := make([]orb.Point, len(tc.nodes))
				for i, p := range tc.nodes {
					nodes[i] = orb.Point{p[0] + shift, p[1] - shift}
				}
				m := build(t, nodes, [][]int32{idx}, true)
				r := evaluate(t, m)
				tol := 1e-12
				if shift != 0 {
					tol = 1e-9 // coordinates of 1e6 keep ~1e-10 of a unit cell
				}
				check := func(name string, want float64) {
					got := field(t, r, name)[0]
					if math.IsNaN(want) {
						if !math.IsNaN(got) {
							t.Errorf("shift %g: %s = %g, want NaN (not applicable)", shift, name, got)
						}
						return
					}
					if !near(got, want, tol*max(1, math.Abs(want))) {
						t.Errorf("shift %g: %s = %.17g, want %.17g", shift, name, got, want)
					}
				}
				check("equiangle_skewness", tc.equiangle)
				check("aspect_ratio", tc.aspect)
				check("min_angle", tc.minAngle)
				check("max_angle", tc.maxAngle)
				check("scaled_jacobian", tc.sjac)
				if r.Verdict == Fail {
					t.Errorf("shift %g: a good single cell fails: %v", shift, r)
				}
			}
		})
	}
}

func hexagon() []orb.Point {
	var p []orb.Point
	for k := 0; k < 6; k++ {
		a := float64(k) * math.Pi / 3
		p = append(p, orb.Point{math.Cos(a), math.Sin(a)})
	}
	return p
}

// A needle-thin sliver keeps accurate angles: the triangle (0,0), (1,0),
// (0.5, h) has base angles atan(2h) and apex 180° − 2 atan(2h) (elementary
// trigonometry), which atan2 of cross and dot products resolves to full
// relative precision even at h = 1e-9, where acos of the cosine would give
// 0 or an error of order 1e-6°.
func TestSliverAngles(t *testing.T) {
	h := 1e-9
	m := build(t, []orb.Point{{0, 0}, {1, 0}, {0.5, h}}, [][]int32{{0, 1, 2}}, true)
	r := evaluate(t, m)
	want := math.Atan(2*h) * rad2deg
	if got := field(t, r, "min_angle")[0]; math.Abs(got-want) > 1e-12*want {
		t.Errorf("min angle %.17g, want %.17g", got, want)
	}
	if got := field(t, r, "max_angle")[0]; math.Abs(got-(180-2*want)) > 1e-12 {
		t.Errorf("max angle %.17g, want %.17g", got, 180-2*want)
	}
	// Aspect ratio l_max·P/(4√3 A) with A = h/2, P = 1 + 2·√(0.25+h²).
	ar := (1 + 2*math.Sqrt(0.25+h*h)) / (4 * math.Sqrt(3) * h / 2)
	if got := field(t, r, "aspect_ratio")[0]; math.Abs(got-ar) > 1e-9*ar {
		t.Errorf("aspect ratio %g, want %g", got, ar)
	}
}
