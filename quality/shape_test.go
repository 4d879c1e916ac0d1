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

// A node on a straight side is not a corner (cellShape, "Straight
// corners"): a unit square with a node at the middle of one side, one with
// a node on each of two sides and one with two nodes on one side are
// measured as the unit square
// (angles 90°, equiangle skewness 0, aspect ratio 1, scaled Jacobian 1:
// the square's values, worked by hand). A node off the side by more than
// the hanging-node tolerance stays a corner: its angle is
// 180° − 2·atan(2d) for a node d off the middle of a unit side (elementary
// trigonometry), graded as the near-180° corner it is.
func TestStraightCorners(t *testing.T) {
	square := func(t *testing.T, nodes []orb.Point) *Report {
		idx := make([]int32, len(nodes))
		for i := range idx {
			idx[i] = int32(i)
		}
		return evaluate(t, build(t, nodes, [][]int32{idx}, true))
	}
	for name, nodes := range map[string][]orb.Point{
		"one side node":   {{0, 0}, {1, 0}, {1, 0.5}, {1, 1}, {0, 1}},
		"two side nodes":  {{0, 0}, {0.5, 0}, {1, 0}, {1, 1}, {0.25, 1}, {0, 1}},
		"two on one side": {{0, 0}, {1, 0}, {1, 0.25}, {1, 0.5}, {1, 1}, {0, 1}},
	} {
		t.Run(name, func(t *testing.T) {
			r := square(t, nodes)
			for metric, want := range map[string]float64{"min_angle": 90, "max_angle": 90, "equiangle_skewness": 0, "aspect_ratio": 1, "scaled_jacobian": 1} {
				if got := field(t, r, metric)[0]; !near(got, want, 1e-12) {
					t.Errorf("%s = %.17g, want %g", metric, got, want)
				}
			}
		})
	}
	t.Run("beside two half squares", func(t *testing.T) {
		// The hanging-node fix itself: the unit square as a pentagon with
		// the node its two half-size neighbours share. Nothing fails.
		nodes := []orb.Point{{0, 0}, {1, 0}, {1, 0.5}, {1, 1}, {0, 1}, {1.5, 0}, {1.5, 0.5}, {1.5, 1}}
		r := evaluate(t, build(t, nodes, [][]int32{{0, 1, 2, 3, 4}, {1, 5, 6, 2}, {2, 6, 7, 3}}, true))
		if r.Verdict == Fail {
			t.Errorf("verdict fail: %v", r)
		}
		if got := field(t, r, "max_angle")[0]; !near(got, 90, 1e-12) {
			t.Errorf("max_angle of the pentagon = %.17g, want 90", got)
		}
	})
	t.Run("off the side", func(t *testing.T) {
		d := 1e-4 // far beyond the hanging-node tolerance of 1e-6
		r := square(t, []orb.Point{{0, 0}, {1, 0}, {1 + d, 0.5}, {1, 1}, {0, 1}})
		want := 180 - 2*math.Atan(2*d)*rad2deg
		if got := field(t, r, "max_angle")[0]; !near(got, want, 1e-9) {
			t.Errorf("max_angle = %.17g, want %.17g", got, want)
		}
		if r.Verdict != Fail {
			t.Errorf("verdict %v, want fail for a %.4f° corner", r.Verdict, want)
		}
	})
	t.Run("quadrilateral keeps its corners", func(t *testing.T) {
		// A four-node cell with a straight corner is a degenerate
		// quadrilateral: scaled Jacobian sin 180° = 0, which fails.
		r := square(t, []orb.Point{{0, 0}, {1, 0}, {2, 0}, {1, 1}})
		if got := field(t, r, "scaled_jacobian")[0]; !near(got, 0, 1e-12) {
			t.Errorf("scaled_jacobian = %g, want 0", got)
		}
		if r.Verdict != Fail {
			t.Errorf("verdict %v, want fail", r.Verdict)
		}
	})
}
