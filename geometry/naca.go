package geometry

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// Thickness coefficients of the NACA 4-digit sections (Abbott and von
// Doenhoff, Theory of Wing Sections (1959), §6.4; NACA Report 824):
//
//	y_t/c = 5t (0.2969√x − 0.1260x − 0.3516x² + 0.2843x³ + a₄x⁴),  x = x/c,
//
// with a₄ = −0.1015 as published (a trailing edge of finite thickness,
// 0.00126c for t = 0.12) or a₄ = −0.1036, the common-practice change that
// closes the trailing edge.
const (
	nacaA4Open   = -0.1015
	nacaA4Closed = -0.1036
)

// NACA4 is a NACA 4-digit section "MPTT": maximum camber m = M/100 at
// p = P/10 of the chord, thickness t = TT/100. The camber line is
//
//	y_c = m/p² (2px − x²)              for 0 ≤ x < p,
//	y_c = m/(1−p)² (1 − 2p + 2px − x²) for p ≤ x ≤ 1,
//
// and the thickness is laid off normal to it: x_U = x − y_t sin θ,
// y_U = y_c + y_t cos θ, x_L = x + y_t sin θ, y_L = y_c − y_t cos θ with
// θ = atan(dy_c/dx) (Abbott and von Doenhoff §6.4). The section is
// scaled to Chord, its leading edge put at LE and rotated by Angle about
// it (positive Angle raises the nose, as an angle of attack does).
//
// Its surfaces are parametrised by v = √(x/c), which makes y_t a
// polynomial in v, so Gauss–Legendre arc lengths converge even at the
// leading edge.
type NACA4 struct {
	M, P, T  float64
	Chord    float64
	LE       orb.Point
	Angle    float64 // radians
	ClosedTE bool
}

// NewNACA4 returns the section of the given 4 digits (e.g. "0012",
// "2412"), chord, leading-edge position, angle in degrees (nose up
// positive) and trailing-edge choice.
func NewNACA4(digits string, chord, leX, leY, angleDeg float64, closedTE bool) (*NACA4, error) {
	if len(digits) != 4 {
		return nil, fmt.Errorf("NACA designation %q must have 4 digits, like \"0012\" or \"2412\": %w", digits, ErrSegment)
	}
	var d [4]int
	for i, r := range digits {
		if r < '0' || r > '9' {
			return nil, fmt.Errorf("NACA designation %q has a non-digit %q at position %d: %w", digits, r, i+1, ErrSegment)
		}
		d[i] = int(r - '0')
	}
	m, p, t := float64(d[0])/100, float64(d[1])/10, float64(10*d[2]+d[3])/100
	if t == 0 {
		return nil, fmt.Errorf("NACA %s has zero thickness: %w", digits, ErrSegment)
	}
	if (m == 0) != (p == 0) {
		return nil, fmt.Errorf("NACA %s: camber %g%% and its position %g%% must both be zero or both non-zero: %w", digits, 100*m, 100*p, ErrSegment)
	}
	if !(chord > 0) || math.IsInf(chord, 0) {
		return nil, fmt.Errorf("NACA %s chord %g must be a positive finite length: %w", digits, chord, ErrSegment)
	}
	if err := checkPoint("NACA leading edge", orb.Point{leX, leY}); err != nil {
		return nil, err
	}
	if math.IsNaN(angleDeg) || math.IsInf(angleDeg, 0) {
		return nil, fmt.Errorf("NACA %s angle %g is not finite: %w", digits, angleDeg, ErrSegment)
	}
	return &NACA4{M: m, P: p, T: t, Chord: chord, LE: orb.Point{leX, leY}, Angle: angleDeg * math.Pi / 180, ClosedTE: closedTE}, nil
}

// Thickness returns the half-thickness y_t/c at x = x/c.
func (s *NACA4) Thickness(x float64) float64 {
	yt, _ := s.thicknessV(math.Sqrt(x))
	return yt
}

// thicknessV returns y_t and dy_t/dv at v = √x (x = v²).
func (s *NACA4) thicknessV(v float64) (float64, float64) {
	a4 := nacaA4Open
	if s.ClosedTE {
		a4 = nacaA4Closed
	}
	v2 := v * v
	// In v: 5t(0.2969v − 0.1260v² − 0.3516v⁴ + 0.2843v⁶ + a₄v⁸).
	yt := 5 * s.T * (0.2969*v - 0.1260*v2 - 0.3516*v2*v2 + 0.2843*v2*v2*v2 + a4*v2*v2*v2*v2)
	dyt := 5 * s.T * (0.2969 - 0.2520*v - 4*0.3516*v2*v + 6*0.2843*v2*v2*v + 8*a4*v2*v2*v2*v)
	return yt, dyt
}

// Camber returns y_c/c, dy_c/dx and d²y_c/dx² at x = x/c.
func (s *NACA4) Camber(x float64) (yc, slope, curv float64) {
	m, p := s.M, s.P
	if m == 0 {
		return 0, 0, 0
	}
	if x < p {
		return m / (p * p) * (2*p*x - x*x), 2 * m / (p * p) * (p - x), -2 * m / (p * p)
	}
	q := (1 - p) * (1 - p)
	return m / q * (1 - 2*p + 2*p*x - x*x), 2 * m / q * (p - x), -2 * m / q
}

// Surface returns the point of the upper (upper = true) or lower surface
// at x = x/c, in section coordinates (chord 1, leading edge at the origin,
// no rotation).
func (s *NACA4) Surface(x float64, upper bool) orb.Point {
	p, _ := s.surfaceVX(math.Sqrt(x), x, upper)
	return p
}

// surfaceV returns the unit-chord surface point and its derivative with
// respect to v = √x.
func (s *NACA4) surfaceV(v float64, upper bool) (p, d orb.Point) {
	return s.surfaceVX(v, v*v, upper)
}

// surfaceVX is surfaceV with x = v² given exactly by the caller.
func (s *NACA4) surfaceVX(v, x float64, upper bool) (p, d orb.Point) {
	yt, dyt := s.thicknessV(v)
	yc, slope, curv := s.Camber(x)
	th := math.Atan(slope)
	sin, cos := math.Sin(th), math.Cos(th)
	dx := 2 * v // dx/dv
	dth := curv / (1 + slope*slope) * dx
	sign := 1.0
	if !upper {
		sign = -1
	}
	p = orb.Point{x - sign*yt*sin, yc + sign*yt*cos}
	d = orb.Point{dx - sign*(dyt*sin+yt*cos*dth), slope*dx + sign*(dyt*cos-yt*sin*dth)}
	return p, d
}

// place maps a unit-chord point to the section's position: scale by the
// chord, rotate by −Angle (nose up) about the leading edge, translate.
func (s *NACA4) place(p orb.Point) orb.Point {
	sin, cos := math.Sincos(-s.Angle)
	x, y := s.Chord*p[0], s.Chord*p[1]
	return orb.Point{s.LE[0] + cos*x - sin*y, s.LE[1] + sin*x + cos*y}
}

func (s *NACA4) placeDir(d orb.Point) orb.Point {
	sin, cos := math.Sincos(-s.Angle)
	x, y := s.Chord*d[0], s.Chord*d[1]
	return orb.Point{cos*x - sin*y, sin*x + cos*y}
}

// Upper returns the upper surface as a segment from the trailing edge to
// the leading edge.
func (s *NACA4) Upper(a Attr) Segment { return s.surface(true, a) }

// Lower returns the lower surface as a segment from the leading edge to
// the trailing edge.
func (s *NACA4) Lower(a Attr) Segment { return s.surface(false, a) }

// Segments returns the section as a loop's segments: upper surface (from
// the trailing edge to the leading edge), lower surface (back to the
// trailing edge), and, for the open trailing edge, the straight base from
// the lower to the upper trailing-edge point. The loop runs
// counter-clockwise.
func (s *NACA4) Segments(upper, lower, base Attr) []Segment {
	segs := []Segment{s.Upper(upper), s.Lower(lower)}
	if !s.ClosedTE {
		lo, up := segs[1].At(1), segs[0].At(0)
		segs = append(segs, &Line{A: lo, B: up, attr: base})
	}
	return segs
}

func (s *NACA4) surface(upper bool, a Attr) *nacaSurface {
	ns := &nacaSurface{sec: *s, upper: upper, reversed: upper, attr: a}
	breaks := []float64{0, 0.05, 0.1, 0.2, 0.3, 0.45, 0.6, 0.8, 1}
	if p := math.Sqrt(s.P); s.M != 0 && p > 0 && p < 1 {
		// The camber line's curvature jumps at x = p: keep it on a break.
		breaks = insertBreak(breaks, p)
	}
	ns.curve = newParamCurve(ns.eval, breaks)
	return ns
}

func insertBreak(b []float64, v float64) []float64 {
	out := make([]float64, 0, len(b)+1)
	for i, x := range b {
		if x == v {
			return b
		}
		if x > v && (i == 0 || b[i-1] < v) {
			out = append(out, v)
		}
		out = append(out, x)
	}
	return out
}

// nacaSurface is one surface of a NACA4 section as a segment. Its curve is
// parametrised by v = √(x/c) from the leading edge (v = 0) to the trailing
// edge (v = 1); reversed runs it from the trailing edge.
type nacaSurface struct {
	sec      NACA4
	upper    bool
	reversed bool
	curve    paramCurve
	attr     Attr
}

func (n *nacaSurface) eval(v float64) (p, d orb.Point) {
	p, d = n.sec.surfaceV(v, n.upper)
	return n.sec.place(p), n.sec.placeDir(d)
}

func (n *nacaSurface) Kind() string {
	if n.upper {
		return "NACA upper surface"
	}
	return "NACA lower surface"
}

func (n *nacaSurface) Attr() Attr      { return n.attr }
func (n *nacaSurface) Length() float64 { return n.curve.length() }

func (n *nacaSurface) At(f float64) orb.Point {
	if n.reversed {
		f = 1 - f
	}
	p, _ := n.eval(n.curve.param(f))
	return p
}

func (n *nacaSurface) Reversed() Segment {
	c := *n
	c.reversed = !n.reversed
	c.attr.Spacing = n.attr.Spacing.Reversed()
	c.curve = newParamCurve(c.eval, n.curve.breaks)
	return &c
}

func (n *nacaSurface) Scaled(f float64) Segment {
	sec := n.sec
	sec.Chord *= f
	sec.LE = scalePt(sec.LE, f)
	c := sec.surface(n.upper, scaleAttr(n.attr, f))
	c.reversed = n.reversed
	return c
}

func (n *nacaSurface) WithAttr(a Attr) Segment {
	c := *n
	c.attr = a
	c.curve = newParamCurve(c.eval, n.curve.breaks)
	return &c
}
