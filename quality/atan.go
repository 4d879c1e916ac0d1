package quality

import "math"

// atan2 returns the angle of the point (x, y), as math.Atan2(y, x) does,
// within 2 units in the last place of the exact angle, about as accurate as
// the library (TestAtan2NearExact, TestAtan2NearLibrary), but with one
// division instead of three and without data-dependent branches: the
// angles of a mesh fall on both sides of every reduction boundary at
// random, and divisions and mispredicted branches are what an angle costs
// in the cell sweep (a third less time per angle than the branch-free form
// of the library's algorithm used before). NaN, ±Inf and zero operands,
// and ratios that underflow, go to math.Atan2.
//
// With a = |y| and b = |x|, t = min(a, b)/max(a, b) lies in (0, 1] and
// atan t is the Taylor polynomial of degree 7 about the centre c_k of the
// k-th of atanIntervals equal intervals of [0, 1]; the coefficients are
//
//	a_0 = atan c,  a_n = (−1)^(n−1) sin^n(θ) sin(nθ) / n,  θ = arccot c,
//
// from d^n/dx^n atan x = (−1)^(n−1) (n−1)! sin^n θ sin nθ (a classical
// result, from memory; TestAtanTaylorCoefficients checks it against the
// derivatives written out). With |t − c| ≤ 1/256
// the truncation error is below (1/256)^8/8 ≈ 7e-21. The first interval is
// centred on 0, where the series is t − t³/3 + t⁵/5 − t⁷/7 and the error
// relative to atan t is below (1/128)^8/9. The quadrant follows by
// atan2 = π/2 − atan t when a > b, π − that when x < 0, and the sign of y;
// the constant term of each interval is kept already turned into each
// quadrant, so the result is rounded once after it.
func atan2(y, x float64) float64 {
	a, b := math.Abs(y), math.Abs(x)
	t := min(a, b) / max(a, b)
	if !(t > 0) {
		// A NaN, ±Inf or zero operand (t is NaN or 0), or a ratio that
		// underflows: the library's special cases.
		return math.Atan2(y, x)
	}
	k := min(int(t*atanIntervals), atanIntervals-1)
	u := t - atanCentre[k]
	c := &atanTaylor[k]
	// The terms after a_0 by Estrin's scheme (nested pairs, so that the
	// products do not wait on each other in one long chain); they are at
	// most 1/128, so adding them to the quadrant's base last rounds once.
	u2 := u * u
	tail := (c[1]*u + u2*(c[2]+c[3]*u)) + u2*u2*((c[4]+c[5]*u)+u2*(c[6]+c[7]*u))
	q := b2i(a > b) + 2*b2i(x < 0)
	return math.Copysign(atanBase[k][q]+atanTailSign[q]*tail, y)
}

// atanIntervals is the number of Taylor intervals on [0, 1].
const atanIntervals = 128

// atanCentre and atanTaylor hold the centre and the Taylor coefficients of
// atan on each interval (see atan2; a_0 is not used there), and atanBase
// the angle a_0 turns into in each quadrant q = (|y| > |x|) + 2·(x < 0):
// atan c, π/2 − atan c, π − atan c and π/2 + atan c, each taken from
// math.Atan2 so that it is rounded once. atanTailSign is the sign the rest
// of the series takes in each quadrant.
var (
	atanCentre   [atanIntervals]float64
	atanTaylor   [atanIntervals][8]float64
	atanBase     [atanIntervals][4]float64
	atanTailSign = [4]float64{1, -1, -1, 1}
)

func init() {
	for k := range atanIntervals {
		c := 0.0 // the first interval is centred on 0
		if k > 0 {
			c = (float64(k) + 0.5) / atanIntervals
		}
		atanCentre[k] = c
		atanTaylor[k] = atanCoefficients(c)
		atanBase[k] = [4]float64{math.Atan2(c, 1), math.Atan2(1, c), math.Atan2(c, -1), math.Atan2(1, -c)}
	}
}

// atanCoefficients returns the Taylor coefficients a_0 … a_7 of atan about
// c (see atan2).
func atanCoefficients(c float64) [8]float64 {
	if c == 0 {
		return [8]float64{0, 1, 0, -1.0 / 3, 0, 1.0 / 5, 0, -1.0 / 7}
	}
	theta := math.Atan2(1, c) // arccot c
	s := math.Sin(theta)
	out := [8]float64{math.Atan(c)}
	sn, sign := 1.0, 1.0
	for n := 1; n < 8; n++ {
		sn *= s
		out[n] = sign * sn * math.Sin(float64(n)*theta) / float64(n)
		sign = -sign
	}
	return out
}

// b2i is 1 for true and 0 for false; the compiler makes it a flag set, not
// a branch.
func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}
