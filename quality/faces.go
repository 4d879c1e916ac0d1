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
	// cross is the signed position t of the point x_ip = m_f + t (b − a)
	// where the centroid line crosses the face, until skewness turns it
	// into the skewness |t| in place.
	cross []float64
	// shortestPart is the shortest non-zero face length of each chunk.
	shortestPart []float64
}

// shortest returns the shortest non-zero face length, +Inf if none.
func (ff *faceFields) shortest() float64 {
	h := math.Inf(1)
	for _, x := range ff.shortestPart {
		h = min(h, x)
	}
	return h
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
// Growth, the area ratio of the two cells of a face, is taken per cell in
// faceSummary.gather.
func computeFaces(m *mesh.Mesh, ff *faceFields) {
	nf := m.NumFaces()
	g := &m.Geo
	resize(&ff.length, nf)
	resize(&ff.nonOrth, nf)
	resize(&ff.cross, nf)
	resize(&ff.shortestPart, (nf+chunk-1)/chunk)
	forChunks(nf, func(lo, hi int) {
		short := math.Inf(1)
		for f := lo; f < hi; f++ {
			// The face vector b − a = |S_f| (−n_y, n_x) from the stored
			// normal, so the node positions need not be read.
			l := g.FaceLength[f]
			if l > 0 && l < short {
				short = l
			}
			mid, n := g.FaceMid[f], g.FaceNormal[f]
			ex, ey := -l*n[1], l*n[0]
			cp := g.CellCentroid[m.Owner[f]]
			px, py := cp[0]-mid[0], cp[1]-mid[1] // c_P − m_f
			var dx, dy, t float64
			if nb := m.Neighbour[f]; nb >= 0 {
				cn := g.CellCentroid[nb]
				dx, dy = (cn[0]-mid[0])-px, (cn[1]-mid[1])-py
				t = (px*dy - py*dx) / (ex*dy - ey*dx)
			} else {
				dx, dy = -px, -py
				t = (px*n[1] - py*n[0]) / (ex*n[1] - ey*n[0])
			}
			cr := n[0]*dy - n[1]*dx
			dt := n[0]*dx + n[1]*dy
			ff.nonOrth[f] = atan2(math.Abs(cr), dt) * rad2deg
			if t != t {
				t = math.Inf(1) // zero-length face with a degenerate centroid line
			}
			ff.cross[f] = t
			if dt < 0 {
				l = -l
			}
			ff.length[f] = l
		}
		ff.shortestPart[lo/chunk] = short
	})
}

// skewness turns cross into the skewness |t| of every face, in place (so
// that no second face array is allocated), and returns it. The signed
// values are gone afterwards.
func (ff *faceFields) skewness() []float64 {
	forChunks(len(ff.cross), func(lo, hi int) {
		for f := lo; f < hi; f++ {
			ff.cross[f] = math.Abs(ff.cross[f])
		}
	})
	return ff.cross
}

// cellFaces is the list of faces of each cell in CSR form, each list in
// face order: the faces of cell c are faces[start[c]:start[c+1]].
type cellFaces struct {
	start []int32
	faces []int32
}

// buildCellFaces lists the faces of each cell (as owner or neighbour), in
// increasing face index, by a counting sort over the faces. The counts go
// two places up, so that after the prefix sum next[c+1] is where cell c's
// list begins; filling advances it to where the list ends, which is where
// cell c+1's begins, and next[:nc+1] is then the start array itself.
func buildCellFaces(m *mesh.Mesh, cf *cellFaces) {
	nc, nf := m.NumCells(), m.NumFaces()
	next := zeroed(&cf.start, nc+2)
	for f := 0; f < nf; f++ {
		next[m.Owner[f]+2]++
		if nb := m.Neighbour[f]; nb >= 0 {
			next[nb+2]++
		}
	}
	for c := 2; c < nc+2; c++ {
		next[c] += next[c-1]
	}
	faces := resize(&cf.faces, int(next[nc+1]))
	for f := 0; f < nf; f++ {
		o := m.Owner[f] + 1
		faces[next[o]] = int32(f)
		next[o]++
		if nb := m.Neighbour[f]; nb >= 0 {
			faces[next[nb+1]] = int32(f)
			next[nb+1]++
		}
	}
	cf.start = next[:nc+1]
}
