package quality

import "math"

// atan2 returns math.Atan2(y, x), bit for bit, for finite non-zero y and x,
// and defers to math.Atan2 otherwise. It is the standard library's
// algorithm (Cephes: reduction of |y/x| to [0, 0.66] and a rational
// approximation there; Moshier, Methods and Programs for Mathematical
// Functions, 1989) written without data-dependent branches: the angles of
// a mesh fall on both sides of the reduction boundaries at random, and the
// mispredicted branches cost more than the arithmetic. The reduction is
// chosen by an index into small tables and applied as exact operations
// (products with 0 and 1, sums with 0), so every rounding is the
// library's and the result is the same float64; TestAtan2MatchesLibrary
// checks it.
func atan2(y, x float64) float64 {
	if y-y != 0 || x-x != 0 || y == 0 || x == 0 {
		return math.Atan2(y, x) // NaN, ±Inf or a zero: the library's special cases
	}
	r := y / x
	if r == 0 || r-r != 0 {
		return math.Atan2(y, x) // y/x underflows or overflows
	}
	a := math.Abs(r)
	// The library's satan(a): a ≤ 0.66 → xatan(a); a ≤ tan(3π/8) →
	// π/4 + xatan((a−1)/(a+1)) + morebits/2; else π/2 − xatan(1/a) +
	// morebits. Case k is (base + sign·xatan(num/den)) + extra with
	// num = numA·a + numC and den = denA·a + denC, all exact here.
	t := &reductions[b2i(a > 0.66)+b2i(a > tan3pio8)]
	q := (t.base + t.sign*xatan((t.numA*a+t.numC)/(t.denA*a+t.denC))) + t.extra
	q = math.Copysign(q, r) // atan(r) = −atan(−r)
	// x < 0: atan2 = q + π for q ≤ 0, q − π for q > 0, i.e. q − π·sign(q).
	return q - math.Copysign(math.Pi, q)*float64(b2i(x < 0))
}

// b2i is 1 for true and 0 for false; the compiler makes it a flag set, not
// a branch.
func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

// morebits and tan3pio8 are the library's constants: π/2 = PIO2 +
// morebits, and tan(3π/8).
const (
	morebits = 6.123233995736765886130e-17
	tan3pio8 = 2.41421356237309504880
)

// reduction is one branch of the argument reduction of atan2.
type reduction struct {
	numA, numC, denA, denC float64
	base, sign, extra      float64
}

var reductions = [3]reduction{
	{1, 0, 0, 1, 0, 1, 0},                         // a/1 = a, 0 + x = x, x + 0 = x
	{1, -1, 1, 1, math.Pi / 4, 1, 0.5 * morebits}, // (a−1)/(a+1)
	{0, 1, 1, 0, math.Pi / 2, -1, morebits},       // 1/a
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
