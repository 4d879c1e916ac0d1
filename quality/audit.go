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
// the result does not depend on scheduling.
func computeDualClosure(m *mesh.Mesh) []float64 {
	nn, nc := len(m.Nodes), m.NumCells()
	type sums struct{ x, y, s []float64 }
	var acc [2]sums
	var wg sync.WaitGroup
	for h := range acc {
		acc[h] = sums{make([]float64, nn), make([]float64, nn), make([]float64, nn)}
		wg.Add(1)
		go func(a sums, lo, hi int, boundary bool) {
			defer wg.Done()
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
					a.x[v] += dy
					a.y[v] -= dx
					a.s[v] += l
					a.x[w] -= dy
					a.y[w] += dx
					a.s[w] += l
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
				dx, dy := mid[0]-pa[0], mid[1]-pa[1]
				a.x[fn[0]] += dy
				a.y[fn[0]] -= dx
				a.s[fn[0]] += math.Sqrt(dx*dx + dy*dy)
				dx, dy = pb[0]-mid[0], pb[1]-mid[1]
				a.x[fn[1]] += dy
				a.y[fn[1]] -= dx
				a.s[fn[1]] += math.Sqrt(dx*dx + dy*dy)
			}
		}(acc[h], h*nc/2, (h+1)*nc/2, h == 1)
	}
	wg.Wait()
	out := acc[0].s // reused for the result
	forChunks(nn, func(lo, hi int) {
		for v := lo; v < hi; v++ {
			x, y, s := acc[0].x[v]+acc[1].x[v], acc[0].y[v]+acc[1].y[v], acc[0].s[v]+acc[1].s[v]
			if s == 0 {
				out[v] = math.NaN()
				continue
			}
			out[v] = math.Sqrt(x*x+y*y) / s
		}
	})
	return out
}

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
