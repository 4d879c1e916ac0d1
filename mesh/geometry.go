package mesh

import (
	"math"
	"runtime"
	"sync"

	"github.com/paulmach/orb"

	"cvdeck/internal/hugepage"
)

// Geometry is the derived geometry of a mesh, computed once by Build and
// shared by quality, bc and export.
type Geometry struct {
	// FaceLength is |S_f|, the face area per unit depth in 2D.
	FaceLength []float64
	// FaceNormal is the unit normal n_f, pointing from owner to neighbour
	// (outward on the boundary).
	FaceNormal []orb.Point
	// FaceMid is the face midpoint.
	FaceMid []orb.Point
	// CellArea is the signed cell area (volume per unit depth in 2D):
	// positive for counter-clockwise nodes, negative for an inverted cell.
	CellArea []float64
	// CellCentroid is the area centroid of each cell; for a cell of zero
	// area it falls back to the mean of its nodes.
	CellCentroid []orb.Point
}

// ComputeGeometry derives face and cell geometry from the mesh topology.
// Each value depends on its own face or cell alone, so the work is split
// over the processors without changing any result.
func ComputeGeometry(m *Mesh) Geometry {
	nf, nc := m.NumFaces(), m.NumCells()
	g := Geometry{
		FaceLength:   hugepage.Make[float64](nf),
		FaceNormal:   hugepage.Make[orb.Point](nf),
		FaceMid:      hugepage.Make[orb.Point](nf),
		CellArea:     hugepage.Make[float64](nc),
		CellCentroid: hugepage.Make[orb.Point](nc),
	}
	inParallel(nf, func(lo, hi int) {
		for f := lo; f < hi; f++ {
			fn := m.FaceNodes[f]
			a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
			dx, dy := b[0]-a[0], b[1]-a[1]
			l := math.Hypot(dx, dy)
			g.FaceLength[f] = l
			if l > 0 {
				g.FaceNormal[f] = orb.Point{dy / l, -dx / l}
			}
			g.FaceMid[f] = orb.Point{0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])}
		}
	})
	inParallel(nc, func(lo, hi int) {
		for c := lo; c < hi; c++ {
			g.CellArea[c], g.CellCentroid[c] = PolygonAreaCentroid(m.Nodes, m.Cell(c))
		}
	})
	return g
}

// inParallel calls fn on the ranges of partBounds(n) side by side and
// waits for them.
func inParallel(n int, fn func(lo, hi int)) {
	inParts(partBounds(n), func(_, lo, hi int) { fn(lo, hi) })
}

// partBounds splits [0, n) into GOMAXPROCS consecutive ranges, range k
// being [b[k], b[k+1]); below minParallel items it gives the one range
// [0, n), where starting goroutines would cost more than it saves.
func partBounds(n int) []int { return partBoundsUpTo(n, runtime.GOMAXPROCS(0)) }

// partBoundsUpTo is partBounds with at most most ranges.
func partBoundsUpTo(n, most int) []int {
	parts := max(1, min(most, n/minParallel))
	b := make([]int, parts+1)
	for k := range b {
		b[k] = k * n / parts
	}
	return b
}

// inParts calls fn(k, b[k], b[k+1]) for every range of b, side by side
// when there are several, and waits for them.
func inParts(b []int, fn func(k, lo, hi int)) {
	if len(b) == 2 {
		fn(0, b[0], b[1])
		return
	}
	var wg sync.WaitGroup
	for k := range len(b) - 1 {
		wg.Go(func() { fn(k, b[k], b[k+1]) })
	}
	wg.Wait()
}

// minParallel is the fewest items partBounds splits.
const minParallel = 1 << 14

// PolygonAreaCentroid returns the signed area and the area centroid of the
// polygon whose vertices are nodes[idx[0]], nodes[idx[1]], ...
//
// It uses the shoelace formula A = ½ Σ (x_k y_{k+1} − x_{k+1} y_k) and
// C = (1/6A) Σ (p_k + p_{k+1})(x_k y_{k+1} − x_{k+1} y_k), with every vertex
// first shifted by the first one, as orb's planar package does, so that
// cells far from the origin keep their digits (the cross products are then
// of small numbers). A polygon of zero area gets the vertex mean as its
// centroid.
func PolygonAreaCentroid(nodes []orb.Point, idx []int32) (float64, orb.Point) {
	n := len(idx)
	if n == 0 {
		return 0, orb.Point{}
	}
	o := nodes[idx[0]]
	var a2, cx, cy float64
	var mx, my float64
	px, py := 0.0, 0.0
	for k := 1; k <= n; k++ {
		// The vertices after the first, then the first again to close
		// the polygon (no modulo: an integer division per vertex).
		var qx, qy float64
		if k < n {
			q := nodes[idx[k]]
			qx, qy = q[0]-o[0], q[1]-o[1]
		}
		cr := px*qy - qx*py
		a2 += cr
		cx += (px + qx) * cr
		cy += (py + qy) * cr
		mx += qx
		my += qy
		px, py = qx, qy
	}
	area := 0.5 * a2
	if a2 == 0 {
		return 0, orb.Point{o[0] + mx/float64(n), o[1] + my/float64(n)}
	}
	return area, orb.Point{o[0] + cx/(3*a2), o[1] + cy/(3*a2)}
}
