package geometry

import (
	"errors"
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// ErrFormat marks input that a reader cannot turn into an outline.
var ErrFormat = errors.New("invalid outline file")

// EdgeTag tags a range of edges of one polygon ring: edges From through To
// (inclusive, counted from 0, edge k running from vertex k to vertex k+1
// in the file's order) of ring Ring (0 the exterior ring, k the k-th hole)
// of polygon Polygon (0 for a Polygon, the polygon's index within a
// MultiPolygon).
type EdgeTag struct {
	Polygon int    `json:"polygon"`
	Ring    int    `json:"ring"`
	From    int    `json:"from"`
	To      int    `json:"to"`
	Tag     string `json:"tag"`
}

// PolygonTags says how to tag the edges of polygons read from a file:
// ranges in Edges win, then Tag for every edge of the polygon, then the
// default, one tag per loop: "outer", "inner1", "inner2", ... Overlapping
// ranges are an error.
type PolygonTags struct {
	Tag   string
	Edges []EdgeTag
}

// The rules that make a ring closed, cited in errors by the format read.
const (
	geojsonRingRule = "RFC 7946 §3.1.6"
	wktRingRule     = "OGC Simple Features: a LinearRing is a closed LineString"
)

// polygonOutline turns one polygon (closed rings, exterior first) into an
// outline of one line segment per ring edge, tagged by tags, then
// validates and orients it. where names the polygon in errors, rule the
// format's rule for closed rings.
func polygonOutline(p orb.Polygon, tags PolygonTags, polygon int, where, rule string) (Outline, error) {
	if len(p) == 0 {
		return Outline{}, fmt.Errorf("%s has no rings: %w", where, ErrFormat)
	}
	edgeTags := make([][]string, len(p))
	for ri, r := range p {
		if len(r) < 4 || r[0] != r[len(r)-1] {
			return Outline{}, fmt.Errorf("%s ring %d: a ring must be closed (last position equal to the first) with at least 4 positions (%s), got %d positions: %w", where, ri, rule, len(r), ErrFormat)
		}
		edgeTags[ri] = make([]string, len(r)-1)
	}
	for k, e := range tags.Edges {
		if e.Polygon != polygon {
			continue
		}
		if e.Ring < 0 || e.Ring >= len(p) {
			return Outline{}, fmt.Errorf("%s: edge tag range %d names ring %d, but the polygon has rings 0 to %d: %w", where, k, e.Ring, len(p)-1, ErrFormat)
		}
		n := len(edgeTags[e.Ring])
		if e.From < 0 || e.To < e.From || e.To >= n {
			return Outline{}, fmt.Errorf("%s: edge tag range %d (%d to %d) must lie within edges 0 to %d of ring %d with from ≤ to: %w", where, k, e.From, e.To, n-1, e.Ring, ErrFormat)
		}
		if e.Tag == "" {
			return Outline{}, fmt.Errorf("%s: edge tag range %d has an empty tag: %w", where, k, ErrFormat)
		}
		for i := e.From; i <= e.To; i++ {
			if edgeTags[e.Ring][i] != "" {
				return Outline{}, fmt.Errorf("%s: edge tag range %d tags edge %d of ring %d, already tagged %q by an earlier range: %w", where, k, i, e.Ring, edgeTags[e.Ring][i], ErrFormat)
			}
			edgeTags[e.Ring][i] = e.Tag
		}
	}
	var o Outline
	for ri, r := range p {
		l := Loop{ringEdges: true}
		for k := range len(r) - 1 {
			t := edgeTags[ri][k]
			if t == "" {
				t = tags.Tag
			}
			if t == "" {
				t = defaultTag(ri, Loop{})
			}
			a, b := r[k], r[k+1]
			for _, q := range []orb.Point{a, b} {
				if math.IsNaN(q[0]) || math.IsNaN(q[1]) || math.IsInf(q[0], 0) || math.IsInf(q[1], 0) {
					return Outline{}, fmt.Errorf("%s ring %d vertex %d (%g, %g) is not finite: %w", where, ri, k, q[0], q[1], ErrFormat)
				}
			}
			l.Segments = append(l.Segments, &Line{A: a, B: b, attr: Attr{Tag: t}})
		}
		if ri == 0 {
			o.Outer = l
		} else {
			o.Inner = append(o.Inner, l)
		}
	}
	n, err := o.Normalise()
	if err != nil {
		return Outline{}, fmt.Errorf("%s: %w", where, ringError(err, p))
	}
	return n, nil
}

// ringError restates an outline error in the file's own terms: loop k is
// ring k of the polygon and segment e of a ring is its edge from vertex e
// to vertex e+1, so the message names the ring and the vertices as the
// file numbers them.
func ringError(err error, p orb.Polygon) error {
	var ge *Error
	if !errors.As(err, &ge) || ge.Loop < 0 || ge.Loop >= len(p) {
		return err
	}
	ring := "exterior ring 0"
	if ge.Loop > 0 {
		ring = fmt.Sprintf("hole ring %d", ge.Loop)
	}
	if ge.Segment < 0 {
		return fmt.Errorf("%s: %s: %w", ring, ge.Detail, errOrFormat(ge.Err))
	}
	at := ""
	if ge.HasPoint {
		at = fmt.Sprintf(" at (%.9g, %.9g)", ge.Point[0], ge.Point[1])
	}
	return fmt.Errorf("%s, edge from vertex %d to vertex %d%s: %s: %w", ring, ge.Segment, ge.Segment+1, at, ge.Detail, errOrFormat(ge.Err))
}

func errOrFormat(err error) error {
	if err == nil {
		return ErrFormat
	}
	return err
}
