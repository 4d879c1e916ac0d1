package unstructured

import (
	"math"
	"slices"

	"github.com/paulmach/orb"
)

// minQuadQuality is the least angle quality of a quadrilateral made by
// pairing: every angle between 36° and 144°.
const minQuadQuality = 0.4

// angleQuality is the angle-based quality of a convex polygon with
// corners p: 1 − max_i |θ_i − θ*| / θ*', where θ* is the ideal angle
// (60° for a triangle, 90° for a quadrilateral) and θ*' the largest
// possible deviation (120° and 90°); 1 for the equilateral triangle and
// the square, 0 for a degenerate cell (the "equiangle skewness" of common
// practice, as one minus it).
func angleQuality(p ...orb.Point) float64 {
	n := len(p)
	ideal := math.Pi * float64(n-2) / float64(n)
	span := math.Pi - ideal
	if n == 3 {
		span = ideal * 2
	}
	worst := 0.0
	for i := range n {
		a, b, c := p[(i+n-1)%n], p[i], p[(i+1)%n]
		ux, uy := a[0]-b[0], a[1]-b[1]
		vx, vy := c[0]-b[0], c[1]-b[1]
		th := math.Atan2(ux*vy-uy*vx, ux*vx+uy*vy)
		if th < 0 {
			// A reflex corner, seen from the counter-clockwise side.
			th += 2 * math.Pi
		}
		th = 2*math.Pi - th
		worst = math.Max(worst, math.Abs(th-ideal))
	}
	return math.Max(0, 1-worst/span)
}

// pairQuads matches inside triangles across unconstrained edges into
// quadrilaterals where the quadrilateral's angle quality is above both
// minQuadQuality and the quality of the worse of its two triangles.
// Candidates are taken greedily from the best quadrilateral down (ties by
// edge index, so the result is deterministic). It returns, per triangle,
// the half-edge it shares with its partner, or -1.
func (tr *triangulation) pairQuads() []int32 {
	nt := tr.numTri()
	type cand struct {
		e int32
		q float64
	}
	var cands []cand
	q3 := make([]float64, nt)
	for t := int32(0); t < nt; t++ {
		if tr.flag[t]&flagInside != 0 {
			q3[t] = angleQuality(tr.pts[tr.v[3*t]], tr.pts[tr.v[3*t+1]], tr.pts[tr.v[3*t+2]])
		}
	}
	for e := int32(0); e < 3*nt; e++ {
		f := tr.adj[e]
		t, u := e/3, f/3
		if f < e || tr.seg[e] != noSeg || tr.flag[t]&flagInside == 0 || tr.flag[u]&flagInside == 0 {
			continue
		}
		a, b, c, d := tr.v[e], tr.v[f], tr.v[prev(e)], tr.v[prev(f)]
		pa, pd, pb, pc := tr.pts[a], tr.pts[d], tr.pts[b], tr.pts[c]
		if orient2d(pa, pd, pb) <= 0 || orient2d(pd, pb, pc) <= 0 || orient2d(pb, pc, pa) <= 0 || orient2d(pc, pa, pd) <= 0 {
			continue
		}
		q := angleQuality(pa, pd, pb, pc)
		if q >= minQuadQuality && q > math.Min(q3[t], q3[u]) {
			cands = append(cands, cand{e, q})
		}
	}
	slices.SortStableFunc(cands, func(x, y cand) int {
		switch {
		case x.q > y.q:
			return -1
		case x.q < y.q:
			return 1
		}
		return 0
	})
	partner := make([]int32, nt)
	for i := range partner {
		partner[i] = -1
	}
	for _, c := range cands {
		t, u := c.e/3, tr.adj[c.e]/3
		if partner[t] < 0 && partner[u] < 0 {
			partner[t], partner[u] = c.e, tr.adj[c.e]
		}
	}
	return partner
}
