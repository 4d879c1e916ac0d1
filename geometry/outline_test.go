package geometry

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

func mustLine(t testing.TB, x0, y0, x1, y1 float64, tag string, sp Spacing) Segment {
	t.Helper()
	l, err := NewLine(x0, y0, x1, y1, Attr{Tag: tag, Spacing: sp})
	if err != nil {
		t.Fatal(err)
	}
	return l
}

func count(t testing.TB, n int) Spacing {
	s, err := Count(n)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// tunnel is a test outline: a channel 4 × 1 with a circular-arc bump on
// its floor (chord 1, height 0.1) and a circular body inside.
func tunnel(t testing.TB) Outline {
	sp := count(t, 11)
	// Bump: chord from (1.5, 0) to (2.5, 0), height h = 0.1, so radius
	// R = (c²/4 + h²)/(2h) = 1.3 and centre (2, h − R).
	bump, err := NewArcThrough(1.5, 0, 2, 0.1, 2.5, 0, Attr{Tag: "wall", Spacing: sp})
	if err != nil {
		t.Fatal(err)
	}
	body, err := NewCircle(3.3, 0.6, 0.15, Attr{Tag: "body", Spacing: count(t, 33)})
	if err != nil {
		t.Fatal(err)
	}
	return Outline{
		Outer: Loop{Name: "tunnel", Segments: []Segment{
			mustLine(t, 0, 0, 1.5, 0, "wall", sp), bump, mustLine(t, 2.5, 0, 4, 0, "wall", sp),
			mustLine(t, 4, 0, 4, 1, "outflow", sp), mustLine(t, 4, 1, 0, 1, "wall", sp),
			mustLine(t, 0, 1, 0, 0, "inflow", sp),
		}},
		Inner: []Loop{body},
	}
}

// Areas against closed forms: the channel 4 × 1 plus the circular segment
// of the bump, R²(θ − sin θ)/2 with sin(θ/2) = c/(2R) (common practice),
// minus the body's πr².
func TestOutlineAreaClosedForm(t *testing.T) {
	o := tunnel(t)
	n, err := o.Normalise()
	if err != nil {
		t.Fatal(err)
	}
	if n.Outer.Flipped || !n.Inner[0].Flipped {
		t.Errorf("flips: outer %v inner %v (body circle was counter-clockwise)", n.Outer.Flipped, n.Inner[0].Flipped)
	}
	// Fine discretisation of the same outline.
	fine := func(l Loop) Loop {
		r := Loop{Name: l.Name}
		for _, s := range l.Segments {
			r.Segments = append(r.Segments, s.WithAttr(Attr{s.Attr().Tag, count(t, 4001)}))
		}
		return r
	}
	f := Outline{Outer: fine(n.Outer), Inner: []Loop{fine(n.Inner[0])}}
	d, err := f.Discretise()
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Validate(); err != nil {
		t.Fatal(err)
	}
	R := 1.3
	theta := 2 * math.Asin(0.5/R)
	wantOuter := 4 - R*R*(theta-math.Sin(theta))/2 // the bump takes area away from the channel
	gotOuter := planar.Area(orb.Ring(d.Loops[0].Points))
	if e := relErr(gotOuter, wantOuter); e > 1e-7 {
		t.Errorf("outer area %.10g want %.10g", gotOuter, wantOuter)
	}
	// A polygon inscribed in a circle with n sides: (n/2) r² sin(2π/n).
	if e := relErr(d.Area(), gotOuter+planar.Area(orb.Ring(d.Loops[1].Points))); e > 1e-14 {
		t.Errorf("DiscreteOutline.Area %g disagrees with orb's planar.Area", d.Area())
	}
	gotBody := planar.Area(orb.Ring(d.Loops[1].Points))
	nb := float64(len(d.Loops[1].Points))
	if e := relErr(-gotBody, nb/2*0.15*0.15*math.Sin(2*math.Pi/nb)); e > 1e-12 {
		t.Errorf("body area %.15g (clockwise, negative) with %g sides", gotBody, nb)
	}
}

func TestLoopDiscretiseJointsAndTags(t *testing.T) {
	o, err := tunnel(t).Normalise()
	if err != nil {
		t.Fatal(err)
	}
	dl, starts, err := o.Outer.Discretise()
	if err != nil {
		t.Fatal(err)
	}
	if len(dl.Points) != 60 || len(dl.Tags) != 60 {
		t.Fatalf("6 segments × 10 edges: got %d points, %d tags", len(dl.Points), len(dl.Tags))
	}
	for k, s := range starts {
		if s != 10*k {
			t.Errorf("segment %d starts at node %d want %d", k, s, 10*k)
		}
		if dl.Points[s] != o.Outer.Segments[k].At(0) {
			t.Errorf("segment %d start node %v is not its start point", k, dl.Points[s])
		}
	}
	if n, err := o.Outer.NodeCount(); err != nil || n != len(dl.Points) {
		t.Errorf("NodeCount %d (%v), discretisation has %d", n, err, len(dl.Points))
	}
	if dl.Tags[0] != "wall" || dl.Tags[30] != "outflow" || dl.Tags[59] != "inflow" {
		t.Errorf("tags %v", dl.Tags)
	}
	// An untagged segment takes its loop's name, an unnamed loop "outer".
	rect, _ := NewRectangle(0, 0, 2, 1, [4]Attr{{Tag: "floor"}})
	d, err := Outline{Outer: rect}.Discretise()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(d.Loops[0].Tags, " "); got != "floor outer outer outer" {
		t.Errorf("rectangle tags %q", got)
	}
	// Chain of the floor: three segments, 31 nodes, the bump's tags inside.
	c, err := DiscretiseChain(o.Outer.Segments[:3])
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Points) != 31 || len(c.Tags) != 30 || c.Points[30] != (orb.Point{4, 0}) {
		t.Errorf("chain: %d points, %d tags, ends at %v", len(c.Points), len(c.Tags), c.Points[len(c.Points)-1])
	}
	if _, err := DiscretiseChain([]Segment{o.Outer.Segments[0], o.Outer.Segments[3]}); !errors.Is(err, ErrNotContinuous) {
		t.Errorf("disjoint chain: %v", err)
	}
}

// Bad outlines give one-line errors that name the loop, segment, vertex
// or point and wrap the kind of problem.
func TestValidateBadInput(t *testing.T) {
	sp := count(t, 5)
	sq := func(x0, y0, s float64) []Segment {
		return []Segment{mustLine(t, x0, y0, x0+s, y0, "", sp), mustLine(t, x0+s, y0, x0+s, y0+s, "", sp),
			mustLine(t, x0+s, y0+s, x0, y0+s, "", sp), mustLine(t, x0, y0+s, x0, y0, "", sp)}
	}
	poly := func(pts ...orb.Point) Segment {
		p, err := NewPolyline(pts, Attr{})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	cases := []struct {
		name string
		o    Outline
		want error
		says string
	}{
		{"not closed", Outline{Outer: Loop{Name: "box", Segments: sq(0, 0, 1)[:3]}}, ErrNotClosed,
			`outer loop "box", segment 2 (line) at (0, 1): ends here but the first segment (line) starts at (0, 0)`},
		{"gap between segments", Outline{Outer: Loop{Segments: []Segment{
			mustLine(t, 0, 0, 1, 0, "", sp), mustLine(t, 1, 0.01, 1, 1, "", sp), mustLine(t, 1, 1, 0, 0, "", sp)}}},
			ErrNotClosed, "outer loop, segment 0 (line) at (1, 0): ends here but segment 1 (line) starts at (1, 0.01)"},
		{"self-crossing", Outline{Outer: Loop{Segments: []Segment{poly(orb.Point{0, 0}, orb.Point{1, 1}, orb.Point{1, 0}, orb.Point{0, 1}, orb.Point{0, 0})}}},
			ErrSelfCrossing, "outer loop, segment 0 (polyline), vertex 0 at (0.5, 0.5): meets segment 0 (polyline) edge from vertex 2"},
		{"inner outside", Outline{Outer: Loop{Segments: sq(0, 0, 1)}, Inner: []Loop{{Name: "stray", Segments: sq(2, 2, 0.5)}}},
			ErrOutside, `inner loop 1 "stray", segment 0 (line) at (2, 2): this point lies outside the outer loop`},
		{"loops cross", Outline{Outer: Loop{Segments: sq(0, 0, 1)}, Inner: []Loop{{Segments: sq(0.5, 0.5, 1)}}},
			ErrLoopsCross, "outer loop, segment 2 (line) at (0.5, 1): meets inner loop 1, segment 3 (line)"},
		{"holes touch", Outline{Outer: Loop{Segments: sq(0, 0, 10)}, Inner: []Loop{{Segments: sq(2, 2, 2)}, {Segments: sq(4, 4, 2)}}},
			ErrLoopsCross, "inner loop 1, segment 2 (line) at (4, 4): meets inner loop 2, segment 0 (line) at a vertex of both, so the loops touch there"},
		{"nested", Outline{Outer: Loop{Segments: sq(0, 0, 10)}, Inner: []Loop{{Segments: sq(1, 1, 5)}, {Segments: sq(2, 2, 1)}}},
			ErrNested, "inner loop 2, segment 0 (line) at (2, 2): this point lies inside inner loop 1"},
		{"zero-length", Outline{Outer: Loop{Segments: append(sq(0, 0, 1), mustLine(t, 0, 0, 0, 0, "", sp))}},
			ErrZeroLength, "outer loop, segment 4 (line) at (0, 0): length 0 is not above the closure tolerance"},
		{"empty", Outline{}, ErrEmptyLoop, "outer loop: give at least one segment"},
		{"no area", Outline{Outer: Loop{Segments: []Segment{mustLine(t, 0, 0, 1, 0, "", sp), mustLine(t, 1, 0, 0, 0, "", sp)}}},
			ErrSelfCrossing, "outer loop, segment 0 (line) at (1, 0): meets segment 1 (line)"},
	}
	for _, c := range cases {
		err := c.o.Validate()
		if !errors.Is(err, c.want) {
			t.Errorf("%s: got %v, want %v", c.name, err, c.want)
			continue
		}
		var e *Error
		if !errors.As(err, &e) {
			t.Errorf("%s: not an *Error: %T", c.name, err)
		}
		msg := err.Error()
		if !strings.Contains(msg, c.says) || strings.Contains(msg, "\n") {
			t.Errorf("%s:\n got  %s\n want %s", c.name, msg, c.says)
		}
	}
}

func TestScaledOutline(t *testing.T) {
	o := tunnel(t)
	mm, err := o.Scaled(1e-3)
	if err != nil {
		t.Fatal(err)
	}
	if e := relErr(mm.Outer.Segments[1].Length(), 1e-3*o.Outer.Segments[1].Length()); e > 1e-14 {
		t.Errorf("scaled bump length rel err %g", e)
	}
	if err := mm.Validate(); err != nil {
		t.Errorf("scaled outline invalid: %v", err)
	}
	for _, f := range []float64{0, -1, math.Inf(1), math.NaN()} {
		if _, err := o.Scaled(f); !errors.Is(err, ErrBadScale) {
			t.Errorf("scale %g: %v", f, err)
		}
	}
}

// A coarse spacing can cut across a thin gap: the discretised outline
// then crosses itself and DiscreteOutline.Validate says where.
func TestDiscreteValidateCatchesCoarseSpacing(t *testing.T) {
	// A unit circle with 5 nodes becomes the diamond |x| + |y| ≤ 1; a small
	// square from (0.45, 0.45) to (0.6, 0.6) is inside the circle but
	// crosses the diamond's side.
	c, _ := NewCircle(0, 0, 1, Attr{Spacing: count(t, 5)})
	two := Attr{Spacing: count(t, 2)}
	sq, _ := NewRectangle(0.45, 0.45, 0.6, 0.6, [4]Attr{two, two, two, two})
	o := Outline{Outer: c, Inner: []Loop{sq}}
	if err := o.Validate(); err != nil {
		t.Fatalf("curves are valid: %v", err)
	}
	n, _ := o.Normalise()
	d, _ := n.Discretise()
	err := d.Validate()
	if !errors.Is(err, ErrLoopsCross) {
		t.Errorf("coarse discretisation: got %v", err)
	}
	t.Log(err)
}

// A NACA 0012 body in a box: the section's area from the thickness
// formula integrated in closed form,
// A = 10t·c²·(⅔·0.2969 − 0.1260/2 − 0.3516/3 + 0.2843/4 − 0.1015/5)
// (Abbott and von Doenhoff §6.4 thickness law), against the area of the
// discretised loop with cosine clustering.
func TestNACABodyInBox(t *testing.T) {
	sec, err := NewNACA4("0012", 0.5, 0.25, 0.5, 0, false)
	if err != nil {
		t.Fatal(err)
	}
	cos, _ := Cosine(801)
	segs := sec.Segments(Attr{Tag: "aerofoil", Spacing: cos}, Attr{Tag: "aerofoil", Spacing: cos}, Attr{Tag: "base", Spacing: count(t, 3)})
	sp := count(t, 21)
	box, _ := NewRectangle(-1, -0.5, 2, 1.5, [4]Attr{{Tag: "farfield", Spacing: sp}, {Tag: "farfield", Spacing: sp}, {Tag: "farfield", Spacing: sp}, {Tag: "farfield", Spacing: sp}})
	o, err := Outline{Outer: box, Inner: []Loop{{Name: "wing", Segments: segs}}}.Normalise()
	if err != nil {
		t.Fatal(err)
	}
	d, err := o.Discretise()
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Validate(); err != nil {
		t.Fatal(err)
	}
	c, tk := 0.5, 0.12
	want := 10 * tk * c * c * (2.0/3*0.2969 - 0.1260/2 - 0.3516/3 + 0.2843/4 - 0.1015/5)
	got := -planar.Area(orb.Ring(d.Loops[1].Points))
	if e := relErr(got, want); e > 1e-5 {
		t.Errorf("NACA 0012 area %.10g want %.10g (rel %g)", got, want, e)
	}
	if e := relErr(planar.Area(orb.Ring(d.Loops[0].Points)), 6); e > 1e-15 {
		t.Errorf("box area %g want 6", planar.Area(orb.Ring(d.Loops[0].Points)))
	}
}
