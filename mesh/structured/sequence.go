package structured

import (
	"math"

	"cvdeck/mesh"
)

// minCoarse is the fewest nodes a coarse block may have along either
// direction.
const minCoarse = 17

// coarseSweeps bounds the sweeps of a coarse level.
const coarseSweeps = 300

// presmooth gives the blocks a better starting grid by grid sequencing
// (nested iteration). When every block has an even number of cells both
// ways and at least 2·(minCoarse − 1) of them, no side slides and no block
// asks for SingleLevel, the blocks are coarsened by taking every other
// node, the coarse blocks are smoothed together by SmoothBlocks (sequenced
// again in turn), and each fine node moves by the coarse correction
// (smoothed minus starting position) interpolated bilinearly onto it.
// Point SOR removes error on the scale of a few cells in a few sweeps but
// the smooth part slowly; on the coarse grid that part is removed at a
// quarter of the cost per sweep and in fewer sweeps (common practice for
// iterative grid generation and the first step of full multigrid; Brandt,
// Math. Comp. 31, 1977, from memory). The fine smoothing then converges
// from there to the same grid.
//
// The coarse blocks keep the fine blocks' options, but a coarse cell
// spans two fine ones: the control decay doubles, and a first-cell
// height becomes that of the first two fine cells, h (1 + r) with r the
// mean ratio of the second cell height to the first along the side in the
// starting grid. A coarse level only gives a start, so it stops at a
// hundred times the tolerance or after coarseSweeps sweeps: where the
// sweeps needed are set by the wall-control feedback rather than by the
// grid size, which a coarse grid cannot shorten, it then costs little
// (BenchmarkSmoothToTolerance: on a 257 × 257 channel with a bump,
// sequenced smoothing takes about 6% longer than one level; round a
// cylinder, about a third of the time). Sliding sides are left out
// because their nodes must stay on the fine side's polyline.
//
// Sequencing cannot make smoothing fail: if the coarse blocks cannot be
// smoothed, or the corrected grid has more inverted cells than the
// starting one, the blocks are left as they were.
func presmooth(blocks []*Block, opts []SmoothOptions) {
	for b, blk := range blocks {
		if opts[b].SingleLevel || (blk.NI-1)%2 != 0 || (blk.NJ-1)%2 != 0 || (blk.NI+1)/2 < minCoarse || (blk.NJ+1)/2 < minCoarse {
			return
		}
		for _, c := range opts[b].Sides {
			if c.Mode == Slide {
				return
			}
		}
	}
	coarse := make([]*Block, len(blocks))
	start := make([]*Block, len(blocks))
	copts := make([]SmoothOptions, len(blocks))
	for b, blk := range blocks {
		coarse[b] = coarsen(blk)
		start[b] = coarse[b].Clone()
		copts[b] = opts[b]
		copts[b].Omega = 0 // chosen afresh for the coarse size
		copts[b].Decay *= 2
		copts[b].Tolerance = 100 * max(opts[b].Tolerance, 1e-6)
		copts[b].MaxIterations = min(opts[b].MaxIterations, coarseSweeps)
		for s := range copts[b].Sides {
			if h := opts[b].Sides[s].FirstHeight; h > 0 {
				copts[b].Sides[s].FirstHeight = h * (1 + secondCellRatio(blk, mesh.Side(s)))
			}
		}
	}
	if _, err := SmoothBlocks(coarse, copts); err != nil {
		return
	}
	saved := make([][2][]float64, len(blocks))
	worse := false
	for b, blk := range blocks {
		saved[b] = [2][]float64{append([]float64(nil), blk.X...), append([]float64(nil), blk.Y...)}
		before, _, _ := inverted(blk)
		prolong(blk, start[b], coarse[b])
		after, _, _ := inverted(blk)
		worse = worse || after > before
	}
	if worse {
		for b, blk := range blocks {
			copy(blk.X, saved[b][0])
			copy(blk.Y, saved[b][1])
		}
	}
}

// coarsen returns the block of every other node of b (b has an odd number
// of nodes both ways), each coarse edge tagged as the first of its two
// fine edges.
func coarsen(b *Block) *Block {
	ni, nj := (b.NI+1)/2, (b.NJ+1)/2
	c := NewBlock(b.Name, ni, nj)
	for j := 0; j < nj; j++ {
		for i := 0; i < ni; i++ {
			c.X[j*ni+i], c.Y[j*ni+i] = b.X[2*j*b.NI+2*i], b.Y[2*j*b.NI+2*i]
		}
	}
	for s := range c.Tags {
		for k := range c.Tags[s] {
			c.Tags[s][k] = b.Tags[s][2*k]
		}
	}
	return c
}

// prolong moves every node of b by the correction to − from of the block
// coarsened by two, interpolated bilinearly: fine node (i, j) takes the
// mean over the coarse nodes (⌊i/2⌋ or ⌈i/2⌉, ⌊j/2⌋ or ⌈j/2⌉), which is
// the coarse node itself at even i and j, the midpoint of two at one odd
// index and the mean of four at two.
func prolong(b, from, to *Block) {
	ni := to.NI
	d := func(i, j int) (float64, float64) {
		k := j*ni + i
		return to.X[k] - from.X[k], to.Y[k] - from.Y[k]
	}
	for j := 0; j < b.NJ; j++ {
		j0, j1 := j/2, (j+1)/2
		for i := 0; i < b.NI; i++ {
			i0, i1 := i/2, (i+1)/2
			ax, ay := d(i0, j0)
			bx, by := d(i1, j0)
			cx, cy := d(i0, j1)
			ex, ey := d(i1, j1)
			k := j*b.NI + i
			b.X[k] += 0.25 * (ax + bx + cx + ex)
			b.Y[k] += 0.25 * (ay + by + cy + ey)
		}
	}
}

// secondCellRatio returns the mean ratio of the second cell height to the
// first off side s of b, along the side's inner nodes, in b's present
// grid (1 if no first cell has a height).
func secondCellRatio(b *Block, s mesh.Side) float64 {
	_, in := sideFrame(b, s)
	n := b.SideLen(s)
	sum, count := 0.0, 0
	for k := 1; k+1 < n; k++ {
		p := b.SideNode(s, k)
		h1 := math.Hypot(b.X[p+in]-b.X[p], b.Y[p+in]-b.Y[p])
		h2 := math.Hypot(b.X[p+2*in]-b.X[p+in], b.Y[p+2*in]-b.Y[p+in])
		if h1 > 0 {
			sum += h2 / h1
			count++
		}
	}
	if count == 0 {
		return 1
	}
	return sum / float64(count)
}
