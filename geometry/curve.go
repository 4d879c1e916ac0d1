package geometry

import (
	"math"

	"github.com/paulmach/orb"
	"gonum.org/v1/gonum/integrate/quad"
)

// glOrder is the number of Gauss–Legendre points per smooth piece; with
// pieces on which the speed |P′(u)| is smooth (a cubic per spline interval,
// polynomials in u = √(x/c) for a NACA surface) 16 points give arc
// lengths to round-off.
const glOrder = 16

var glX, glW = func() ([]float64, []float64) {
	x, w := make([]float64, glOrder), make([]float64, glOrder)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

// paramCurve is a curve P(u) given with its derivative, smooth on each
// piece [breaks[i], breaks[i+1]]; it measures arc length by Gauss–Legendre
// quadrature and inverts it by a safeguarded Newton iteration.
type paramCurve struct {
	eval   func(u float64) (p, d orb.Point)
	breaks []float64
	cum    []float64 // arc length from breaks[0] to breaks[i]
}

func newParamCurve(eval func(u float64) (p, d orb.Point), breaks []float64) paramCurve {
	c := paramCurve{eval: eval, breaks: breaks, cum: make([]float64, len(breaks))}
	for i := 1; i < len(breaks); i++ {
		c.cum[i] = c.cum[i-1] + c.integral(breaks[i-1], breaks[i])
	}
	return c
}

func (c *paramCurve) speed(u float64) float64 {
	_, d := c.eval(u)
	return math.Hypot(d[0], d[1])
}

// integral returns ∫ₐᵇ |P′(u)| du by glOrder-point Gauss–Legendre.
func (c *paramCurve) integral(a, b float64) float64 {
	h, m := (b-a)/2, (a+b)/2
	s := 0.0
	for k, x := range glX {
		s += glW[k] * c.speed(m+h*x)
	}
	return s * h
}

func (c *paramCurve) length() float64 { return c.cum[len(c.cum)-1] }

// param returns the parameter u at arc-length fraction f.
func (c *paramCurve) param(f float64) float64 {
	n := len(c.breaks)
	if f <= 0 {
		return c.breaks[0]
	}
	if f >= 1 {
		return c.breaks[n-1]
	}
	s := f * c.length()
	lo, hi := 0, n-1
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if c.cum[mid] <= s {
			lo = mid
		} else {
			hi = mid
		}
	}
	a, b := c.breaks[lo], c.breaks[hi]
	target := s - c.cum[lo]
	pieceLen := c.cum[hi] - c.cum[lo]
	if pieceLen <= 0 {
		return a
	}
	ua, ub := a, b // bracket: ℓ(ua) ≤ target ≤ ℓ(ub)
	u := a + (b-a)*target/pieceLen
	tol := 1e-14 * c.length()
	for range 60 {
		g := c.integral(a, u) - target
		if math.Abs(g) <= tol {
			break
		}
		if g < 0 {
			ua = u
		} else {
			ub = u
		}
		next := u - g/c.speed(u)
		if !(next > ua && next < ub) {
			next = ua + (ub-ua)/2
		}
		if next == u {
			break
		}
		u = next
	}
	return u
}
