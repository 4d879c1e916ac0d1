package geometry

import (
	"errors"
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// DiscretiseSegment returns the nodes of a segment, both ends included,
// placed by its spacing law at the arc-length fractions the law gives
// (Spacing.Fractions); with the zero law, the segment's own vertices.
func DiscretiseSegment(s Segment) ([]orb.Point, error) {
	sp := s.Attr().Spacing
	if sp.KeepsVertices() {
		v, ok := s.(vertexed)
		if !ok {
			return nil, fmt.Errorf("a %s has no vertices of its own: give it a spacing law (count, size, growth or clustering): %w", s.Kind(), ErrSpacing)
		}
		return append([]orb.Point(nil), v.Vertices()...), nil
	}
	f, err := sp.Fractions(s.Length())
	if err != nil {
		return nil, err
	}
	pts := make([]orb.Point, len(f))
	for i, fi := range f {
		pts[i] = s.At(fi)
	}
	return pts, nil
}

// Discretise returns the loop's nodes (each joint once, the closing edge
// implied) with one tag per edge, and the node index at which each
// segment starts, so a structured mesher can find the corners and sides
// at segment joints. An edge takes its segment's tag, or the loop's name
// when the segment has none.
func (l Loop) Discretise() (DiscreteLoop, []int, error) {
	return discretiseLoop(l, 0)
}

func discretiseLoop(l Loop, index int) (DiscreteLoop, []int, error) {
	var d DiscreteLoop
	starts := make([]int, len(l.Segments))
	tag := defaultTag(index, l)
	for si, s := range l.Segments {
		pts, err := DiscretiseSegment(s)
		if err != nil {
			return DiscreteLoop{}, nil, &Error{Loop: index, LoopName: l.Name, Segment: si, Kind: s.Kind(), Vertex: -1, Detail: "cannot place nodes", Err: err}
		}
		starts[si] = len(d.Points)
		t := s.Attr().Tag
		if t == "" {
			t = tag
		}
		for _, p := range pts[:len(pts)-1] {
			d.Points = append(d.Points, p)
			d.Tags = append(d.Tags, t)
		}
	}
	return d, starts, nil
}

// Discretise returns the discretised outline: the outer loop first, then
// the inner loops, every edge tagged from its segment (or, failing that,
// its loop's name, or "outer", "inner1", "inner2", ...). Normalise the
// outline first so the loops come out oriented.
func (o Outline) Discretise() (DiscreteOutline, error) {
	var d DiscreteOutline
	for i, l := range o.Loops() {
		dl, _, err := discretiseLoop(l, i)
		if err != nil {
			return DiscreteOutline{}, err
		}
		d.Loops = append(d.Loops, dl)
	}
	return d, nil
}

// DiscretiseChain returns the nodes of an ordered run of segments, each
// starting where the previous one ends (within ClosureTolerance × the
// run's size), as one open chain: joints once, both far ends included,
// every edge tagged from its segment. Its errors are *ChainError, which
// name the segments by their place in segs; NameChain names them as the
// caller knows them.
func DiscretiseChain(segs []Segment) (Chain, error) {
	if len(segs) == 0 {
		return Chain{}, fmt.Errorf("chain has no segments: %w", ErrEmptyLoop)
	}
	var c Chain
	bound := orb.Bound{Min: segs[0].At(0), Max: segs[0].At(0)}
	for _, s := range segs {
		bound = bound.Extend(s.At(0)).Extend(s.At(1))
	}
	size := math.Hypot(bound.Max[0]-bound.Min[0], bound.Max[1]-bound.Min[1])
	tol := ClosureTolerance * size
	for si, s := range segs {
		if si > 0 {
			end, start := segs[si-1].At(1), s.At(0)
			if gap := math.Hypot(end[0]-start[0], end[1]-start[1]); !(gap <= tol) {
				return Chain{}, &ChainError{Index: si, Kind: s.Kind(), PrevKind: segs[si-1].Kind(),
					End: end, Start: start, Gap: gap, Tol: tol, Size: size, Err: ErrNotContinuous}
			}
		}
		pts, err := DiscretiseSegment(s)
		if err != nil {
			return Chain{}, &ChainError{Index: si, Kind: s.Kind(), Err: err}
		}
		edges := len(pts) - 1
		if si > 0 {
			pts = pts[1:] // the joint is already the previous segment's end
		}
		c.Points = append(c.Points, pts...)
		for range edges {
			c.Tags = append(c.Tags, s.Attr().Tag)
		}
		// The segment's first point (the joint, or the chain's start) and
		// its last are not smooth; its inner points are if it is curved.
		if si == 0 {
			c.Smooth = append(c.Smooth, false)
		}
		for k := 1; k < edges; k++ {
			c.Smooth = append(c.Smooth, Curved(s))
		}
		c.Smooth = append(c.Smooth, false)
	}
	return c, nil
}

// Curved reports whether a segment is a curve that runs smoothly between
// the points it is discretised at (an arc, a spline or a NACA surface),
// rather than straight pieces (a line, a polyline).
func Curved(s Segment) bool {
	switch s.(type) {
	case *Arc, *Spline, *nacaSurface:
		return true
	}
	return false
}

// ChainError is an error at segment Index (from 0, in the order given) of
// a chain given to DiscretiseChain: either its nodes cannot be placed (Err
// is the spacing error), or it does not start where segment Index−1 ends
// (Err is ErrNotContinuous; End is where segment Index−1 ends, Start where
// segment Index starts, Gap the distance between them and Tol the largest
// gap allowed, ClosureTolerance × Size, the diagonal of the chain's
// bounding box). Lengths are in the outline's units (metres).
//
// The geometry package does not know what a case calls its segments:
// Name and PrevName are empty, and the message says "segment 2", until a
// caller that knows the names sets them (NameChain).
type ChainError struct {
	Index          int
	Kind, PrevKind string
	Name, PrevName string
	End, Start     orb.Point
	Gap, Tol, Size float64
	Err            error
}

func (e *ChainError) Error() string {
	this := chainSegmentLabel(e.Index, e.Name, e.Kind)
	if !errors.Is(e.Err, ErrNotContinuous) {
		return fmt.Sprintf("chain %s: %v", this, e.Err)
	}
	prev := chainSegmentLabel(e.Index-1, e.PrevName, e.PrevKind)
	d := DistinctDigits(e.Start, e.End)
	return fmt.Sprintf("chain %s starts at (%.*g, %.*g) but %s before it ends at (%.*g, %.*g): gap %.4g exceeds the closure tolerance %.3g (%g × the chain's size %.4g); each segment must start where the one before it ends: %v",
		this, d, e.Start[0], d, e.Start[1], prev, d, e.End[0], d, e.End[1], e.Gap, e.Tol, ClosureTolerance, e.Size, e.Err)
}

func (e *ChainError) Unwrap() error { return e.Err }

// NameChain returns err with the segments of a *ChainError named:
// names[i] names segment i of the chain (the names the case gave). Any
// other error, or names too short, returns err as it is.
func NameChain(err error, names []string) error {
	ce, ok := err.(*ChainError)
	if !ok || ce.Index >= len(names) {
		return err
	}
	named := *ce
	named.Name = names[ce.Index]
	if ce.Index > 0 {
		named.PrevName = names[ce.Index-1]
	}
	return &named
}

// chainSegmentLabel names a chain segment for messages: `segment "roof"
// (line)` when named, else `segment 2 (line)`.
func chainSegmentLabel(i int, name, kind string) string {
	if name != "" {
		return fmt.Sprintf("segment %q (%s)", name, kind)
	}
	return fmt.Sprintf("segment %d (%s)", i, kind)
}

// NodeCount returns the number of nodes the loop's discretisation will
// have (each joint once), from the spacing laws alone and without placing
// any node: cheap enough to estimate a mesh size before allocating it.
func (l Loop) NodeCount() (int, error) {
	n := 0
	for si, s := range l.Segments {
		sp := s.Attr().Spacing
		var k int
		if sp.KeepsVertices() {
			v, ok := s.(vertexed)
			if !ok {
				return 0, &Error{Loop: -1, LoopName: l.Name, Segment: si, Kind: s.Kind(), Vertex: -1,
					Detail: "has no vertices of its own: give it a spacing law", Err: ErrSpacing}
			}
			k = len(v.Vertices())
		} else {
			var err error
			if k, err = sp.NodeCount(s.Length()); err != nil {
				return 0, &Error{Loop: -1, LoopName: l.Name, Segment: si, Kind: s.Kind(), Vertex: -1, Detail: "cannot count nodes", Err: err}
			}
		}
		n += k - 1
	}
	return n, nil
}

// Area returns the area of the region a discretised outline bounds: the
// signed shoelace areas of its loops summed (the inner loops, clockwise,
// subtract), each shifted to its first node for round-off as orb's planar
// package does.
func (d DiscreteOutline) Area() float64 {
	a := 0.0
	for _, l := range d.Loops {
		a += signedArea(l.Points)
	}
	return a
}
