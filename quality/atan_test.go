package quality

import (
	"math"
	"math/rand/v2"
	"testing"
)

// atan2 must give the standard library's math.Atan2 bit for bit (the
// reference here is Go's own math package), over random operands of every
// sign and of magnitudes from subnormal to near overflow, over ratios
// close to the reduction boundaries 0.66 and tan(3π/8), and over the
// special cases.
func TestAtan2MatchesLibrary(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	check := func(y, x float64) {
		if got, want := atan2(y, x), math.Atan2(y, x); math.Float64bits(got) != math.Float64bits(want) && !(got != got && want != want) {
			t.Fatalf("atan2(%v, %v) = %v, math.Atan2 gives %v", y, x, got, want)
		}
	}
	special := []float64{0, math.Copysign(0, -1), 1, -1, math.Inf(1), math.Inf(-1), math.NaN(),
		math.SmallestNonzeroFloat64, -math.SmallestNonzeroFloat64, math.MaxFloat64, -math.MaxFloat64}
	for _, y := range special {
		for _, x := range special {
			check(y, x)
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
		case 2: // ratios near the reduction boundaries
			b := []float64{0.66, 2.41421356237309504880, 1}[rng.IntN(3)]
			x = 2*rng.Float64() - 1
			y = x * b * (1 + (2*rng.Float64()-1)*1e-12)
		default: // moderate exponents
			y = math.Ldexp(2*rng.Float64()-1, rng.IntN(80)-40)
			x = math.Ldexp(2*rng.Float64()-1, rng.IntN(80)-40)
		}
		check(y, x)
	}
}
