package unstructured

import (
	"math"

	"github.com/paulmach/orb"
)

// sizeSource is one cone of the size field: the target size h at point p,
// held out to radius r and growing linearly beyond it. from says what
// asked for it (see sizeField.sizeAt).
type sizeSource struct {
	p    orb.Point
	h, r float64
	from int32
}

// fromMaxSize is the sizeSource.from of the maximum size; from ≥ 0 is the
// index of a region in Options.Regions, and from < 0 other than
// fromMaxSize a boundary point whose outgoing edge has tag index −1−from.
const fromMaxSize = math.MinInt32

// fromTag returns the sizeSource.from of a boundary point whose outgoing
// edge has tag index t.
func fromTag(t int16) int32 { return -1 - int32(t) }

// sizeField is the target edge length h(x) of the mesh:
//
//	h(x) = min( hmax,  min_i [ h_i + (G−1)·max(0, |x − p_i| − r_i) ],
//	            min_regions [ h_R + (G−1)·dist(x, R) ] )
//
// a minimum of cones. Cells whose sizes grow by the ratio G from one cell
// to the next away from a wall have h growing linearly at slope G−1 with
// distance, which is the cone slope (common practice for size gradation).
// The sources are the boundary points, with h_i the mean length of their
// two edges (so the mesh meets the wall at the boundary spacing), and the
// points of tags with a distance region. Boxes and circles are evaluated
// exactly. The nearest-cone search over the sources uses a background
// grid that stores, per node, the source whose cone is lowest there,
// propagated by two raster sweeps as in Danielsson's vector distance
// transform (Danielsson 1980); a query takes the lowest of the cones of
// the four corners of its grid cell.
type sizeField struct {
	slope   float64
	maxSize float64
	src     []sizeSource
	boxes   []Region
	circles []Region
	// boxFrom and circleFrom are the indices of the boxes and circles
	// in Options.Regions.
	boxFrom, circleFrom []int32

	x0, y0, inv float64 // grid origin and 1/cell
	cell        float64
	nx, ny      int // nodes per row and column
	best        []int32
}

func (s *sizeField) cone(i int32, p orb.Point) float64 {
	q := s.src[i]
	dx, dy := p[0]-q.p[0], p[1]-q.p[1]
	d := math.Sqrt(dx*dx+dy*dy) - q.r
	if d < 0 {
		d = 0
	}
	return q.h + s.slope*d
}

// build sets up the background grid over bound.
func (s *sizeField) build(bound orb.Bound) {
	if len(s.src) == 0 {
		return
	}
	w := math.Max(bound.Max[0]-bound.Min[0], bound.Max[1]-bound.Min[1])
	if w <= 0 {
		w = 1
	}
	hmin := math.Inf(1)
	for _, q := range s.src {
		hmin = math.Min(hmin, q.h)
	}
	// Cells of half the smallest source size, but at most 512 along the
	// longer side, and fewer for few sources (the lookup error is at most
	// about 1.4·(G−1)·cell, see at).
	maxCells := math.Min(512, 8*math.Sqrt(float64(len(s.src)))+64)
	s.cell = math.Max(w/maxCells, 0.5*hmin)
	s.inv = 1 / s.cell
	s.x0, s.y0 = bound.Min[0]-s.cell, bound.Min[1]-s.cell
	s.nx = int((bound.Max[0]-s.x0)*s.inv) + 3
	s.ny = int((bound.Max[1]-s.y0)*s.inv) + 3
	n := s.nx * s.ny
	s.best = make([]int32, n)
	val := make([]float64, n)
	for i := range s.best {
		s.best[i] = -1
		val[i] = math.Inf(1)
	}
	node := func(i, j int) orb.Point { return orb.Point{s.x0 + float64(i)*s.cell, s.y0 + float64(j)*s.cell} }
	for k := range s.src {
		i := int(math.Round((s.src[k].p[0] - s.x0) * s.inv))
		j := int(math.Round((s.src[k].p[1] - s.y0) * s.inv))
		i = min(max(i, 0), s.nx-1)
		j = min(max(j, 0), s.ny-1)
		if v := s.cone(int32(k), node(i, j)); v < val[j*s.nx+i] {
			val[j*s.nx+i] = v
			s.best[j*s.nx+i] = int32(k)
		}
	}
	// A cone has slope at most G−1, so a neighbour's source cannot beat
	// this node's value when the neighbour's value is higher by more than
	// (G−1) times their distance; such neighbours, and neighbours with the
	// same source, are skipped without evaluating a cone.
	reach := s.slope * s.cell * math.Sqrt2
	relax := func(i, j, ni, nj int) {
		if ni < 0 || nj < 0 || ni >= s.nx || nj >= s.ny {
			return
		}
		k, nk := j*s.nx+i, nj*s.nx+ni
		b := s.best[nk]
		if b < 0 || b == s.best[k] || val[nk]-reach >= val[k] {
			return
		}
		if v := s.cone(b, node(i, j)); v < val[j*s.nx+i] {
			val[j*s.nx+i] = v
			s.best[j*s.nx+i] = b
		}
	}
	for round := 0; round < 2; round++ {
		for j := 0; j < s.ny; j++ {
			for i := 0; i < s.nx; i++ {
				relax(i, j, i-1, j)
				relax(i, j, i-1, j-1)
				relax(i, j, i, j-1)
				relax(i, j, i+1, j-1)
			}
			for i := s.nx - 1; i >= 0; i-- {
				relax(i, j, i+1, j)
			}
		}
		for j := s.ny - 1; j >= 0; j-- {
			for i := s.nx - 1; i >= 0; i-- {
				relax(i, j, i+1, j)
				relax(i, j, i+1, j+1)
				relax(i, j, i, j+1)
				relax(i, j, i-1, j+1)
			}
			for i := 0; i < s.nx; i++ {
				relax(i, j, i-1, j)
			}
		}
	}
}

// at returns the target size at p. If the lowest cone at p belongs to a
// source s* that no corner of p's grid cell holds, the nearest corner c
// holds a source s' with cone_s'(c) ≤ cone_s*(c); both cones have slope
// G−1, so the value returned exceeds the exact one by at most
// 2(G−1)|p−c| ≤ 1.4(G−1)·cell.
func (s *sizeField) at(p orb.Point) float64 {
	h, _ := s.sizeAt(p)
	return h
}

// sizeAt returns the target size at p (see at) and what sets it there: a
// sizeSource.from value, fromMaxSize when no cone is lower than the
// maximum size.
func (s *sizeField) sizeAt(p orb.Point) (float64, int32) {
	h, from := s.maxSize, int32(fromMaxSize)
	if s.best != nil {
		i := int((p[0] - s.x0) * s.inv)
		j := int((p[1] - s.y0) * s.inv)
		i = min(max(i, 0), s.nx-2)
		j = min(max(j, 0), s.ny-2)
		k := j*s.nx + i
		for _, b := range [4]int32{s.best[k], s.best[k+1], s.best[k+s.nx], s.best[k+s.nx+1]} {
			if b >= 0 {
				if c := s.cone(b, p); c < h {
					h, from = c, s.src[b].from
				}
			}
		}
	}
	for i, r := range s.boxes {
		dx := math.Max(0, math.Max(r.Min[0]-p[0], p[0]-r.Max[0]))
		dy := math.Max(0, math.Max(r.Min[1]-p[1], p[1]-r.Max[1]))
		if c := r.Size + s.slope*math.Hypot(dx, dy); c < h {
			h, from = c, s.boxFrom[i]
		}
	}
	for i, r := range s.circles {
		d := math.Max(0, math.Hypot(p[0]-r.Center[0], p[1]-r.Center[1])-r.Radius)
		if c := r.Size + s.slope*d; c < h {
			h, from = c, s.circleFrom[i]
		}
	}
	return h, from
}
