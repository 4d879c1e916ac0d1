package quality

import (
	"math"
	"sync"

	"cvdeck/mesh"
)

// computeDualClosure returns, for each node, the closure error of its
// median-dual control volume: the region bounded, inside each cell around
// the node, by the segments from the midpoints of the node's two edges to
// the cell centroid, and on the boundary by the halves of the boundary faces
// at the node (Barth and Jespersen 1989, AIAA 89-0366, and common practice
// for vertex-centred schemes). Each dual face a→b, traversed
// counter-clockwise around the node, has outward normal vector
// (b_y − a_y, −(b_x − a_x)); the closure error is |Σ S n| / Σ |S| over the
// node's dual faces. The dual face from the midpoint m_k of cell edge
// p_k p_{k+1} to the centroid c bounds both end nodes, outward +N for p_k
// (traversed m_k → c) and −N for p_{k+1} (traversed c → m_k). Edge
// midpoints are ½(p + q), a symmetric expression, so both cells of an edge
// use the same point. Unused nodes get NaN.
//
// The cells are split into two fixed halves scattered into separate sums
// (the second half followed by the boundary faces), added at the end, so
// the result does not depend on scheduling. The three sums of a node lie
// together, in one cache line or two.
func computeDualClosure(m *mesh.Mesh, d *dualSums) []float64 {
	nn, nc := len(m.Nodes), m.NumCells()
	var wg sync.WaitGroup
	for h := range d.half {
		acc := resize(&d.half[h], nn)
		wg.Add(1)
		go func(lo, hi int, boundary bool) {
			defer wg.Done()
			// Each half is cleared here, side by side with the other, not
			// both by the caller before they start: 1M nodes in fresh
			// memory, 105-134 ms to 47-56 ms (reused memory unchanged).
			clear(acc)
			for c := lo; c < hi; c++ {
				idx := m.CellNodes[m.CellStart[c]:m.CellStart[c+1]]
				cc := m.Geo.CellCentroid[c]
				n := len(idx)
				v := idx[0]
				p := m.Nodes[v]
				for k := 0; k < n; k++ {
					w := idx[0]
					if k+1 < n {
						w = idx[k+1]
					}
					q := m.Nodes[w]
					dx, dy := cc[0]-0.5*(p[0]+q[0]), cc[1]-0.5*(p[1]+q[1])
					l := math.Sqrt(dx*dx + dy*dy)
					a, b := &acc[v], &acc[w]
					a.x += dy
					a.y -= dx
					a.s += l
					b.x -= dy
					b.y += dx
					b.s += l
					v, p = w, q
				}
			}
			if !boundary {
				return
			}
			for f := m.NumInterior; f < m.NumFaces(); f++ {
				fn := m.FaceNodes[f]
				pa, pb := m.Nodes[fn[0]], m.Nodes[fn[1]]
				mid := m.Geo.FaceMid[f]
				// Half a→mid bounds node a, half mid→b node b.
				a, b := &acc[fn[0]], &acc[fn[1]]
				dx, dy := mid[0]-pa[0], mid[1]-pa[1]
				a.x += dy
				a.y -= dx
				a.s += math.Sqrt(dx*dx + dy*dy)
				dx, dy = pb[0]-mid[0], pb[1]-mid[1]
				b.x += dy
				b.y -= dx
				b.s += math.Sqrt(dx*dx + dy*dy)
			}
		}(h*nc/2, (h+1)*nc/2, h == 1)
	}
	wg.Wait()
	out := resize(&d.out, nn)
	h0, h1 := d.half[0], d.half[1]
	forChunks(nn, func(lo, hi int) {
		for v := lo; v < hi; v++ {
			a, b := h0[v], h1[v]
			x, y, s := a.x+b.x, a.y+b.y, a.s+b.s
			if s == 0 {
				out[v] = math.NaN()
				continue
			}
			out[v] = math.Sqrt(x*x+y*y) / s
		}
	})
	return out
}

// dualSums holds computeDualClosure's accumulators, one per half of the
// cells, and its result, kept for reuse.
type dualSums struct {
	half [2][]dualSum
	out  []float64
}

// dualSum is the running Σ S n (x, y) and Σ |S| (s) of one node's dual.
type dualSum struct{ x, y, s float64 }

// boundaryClosure returns |Σ S_f n_f| / Σ S_f over the boundary faces: zero
// when the boundary is watertight (a closed set of loops), since the sum of
// outward normal vectors over any closed curve vanishes.
func boundaryClosure(m *mesh.Mesh) float64 {
	var sx, sy, sum float64
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		s, n := m.Geo.FaceLength[f], m.Geo.FaceNormal[f]
		sx += s * n[0]
		sy += s * n[1]
		sum += s
	}
	if sum == 0 {
		return 0
	}
	return math.Sqrt(sx*sx+sy*sy) / sum
}
