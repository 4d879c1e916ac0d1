package geometry

import (
	"errors"
	"fmt"
	"strings"

	"github.com/paulmach/orb"
)

// The kinds of outline error; an *Error wraps one, so callers can test
// with errors.Is.
var (
	ErrNotClosed     = errors.New("loop is not closed")
	ErrSelfCrossing  = errors.New("loop crosses itself")
	ErrLoopsCross    = errors.New("loops cross")
	ErrOutside       = errors.New("inner loop is not inside the outer loop")
	ErrNested        = errors.New("inner loop lies inside another inner loop")
	ErrZeroLength    = errors.New("zero-length segment")
	ErrNoArea        = errors.New("loop encloses no area")
	ErrEmptyLoop     = errors.New("loop has no segments")
	ErrBadScale      = errors.New("invalid scale factor")
	ErrNotContinuous = errors.New("segments do not join")
	ErrNotOriented   = errors.New("loop runs the wrong way")
	ErrTooLarge      = errors.New("coordinates out of range")
)

// Error is an outline error located at a loop, a segment of it and,
// where it applies, a vertex of that segment and a point. Loop is 0 for
// the outer loop and k for inner loop k (Outline.Inner[k−1]); Segment and
// Vertex are -1 when they do not apply. Segment indices refer to the
// loop's segments in their given order.
type Error struct {
	Loop     int
	LoopName string
	Segment  int
	Kind     string // segment kind, "" when Segment is -1
	Vertex   int
	Point    orb.Point
	HasPoint bool
	Detail   string
	Err      error
}

func (e *Error) Error() string {
	var b strings.Builder
	if e.Loop >= 0 {
		b.WriteString(loopLabel(e.Loop, e.LoopName))
	}
	if e.Segment >= 0 {
		fmt.Fprintf(&b, ", segment %d (%s)", e.Segment, e.Kind)
	}
	if e.Vertex >= 0 {
		fmt.Fprintf(&b, ", vertex %d", e.Vertex)
	}
	if e.HasPoint {
		fmt.Fprintf(&b, " at (%.9g, %.9g)", e.Point[0], e.Point[1])
	}
	if b.Len() > 0 {
		b.WriteString(": ")
	}
	b.WriteString(e.Detail)
	if e.Err != nil {
		fmt.Fprintf(&b, ": %v", e.Err)
	}
	return b.String()
}

func (e *Error) Unwrap() error { return e.Err }

// loopLabel names a loop for messages: `outer loop "tunnel"` or
// `inner loop 2 "strut"`.
func loopLabel(i int, name string) string {
	s := "outer loop"
	if i > 0 {
		s = fmt.Sprintf("inner loop %d", i)
	}
	if name != "" {
		s += fmt.Sprintf(" %q", name)
	}
	return s
}
