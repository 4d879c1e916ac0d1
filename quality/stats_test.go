package quality

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestOrderedKey checks that orderedKey sorts like the floats (IEEE 754
// total order of the non-NaN values, −0 below +0) and that fromOrderedKey
// inverts it.
func TestOrderedKey(t *testing.T) {
	vals := []float64{math.Inf(-1), -math.MaxFloat64, -1, -math.SmallestNonzeroFloat64, math.Copysign(0, -1), 0,
		math.SmallestNonzeroFloat64, 1e-300, 0.5, 1, math.Nextafter(1, 2), 3, math.MaxFloat64, math.Inf(1)}
	for i, x := range vals {
		if got := fromOrderedKey(orderedKey(x)); math.Float64bits(got) != math.Float64bits(x) {
			t.Errorf("round trip of %g gave %g", x, got)
		}
		if i > 0 && !(orderedKey(vals[i-1]) < orderedKey(x)) {
			t.Errorf("key of %g is not below the key of %g", vals[i-1], x)
		}
	}
}

// TestScanMatchesDirectStatistics scans values with NaN, infinities,
// negatives and signed zeros, in pieces of random length as the cell pass
// does, and compares the summary with statistics taken directly: extremes
// from the sorted non-NaN values, sums in index order, and the graded
// counts and worst list by a plain comparison of every value. Each trial
// takes a higher-is-worse or a lower-is-worse metric, and a bound that
// grades many values or one that grades almost none (only the infinities),
// so that both loops of scan that look for graded and worst values run.
func TestScanMatchesDirectStatistics(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 7))
	for trial := 0; trial < 400; trial++ {
		d, b := &metricDefs[mAspect], Bound{Warn: 0.8, Fail: 0.95}
		if trial%2 == 1 {
			d, b = &metricDefs[mMinAngle], Bound{Warn: -0.8, Fail: -0.95}
		}
		if trial%4 >= 2 {
			b.Warn, b.Fail = 1e3*b.Warn, 1e3*b.Fail
		}
		n := 1 + rng.IntN(2000)
		v := make([]float64, n)
		for i := range v {
			switch r := rng.IntN(40); {
			case r == 0 && trial%3 == 0:
				v[i] = math.NaN()
			case r == 1 && trial%5 == 0, r == 1 && trial%11 == 0:
				v[i] = math.Inf(1)
			case r == 2 && trial%11 == 0:
				v[i] = math.Inf(-1) // with +Inf, a NaN sum of non-NaN values
			case r == 3:
				v[i] = math.Copysign(0, -1)
			default:
				v[i] = rng.Float64()*2 - 1
			}
		}
		if trial%7 == 0 {
			v[0] = math.NaN() // a piece that starts with NaN
		}
		var p partial
		p.start()
		status := make([]Status, n)
		for lo := 0; lo < n; {
			hi := min(n, lo+1+rng.IntN(300))
			p.scan(d, b, 5, v[lo:hi], lo, status)
			lo = hi
		}
		var finite []float64
		sum, sumsq := 0.0, 0.0
		warned, failed := 0, 0
		for i, x := range v {
			if x != x {
				continue
			}
			finite = append(finite, x)
			sum += x
			sumsq += x * x
			want, y, sign := Pass, x, 1.0
			if d.lower {
				y, sign = -x, -1
			}
			switch {
			case y > sign*b.Fail:
				want, failed = Fail, failed+1
			case y > sign*b.Warn:
				want, warned = Warn, warned+1
			}
			if status[i] != want {
				t.Fatalf("trial %d: value %g at %d graded %v, want %v", trial, x, i, status[i], want)
			}
		}
		slices.Sort(finite)
		if p.count != len(finite) || p.warned != warned || p.failed != failed {
			t.Fatalf("trial %d: count %d warned %d failed %d, want %d %d %d", trial, p.count, p.warned, p.failed, len(finite), warned, failed)
		}
		if len(finite) == 0 {
			continue
		}
		if p.min != finite[0] || p.max != finite[len(finite)-1] {
			t.Fatalf("trial %d: extremes %g %g, want %g %g", trial, p.min, p.max, finite[0], finite[len(finite)-1])
		}
		if !same(p.sum, sum) || !same(p.sumsq, sumsq) {
			t.Fatalf("trial %d: sums %g %g, want %g %g", trial, p.sum, p.sumsq, sum, sumsq)
		}
		top := slices.Clone(finite)
		if !d.lower {
			slices.Reverse(top)
		}
		for i, w := range p.worst {
			if float64(w.Value) != top[i] || v[w.Index] != top[i] {
				t.Fatalf("trial %d: worst[%d] = %v, want value %g", trial, i, w, top[i])
			}
		}
		if len(p.worst) != min(5, len(finite)) {
			t.Fatalf("trial %d: %d worst entries", trial, len(p.worst))
		}
	}
}

// same reports whether a and b are equal, NaN equal to NaN.
func same(a, b float64) bool { return a == b || (a != a && b != b) }
