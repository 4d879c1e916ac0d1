package quality

import (
	"math"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// The cell metrics, in the order of metricDefs (dual_closure, the node
// metric, comes last there).
const (
	mArea = iota
	mFaceLength
	mAspect
	mMinAngle
	mMaxAngle
	mEquiangle
	mJacobian
	mNonOrth
	mSkewness
	mGrowth
	mClosure
	mFreeStream
	mGradient
	numCellMetrics
)

// cellPass computes every cell metric in one sweep over the cells: the
// shape (cellShape), and the worst face values of the cell (computeFaces)
// with the conservation audit (both faceSummary.gather). The cells go in
// tiles: each tile's values are computed into the per-cell arrays in buf
// when keep is set, else into a small buffer, then graded (raising status)
// and summarised while they are in the first-level cache. It returns the
// arrays in metric order (area is the mesh's own; nil all when keep is not
// set) and the per-chunk summaries.
func cellPass(m *mesh.Mesh, cf *cellFaces, ff *faceFields, lim *Limits, status []Status, keep bool, buf *[numCellMetrics][]float64) ([numCellMetrics][]float64, [numCellMetrics][]partial) {
	nc := m.NumCells()
	var vals [numCellMetrics][]float64
	var parts [numCellMetrics][]partial
	for k := range vals {
		if keep && k != mArea {
			vals[k] = resize(&buf[k], nc)
		}
		parts[k] = make([]partial, (nc+chunk-1)/chunk)
	}
	if keep {
		vals[mArea] = m.Geo.CellArea
	}
	bounds := make([]Bound, numCellMetrics)
	for k := range bounds {
		bounds[k] = *metricDefs[k].bound(lim)
	}
	fa := newFaceArrays(m, cf, ff)
	forChunks(nc, func(lo, hi int) {
		for k := range parts {
			parts[k][lo/chunk].start()
		}
		var buf []float64
		sh := cellShape{straight: lim.HangingTolerance}
		var tv [numCellMetrics][tile]float64
		var out [numCellMetrics][]float64
		for b := lo; b < hi; b += tile {
			e := min(b+tile, hi)
			// The values go straight into the per-cell arrays when they
			// are kept, else into the tile buffer; either way they are
			// scanned from the first-level cache.
			for k := range out {
				switch {
				case k == mArea:
					out[k] = m.Geo.CellArea[b:e]
				case keep:
					out[k] = vals[k][b:e]
				default:
					out[k] = tv[k][:e-b]
				}
			}
			aspect, minAngle, maxAngle, equiangle, jacobian := out[mAspect], out[mMinAngle], out[mMaxAngle], out[mEquiangle], out[mJacobian]
			faceLength, nonOrth, skew, growth := out[mFaceLength], out[mNonOrth], out[mSkewness], out[mGrowth]
			closure, freeStream, gradient := out[mClosure], out[mFreeStream], out[mGradient]
			for c := b; c < e; c++ {
				i := c - b
				buf = sh.compute(m.Nodes, m.Cell(c), m.Geo.CellArea[c], buf)
				aspect[i] = sh.aspect
				minAngle[i] = sh.minAngle
				maxAngle[i] = sh.maxAngle
				equiangle[i] = sh.equiangle
				jacobian[i] = sh.jacobian
				var fc faceSummary
				fc.gather(fa, c)
				faceLength[i] = fc.minLength
				nonOrth[i] = fc.maxNonOrth
				skew[i] = fc.maxSkew
				growth[i] = fc.maxGrowth
				closure[i] = fc.closure
				freeStream[i] = fc.freeStream
				gradient[i] = fc.gradient
			}
			for k, v := range out {
				p := &parts[k][lo/chunk]
				failed := p.failed
				p.scan(&metricDefs[k], bounds[k], lim.WorstCells, v, b, status)
				if thinMetric[k] && p.failed > failed {
					p.thin += countThin(v, aspect, maxAngle, bounds[k].Fail, bounds[mMaxAngle].Warn)
				}
			}
		}
	})
	return vals, parts
}

// ThinAspect is the aspect ratio from which a cell counts as thin in the
// report (MetricSummary.FailedThin), if its largest angle is within the
// max_angle warn limit (a long cell, not a sliver; its smallest angle is
// small by construction when it is a triangle): a cell ten times
// as long as it is high, as wall layers and stretched structured cells
// are (common practice).
const ThinAspect = 10

// thinMetric marks the metrics measured from cell centroids across faces,
// whose failures on thin cells the report counts apart: on a thin cell
// the centroids lie far from the short faces compared with their length,
// so these values grow large by construction (see WriteText).
var thinMetric = [numCellMetrics]bool{mNonOrth: true, mSkewness: true, mGradient: true}

// countThin counts the values of v past fail whose cells are thin: an
// aspect ratio of ThinAspect or more, and no angle past angleWarn, the
// max_angle warn limit (a long cell of sound angles, not a sliver, whose
// near-flat corner is a defect in its own right). It is kept out of
// cellPass's loop, which calls it only for a tile with failures, so that
// the loop stays as lean as it was.
//
//go:noinline
func countThin(v, aspect, maxAngle []float64, fail, angleWarn float64) int {
	n := 0
	for i, x := range v {
		n += b2i(x > fail && aspect[i] >= ThinAspect && maxAngle[i] <= angleWarn)
	}
	return n
}

// tile is the number of cells computed before their values are scanned:
// 13 metrics × 256 cells × 8 bytes = 26 KiB, within a first-level cache.
const tile = 256

// faceArrays are the face and cell arrays that faceSummary.gather reads.
type faceArrays struct {
	start, faces           []int32
	length, nonOrth, cross []float64
	faceLength             []float64
	normal, mid, centroid  []orb.Point
	owner, neighbour       []int32
	area                   []float64
}

func newFaceArrays(m *mesh.Mesh, cf *cellFaces, ff *faceFields) *faceArrays {
	return &faceArrays{
		start: cf.start, faces: cf.faces,
		length: ff.length, nonOrth: ff.nonOrth, cross: ff.cross,
		faceLength: m.Geo.FaceLength, normal: m.Geo.FaceNormal, mid: m.Geo.FaceMid,
		owner: m.Owner, neighbour: m.Neighbour,
		centroid: m.Geo.CellCentroid, area: m.Geo.CellArea,
	}
}

// faceSummary gathers what a cell takes from its faces: the worst face
// metrics and the conservation audit.
type faceSummary struct {
	minLength, maxNonOrth, maxSkew, maxGrowth float64
	closure, freeStream, gradient             float64
}

// freeStream is the uniform flux of the free-stream audit: a unit vector
// with both components non-zero, so that neither axis hides an error.
var freeStream = [2]float64{0.6, 0.8}

// gather fills s for cell P = c from its faces f, each with outward sign
// s_f = +1 where P owns f and −1 where it is the neighbour, face length S_f
// and unit normal n_f. The face metrics are those of computeFaces, reduced
// to the minimum signed length and the largest non-orthogonality and
// skewness. Growth is the largest area ratio max(|A_P|, |A_N|) /
// min(|A_P|, |A_N|) to a neighbour N across a face, ≥ 1, 1 for a cell with
// no neighbour and +Inf when a cell has zero area (common practice). A cell
// with no faces gets NaN throughout.
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
// for any linear field up to a factor √2 (common practice). A cell of zero
// area, or a face whose centroid line runs along it, gives +Inf.
func (s *faceSummary) gather(fa *faceArrays, c int) {
	cc := fa.centroid[c]
	ac := math.Abs(fa.area[c])
	var sx, sy, sum, flux float64
	var gxx, gxy, gyx, gyy float64
	minLen, maxNO, maxSkew := math.Inf(1), math.Inf(-1), math.Inf(-1)
	// The extreme neighbour areas give the growth at the end.
	minAo, maxAo := math.Inf(1), math.Inf(-1)
	faces := fa.faces[fa.start[c]:fa.start[c+1]]
	// Local slices of one length let the compiler drop the per-array index
	// checks after the one below.
	nf := len(fa.length)
	length, nonOrth, cross, faceLength := fa.length, fa.nonOrth[:nf], fa.cross[:nf], fa.faceLength[:nf]
	normal, mid, owner, neighbour := fa.normal[:nf], fa.mid[:nf], fa.owner[:nf], fa.neighbour[:nf]
	for _, fi := range faces {
		f := int(fi)
		if uint(f) >= uint(nf) {
			continue // never: buildCellFaces lists faces of the mesh
		}
		// The running extremes are updated by pick, without branches: the
		// order of a cell's face values is random.
		x := length[f]
		minLen = pick(x < minLen, x, minLen)
		x = nonOrth[f]
		maxNO = pick(x > maxNO, x, maxNO)
		t := cross[f]
		x = math.Abs(t)
		maxSkew = pick(x > maxSkew, x, maxSkew)
		l := faceLength[f]
		n := normal[f]
		mf := mid[f]
		qx, qy := mf[0]-cc[0], mf[1]-cc[1]
		sl := l
		o, nb := owner[f], neighbour[f]
		if nb >= 0 {
			other := o
			if o == int32(c) {
				other = nb
			} else {
				sl = -l
			}
			ao := math.Abs(fa.area[other])
			minAo = pick(ao < minAo, ao, minAo)
			maxAo = pick(ao > maxAo, ao, maxAo)
			// x_ip − c = (m_f − c) + t (b − a), b − a = |S_f| (−n_y, n_x).
			qx -= t * l * n[1]
			qy += t * l * n[0]
		} else if o != int32(c) {
			sl = -l
		}
		snx, sny := sl*n[0], sl*n[1]
		sx += snx
		sy += sny
		sum += l
		flux += sl * (freeStream[0]*n[0] + freeStream[1]*n[1])
		gxx += qx * snx
		gxy += qx * sny
		gyx += qy * snx
		gyy += qy * sny
	}
	if len(faces) == 0 {
		nan := math.NaN()
		*s = faceSummary{nan, nan, nan, nan, nan, nan, nan}
		return
	}
	s.minLength, s.maxNonOrth, s.maxSkew = minLen, maxNO, maxSkew
	// Growth over the neighbours N: max(|A_N|/|A_P|, |A_P|/|A_N|, 1), which
	// the extreme neighbour areas give without a division per face.
	s.maxGrowth = 1
	if maxAo >= 0 {
		gr := max(maxAo/ac, ac/minAo, 1)
		if gr != gr {
			gr = math.Inf(1) // the cell and a neighbour both of zero area
		}
		s.maxGrowth = gr
	}
	inv := 1 / sum
	s.closure = math.Sqrt(sx*sx+sy*sy) * inv
	s.freeStream = math.Abs(flux) * inv
	ia := 1 / fa.area[c]
	ex, ey := gxx*ia-1, gxy*ia
	fx, fy := gyx*ia, gyy*ia-1
	e := math.Sqrt(max(ex*ex+ey*ey, fx*fx+fy*fy))
	if e != e {
		e = math.Inf(1)
	}
	if s.closure != s.closure {
		s.closure, s.freeStream = math.Inf(1), math.Inf(1) // every face of zero length
	}
	s.gradient = e
}

// pick returns a if c, else b, by bit masking rather than a branch. It is
// exactly "if c { return a }; return b", signed zeros and NaN included.
func pick(c bool, a, b float64) float64 {
	ab, bb := math.Float64bits(a), math.Float64bits(b)
	return math.Float64frombits(bb ^ (ab^bb)&-uint64(b2i(c)))
}
