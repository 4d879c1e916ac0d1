package quality

import "math"

// atan2 returns math.Atan2(y, x), bit for bit, for finite non-zero y and x,
// and defers to math.Atan2 otherwise. It is the standard library's
// algorithm (Cephes: reduction of |y/x| to [0, 0.66] and a rational
// approximation there; Moshier, Methods and Programs for Mathematical
// Functions, 1989) written so that it inlines and chooses its reduction
// by selecting operands rather than by branching: the angles of a mesh
// fall on both sides of the reduction boundaries at random, and the
// mispredicted branches cost more than the arithmetic. Every operation
// and its order are those of the library, so the result is the same
// float64; TestAtan2MatchesLibrary checks it.
func atan2(y, x float64) float64 {
	if y-y != 0 || x-x != 0 || y == 0 || x == 0 {
		return math.Atan2(y, x) // NaN, ±Inf or a zero: the library's special cases
	}
	return atan2Finite(y, x)
}

// atan2Finite is atan2 for finite non-zero y and x.
func atan2Finite(y, x float64) float64 {
	const (
		morebits = 6.123233995736765886130e-17 // π/2 = PIO2 + morebits
		tan3pio8 = 2.41421356237309504880      // tan(3π/8)
	)
	r := y / x
	if r == 0 {
		return math.Atan2(y, x) // y/x underflows: the library keeps the sign of zero
	}
	a := math.Abs(r)
	// satan: a ≤ 0.66 → xatan(a); a > tan(3π/8) → π/2 − xatan(1/a) +
	// morebits; otherwise π/4 + xatan((a−1)/(a+1)) + morebits/2. Each is
	// (base + sign·xatan(num/den)) + extra, with num/den = a/1 = a exactly
	// in the first case and base + xatan = xatan, xatan + 0 = xatan there.
	num, den, base, sign, extra := a, 1.0, 0.0, 1.0, 0.0
	if a > 0.66 {
		num, den, base, extra = a-1, a+1, math.Pi/4, 0.5*morebits
	}
	if a > tan3pio8 {
		num, den, base, sign, extra = 1, a, math.Pi/2, -1, morebits
	}
	q := (base + sign*xatan(num/den)) + extra
	if r < 0 {
		q = -q
	}
	if x < 0 {
		if q <= 0 {
			return q + math.Pi
		}
		return q - math.Pi
	}
	return q
}

// xatan is the rational approximation of atan on [0, 0.66], as in the
// standard library's math package.
func xatan(x float64) float64 {
	const (
		P0 = -8.750608600031904122785e-01
		P1 = -1.615753718733365076637e+01
		P2 = -7.500855792314704667340e+01
		P3 = -1.228866684490136173410e+02
		P4 = -6.485021904942025371773e+01
		Q0 = +2.485846490142306297962e+01
		Q1 = +1.650270098316988542046e+02
		Q2 = +4.328810604912902668951e+02
		Q3 = +4.853903996359136964868e+02
		Q4 = +1.945506571482613964425e+02
	)
	z := x * x
	z = z * ((((P0*z+P1)*z+P2)*z+P3)*z + P4) / (((((z+Q0)*z+Q1)*z+Q2)*z+Q3)*z + Q4)
	return x*z + x
}
