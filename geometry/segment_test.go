package geometry

import (
	"errors"
	"math"
	"testing"

	"github.com/paulmach/orb"
)

func dist(a, b orb.Point) float64 { return math.Hypot(a[0]-b[0], a[1]-b[1]) }

// Arc length of a circular arc is r·|Δθ| (closed form, common practice).
func TestArcLengthAndPoints(t *testing.T) {
	a, err := NewArc(1, 2, 3, 30, 120, Attr{})
	if err != nil {
		t.Fatal(err)
	}
	if e := relErr(a.Length(), 3*math.Pi/2); e > 1e-15 {
		t.Errorf("arc length %g want %g", a.Length(), 3*math.Pi/2)
	}
	mid := a.At(0.5) // at 75°
	want := orb.Point{1 + 3*math.Cos(75*math.Pi/180), 2 + 3*math.Sin(75*math.Pi/180)}
	if dist(mid, want) > 1e-14 {
		t.Errorf("arc midpoint %v want %v", mid, want)
	}
	// Three points on the unit circle about (2, -1): quarter arc through 45°.
	b, err := NewArcThrough(3, -1, 2+math.Sqrt2/2, -1+math.Sqrt2/2, 2, 0, Attr{})
	if err != nil {
		t.Fatal(err)
	}
	if dist(b.Centre, orb.Point{2, -1}) > 1e-14 || math.Abs(b.Radius-1) > 1e-14 {
		t.Errorf("circumcircle centre %v radius %g", b.Centre, b.Radius)
	}
	if e := relErr(b.Length(), math.Pi/2); e > 1e-14 {
		t.Errorf("three-point arc length %g want π/2", b.Length())
	}
	// The same points in reverse order run clockwise: same length.
	c, _ := NewArcThrough(2, 0, 2+math.Sqrt2/2, -1+math.Sqrt2/2, 3, -1, Attr{})
	if e := relErr(c.Length(), math.Pi/2); e > 1e-14 || c.End > c.Start {
		t.Errorf("clockwise three-point arc: length %g, %g→%g", c.Length(), c.Start, c.End)
	}
	// Going the long way round: through the far side of the circle.
	d, _ := NewArcThrough(3, -1, 1, -1, 2, 0, Attr{})
	if e := relErr(d.Length(), 3*math.Pi/2); e > 1e-14 {
		t.Errorf("long three-point arc length %g want 3π/2", d.Length())
	}
	for _, bad := range []func() error{
		func() error { _, err := NewArc(0, 0, -1, 0, 90, Attr{}); return err },
		func() error { _, err := NewArc(0, 0, 1, 10, 10, Attr{}); return err },
		func() error { _, err := NewArcThrough(0, 0, 1, 1, 2, 2, Attr{}); return err },
	} {
		if err := bad(); !errors.Is(err, ErrSegment) {
			t.Errorf("got %v, want ErrSegment", err)
		}
	}
}

// A natural cubic spline reproduces linear data exactly (de Boor 1978,
// ch. IV), so a spline through collinear points with chord-length
// parameters is the straight line: arc length = distance.
func TestSplineCollinear(t *testing.T) {
	s, err := NewSpline([]orb.Point{{0, 0}, {1, 2}, {1.5, 3}, {4, 8}}, Attr{})
	if err != nil {
		t.Fatal(err)
	}
	if e := relErr(s.Length(), math.Hypot(4, 8)); e > 1e-13 {
		t.Errorf("collinear spline length %.16g want %.16g", s.Length(), math.Hypot(4, 8))
	}
	p := s.At(0.3)
	if dist(p, orb.Point{1.2, 2.4}) > 1e-12 {
		t.Errorf("At(0.3) = %v want (1.2, 2.4)", p)
	}
}

// A periodic spline through many points of a circle approaches the circle:
// length 2πr (closed form) to the spline's O(h⁴) error (here h ≈ 0.2,
// giving about 1e-7).
func TestSplineClosedCircle(t *testing.T) {
	const n = 64
	pts := make([]orb.Point, n+1)
	for i := range pts {
		a := 2 * math.Pi * float64(i%n) / n
		pts[i] = orb.Point{2 * math.Cos(a), 2 * math.Sin(a)}
	}
	s, err := NewSpline(pts, Attr{})
	if err != nil {
		t.Fatal(err)
	}
	if !s.Closed() {
		t.Fatal("spline with equal ends is not closed")
	}
	if e := relErr(s.Length(), 4*math.Pi); e > 5e-7 {
		t.Errorf("closed spline length %.12g want 4π (rel %g)", s.Length(), e)
	}
	// Points at arc-length fractions lie on the circle.
	for _, f := range []float64{0.1, 0.37, 0.5, 0.93} {
		p := s.At(f)
		if math.Abs(math.Hypot(p[0], p[1])-2) > 1e-6 {
			t.Errorf("At(%g) = %v off the circle", f, p)
		}
		wantAng := 2 * math.Pi * f
		if math.Abs(math.Atan2(p[1], p[0])-math.Remainder(wantAng, 2*math.Pi)) > 1e-6 {
			t.Errorf("At(%g) at angle %g want %g", f, math.Atan2(p[1], p[0]), wantAng)
		}
	}
}

// At inverts the arc length: the length of the polyline through At(i/N)
// for large N tends to Length, and equal fractions give equal chords.
func TestSplineArcLengthInversion(t *testing.T) {
	s, _ := NewSpline([]orb.Point{{0, 0}, {1, 0.8}, {2, -0.3}, {3.5, 0.4}, {4, 2}}, Attr{})
	const N = 2000
	sum, prev := 0.0, s.At(0)
	minC, maxC := math.Inf(1), 0.0
	for i := 1; i <= N; i++ {
		p := s.At(float64(i) / N)
		c := dist(p, prev)
		sum += c
		minC, maxC = math.Min(minC, c), math.Max(maxC, c)
		prev = p
	}
	if e := relErr(sum, s.Length()); e > 1e-6 {
		t.Errorf("polyline length %g vs spline length %g", sum, s.Length())
	}
	if (maxC-minC)/maxC > 1e-4 {
		t.Errorf("chords of equal arc fractions vary from %g to %g", minC, maxC)
	}
}

// NACA 0012 half-thickness, NACA Report 824 / Abbott and von Doenhoff,
// Theory of Wing Sections (1959), Appendix I (ordinates in per cent of the
// chord, 3 decimals). Values from memory; they agree with the published
// formula, so the tolerance is half the last tabulated digit.
func TestNACA0012Ordinates(t *testing.T) {
	table := [][2]float64{
		{1.25, 1.894}, {2.5, 2.615}, {5, 3.555}, {7.5, 4.200}, {10, 4.683},
		{15, 5.345}, {20, 5.737}, {25, 5.941}, {30, 6.002}, {40, 5.803},
		{50, 5.294}, {60, 4.563}, {70, 3.664}, {80, 2.623}, {90, 1.448},
		{95, 0.807}, {100, 0.126},
	}
	s, err := NewNACA4("0012", 1, 0, 0, 0, false)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range table {
		y := 100 * s.Thickness(r[0]/100)
		if math.Abs(y-r[1]) > 0.0006 {
			t.Errorf("NACA 0012 at x/c = %g%%: y/c = %.4f%%, table %.3f%%", r[0], y, r[1])
		}
		up, lo := s.Surface(r[0]/100, true), s.Surface(r[0]/100, false)
		if up[1] != -lo[1] || up[0] != r[0]/100 {
			t.Errorf("symmetric section surfaces %v %v", up, lo)
		}
	}
	// Closed trailing edge: coefficient −0.1036 (common practice) brings
	// y_t(1) to 5t(0.2969 − 0.1260 − 0.3516 + 0.2843 − 0.1036) ≈ 0.
	c, _ := NewNACA4("0012", 1, 0, 0, 0, true)
	if y := c.Thickness(1); math.Abs(y) > 1e-4*0.12 {
		t.Errorf("closed trailing edge thickness %g", y)
	}
}

// NACA 2412, Abbott and von Doenhoff, Appendix II ordinate table (upper
// and lower surface at the tabulated stations, per cent of chord, 2
// decimals). Values from memory, so checked to 0.012 % of the chord; a
// wrong camber law misses them by 0.1 % or more.
func TestNACA2412Ordinates(t *testing.T) {
	table := []struct{ x, up, lo float64 }{
		{2.5, 2.99, -2.27}, {5, 4.13, -3.01}, {20, 7.26, -4.23},
		{30, 7.88, -4.12}, {40, 7.80, -3.80}, {80, 3.75, -1.50},
	}
	s, err := NewNACA4("2412", 1, 0, 0, 0, false)
	if err != nil {
		t.Fatal(err)
	}
	// The table's stations are surface x positions: find the surface
	// point there by bisection in v = √x.
	at := func(x float64, upper bool) float64 {
		lo, hi := 0.0, 1.0
		for range 200 {
			m := (lo + hi) / 2
			if s.Surface(m*m, upper)[0] < x {
				lo = m
			} else {
				hi = m
			}
		}
		return 100 * s.Surface(lo*lo, upper)[1]
	}
	for _, r := range table {
		if y := at(r.x/100, true); math.Abs(y-r.up) > 0.012 {
			t.Errorf("NACA 2412 upper at %g%%: %.4f%%, table %.2f%%", r.x, y, r.up)
		}
		if y := at(r.x/100, false); math.Abs(y-r.lo) > 0.012 {
			t.Errorf("NACA 2412 lower at %g%%: %.4f%%, table %.2f%%", r.x, y, r.lo)
		}
	}
	// Maximum camber 2 % at 40 % chord: the camber line is 0.02 there.
	if yc, slope, _ := s.Camber(0.4); math.Abs(yc-0.02) > 1e-15 || slope != 0 {
		t.Errorf("camber at p: %g slope %g", yc, slope)
	}
}

// A placed section: chord 2, leading edge at (1, 1), 10° nose up. The
// trailing edge of the closed section sits at LE + 2(cos 10°, −sin 10°);
// the surfaces' lengths sum to a little over twice the chord.
func TestNACAPlacedSegments(t *testing.T) {
	s, err := NewNACA4("0012", 2, 1, 1, 10, true)
	if err != nil {
		t.Fatal(err)
	}
	segs := s.Segments(Attr{Tag: "upper"}, Attr{Tag: "lower"}, Attr{})
	if len(segs) != 2 {
		t.Fatalf("closed section has %d segments", len(segs))
	}
	te := orb.Point{1 + 2*math.Cos(10*math.Pi/180), 1 - 2*math.Sin(10*math.Pi/180)}
	if dist(segs[0].At(0), te) > 1e-6 || dist(segs[1].At(1), te) > 1e-6 {
		t.Errorf("trailing edge %v / %v want %v", segs[0].At(0), segs[1].At(1), te)
	}
	if dist(segs[0].At(1), orb.Point{1, 1}) > 1e-15 || dist(segs[1].At(0), orb.Point{1, 1}) > 1e-15 {
		t.Errorf("leading edge %v / %v", segs[0].At(1), segs[1].At(0))
	}
	// Arc length by quadrature against a fine polyline (common practice).
	for _, g := range segs {
		sum, prev := 0.0, g.At(0)
		for i := 1; i <= 5000; i++ {
			p := g.At(float64(i) / 5000)
			sum += dist(p, prev)
			prev = p
		}
		if e := relErr(sum, g.Length()); e > 1e-7 {
			t.Errorf("%s: polyline %g vs quadrature %g", g.Kind(), sum, g.Length())
		}
		if !(g.Length() > 2 && g.Length() < 2.1) {
			t.Errorf("%s length %g not just above the chord", g.Kind(), g.Length())
		}
	}
	open, _ := NewNACA4("0012", 2, 1, 1, 10, false)
	if segs := open.Segments(Attr{}, Attr{}, Attr{Tag: "base"}); len(segs) != 3 || segs[2].Kind() != "line" {
		t.Errorf("open trailing edge should add a base line, got %d segments", len(segs))
	}
	for _, d := range []string{"12", "00a2", "2012", "0000", "0200"} {
		if _, err := NewNACA4(d, 1, 0, 0, 0, false); !errors.Is(err, ErrSegment) {
			t.Errorf("NACA %q: got %v", d, err)
		}
	}
}

// Reversing and scaling keep the shape: a reversed segment visits the
// same points backwards; a scaled one has f times the length.
func TestReverseAndScale(t *testing.T) {
	sp, _ := Clustered(0.01, 0.05, 20)
	naca, _ := NewNACA4("4412", 1, 0, 0, 0, true)
	spline, _ := NewSpline([]orb.Point{{0, 0}, {1, 1}, {2, 0}, {3, 1}}, Attr{})
	arc, _ := NewArc(0, 0, 1, 0, 200, Attr{})
	line, _ := NewLine(0, 0, 3, 4, Attr{})
	poly, _ := NewPolyline([]orb.Point{{0, 0}, {1, 0}, {1, 1}}, Attr{})
	for _, s := range []Segment{naca.Upper(Attr{}), naca.Lower(Attr{}), spline, arc, line, poly} {
		s = s.WithAttr(Attr{Tag: "t", Spacing: sp})
		r := s.Reversed()
		for _, f := range []float64{0, 0.2, 0.5, 0.9, 1} {
			if d := dist(s.At(f), r.At(1-f)); d > 1e-9 {
				t.Errorf("%s reversed: At(%g) differs by %g", s.Kind(), f, d)
			}
		}
		if r.Attr().Spacing != sp.Reversed() || r.Attr().Tag != "t" {
			t.Errorf("%s reversed spacing %v", s.Kind(), r.Attr().Spacing)
		}
		g := s.Scaled(1e-3)
		if e := relErr(g.Length(), 1e-3*s.Length()); e > 1e-12 {
			t.Errorf("%s scaled length rel err %g", s.Kind(), e)
		}
		if d := dist(g.At(0.4), scalePt(s.At(0.4), 1e-3)); d > 1e-12 {
			t.Errorf("%s scaled point off by %g", s.Kind(), d)
		}
	}
}

// A spline through the points of an ellipse at every 15°, computed from
// angles in radians so that the point at 360° misses the one at 0° by
// round-off (sin 2π ≈ −2.4e-16), is closed all the same: its last point is
// the first, it is the spline through the exact points, and by the
// ellipse's mirror symmetry about the x axis (elementary geometry) its
// tangent at (a, 0) is vertical at both ends of the parameter range, with
// no kink at the seam.
func TestSplineClosesWithinTolerance(t *testing.T) {
	const a, b = 0.5, 0.5 / 3
	var pts, exact []orb.Point
	for k := 0; k <= 24; k++ {
		th := float64(k) * 15 * math.Pi / 180
		pts = append(pts, orb.Point{a * math.Cos(th), b * math.Sin(th)})
		exact = append(exact, orb.Point{a * math.Cos(th), b * math.Sin(th)})
	}
	exact[24] = exact[0]
	if pts[24] == pts[0] {
		t.Fatalf("the test needs a last point off the first by round-off; both are %v", pts[0])
	}
	s, err := NewSpline(pts, Attr{})
	if err != nil {
		t.Fatal(err)
	}
	ref, err := NewSpline(exact, Attr{})
	if err != nil {
		t.Fatal(err)
	}
	if !s.Closed() || s.Vertices()[24] != pts[0] {
		t.Fatalf("spline ending %.3g from its start: closed %v, last point %v", dist(pts[24], pts[0]), s.Closed(), s.Vertices()[24])
	}
	for _, f := range []float64{0, 0.13, 0.5, 0.91, 1} {
		if p, q := s.At(f), ref.At(f); p != q {
			t.Errorf("At(%g) = %v, the spline through the exact points gives %v", f, p, q)
		}
	}
	for _, u := range []float64{0, s.t[len(s.t)-1]} {
		_, d := s.eval(u)
		if math.Abs(d[0]) > 1e-12*math.Abs(d[1]) {
			t.Errorf("tangent at (a, 0), t = %g: %v, want vertical", u, d)
		}
	}
	// A gap far above round-off (a millionth of the size) is an open spline.
	pts[24] = orb.Point{a, 1e-6}
	s, err = NewSpline(pts, Attr{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Closed() || s.Vertices()[24] != pts[24] {
		t.Errorf("spline with a gap of 1e-6: closed %v, last point %v", s.Closed(), s.Vertices()[24])
	}
}
