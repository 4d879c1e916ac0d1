package geometry

import (
	"fmt"
	"math"
)

// Vinokur's stretching functions (M. Vinokur, "On one-dimensional
// stretching functions for finite-difference calculations", J. Comput.
// Phys. 50 (1983) 215–234).
//
// The symmetric two-sided family, with ξ ∈ [0, 1] and parameter Δy, is
//
//	u(ξ) = ½ (1 + tanh(Δy (ξ − ½)) / tanh(Δy/2))   (sinh branch, B > 1)
//	u(ξ) = ½ (1 + tan(Δy (ξ − ½)) / tan(Δy/2))     (sin branch, B < 1, Δy < π)
//
// where Δy solves sinh(Δy)/Δy = B or sin(Δy)/Δy = B, and the asymmetric
// form is s = u / (A + (1 − A) u). The one-sided form is
//
//	s(ξ) = 1 + tanh(Δy (ξ − 1)/2) / tanh(Δy/2)   (and its tan counterpart).
//
// The paper fixes A and B from the end slopes ds/dξ; here the parameters
// are chosen so that the discrete first and last edges, s(1/N) and
// 1 − s(1 − 1/N) with N = n − 1 edges, equal the targets d₀ and d₁ exactly.
// For the two-sided form that has a closed form in A and u₁ = u(1/N): from
// s(1/N) = d₀ and, by the symmetry u(1−ξ) = 1 − u(ξ), 1 − s(1−1/N) =
// A u₁ / (A + (1−A)(1−u₁)) = d₁, one gets
//
//	q = √((1/d₀ − 1)(1/d₁ − 1)),  u₁ = 1/(1 + q),  A = √((1/d₀ − 1)/(1/d₁ − 1)),
//
// and Δy is the root of u(1/N; Δy) = u₁ (found by bisection on the merged
// parameter c: c > 0 is the sinh branch with Δy = c, c < 0 the sin branch
// with Δy = −c, c = 0 the uniform limit). Both identities
// 1 + tanh b / tanh a = sinh(a+b)/(sinh a cosh b) and its tan analogue are
// used to evaluate u without cancellation.

// vinokurU evaluates the symmetric two-sided function u(ξ; c) for ξ ≤ ½
// (and, by u(ξ) = sinh(cξ)/(2 sinh(c/2) cosh(c(ξ−½))), for any ξ) without
// overflow: for c > 0 it is written with exponentials of non-positive
// arguments only.
func vinokurU(xi, c float64) float64 {
	switch {
	case c > 0:
		// sinh(cξ) = e^{cξ}(1−e^{−2cξ})/2, sinh(c/2) = e^{c/2}(1−e^{−c})/2,
		// cosh(c|ξ−½|) = e^{c|ξ−½|}(1+e^{−2c|ξ−½|})/2.
		h := math.Abs(xi - 0.5)
		e := math.Exp(c*xi - c/2 - c*h)
		return e * -math.Expm1(-2*c*xi) / (-math.Expm1(-c) * (1 + math.Exp(-2*c*h)))
	case c < 0:
		d := -c
		return math.Sin(d*xi) / (2 * math.Sin(d/2) * math.Cos(d*(xi-0.5)))
	}
	return xi
}

// vinokurSolve returns the parameter c at which
// u(ξ; c) = target, by bisection: u(ξ; ·) decreases from ½
// (c → −π) to 0 (c → ∞) for 0 < ξ < ½.
func vinokurSolve(xi, target float64) (float64, error) {
	if !(target > 0 && target < 0.5) {
		return 0, fmt.Errorf("no Vinokur stretching gives an end value %g at ξ = %g: %w", target, xi, ErrSpacing)
	}
	g := func(c float64) float64 { return vinokurU(xi, c) - target }
	hi := 1.0
	for g(hi) > 0 {
		hi *= 2
		if hi > 1e9 {
			return 0, fmt.Errorf("end spacing fraction %g is too small to reach: %w", target, ErrSpacing)
		}
	}
	lo := -math.Pi * (1 - 1e-15)
	if g(lo) < 0 {
		return 0, fmt.Errorf("end value %g at ξ = %g needs more clustering towards the middle than the sin branch allows: %w", target, xi, ErrSpacing)
	}
	return bisect(g, lo, hi), nil
}

// VinokurTwoSided returns n arc-length fractions (ends 0 and 1 included)
// by Vinokur's two-sided stretching, with the first edge d0 and the last
// edge d1 (both fractions of the length) met exactly up to rounding of the
// node positions. It needs n ≥ 4, d0 + d1 < 1, and end spacings that the
// sin branch can still reach: (1/d₀ − 1)(1/d₁ − 1) > 1, which holds
// whenever d0 + d1 < 1.
//
// Accuracy: the first edge is met to a few units of round-off relative to
// d0 however small; the last edge, 1 − f[n−2], can be no closer to d1 than
// the float spacing of numbers near 1 (1.1e-16 absolute), so it is exact
// to 1e-12 relative for d1 ≥ 1e-4 (clustering at the end of a segment as
// finely as that is best asked of the reversed law from the other end).
func VinokurTwoSided(n int, d0, d1 float64) ([]float64, error) {
	if n < 4 {
		return nil, fmt.Errorf("two-sided clustering needs at least 4 nodes (with 3 the middle node fixes both end edges), got %d: %w", n, ErrSpacing)
	}
	if !(d0 > 0 && d1 > 0 && d0+d1 < 1) {
		return nil, fmt.Errorf("end spacing fractions %g and %g must be positive with a sum below 1: %w", d0, d1, ErrSpacing)
	}
	N := float64(n - 1)
	a0, a1 := 1/d0-1, 1/d1-1
	q := math.Sqrt(a0 * a1)
	u1 := 1 / (1 + q)
	A := math.Sqrt(a0 / a1)
	c, err := vinokurSolve(1/N, u1)
	if err != nil {
		return nil, err
	}
	f := make([]float64, n)
	f[n-1] = 1
	for i := 1; i < n-1; i++ {
		xi := float64(i) / N
		if 2*i <= n-1 {
			u := vinokurU(xi, c)
			f[i] = u / (A + (1-A)*u)
		} else {
			// 1 − s = A w / (A + (1−A)(1−w)) with w = 1 − u = u(1−ξ).
			w := vinokurU(float64(n-1-i)/N, c)
			f[i] = 1 - A*w/(A+(1-A)*(1-w))
		}
	}
	return f, checkIncreasing(f)
}

// VinokurOneSided returns n arc-length fractions by Vinokur's one-sided
// stretching with the first edge d0 (a fraction of the length, 0 < d0 < 1)
// met exactly; s(ξ) = 1 + tanh(Δy(ξ−1)/2)/tanh(Δy/2) equals 2·u(ξ/2) of the
// two-sided family, so the same parameter search serves both.
func VinokurOneSided(n int, d0 float64) ([]float64, error) {
	if n < 3 {
		return nil, fmt.Errorf("one-sided clustering needs at least 3 nodes, got %d: %w", n, ErrSpacing)
	}
	if !(d0 > 0 && d0 < 1) {
		return nil, fmt.Errorf("first spacing fraction %g must lie strictly between 0 and 1: %w", d0, ErrSpacing)
	}
	N := float64(n - 1)
	c, err := vinokurSolve(0.5/N, d0/2)
	if err != nil {
		return nil, err
	}
	f := make([]float64, n)
	f[n-1] = 1
	for i := 1; i < n-1; i++ {
		f[i] = 2 * vinokurU(float64(i)/(2*N), c)
	}
	return f, checkIncreasing(f)
}

func checkIncreasing(f []float64) error {
	for i := 1; i < len(f); i++ {
		if !(f[i] > f[i-1]) {
			return fmt.Errorf("nodes %d and %d coincide at fraction %g (spacing too small for float precision): %w", i-1, i, f[i], ErrSpacing)
		}
	}
	return nil
}
