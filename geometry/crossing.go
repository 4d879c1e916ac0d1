package geometry

import (
	"slices"

	"github.com/paulmach/orb"
)

// Piece is a straight piece from A to B, for FirstCrossing.
type Piece struct{ A, B orb.Point }

// FirstCrossing returns two pieces of segs that cross, touch or overlap,
// with a point they share, leaving out the pairs for which skip(i, j) is
// true (such as neighbours along a line, which share an end by
// construction). A sweep along x keeps only the segments whose x ranges
// overlap the current one, and the segments are taken in the order of
// their left ends, then of their index, so the answer is deterministic.
// The test is the one outline validation uses (orientation signs with the
// coordinates taken relative to a segment's end).
func FirstCrossing(segs []Piece, skip func(i, j int) bool) (i, j int, p orb.Point, ok bool) {
	type box struct{ x0, x1, y0, y1 float64 }
	boxes := make([]box, len(segs))
	order := make([]int32, len(segs))
	for k, s := range segs {
		boxes[k] = box{min(s.A[0], s.B[0]), max(s.A[0], s.B[0]), min(s.A[1], s.B[1]), max(s.A[1], s.B[1])}
		order[k] = int32(k)
	}
	slices.SortFunc(order, func(a, b int32) int {
		if xa, xb := boxes[a].x0, boxes[b].x0; xa != xb {
			if xa < xb {
				return -1
			}
			return 1
		}
		return int(a - b)
	})
	var active []int32
	for _, e := range order {
		be := boxes[e]
		keep := active[:0]
		for _, f := range active {
			if boxes[f].x1 >= be.x0 {
				keep = append(keep, f)
			}
		}
		active = keep
		for _, f := range active {
			bf := boxes[f]
			if bf.y1 < be.y0 || be.y1 < bf.y0 || skip(int(f), int(e)) {
				continue
			}
			if pt, hit := segmentsMeet(segs[f].A, segs[f].B, segs[e].A, segs[e].B); hit {
				return int(f), int(e), pt, true
			}
		}
		active = append(active, e)
	}
	return 0, 0, orb.Point{}, false
}
