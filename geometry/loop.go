package geometry

import (
	"fmt"
	"math"
)

// ClosureTolerance is the largest gap allowed where one segment ends and
// the next begins, and the shortest segment allowed, as a fraction of the
// outline size (the diagonal of its bounding box): 1e-9, far below any
// mesh spacing yet above the round-off of arcs given by angles.
const ClosureTolerance = 1e-9

// Loop is a closed chain of segments, each starting where the previous one
// ends and the last ending where the first starts.
type Loop struct {
	// Name names the loop in messages; it is also the boundary tag of any
	// segment that has none.
	Name     string
	Segments []Segment
	// Flipped is set by Normalise when it reversed the loop to orient it:
	// segment k of a flipped loop is segment n−1−k of the input, run
	// backwards.
	Flipped bool
	// ringEdges is set by the polygon readers, whose segment k is the
	// ring's edge from vertex k to vertex k+1: validation messages then name
	// segments by their vertices, as the file numbers them.
	ringEdges bool
}

// Outline is a region bounded by one outer loop and any number of inner
// loops (bodies or holes) inside it.
type Outline struct {
	Outer Loop
	Inner []Loop
}

// Loops returns the outer loop followed by the inner loops: loop index i
// in errors is Loops()[i].
func (o Outline) Loops() []Loop {
	return append([]Loop{o.Outer}, o.Inner...)
}

// defaultTag returns the tag an edge of loop i takes when neither its
// segment nor its loop names one: "outer", "inner1", "inner2", ...
func defaultTag(i int, l Loop) string {
	if l.Name != "" {
		return l.Name
	}
	if i == 0 {
		return "outer"
	}
	return fmt.Sprintf("inner%d", i)
}

// NewCircle returns a whole circle about (cx, cy) of radius r as a loop of
// one counter-clockwise 360° arc starting at angle 0.
func NewCircle(cx, cy, r float64, a Attr) (Loop, error) {
	arc, err := NewArc(cx, cy, r, 0, 360, a)
	if err != nil {
		return Loop{}, fmt.Errorf("circle: %w", err)
	}
	return Loop{Segments: []Segment{arc}}, nil
}

// NewRectangle returns the axis-aligned rectangle with opposite corners
// (x0, y0) and (x1, y1) as a counter-clockwise loop of four lines from its
// lower-left corner: bottom, right, top, left, carrying sides[0..3].
func NewRectangle(x0, y0, x1, y1 float64, sides [4]Attr) (Loop, error) {
	xa, xb := math.Min(x0, x1), math.Max(x0, x1)
	ya, yb := math.Min(y0, y1), math.Max(y0, y1)
	if !(xb > xa && yb > ya) || math.IsInf(xb-xa, 0) || math.IsInf(yb-ya, 0) {
		return Loop{}, fmt.Errorf("rectangle from (%g, %g) to (%g, %g) must have a positive finite width and height: %w", x0, y0, x1, y1, ErrSegment)
	}
	c := [5][2]float64{{xa, ya}, {xb, ya}, {xb, yb}, {xa, yb}, {xa, ya}}
	l := Loop{}
	for k := range 4 {
		line, _ := NewLine(c[k][0], c[k][1], c[k+1][0], c[k+1][1], sides[k])
		l.Segments = append(l.Segments, line)
	}
	return l, nil
}

// Reversed returns the loop run the other way: segments in reverse order,
// each reversed.
func (l Loop) Reversed() Loop {
	r := Loop{Name: l.Name, Segments: make([]Segment, len(l.Segments)), Flipped: !l.Flipped}
	for i, s := range l.Segments {
		r.Segments[len(l.Segments)-1-i] = s.Reversed()
	}
	return r
}

// Scaled returns the loop scaled by f about the origin.
func (l Loop) Scaled(f float64) Loop {
	r := Loop{Name: l.Name, Segments: make([]Segment, len(l.Segments)), Flipped: l.Flipped}
	for i, s := range l.Segments {
		r.Segments[i] = s.Scaled(f)
	}
	return r
}

// Scaled returns the outline with every coordinate and every spacing
// length multiplied by f (for instance 1e-3 to turn millimetres into
// metres). f must be positive and finite.
func (o Outline) Scaled(f float64) (Outline, error) {
	if !(f > 0) || math.IsInf(f, 0) {
		return Outline{}, fmt.Errorf("scale factor %g must be positive and finite: %w", f, ErrBadScale)
	}
	r := Outline{Outer: o.Outer.Scaled(f), Inner: make([]Loop, len(o.Inner))}
	for i, l := range o.Inner {
		r.Inner[i] = l.Scaled(f)
	}
	return r, nil
}
