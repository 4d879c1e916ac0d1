package geometry

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// Spline is an interpolating cubic spline through its points, x(t) and
// y(t) each a C² piecewise cubic in the chord-length parameter t
// (t₀ = 0, tᵢ₊₁ = tᵢ + |Pᵢ₊₁ − Pᵢ|). End conditions: natural (zero second
// derivative at both ends) for an open spline; periodic (first and second
// derivatives continuous through the joint) when the first and last points
// are equal, so a closed spline is smooth all round. Equal means within
// ClosureTolerance × the diagonal of the points' bounding box, as loops
// close: points computed from angles (the point at 360° of an ellipse,
// off the one at 0° by round-off) close the spline, and the last point is
// moved onto the first. Formulas: the
// second-derivative form of the cubic spline, e.g. de Boor, A Practical
// Guide to Splines (1978), ch. IV; the same end conditions as
// scipy.interpolate.CubicSpline's "natural" and "periodic".
type Spline struct {
	pts    []orb.Point
	t      []float64  // knots
	mx, my []float64  // second derivatives d²x/dt², d²y/dt² at the knots
	curve  paramCurve // arc-length measure of the spline
	attr   Attr
}

// NewSpline returns the cubic spline through pts (at least two points; at
// least three distinct ones when closed; no two consecutive ones equal).
// The slice is copied; a last point within the closure tolerance of the
// first is replaced by the first (see Spline).
func NewSpline(pts []orb.Point, a Attr) (*Spline, error) {
	n := len(pts)
	if n < 2 {
		return nil, fmt.Errorf("spline has %d points, needs at least 2: %w", n, ErrSegment)
	}
	s := &Spline{pts: append([]orb.Point(nil), pts...), t: make([]float64, n), attr: a}
	bound := orb.Bound{Min: s.pts[0], Max: s.pts[0]}
	for i, p := range s.pts {
		if !finite(p) {
			return nil, checkPoint(fmt.Sprintf("spline point %d", i), p)
		}
		bound = bound.Extend(p)
	}
	first, last := s.pts[0], s.pts[n-1]
	if math.Hypot(last[0]-first[0], last[1]-first[1]) <= ClosureTolerance*math.Hypot(bound.Max[0]-bound.Min[0], bound.Max[1]-bound.Min[1]) {
		s.pts[n-1] = first
	}
	for i, p := range s.pts {
		if i > 0 {
			q := s.pts[i-1]
			h := math.Hypot(p[0]-q[0], p[1]-q[1])
			if h == 0 {
				return nil, fmt.Errorf("spline points %d and %d are both (%g, %g): zero-length interval: %w", i-1, i, p[0], p[1], ErrZeroLength)
			}
			s.t[i] = s.t[i-1] + h
		}
	}
	x, y := make([]float64, n), make([]float64, n)
	for i, p := range s.pts {
		x[i], y[i] = p[0], p[1]
	}
	if s.Closed() {
		if n < 4 {
			return nil, fmt.Errorf("closed spline has %d distinct points, needs at least 3: %w", n-1, ErrSegment)
		}
		s.mx, s.my = periodicSecondDerivs(s.t, x), periodicSecondDerivs(s.t, y)
	} else {
		s.mx, s.my = naturalSecondDerivs(s.t, x), naturalSecondDerivs(s.t, y)
	}
	breaks := make([]float64, 0, 2*n-1)
	for i := range n {
		if i > 0 {
			breaks = append(breaks, (s.t[i-1]+s.t[i])/2)
		}
		breaks = append(breaks, s.t[i])
	}
	s.curve = newParamCurve(s.eval, breaks)
	return s, nil
}

// Closed reports whether the first and last points are equal, after the
// snap of NewSpline (a periodic spline, a whole loop by itself).
func (s *Spline) Closed() bool { return s.pts[0] == s.pts[len(s.pts)-1] }

// naturalSecondDerivs solves the tridiagonal system for the second derivatives
// M of a natural spline through (t, y):
// hᵢ₋₁Mᵢ₋₁ + 2(hᵢ₋₁+hᵢ)Mᵢ + hᵢMᵢ₊₁ = 6((yᵢ₊₁−yᵢ)/hᵢ − (yᵢ−yᵢ₋₁)/hᵢ₋₁),
// M₀ = Mₙ₋₁ = 0, by the Thomas algorithm.
func naturalSecondDerivs(t, y []float64) []float64 {
	n := len(t)
	m := make([]float64, n)
	if n < 3 {
		return m
	}
	k := n - 2 // unknowns M₁ … Mₙ₋₂
	diag, rhs := make([]float64, k), make([]float64, k)
	for j := range k {
		i := j + 1
		h0, h1 := t[i]-t[i-1], t[i+1]-t[i]
		diag[j] = 2 * (h0 + h1)
		rhs[j] = 6 * ((y[i+1]-y[i])/h1 - (y[i]-y[i-1])/h0)
	}
	for j := 1; j < k; j++ {
		sub := t[j+1] - t[j] // h between knots j and j+1 couples unknowns j−1 and j
		w := sub / diag[j-1]
		diag[j] -= w * sub
		rhs[j] -= w * rhs[j-1]
	}
	m[k] = rhs[k-1] / diag[k-1]
	for j := k - 2; j >= 0; j-- {
		m[j+1] = (rhs[j] - (t[j+2]-t[j+1])*m[j+2]) / diag[j]
	}
	return m
}

// periodicSecondDerivs solves the tridiagonal system with two corner
// entries of a periodic spline (y[n−1] = y[0], M[n−1] = M[0]) by
// tridiagonal elimination and back substitution, with a rank-one
// correction for the corner entries (the matrix inversion lemma; common
// practice for periodic tridiagonal systems).
func periodicSecondDerivs(t, y []float64) []float64 {
	n := len(t) - 1 // unknowns M₀ … Mₙ₋₁, the last knot repeating the first
	h := func(i int) float64 { i = ((i % n) + n) % n; return t[i+1] - t[i] }
	yv := func(i int) float64 { return y[((i%n)+n)%n] }
	a, b, c, r := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range n {
		h0, h1 := h(i-1), h(i)
		a[i], b[i], c[i] = h0, 2*(h0+h1), h1
		r[i] = 6 * ((yv(i+1)-yv(i))/h1 - (yv(i)-yv(i-1))/h0)
	}
	alpha, beta := c[n-1], a[0] // corner entries
	gamma := -b[0]
	bb := append([]float64(nil), b...)
	bb[0] = b[0] - gamma
	bb[n-1] = b[n-1] - alpha*beta/gamma
	x := thomas(a, bb, c, r)
	u := make([]float64, n)
	u[0], u[n-1] = gamma, alpha
	z := thomas(a, bb, c, u)
	fact := (x[0] + beta*x[n-1]/gamma) / (1 + z[0] + beta*z[n-1]/gamma)
	m := make([]float64, n+1)
	for i := range n {
		m[i] = x[i] - fact*z[i]
	}
	m[n] = m[0]
	return m
}

// thomas solves the tridiagonal system a[i]x[i−1] + b[i]x[i] + c[i]x[i+1]
// = r[i] (a[0] and c[n−1] ignored).
func thomas(a, b, c, r []float64) []float64 {
	n := len(b)
	cp, x := make([]float64, n), make([]float64, n)
	beta := b[0]
	x[0] = r[0] / beta
	for i := 1; i < n; i++ {
		cp[i] = c[i-1] / beta
		beta = b[i] - a[i]*cp[i]
		x[i] = (r[i] - a[i]*x[i-1]) / beta
	}
	for i := n - 2; i >= 0; i-- {
		x[i] -= cp[i+1] * x[i+1]
	}
	return x
}

// eval returns the spline point and its derivative at parameter u:
// with A = (tᵢ₊₁−u)/h, B = (u−tᵢ)/h,
// y = A yᵢ + B yᵢ₊₁ + ((A³−A)Mᵢ + (B³−B)Mᵢ₊₁) h²/6,
// y′ = (yᵢ₊₁−yᵢ)/h − (3A²−1)h Mᵢ/6 + (3B²−1)h Mᵢ₊₁/6.
func (s *Spline) eval(u float64) (p, d orb.Point) {
	n := len(s.t)
	lo, hi := 0, n-1
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if s.t[mid] <= u {
			lo = mid
		} else {
			hi = mid
		}
	}
	h := s.t[hi] - s.t[lo]
	A, B := (s.t[hi]-u)/h, (u-s.t[lo])/h
	coord := func(v0, v1, m0, m1 float64) (float64, float64) {
		return A*v0 + B*v1 + ((A*A*A-A)*m0+(B*B*B-B)*m1)*h*h/6,
			(v1-v0)/h - (3*A*A-1)*h*m0/6 + (3*B*B-1)*h*m1/6
	}
	p[0], d[0] = coord(s.pts[lo][0], s.pts[hi][0], s.mx[lo], s.mx[hi])
	p[1], d[1] = coord(s.pts[lo][1], s.pts[hi][1], s.my[lo], s.my[hi])
	return p, d
}

func (s *Spline) Kind() string    { return "spline" }
func (s *Spline) Attr() Attr      { return s.attr }
func (s *Spline) Length() float64 { return s.curve.length() }

// Vertices returns the data points (not a copy: do not modify).
func (s *Spline) Vertices() []orb.Point { return s.pts }

func (s *Spline) At(f float64) orb.Point {
	switch {
	case f <= 0:
		return s.pts[0]
	case f >= 1:
		return s.pts[len(s.pts)-1]
	}
	p, _ := s.eval(s.curve.param(f))
	return p
}

func (s *Spline) Reversed() Segment {
	q := reversedPoints(s.pts)
	r, _ := NewSpline(q, Attr{s.attr.Tag, s.attr.Spacing.Reversed()})
	return r
}

func (s *Spline) Scaled(f float64) Segment {
	q := scaledPoints(s.pts, f)
	r, _ := NewSpline(q, scaleAttr(s.attr, f))
	return r
}

func (s *Spline) WithAttr(a Attr) Segment {
	r, _ := NewSpline(s.pts, a)
	return r
}
