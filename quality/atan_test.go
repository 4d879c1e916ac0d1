package quality

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// atan2 must stay within 3 units in the last place of the standard
// library's math.Atan2 (the reference here is Go's own math package; each
// is within about 1.5 units of the exact angle, see TestAtan2NearExact), over random operands of every
// sign and of magnitudes from subnormal to near overflow, over ratios close
// to the interval boundaries of the table and to 1, and give exactly the
// library's result in the special cases.
func TestAtan2NearLibrary(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	worst := 0.0
	check := func(y, x float64) {
		got, want := atan2(y, x), math.Atan2(y, x)
		if got != got && want != want || got == want {
			return
		}
		ulp := math.Abs(math.Nextafter(want, math.Inf(1)) - want)
		if e := math.Abs(got-want) / ulp; e > worst {
			worst = e
			if e > 3 || got != got {
				t.Fatalf("atan2(%v, %v) = %v, math.Atan2 gives %v: %.1f units apart", y, x, got, want, e)
			}
		}
	}
	special := []float64{0, math.Copysign(0, -1), 1, -1, math.Inf(1), math.Inf(-1), math.NaN(),
		math.SmallestNonzeroFloat64, -math.SmallestNonzeroFloat64, math.MaxFloat64, -math.MaxFloat64}
	for _, y := range special {
		for _, x := range special {
			if got, want := atan2(y, x), math.Atan2(y, x); math.Float64bits(got) != math.Float64bits(want) && !(got != got && want != want) {
				t.Fatalf("atan2(%v, %v) = %v, math.Atan2 gives %v", y, x, got, want)
			}
		}
	}
	for i := 0; i < 2_000_000; i++ {
		var y, x float64
		switch i % 4 {
		case 0: // uniform in the unit square, both signs
			y, x = 2*rng.Float64()-1, 2*rng.Float64()-1
		case 1: // any magnitude
			y = math.Float64frombits(rng.Uint64()) // may be NaN or Inf
			x = math.Float64frombits(rng.Uint64())
		case 2: // ratios near the interval boundaries k/128 and 1, either way up
			b := float64(1+rng.IntN(atanIntervals)) / atanIntervals
			x = 2*rng.Float64() - 1
			y = x * b * (1 + (2*rng.Float64()-1)*1e-12)
			if rng.IntN(2) == 0 {
				x, y = y, x
			}
		default: // moderate exponents
			y = math.Ldexp(2*rng.Float64()-1, rng.IntN(80)-40)
			x = math.Ldexp(2*rng.Float64()-1, rng.IntN(80)-40)
		}
		check(y, x)
	}
	t.Logf("largest difference from math.Atan2: %.2f units in the last place", worst)
}

// TestAtanTaylorCoefficients checks the closed form of the Taylor
// coefficients of atan against the first derivatives written out by hand:
// atan′ = 1/(1+c²), atan″ = −2c/(1+c²)², atan‴ = (6c² − 2)/(1+c²)³, with
// a_n = atan⁽ⁿ⁾(c)/n!.
func TestAtanTaylorCoefficients(t *testing.T) {
	for _, c := range []float64{0.01, 0.3, 0.5, 0.77, 0.99} {
		a := atanCoefficients(c)
		w := 1 + c*c
		want := [4]float64{math.Atan(c), 1 / w, -2 * c / (w * w) / 2, (6*c*c - 2) / (w * w * w) / 6}
		for n, x := range want {
			if math.Abs(a[n]-x) > 1e-15*math.Max(1, math.Abs(x)) {
				t.Errorf("c = %g: a_%d = %.17g, want %.17g", c, n, a[n], x)
			}
		}
	}
}

// TestAtan2NearExact compares atan2 with the angle computed to 160 bits
// by math/big (Go's arbitrary-precision package): argument halving
// atan t = 2 atan(t / (1 + √(1 + t²))) down to t < 1/16, then the series
// t − t³/3 + t⁵/5 − …, and π = 16 atan(1/5) − 4 atan(1/239) (Machin's
// formula). atan2 must be within 2 units in the last place of the exact
// angle (1.54 measured; math.Atan2 reaches 1.33 on the same operands), over
// random operands with ratios across (0, ∞) in every quadrant.
func TestAtan2NearExact(t *testing.T) {
	const prec = 160
	newF := func(x float64) *big.Float { return new(big.Float).SetPrec(prec).SetFloat64(x) }
	var atan func(x *big.Float) *big.Float // for 0 ≤ x ≤ 1
	atan = func(x *big.Float) *big.Float {
		if x.Cmp(newF(1.0/16)) > 0 {
			w := new(big.Float).SetPrec(prec).Mul(x, x)
			w.Add(w, newF(1)).Sqrt(w).Add(w, newF(1))
			h := atan(new(big.Float).SetPrec(prec).Quo(x, w))
			return h.Add(h, h)
		}
		sum, term := new(big.Float).SetPrec(prec).Set(x), new(big.Float).SetPrec(prec).Set(x)
		x2 := new(big.Float).SetPrec(prec).Mul(x, x)
		for n := 3; n < 200; n += 2 {
			term.Mul(term, x2).Neg(term)
			d := new(big.Float).SetPrec(prec).Quo(term, newF(float64(n)))
			sum.Add(sum, d)
			if d.Sign() == 0 || d.MantExp(nil)-sum.MantExp(nil) < -prec {
				break
			}
		}
		return sum
	}
	pi := atan(new(big.Float).SetPrec(prec).Quo(newF(1), newF(5)))
	pi.Mul(pi, newF(16))
	p2 := atan(new(big.Float).SetPrec(prec).Quo(newF(1), newF(239)))
	pi.Sub(pi, p2.Mul(p2, newF(4)))
	exact := func(y, x float64) *big.Float {
		a, b := math.Abs(y), math.Abs(x)
		var r *big.Float
		if a <= b {
			r = atan(new(big.Float).SetPrec(prec).Quo(newF(a), newF(b)))
		} else {
			r = atan(new(big.Float).SetPrec(prec).Quo(newF(b), newF(a)))
			r.Sub(new(big.Float).SetPrec(prec).Quo(pi, newF(2)), r)
		}
		if x < 0 {
			r.Sub(pi, r)
		}
		if y < 0 {
			r.Neg(r)
		}
		return r
	}
	if got, _ := pi.Float64(); got != math.Pi {
		t.Fatalf("reference π = %v", got)
	}
	rng := rand.New(rand.NewPCG(3, 5))
	worst, libWorst := 0.0, 0.0
	for i := 0; i < 20000; i++ {
		y := math.Ldexp(2*rng.Float64()-1, rng.IntN(20)-10)
		x := math.Ldexp(2*rng.Float64()-1, rng.IntN(20)-10)
		got := atan2(y, x)
		ulp := math.Abs(math.Nextafter(got, math.Inf(1)) - got)
		ex := exact(y, x)
		d, _ := new(big.Float).SetPrec(prec).Sub(newF(got), ex).Float64()
		dl, _ := new(big.Float).SetPrec(prec).Sub(newF(math.Atan2(y, x)), ex).Float64()
		libWorst = max(libWorst, math.Abs(dl)/ulp)
		if e := math.Abs(d) / ulp; e > worst {
			worst = e
			if e > 2 {
				t.Fatalf("atan2(%v, %v) = %v is %.2f units from the exact angle", y, x, got, e)
			}
		}
	}
	t.Logf("largest error: %.2f units in the last place (math.Atan2: %.2f)", worst, libWorst)
}
