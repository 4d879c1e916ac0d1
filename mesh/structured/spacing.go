package structured

import (
	"fmt"
	"math"
)

// GeometricHeights returns the n layer heights h, h·r, h·r², …, h·rⁿ⁻¹ of a
// geometric distribution with first height h and growth ratio r.
func GeometricHeights(h, r float64, n int) []float64 {
	d := make([]float64, n)
	v := h
	for k := range d {
		d[k] = v
		v *= r
	}
	return d
}

// geometricSum is h (rⁿ − 1)/(r − 1), the distance covered by n geometric
// layers, written so that it is exact at r = 1.
func geometricSum(h, r float64, n int) float64 {
	if math.Abs(r-1) < 1e-12 {
		return h * float64(n)
	}
	return h * math.Expm1(float64(n)*math.Log(r)) / (r - 1)
}

// GrowthFor returns the growth ratio r at which n geometric layers starting
// at height h reach distance D: h (rⁿ − 1)/(r − 1) = D. The sum rises
// monotonically with r, so bisection on [rlo, rhi] bracketing the root
// converges; 200 halvings reach full double precision.
func GrowthFor(h float64, n int, D float64) (float64, error) {
	switch {
	case !(h > 0) || math.IsInf(h, 0):
		return 0, fmt.Errorf("first-cell height %g must be positive", h)
	case n < 1:
		return 0, fmt.Errorf("layer count %d must be at least 1", n)
	case !(D > 0) || math.IsInf(D, 0):
		return 0, fmt.Errorf("outer distance %g must be positive", D)
	case h > D:
		return 0, fmt.Errorf("first-cell height %g is larger than the outer distance %g", h, D)
	}
	if n == 1 {
		if h != D {
			return 0, fmt.Errorf("one layer of height %g cannot reach the outer distance %g", h, D)
		}
		return 1, nil
	}
	lo, hi := 1e-6, 1.0
	for geometricSum(h, hi, n) < D {
		hi *= 2
		if hi > 1e6 {
			return 0, fmt.Errorf("no growth ratio takes %d layers from height %g to distance %g", n, h, D)
		}
	}
	for it := 0; it < 200 && hi-lo > 1e-15*hi; it++ {
		mid := 0.5 * (lo + hi)
		if geometricSum(h, mid, n) < D {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi), nil
}

// LayersFor returns the fewest geometric layers from height h with growth
// r ≥ 1 that reach distance D.
func LayersFor(h, r, D float64) (int, error) {
	switch {
	case !(h > 0) || math.IsInf(h, 0):
		return 0, fmt.Errorf("first-cell height %g must be positive", h)
	case !(r >= 1) || math.IsInf(r, 0):
		return 0, fmt.Errorf("growth ratio %g must be at least 1 when layers are counted from an outer distance", r)
	case !(D > 0) || math.IsInf(D, 0):
		return 0, fmt.Errorf("outer distance %g must be positive", D)
	case h > D:
		return 0, fmt.Errorf("first-cell height %g is larger than the outer distance %g", h, D)
	}
	var n int
	if r == 1 {
		n = int(math.Ceil(D/h - 1e-9))
	} else {
		n = int(math.Ceil(math.Log1p(D*(r-1)/h)/math.Log(r) - 1e-9))
	}
	if n > 1<<24 {
		return 0, fmt.Errorf("reaching distance %g from height %g with growth %g takes %d layers, too many", D, h, r, n)
	}
	return max(n, 1), nil
}
