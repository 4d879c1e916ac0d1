package quality

import (
	"math"

	"cvdeck/mesh"
)

// faceFields holds the per-face metrics.
type faceFields struct {
	// length is the signed face length; see computeFaces.
	length []float64
	// nonOrth is the non-orthogonality angle in degrees.
	nonOrth []float64
	// cross is the signed position t of the crossing point along the face,
	// x_ip = m_f + t (b − a); skewness is |t|.
	cross []float64
	// growth is the area ratio across the face, 1 on the boundary.
	growth []float64
}

// computeFaces fills the face metrics. For face f from node a to node b,
// with midpoint m_f, unit normal n_f, owner centroid c_P and, on interior
// faces, neighbour centroid c_N:
//
// Signed face length: |S_f| = |b − a| with the sign of n_f · d_f, where
// d_f = c_N − c_P (boundary faces: m_f − c_P). A negative length means the
// face normal points back into its owner, so the two cells of the face (or
// the boundary and its cell) overlap; zero means a degenerate face
// (common practice).
//
// Non-orthogonality: the angle between n_f and d_f,
// atan2(|n_f × d_f|, n_f · d_f) in degrees; 0° for an orthogonal face, above
// 90° when d_f points against the normal (common practice; the boundary
// convention m_f − c_P is the one the issue prescribes).
//
// Skewness: the distance from m_f to the point x_ip where the line through
// c_P along d_f crosses the line of the face, divided by |S_f|. Writing
// x_ip = m_f + t (b − a) gives t = ((c_P − m_f) × d_f) / ((b − a) × d_f), and
// the skewness is |t|: 0 when the centroid line passes through the face
// midpoint, 0.5 at a face end, +Inf when d_f is parallel to the face. On a
// boundary face the neighbour centroid is taken as the mirror image of c_P
// in the face line, so d_f is along n_f and x_ip is the foot of the
// perpendicular from c_P (common practice for ghost cells). Working with
// vectors relative to m_f keeps the digits of cells far from the origin.
//
// Growth: max(|A_P|, |A_N|) / min(|A_P|, |A_N|), the ratio of the areas of
// the two cells of an interior face, ≥ 1; +Inf when a cell has zero area;
// 1 on boundary faces (common practice).
func computeFaces(m *mesh.Mesh) faceFields {
	nf := m.NumFaces()
	g := &m.Geo
	ff := faceFields{
		length:  make([]float64, nf),
		nonOrth: make([]float64, nf),
		cross:   make([]float64, nf),
		growth:  make([]float64, nf),
	}
	forChunks(nf, func(lo, hi int) {
		for f := lo; f < hi; f++ {
			fn := m.FaceNodes[f]
			a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
			ex, ey := b[0]-a[0], b[1]-a[1]
			mid, n := g.FaceMid[f], g.FaceNormal[f]
			cp := g.CellCentroid[m.Owner[f]]
			px, py := cp[0]-mid[0], cp[1]-mid[1] // c_P − m_f
			var dx, dy float64
			var t float64
			if nb := m.Neighbour[f]; nb >= 0 {
				cn := g.CellCentroid[nb]
				dx, dy = (cn[0]-mid[0])-px, (cn[1]-mid[1])-py
				t = (px*dy - py*dx) / (ex*dy - ey*dx)
				ap, an := math.Abs(g.CellArea[m.Owner[f]]), math.Abs(g.CellArea[nb])
				ff.growth[f] = max(ap, an) / min(ap, an)
			} else {
				dx, dy = -px, -py
				t = (px*n[1] - py*n[0]) / (ex*n[1] - ey*n[0])
				ff.growth[f] = 1
			}
			cr := n[0]*dy - n[1]*dx
			dt := n[0]*dx + n[1]*dy
			ff.nonOrth[f] = math.Atan2(math.Abs(cr), dt) * rad2deg
			if math.IsNaN(t) {
				t = math.Inf(1) // zero-length face with a degenerate centroid line
			}
			ff.cross[f] = t
			if math.IsNaN(ff.growth[f]) {
				ff.growth[f] = math.Inf(1) // both cells of zero area
			}
			l := g.FaceLength[f]
			if dt < 0 {
				l = -l
			}
			ff.length[f] = l
		}
	})
	return ff
}

// cellFaces is the list of faces of each cell in CSR form, each list in
// face order.
type cellFaces struct {
	start []int32
	faces []int32
}

// buildCellFaces lists the faces of each cell (as owner or neighbour), in
// increasing face index, by a counting sort over the faces.
func buildCellFaces(m *mesh.Mesh) cellFaces {
	nc, nf := m.NumCells(), m.NumFaces()
	cf := cellFaces{start: make([]int32, nc+1)}
	for f := 0; f < nf; f++ {
		cf.start[m.Owner[f]+1]++
		if nb := m.Neighbour[f]; nb >= 0 {
			cf.start[nb+1]++
		}
	}
	for c := 0; c < nc; c++ {
		cf.start[c+1] += cf.start[c]
	}
	cf.faces = make([]int32, cf.start[nc])
	fill := make([]int32, nc)
	copy(fill, cf.start[:nc])
	for f := 0; f < nf; f++ {
		o := m.Owner[f]
		cf.faces[fill[o]] = int32(f)
		fill[o]++
		if nb := m.Neighbour[f]; nb >= 0 {
			cf.faces[fill[nb]] = int32(f)
			fill[nb]++
		}
	}
	return cf
}

// worstPerCell reduces a face metric to one value per cell: the maximum
// (or, with lowest, the minimum) over the cell's faces, applying abs first
// when asked. Face values are never NaN; a cell with no faces gets NaN.
func worstPerCell(cf cellFaces, v []float64, lowest, abs bool) []float64 {
	nc := len(cf.start) - 1
	out := make([]float64, nc)
	forChunks(nc, func(lo, hi int) {
		for c := lo; c < hi; c++ {
			w := math.NaN()
			for _, f := range cf.faces[cf.start[c]:cf.start[c+1]] {
				x := v[f]
				if abs {
					x = math.Abs(x)
				}
				if math.IsNaN(w) || (lowest && x < w) || (!lowest && x > w) {
					w = x
				}
			}
			out[c] = w
		}
	})
	return out
}
