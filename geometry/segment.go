package geometry

import (
	"errors"
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// ErrSegment marks a segment that cannot be built from its numbers.
var ErrSegment = errors.New("invalid segment")

// Attr is what every segment carries besides its shape: the boundary tag
// its edges get and the spacing law that places its nodes.
type Attr struct {
	Tag     string
	Spacing Spacing
}

// Segment is one piece of a loop: a curve from Start to End parametrised
// by arc length.
type Segment interface {
	// Kind names the segment kind ("line", "arc", ...) for messages.
	Kind() string
	// Attr returns the boundary tag and spacing law.
	Attr() Attr
	// Length returns the arc length: exact for lines, arcs and polylines,
	// by Gauss–Legendre quadrature for splines and NACA surfaces.
	Length() float64
	// At returns the point at arc-length fraction f ∈ [0, 1]; At(0) and
	// At(1) are exactly the end points.
	At(f float64) orb.Point
	// Reversed returns the same curve run the other way, its spacing law
	// reversed with it.
	Reversed() Segment
	// Scaled returns the curve and its spacing lengths scaled by f about
	// the origin (a change of units).
	Scaled(f float64) Segment
	// WithAttr returns the segment with a new tag and spacing law.
	WithAttr(a Attr) Segment
}

// vertexed is implemented by segments that have vertices of their own,
// which the zero spacing law keeps.
type vertexed interface {
	Vertices() []orb.Point
}

func finite(p orb.Point) bool {
	return !math.IsNaN(p[0]) && !math.IsNaN(p[1]) && !math.IsInf(p[0], 0) && !math.IsInf(p[1], 0)
}

func checkPoint(what string, p orb.Point) error {
	if !finite(p) {
		return fmt.Errorf("%s (%g, %g) is not a finite point: %w", what, p[0], p[1], ErrSegment)
	}
	return nil
}

// Line is a straight segment from A to B.
type Line struct {
	A, B orb.Point
	attr Attr
}

// NewLine returns the line from (x0, y0) to (x1, y1).
func NewLine(x0, y0, x1, y1 float64, a Attr) (*Line, error) {
	l := &Line{A: orb.Point{x0, y0}, B: orb.Point{x1, y1}, attr: a}
	if err := checkPoint("line start", l.A); err != nil {
		return nil, err
	}
	if err := checkPoint("line end", l.B); err != nil {
		return nil, err
	}
	return l, nil
}

func (l *Line) Kind() string    { return "line" }
func (l *Line) Attr() Attr      { return l.attr }
func (l *Line) Length() float64 { return math.Hypot(l.B[0]-l.A[0], l.B[1]-l.A[1]) }

func (l *Line) At(f float64) orb.Point {
	switch f {
	case 0:
		return l.A
	case 1:
		return l.B
	}
	return orb.Point{l.A[0] + f*(l.B[0]-l.A[0]), l.A[1] + f*(l.B[1]-l.A[1])}
}

func (l *Line) Reversed() Segment {
	return &Line{A: l.B, B: l.A, attr: Attr{l.attr.Tag, l.attr.Spacing.Reversed()}}
}

func (l *Line) Scaled(f float64) Segment {
	return &Line{A: scalePt(l.A, f), B: scalePt(l.B, f), attr: scaleAttr(l.attr, f)}
}

func (l *Line) WithAttr(a Attr) Segment { c := *l; c.attr = a; return &c }

// Vertices returns the two end points.
func (l *Line) Vertices() []orb.Point { return []orb.Point{l.A, l.B} }

func scalePt(p orb.Point, f float64) orb.Point { return orb.Point{p[0] * f, p[1] * f} }
func scaleAttr(a Attr, f float64) Attr         { return Attr{a.Tag, a.Spacing.Scaled(f)} }

// Arc is a circular arc about Centre with the given Radius, from angle
// Start to angle End (radians, counter-clockwise from +x). End > Start runs
// counter-clockwise, End < Start clockwise; |End − Start| ≤ 2π, and 2π
// makes a whole circle.
type Arc struct {
	Centre     orb.Point
	Radius     float64
	Start, End float64
	p0, p1     orb.Point // exact end points
	attr       Attr
}

// NewArc returns the arc about (cx, cy) of radius r from angle start to
// angle end, both in degrees (end > start counter-clockwise).
func NewArc(cx, cy, r, startDeg, endDeg float64, a Attr) (*Arc, error) {
	if err := checkPoint("arc centre", orb.Point{cx, cy}); err != nil {
		return nil, err
	}
	if !(r > 0) || math.IsInf(r, 0) {
		return nil, fmt.Errorf("arc radius %g must be a positive finite length: %w", r, ErrSegment)
	}
	sweep := endDeg - startDeg
	if math.IsNaN(sweep) || math.IsInf(sweep, 0) || sweep == 0 || math.Abs(sweep) > 360 {
		return nil, fmt.Errorf("arc from %g° to %g° must sweep a non-zero angle of at most 360°: %w", startDeg, endDeg, ErrSegment)
	}
	return newArcRad(orb.Point{cx, cy}, r, startDeg*math.Pi/180, endDeg*math.Pi/180, a), nil
}

func newArcRad(c orb.Point, r, t0, t1 float64, a Attr) *Arc {
	arc := &Arc{Centre: c, Radius: r, Start: t0, End: t1, attr: a}
	arc.p0 = arc.angle(t0)
	arc.p1 = arc.angle(t1)
	return arc
}

// NewArcThrough returns the circular arc from (x0, y0) through (xm, ym) to
// (x1, y1): its centre is the circumcentre of the three points.
func NewArcThrough(x0, y0, xm, ym, x1, y1 float64, a Attr) (*Arc, error) {
	p0, pm, p1 := orb.Point{x0, y0}, orb.Point{xm, ym}, orb.Point{x1, y1}
	for _, p := range []orb.Point{p0, pm, p1} {
		if err := checkPoint("arc point", p); err != nil {
			return nil, err
		}
	}
	// Circumcentre relative to p0 (shifted for round-off):
	// with b = pm − p0, c = p1 − p0, D = 2(b×c),
	// centre = p0 + ((|b|² c_y − |c|² b_y)/D, (|c|² b_x − |b|² c_x)/D).
	bx, by := pm[0]-p0[0], pm[1]-p0[1]
	qx, qy := p1[0]-p0[0], p1[1]-p0[1]
	d := 2 * (bx*qy - by*qx)
	size := math.Max(math.Hypot(bx, by), math.Hypot(qx, qy))
	if size == 0 || math.Abs(d) <= 1e-12*size*size {
		return nil, fmt.Errorf("arc points (%g, %g), (%g, %g), (%g, %g) are collinear or coincident, so no circle passes through them: %w", x0, y0, xm, ym, x1, y1, ErrSegment)
	}
	b2, c2 := bx*bx+by*by, qx*qx+qy*qy
	c := orb.Point{p0[0] + (b2*qy-c2*by)/d, p0[1] + (c2*bx-b2*qx)/d}
	r := math.Hypot(p0[0]-c[0], p0[1]-c[1])
	t0 := math.Atan2(p0[1]-c[1], p0[0]-c[0])
	t1 := math.Atan2(p1[1]-c[1], p1[0]-c[0])
	// Three points met in order along a circle run counter-clockwise
	// exactly when the triangle p0, pm, p1 turns left (d > 0).
	ccw := func(from, to float64) float64 {
		s := math.Mod(to-from, 2*math.Pi)
		if s < 0 {
			s += 2 * math.Pi
		}
		return s
	}
	sweep := ccw(t0, t1)
	if d < 0 {
		sweep -= 2 * math.Pi
	}
	arc := newArcRad(c, r, t0, t0+sweep, a)
	arc.p0, arc.p1 = p0, p1
	return arc, nil
}

func (c *Arc) angle(t float64) orb.Point {
	return orb.Point{c.Centre[0] + c.Radius*math.Cos(t), c.Centre[1] + c.Radius*math.Sin(t)}
}

func (c *Arc) Kind() string    { return "arc" }
func (c *Arc) Attr() Attr      { return c.attr }
func (c *Arc) Length() float64 { return c.Radius * math.Abs(c.End-c.Start) }

func (c *Arc) At(f float64) orb.Point {
	switch f {
	case 0:
		return c.p0
	case 1:
		return c.p1
	}
	return c.angle(c.Start + f*(c.End-c.Start))
}

func (c *Arc) Reversed() Segment {
	return &Arc{Centre: c.Centre, Radius: c.Radius, Start: c.End, End: c.Start, p0: c.p1, p1: c.p0,
		attr: Attr{c.attr.Tag, c.attr.Spacing.Reversed()}}
}

func (c *Arc) Scaled(f float64) Segment {
	return &Arc{Centre: scalePt(c.Centre, f), Radius: c.Radius * f, Start: c.Start, End: c.End,
		p0: scalePt(c.p0, f), p1: scalePt(c.p1, f), attr: scaleAttr(c.attr, f)}
}

func (c *Arc) WithAttr(a Attr) Segment { d := *c; d.attr = a; return &d }

// Polyline is a chain of straight edges through its points, run by arc
// length. With the zero spacing law its own vertices are the nodes; with
// another law nodes are placed by arc length along the whole chain, which
// cuts corners: give sharp corners their own segments.
type Polyline struct {
	pts  []orb.Point
	cum  []float64 // cumulative length at each vertex
	attr Attr
}

// NewPolyline returns the polyline through pts (at least two points, no
// two consecutive ones equal). The slice is copied.
func NewPolyline(pts []orb.Point, a Attr) (*Polyline, error) {
	if len(pts) < 2 {
		return nil, fmt.Errorf("polyline has %d points, needs at least 2: %w", len(pts), ErrSegment)
	}
	p := &Polyline{pts: append([]orb.Point(nil), pts...), cum: make([]float64, len(pts)), attr: a}
	for i, q := range p.pts {
		if !finite(q) {
			return nil, checkPoint(fmt.Sprintf("polyline vertex %d", i), q)
		}
		if i > 0 {
			d := math.Hypot(q[0]-pts[i-1][0], q[1]-pts[i-1][1])
			if d == 0 {
				return nil, fmt.Errorf("polyline vertices %d and %d are both (%g, %g): zero-length edge: %w", i-1, i, q[0], q[1], ErrZeroLength)
			}
			p.cum[i] = p.cum[i-1] + d
		}
	}
	return p, nil
}

func (p *Polyline) Kind() string    { return "polyline" }
func (p *Polyline) Attr() Attr      { return p.attr }
func (p *Polyline) Length() float64 { return p.cum[len(p.cum)-1] }

// Vertices returns the polyline's points (not a copy: do not modify).
func (p *Polyline) Vertices() []orb.Point { return p.pts }

func (p *Polyline) At(f float64) orb.Point {
	n := len(p.pts)
	switch {
	case f <= 0:
		return p.pts[0]
	case f >= 1:
		return p.pts[n-1]
	}
	s := f * p.Length()
	lo, hi := 0, n-1 // cum[lo] ≤ s < cum[hi]
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if p.cum[mid] <= s {
			lo = mid
		} else {
			hi = mid
		}
	}
	t := (s - p.cum[lo]) / (p.cum[hi] - p.cum[lo])
	a, b := p.pts[lo], p.pts[hi]
	return orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}
}

// reversedPoints returns a copy of pts in the opposite order.
func reversedPoints(pts []orb.Point) []orb.Point {
	q := make([]orb.Point, len(pts))
	for i, v := range pts {
		q[len(q)-1-i] = v
	}
	return q
}

// scaledPoints returns a copy of pts with every coordinate times f.
func scaledPoints(pts []orb.Point, f float64) []orb.Point {
	q := make([]orb.Point, len(pts))
	for i, v := range pts {
		q[i] = scalePt(v, f)
	}
	return q
}

func (p *Polyline) Reversed() Segment {
	q := reversedPoints(p.pts)
	r, _ := NewPolyline(q, Attr{p.attr.Tag, p.attr.Spacing.Reversed()})
	return r
}

func (p *Polyline) Scaled(f float64) Segment {
	q := scaledPoints(p.pts, f)
	c := make([]float64, len(p.cum))
	for i, v := range p.cum {
		c[i] = v * f
	}
	return &Polyline{pts: q, cum: c, attr: scaleAttr(p.attr, f)}
}

func (p *Polyline) WithAttr(a Attr) Segment { c := *p; c.attr = a; return &c }
