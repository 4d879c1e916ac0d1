package geometry

import (
	"fmt"
	"math"
	"slices"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// edgeRef says where an edge of a checked ring comes from: the loop, the
// segment (-1 for a discretised loop) and the vertex index within the
// segment (-1 on sampled curves, whose sample points are not vertices).
type edgeRef struct {
	loop, seg, vert int
}

// ring is a loop as the validator sees it: an open ring of points (the
// closing edge implied) and the origin of each edge.
type ring struct {
	pts   []orb.Point
	edges []edgeRef
}

// checkSamples is the number of straight pieces a curve is checked with
// for crossings: curves are validated as fine polylines (at most 1/256 of
// a full turn per piece on an arc).
func checkSamples(s Segment) int {
	switch c := s.(type) {
	case *Arc:
		return max(8, int(math.Ceil(math.Abs(c.End-c.Start)/(2*math.Pi)*256)))
	case *Spline:
		return 8 * (len(c.pts) - 1)
	}
	return 128
}

// sampleSegment returns the points a segment is checked with (both ends
// included) and whether their indices are worth reporting as vertices.
func sampleSegment(s Segment) ([]orb.Point, bool) {
	switch v := s.(type) {
	case *Line:
		return v.Vertices(), false // a line's two vertices are its ends: no index to report
	case *Polyline:
		return v.Vertices(), true
	}
	n := checkSamples(s)
	pts := make([]orb.Point, n+1)
	for i := range pts {
		pts[i] = s.At(float64(i) / float64(n))
	}
	return pts, false
}

// Validate checks the outline: every loop has segments, no segment is
// shorter than the closure tolerance, each segment starts where the
// previous one ends (the last closing on the first) within
// ClosureTolerance × the outline size, no loop crosses or touches itself
// or another loop, every inner loop lies inside the outer loop and outside
// every other inner loop, and every loop encloses an area. Curves are
// checked as fine polylines (see checkSamples). The first problem found is
// returned as an *Error.
func (o Outline) Validate() error {
	_, err := o.check()
	return err
}

// Normalise validates the outline and orients it: the outer loop
// counter-clockwise and the inner loops clockwise, reversing (and marking
// Flipped) the loops that run the other way.
func (o Outline) Normalise() (Outline, error) {
	areas, err := o.check()
	if err != nil {
		return Outline{}, err
	}
	r := Outline{Outer: o.Outer, Inner: slices.Clone(o.Inner)}
	if areas[0] < 0 {
		r.Outer = r.Outer.Reversed()
	}
	flipped := areas[0] < 0
	for i := range r.Inner {
		if areas[i+1] > 0 {
			r.Inner[i] = r.Inner[i].Reversed()
			flipped = true
		}
	}
	if !flipped {
		return r, nil
	}
	// A reversed loop joins its segments at the other side of each joint
	// gap (within the closure tolerance), so check the result again.
	areas, err = r.check()
	if err != nil {
		return Outline{}, err
	}
	for i, a := range areas {
		if (i == 0) != (a > 0) {
			return Outline{}, &Error{Loop: i, LoopName: r.Loops()[i].Name, Segment: -1, Vertex: -1,
				Detail: "its orientation changes when it is reversed: the joint gaps, though within the closure tolerance, are as large as the loop's features", Err: ErrNotOriented}
		}
	}
	return r, nil
}

// check validates the outline and returns the signed area of each loop.
func (o Outline) check() ([]float64, error) {
	loops := o.Loops()
	rings := make([]ring, len(loops))
	bound := orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}
	for li, l := range loops {
		if len(l.Segments) == 0 {
			return nil, &Error{Loop: li, LoopName: l.Name, Segment: -1, Vertex: -1, Detail: "give at least one segment", Err: ErrEmptyLoop}
		}
		samples := make([][]orb.Point, len(l.Segments))
		own := make([]bool, len(l.Segments))
		total := 0
		for si, s := range l.Segments {
			if s == nil {
				return nil, &Error{Loop: li, LoopName: l.Name, Segment: si, Kind: "none", Vertex: -1, Detail: "segment is missing", Err: ErrEmptyLoop}
			}
			samples[si], own[si] = sampleSegment(s)
			total += len(samples[si]) - 1
		}
		rings[li].pts = make([]orb.Point, 0, total)
		rings[li].edges = make([]edgeRef, 0, total)
		for si, pts := range samples {
			for k, p := range pts {
				bound = bound.Extend(p)
				if k == len(pts)-1 {
					break
				}
				ref := edgeRef{li, si, -1}
				if own[si] {
					ref.vert = k
				}
				rings[li].pts = append(rings[li].pts, p)
				rings[li].edges = append(rings[li].edges, ref)
			}
		}
	}
	size := math.Hypot(bound.Max[0]-bound.Min[0], bound.Max[1]-bound.Min[1])
	if err := checkExtent(bound); err != nil {
		return nil, err
	}
	tol := ClosureTolerance * size
	for li, l := range loops {
		n := len(l.Segments)
		for si, s := range l.Segments {
			if L := s.Length(); !(L > tol) {
				return nil, &Error{Loop: li, LoopName: l.Name, Segment: si, Kind: s.Kind(), Vertex: -1,
					Point: s.At(0), HasPoint: true,
					Detail: fmt.Sprintf("length %g is not above the closure tolerance %g (%g × outline size %g)", L, tol, ClosureTolerance, size),
					Err:    ErrZeroLength}
			}
		}
		for si, s := range l.Segments {
			next := l.Segments[(si+1)%n]
			end, start := s.At(1), next.At(0)
			if gap := math.Hypot(end[0]-start[0], end[1]-start[1]); !(gap <= tol) {
				what := fmt.Sprintf("segment %d (%s)", (si+1)%n, next.Kind())
				if si == n-1 {
					what = "the first segment (" + next.Kind() + ")"
				}
				return nil, &Error{Loop: li, LoopName: l.Name, Segment: si, Kind: s.Kind(), Vertex: -1,
					Point: end, HasPoint: true,
					Detail: fmt.Sprintf("ends here but %s starts at (%.9g, %.9g): gap %.3g exceeds the closure tolerance %.3g (%g × outline size)", what, start[0], start[1], gap, tol, ClosureTolerance),
					Err:    ErrNotClosed}
			}
		}
	}
	return checkRings(rings, loops, size)
}

// checkRings checks rings for crossings, area and containment and returns
// their signed areas. loops supplies names and segment kinds for messages
// (nil entries' segments for discretised loops).
func checkRings(rings []ring, loops []Loop, size float64) ([]float64, error) {
	locate := func(r edgeRef, p orb.Point, detail string, err error) *Error {
		e := &Error{Loop: r.loop, Segment: r.seg, Vertex: r.vert, Point: p, HasPoint: true, Detail: detail, Err: err}
		if r.loop < len(loops) {
			e.LoopName = loops[r.loop].Name
			if r.seg >= 0 {
				e.Kind = loops[r.loop].Segments[r.seg].Kind()
			}
		}
		return e
	}
	describe := func(r edgeRef, same bool) string {
		s := ""
		if !same {
			name := ""
			if r.loop < len(loops) {
				name = loops[r.loop].Name
			}
			s = loopLabel(r.loop, name) + ", "
		}
		if r.seg >= 0 && r.loop < len(loops) && loops[r.loop].ringEdges {
			s += fmt.Sprintf("the edge from vertex %d", r.seg)
		} else if r.seg >= 0 {
			s += fmt.Sprintf("segment %d (%s)", r.seg, loops[r.loop].Segments[r.seg].Kind())
			if r.vert >= 0 {
				s += fmt.Sprintf(" edge from vertex %d", r.vert)
			}
		} else {
			s += fmt.Sprintf("the edge from vertex %d", r.vert)
		}
		return s
	}
	if a, b, p, ok := findCrossing(rings); ok {
		ra, rb := rings[a[0]].edges[a[1]], rings[b[0]].edges[b[1]]
		if ra.loop > rb.loop || (ra.loop == rb.loop && (ra.seg > rb.seg || (ra.seg == rb.seg && ra.vert > rb.vert))) {
			ra, rb = rb, ra
		}
		// Where the two edges meet at a vertex of each, the loops (or the
		// loop's two parts) touch at a point rather than cross; the domain
		// would be pinched there to nothing, which no mesh can fill.
		touches := isEnd(rings[a[0]], a[1], p) && isEnd(rings[b[0]], b[1], p)
		if ra.loop == rb.loop {
			touch := ""
			if touches {
				touch = " at a vertex of both, so the loop touches itself there, pinching the region it bounds"
			}
			return nil, locate(ra, p, "meets "+describe(rb, true)+touch, ErrSelfCrossing)
		}
		touch := ""
		if touches {
			touch = " at a vertex of both, so the loops touch there: keep them apart, or draw them as one loop"
		}
		return nil, locate(ra, p, "meets "+describe(rb, false)+touch, ErrLoopsCross)
	}
	areas := make([]float64, len(rings))
	for i, r := range rings {
		areas[i] = planar.Area(orb.Ring(r.pts))
		if len(r.pts) < 3 || !(math.Abs(areas[i]) > 1e-12*size*size) {
			return nil, locate(r.edges[0], r.pts[0], fmt.Sprintf("signed area %g: a loop must enclose a region", areas[i]), ErrNoArea)
		}
	}
	outer := orb.Ring(rings[0].pts)
	for i := 1; i < len(rings); i++ {
		p := rings[i].pts[0]
		if !planar.RingContains(outer, p) {
			return nil, locate(rings[i].edges[0], p, "this point lies outside the outer loop", ErrOutside)
		}
		for j := 1; j < len(rings); j++ {
			if j != i && planar.RingContains(orb.Ring(rings[j].pts), p) {
				name := ""
				if j < len(loops) {
					name = loops[j].Name
				}
				return nil, locate(rings[i].edges[0], p, "this point lies inside "+loopLabel(j, name)+"; inner loops must be side by side, not nested", ErrNested)
			}
		}
	}
	return areas, nil
}

// MaxCoordinate bounds the magnitude of outline coordinates, so that the
// products in areas and orientation tests cannot overflow.
const MaxCoordinate = 1e100

func checkExtent(b orb.Bound) error {
	for _, v := range []float64{b.Min[0], b.Min[1], b.Max[0], b.Max[1]} {
		if !(math.Abs(v) <= MaxCoordinate) {
			return &Error{Loop: -1, Segment: -1, Vertex: -1,
				Detail: fmt.Sprintf("outline reaches coordinate %g; coordinates must be finite and within ±%g", v, MaxCoordinate), Err: ErrTooLarge}
		}
	}
	return nil
}

// sweepEdge is an edge in the crossing sweep: ring r, edge k, its range
// along the sweep axis (x0, x1) and across it (y0, y1).
type sweepEdge struct {
	r, k           int
	x0, x1, y0, y1 float64
}

// findCrossing returns two edges (as [ring, edge] pairs) that cross,
// touch or overlap, with a point they share. Edges next to each other in
// a ring share an end point by construction and count only if they fold
// back over each other. A sweep along the bounding box's longer axis
// keeps only the edges whose ranges on that axis overlap the current one;
// the order is fixed by (position, ring, edge) so the answer is
// deterministic.
func findCrossing(rings []ring) (a, b [2]int, p orb.Point, ok bool) {
	total := 0
	for _, rg := range rings {
		total += len(rg.pts)
	}
	// Sweep along the longer side of the bounding box, so a tall narrow
	// outline does not put every edge in the active set at once.
	box := orb.Bound{Min: rings[0].pts[0], Max: rings[0].pts[0]}
	for _, rg := range rings {
		for _, p := range rg.pts {
			box = box.Extend(p)
		}
	}
	u, v := 0, 1
	if box.Max[1]-box.Min[1] > box.Max[0]-box.Min[0] {
		u, v = 1, 0
	}
	edges := make([]sweepEdge, 0, total)
	for r, rg := range rings {
		n := len(rg.pts)
		for k := range n {
			p, q := rg.pts[k], rg.pts[(k+1)%n]
			edges = append(edges, sweepEdge{r, k, math.Min(p[u], q[u]), math.Max(p[u], q[u]), math.Min(p[v], q[v]), math.Max(p[v], q[v])})
		}
	}
	slices.SortFunc(edges, func(a, b sweepEdge) int {
		if a.x0 != b.x0 {
			if a.x0 < b.x0 {
				return -1
			}
			return 1
		}
		if a.r != b.r {
			return a.r - b.r
		}
		return a.k - b.k
	})
	var active []sweepEdge
	for _, e := range edges {
		keep := active[:0]
		for _, f := range active {
			if f.x1 >= e.x0 {
				keep = append(keep, f)
			}
		}
		active = keep
		for _, f := range active {
			if f.y1 < e.y0 || e.y1 < f.y0 {
				continue
			}
			if pt, hit := edgesMeet(rings, f, e); hit {
				return [2]int{f.r, f.k}, [2]int{e.r, e.k}, pt, true
			}
		}
		active = append(active, e)
	}
	return a, b, p, false
}

// edgesMeet reports whether two ring edges cross, touch or overlap.
func edgesMeet(rings []ring, f, e sweepEdge) (orb.Point, bool) {
	pts := rings[f.r].pts
	n := len(pts)
	p1, p2 := pts[f.k], pts[(f.k+1)%n]
	q := rings[e.r].pts
	m := len(q)
	p3, p4 := q[e.k], q[(e.k+1)%m]
	if f.r == e.r && n >= 2 {
		next, prev := (f.k+1)%n == e.k, (e.k+1)%n == f.k
		if next && prev { // a two-edge ring: the edges are the same line
			return p2, true
		}
		if next {
			return p2, foldsBack(p1, p2, p4)
		}
		if prev {
			return p1, foldsBack(p3, p1, p2)
		}
	}
	return segmentsMeet(p1, p2, p3, p4)
}

// foldsBack reports whether edges a→b and b→c overlap beyond b: collinear
// and turning back.
func foldsBack(a, b, c orb.Point) bool {
	return orient(a, b, c) == 0 && (a[0]-b[0])*(c[0]-b[0])+(a[1]-b[1])*(c[1]-b[1]) > 0
}

// orient returns twice the signed area of triangle a, b, c, with the
// coordinates shifted to a first to limit round-off.
func orient(a, b, c orb.Point) float64 {
	return (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
}

// segmentsMeet reports whether the closed segments p1p2 and p3p4 share a
// point, and one such point.
func segmentsMeet(p1, p2, p3, p4 orb.Point) (orb.Point, bool) {
	d1, d2 := orient(p3, p4, p1), orient(p3, p4, p2)
	d3, d4 := orient(p1, p2, p3), orient(p1, p2, p4)
	if ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0)) {
		t := d1 / (d1 - d2)
		return orb.Point{p1[0] + t*(p2[0]-p1[0]), p1[1] + t*(p2[1]-p1[1])}, true
	}
	switch {
	case d1 == 0 && onSegment(p3, p4, p1):
		return p1, true
	case d2 == 0 && onSegment(p3, p4, p2):
		return p2, true
	case d3 == 0 && onSegment(p1, p2, p3):
		return p3, true
	case d4 == 0 && onSegment(p1, p2, p4):
		return p4, true
	}
	return orb.Point{}, false
}

// onSegment reports whether p, collinear with a and b, lies between them.
func onSegment(a, b, p orb.Point) bool {
	return math.Min(a[0], b[0]) <= p[0] && p[0] <= math.Max(a[0], b[0]) &&
		math.Min(a[1], b[1]) <= p[1] && p[1] <= math.Max(a[1], b[1])
}

// Validate checks a discretised outline the way Outline.Validate checks
// curves: every loop has at least three nodes and no zero-length edge, no
// edge crosses or touches another, inner loops lie inside the outer loop
// and not inside each other, and the loops are oriented (outer
// counter-clockwise, inner clockwise). A coarse spacing can make the
// discretised outline cross itself where the curves do not, so meshers
// should check what they are given.
func (d DiscreteOutline) Validate() error {
	if len(d.Loops) == 0 {
		return &Error{Loop: -1, Segment: -1, Vertex: -1, Detail: "discretised outline has no loops", Err: ErrEmptyLoop}
	}
	rings := make([]ring, len(d.Loops))
	bound := orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}
	for li, l := range d.Loops {
		n := len(l.Points)
		if n < 3 || len(l.Tags) != n {
			return &Error{Loop: li, Segment: -1, Vertex: -1, Detail: fmt.Sprintf("%d nodes and %d edge tags: a loop needs at least 3 nodes and one tag per edge", n, len(l.Tags)), Err: ErrNoArea}
		}
		for k, p := range l.Points {
			bound = bound.Extend(p)
			if q := l.Points[(k+1)%n]; p == q {
				return &Error{Loop: li, Segment: -1, Vertex: k, Point: p, HasPoint: true, Detail: fmt.Sprintf("nodes %d and %d coincide", k, (k+1)%n), Err: ErrZeroLength}
			}
			rings[li].edges = append(rings[li].edges, edgeRef{li, -1, k})
		}
		rings[li].pts = l.Points
	}
	if err := checkExtent(bound); err != nil {
		return err
	}
	size := math.Hypot(bound.Max[0]-bound.Min[0], bound.Max[1]-bound.Min[1])
	areas, err := checkRings(rings, nil, size)
	if err != nil {
		return err
	}
	for i, a := range areas {
		if (i == 0) != (a > 0) {
			want := "clockwise"
			if i == 0 {
				want = "counter-clockwise"
			}
			return &Error{Loop: i, Segment: -1, Vertex: -1, Detail: fmt.Sprintf("signed area %g: the loop must run %s", a, want), Err: ErrNotOriented}
		}
	}
	return nil
}

// isEnd reports whether p is an end of edge e of ring r (from pts[e] to
// the next point, the last edge closing the ring).
func isEnd(r ring, e int, p orb.Point) bool {
	return p == r.pts[e] || p == r.pts[(e+1)%len(r.pts)]
}
