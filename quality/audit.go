package quality

import (
	"math"

	"cvdeck/mesh"
)

// freeStream is the uniform flux of the free-stream audit: a unit vector
// with both components non-zero, so that neither axis hides an error.
var freeStream = [2]float64{0.6, 0.8}

// auditFields holds the per-cell results of the conservation audit.
type auditFields struct {
	closure, freeStream, gradient []float64
}

// computeAudit runs the per-cell conservation audit. For cell P with faces
// f, outward sign s_f = +1 where P owns f and −1 where it is the neighbour,
// face length S_f and unit normal n_f:
//
// Closure error: |Σ_f s_f S_f n_f| / Σ_f S_f. Zero for a closed polygon; it
// is what makes the discrete divergence of a constant vanish, the basis of
// the conservation form (common practice; e.g. Ferziger and Perić,
// Computational Methods for Fluid Dynamics, ch. 8, from memory).
//
// Free-stream residual: |Σ_f s_f (F · n_f) S_f| / (|F| Σ_f S_f) for the
// uniform flux F = (0.6, 0.8): the residual a solver sees in a uniform flow.
// It equals F · (closure vector) in exact arithmetic, but is summed face by
// face as a solver sums it.
//
// Green–Gauss gradient error: the gradient of a linear field φ is
// reconstructed as (1/A_P) Σ_f s_f φ_f S_f n_f and compared with the exact
// gradient. The face value φ_f is interpolated linearly between the owner
// and neighbour centroid values to the point x_ip where the centroid line
// crosses the face (see computeFaces); that interpolation is exact at x_ip
// for a linear field, so the error measures only the offset of x_ip from
// the face midpoint, i.e. the effect of skewness on a cell-centred scheme.
// On boundary faces φ_f is the field's value at the face midpoint, as a
// Dirichlet condition gives it. φ is taken relative to its value at the
// cell's centroid, φ_f − φ_P = ∇φ · (x_ip − c_P), so the result does not
// depend on where the origin lies (the closure error is reported on its
// own). Both fields φ = x and φ = y are used; the error is the larger of
// |∇φ_GG − ∇φ| over the two, relative to |∇φ| = 1, so it bounds the error
// for any linear field up to a factor √2 (common practice).
func computeAudit(m *mesh.Mesh, cf cellFaces, ff faceFields) auditFields {
	nc := m.NumCells()
	g := &m.Geo
	au := auditFields{
		closure:    make([]float64, nc),
		freeStream: make([]float64, nc),
		gradient:   make([]float64, nc),
	}
	forChunks(nc, func(lo, hi int) {
		for c := lo; c < hi; c++ {
			cc := g.CellCentroid[c]
			var sx, sy, sum, flux float64
			var gxx, gxy, gyx, gyy float64
			for _, f := range cf.faces[cf.start[c]:cf.start[c+1]] {
				s := g.FaceLength[f]
				n := g.FaceNormal[f]
				if m.Owner[f] != int32(c) {
					s = -s
				}
				snx, sny := s*n[0], s*n[1]
				sx += snx
				sy += sny
				sum += g.FaceLength[f]
				flux += s * (freeStream[0]*n[0] + freeStream[1]*n[1])
				mid := g.FaceMid[f]
				qx, qy := mid[0]-cc[0], mid[1]-cc[1]
				if m.Neighbour[f] >= 0 {
					fn := m.FaceNodes[f]
					a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
					t := ff.cross[f]
					qx += t * (b[0] - a[0])
					qy += t * (b[1] - a[1])
				}
				gxx += qx * snx
				gxy += qx * sny
				gyx += qy * snx
				gyy += qy * sny
			}
			au.closure[c] = math.Sqrt(sx*sx+sy*sy) / sum
			au.freeStream[c] = math.Abs(flux) / sum
			a := g.CellArea[c]
			e := max(math.Hypot(gxx/a-1, gxy/a), math.Hypot(gyx/a, gyy/a-1))
			if math.IsNaN(e) {
				e = math.Inf(1)
			}
			au.gradient[c] = e
		}
	})
	return au
}

// computeDualClosure returns, for each node, the closure error of its
// median-dual control volume: the region bounded, inside each cell around
// the node, by the segments from the midpoints of the node's two edges to
// the cell centroid, and on the boundary by the halves of the boundary faces
// at the node (Barth and Jespersen 1989, AIAA 89-0366, and common practice
// for vertex-centred schemes). Each dual face a→b, traversed
// counter-clockwise around the node, has outward normal vector
// (b_y − a_y, −(b_x − a_x)); the closure error is |Σ S n| / Σ |S| over the
// node's dual faces. Edge midpoints are computed as ½(p + q) in every cell,
// a symmetric expression, so both cells of an edge use the same point.
// Unused nodes get NaN. The scatter runs in cell order, so the sums are
// deterministic.
func computeDualClosure(m *mesh.Mesh) []float64 {
	nn := len(m.Nodes)
	sx := make([]float64, nn)
	sy := make([]float64, nn)
	sum := make([]float64, nn)
	add := func(v int32, ax, ay, bx, by float64) {
		dx, dy := bx-ax, by-ay
		sx[v] += dy
		sy[v] -= dx
		sum[v] += math.Sqrt(dx*dx + dy*dy)
	}
	for c := 0; c < m.NumCells(); c++ {
		idx := m.Cell(c)
		n := len(idx)
		cc := m.Geo.CellCentroid[c]
		last := m.Nodes[idx[n-1]]
		p := m.Nodes[idx[0]]
		prevx, prevy := 0.5*(last[0]+p[0]), 0.5*(last[1]+p[1])
		for k := 0; k < n; k++ {
			q := m.Nodes[idx[(k+1)%n]]
			mx, my := 0.5*(p[0]+q[0]), 0.5*(p[1]+q[1])
			add(idx[k], mx, my, cc[0], cc[1])
			add(idx[k], cc[0], cc[1], prevx, prevy)
			prevx, prevy = mx, my
			p = q
		}
	}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		fn := m.FaceNodes[f]
		a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
		mid := m.Geo.FaceMid[f]
		add(fn[0], a[0], a[1], mid[0], mid[1])
		add(fn[1], mid[0], mid[1], b[0], b[1])
	}
	out := make([]float64, nn)
	for v := range out {
		if sum[v] == 0 {
			out[v] = math.NaN()
			continue
		}
		out[v] = math.Sqrt(sx[v]*sx[v]+sy[v]*sy[v]) / sum[v]
	}
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
