package structured

import (
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"cvdeck/mesh"
)

// SmoothBlocks smooths several blocks together, opts[b] applying to
// blocks[b]. Each block is smoothed as Smooth does; in addition the nodes
// of every side that two blocks share (found as Assemble finds them, an
// O-grid's seam included) are moved as interior nodes of both, with the
// same Winslow update and fold test on the stencil that joins the two
// blocks, so grid lines run smoothly across interfaces and the interfaces
// stay conforming. The ends of shared sides stay where they are. A shared
// side takes no slide or wall control.
//
// The blocks are swept together until every block and every interface has
// settled to its tolerance (the smallest Tolerance for the interfaces), or
// for at most the largest MaxIterations sweeps. Damped updates at an
// interface are counted in the result of its first block. Large blocks
// start from a grid smoothed on every other node (see presmooth); the
// result counts the sweeps on the given blocks only.
func SmoothBlocks(blocks []*Block, opts []SmoothOptions) ([]SmoothResult, error) {
	if len(blocks) == 0 {
		return nil, fmt.Errorf("structured: no blocks to smooth")
	}
	if len(opts) != len(blocks) {
		return nil, fmt.Errorf("structured: %d smoothing options for %d blocks", len(opts), len(blocks))
	}
	opts = append([]SmoothOptions(nil), opts...)
	maxIt, tol := 0, math.Inf(1)
	for b, blk := range blocks {
		if err := opts[b].normalise(blk); err != nil {
			return nil, err
		}
		maxIt = max(maxIt, opts[b].MaxIterations)
		tol = math.Min(tol, opts[b].Tolerance)
	}
	if err := checkBlocks(blocks); err != nil {
		return nil, err
	}
	ifaces, _, err := findShared(blocks, defaultTol(blocks))
	if err != nil {
		return nil, err
	}
	for _, f := range ifaces {
		for _, end := range [2]struct {
			b int
			s mesh.Side
		}{{f.A, f.SideA}, {f.B, f.SideB}} {
			if c := opts[end.b].Sides[end.s]; c.Mode != Fixed || c.controlled() {
				return nil, fmt.Errorf("structured: block %q %s side is shared with block %q %s side; it is smoothed across the interface and takes no slide or wall control",
					blocks[end.b].Name, end.s, blocks[f.A+f.B-end.b].Name, f.SideA+f.SideB-end.s)
			}
		}
	}

	res := make([]SmoothResult, len(blocks))
	for b, blk := range blocks {
		res[b].FoldedAtStart, _, _ = inverted(blk)
	}
	presmooth(blocks, opts)
	sm := make([]*smoother, len(blocks))
	for b, blk := range blocks {
		sm[b] = newSmoother(blk, opts[b])
	}
	joins := make([]*join, len(ifaces))
	for k, f := range ifaces {
		joins[k] = newJoin(sm[f.A], sm[f.B], f)
	}
	groups := workGroups(blocks)
	stepped := make([]float64, len(blocks))
	for it := 0; it < maxIt; it++ {
		settled := true
		stepAll(sm, groups, it, stepped)
		for b, r := range stepped {
			res[b].Iterations, res[b].Residual = it+1, r
			settled = settled && r <= opts[b].Tolerance
		}
		for k, jn := range joins {
			r := jn.sweep()
			a := ifaces[k].A
			res[a].Residual = math.Max(res[a].Residual, r)
			settled = settled && r <= tol
		}
		if settled {
			for b := range res {
				res[b].Converged = true
			}
			break
		}
	}
	var first error
	for b, s := range sm {
		res[b].Damped = s.damped
		res[b].HeightError, res[b].MeanHeightError, res[b].AngleError, res[b].MeanAngleError, res[b].EndAngleError = s.wallErrors()
		if n, i, j := inverted(blocks[b]); n > 0 && first == nil {
			first = fmt.Errorf("structured: block %q: smoothing could not untangle the starting grid: %d cells are still inverted after %d iterations, the first is cell (%d, %d); refine the sides or give a better starting grid", blocks[b].Name, n, res[b].Iterations, i, j)
		}
	}
	return res, first
}

// parallelNodes is the fewest nodes, all blocks together, for which
// SmoothBlocks steps its blocks on several goroutines; below it the
// start-up of the goroutines in every sweep would cost more than it saves.
const parallelNodes = 8192

// workGroups splits the blocks into groups of about equal node count, one
// per goroutine that stepAll may use: at most GOMAXPROCS groups, one group
// of all blocks when there are few nodes. Each block goes, largest first,
// to the group with the fewest nodes so far (longest processing time
// first; Graham, SIAM J. Appl. Math. 17, 1969, from memory), so that the
// groups finish a sweep at about the same time.
func workGroups(blocks []*Block) [][]int {
	total := 0
	order := make([]int, len(blocks))
	for b, blk := range blocks {
		total += blk.NI * blk.NJ
		order[b] = b
	}
	n := min(runtime.GOMAXPROCS(0), len(blocks))
	if total < parallelNodes || n < 2 {
		return [][]int{order}
	}
	size := func(b int) int { return blocks[b].NI * blocks[b].NJ }
	sort.SliceStable(order, func(a, b int) bool { return size(order[a]) > size(order[b]) })
	groups := make([][]int, n)
	load := make([]int, n)
	for _, b := range order {
		g := 0
		for k := range load {
			if load[k] < load[g] {
				g = k
			}
		}
		groups[g] = append(groups[g], b)
		load[g] += size(b)
	}
	return groups
}

// stepAll runs one step of every block's smoother, the groups side by
// side, and puts each block's residual in r. A step moves only its own
// block's nodes (the shared sides are held until the joins sweep), so the
// blocks are independent within a sweep and the result is the same as
// stepping them one after another.
func stepAll(sm []*smoother, groups [][]int, it int, r []float64) {
	run := func(g []int) {
		for _, b := range g {
			r[b] = sm[b].step(it)
		}
	}
	var wg sync.WaitGroup
	for _, g := range groups[1:] {
		wg.Add(1)
		go func() {
			defer wg.Done()
			run(g)
		}()
	}
	run(groups[0])
	wg.Wait()
}

// join moves the inner nodes of one shared side. In its frame ξ runs
// along the side so that η points into block A (a right-handed frame), so
// the stencil of node m has E, W on the side, N, NE, NW in A and S, SE, SW
// in B; each node is written to both blocks.
type join struct {
	a, b *smoother
	// Flat indices per inner node m (1 … n−2, stored from 0).
	pa, pb, e, w, n, ne, nw, s, se, sw []int
	// phi is the Thomas–Middlecoff term along the side, from its starting
	// distribution, which keeps the side's clustering.
	phi []float64
}

// sideFrame returns the direction (+1 or −1) in which a side's node index
// must run for the block's inward direction to lie to its left, and the
// flat offset from a side node to its inward neighbour.
func sideFrame(b *Block, s mesh.Side) (dir, in int) {
	switch s {
	case mesh.South:
		return 1, b.NI
	case mesh.East:
		return 1, -1
	case mesh.North:
		return -1, -b.NI
	default:
		return -1, 1
	}
}

func newJoin(a, b *smoother, f mesh.BlockInterface) *join {
	A, B := a.b, b.b
	n := A.SideLen(f.SideA)
	dirA, inA := sideFrame(A, f.SideA)
	_, inB := sideFrame(B, f.SideB)
	ka := func(m int) int {
		if dirA > 0 {
			return m
		}
		return n - 1 - m
	}
	nodeB := func(k int) int {
		if f.Reversed {
			k = n - 1 - k
		}
		return B.SideNode(f.SideB, k)
	}
	j := &join{a: a, b: b}
	for m := 1; m+1 < n; m++ {
		p, e, w := A.SideNode(f.SideA, ka(m)), A.SideNode(f.SideA, ka(m+1)), A.SideNode(f.SideA, ka(m-1))
		pb, eb, wb := nodeB(ka(m)), nodeB(ka(m+1)), nodeB(ka(m-1))
		j.pa, j.pb = append(j.pa, p), append(j.pb, pb)
		j.e, j.w = append(j.e, e), append(j.w, w)
		j.n, j.ne, j.nw = append(j.n, p+inA), append(j.ne, e+inA), append(j.nw, w+inA)
		j.s, j.se, j.sw = append(j.s, pb+inB), append(j.se, eb+inB), append(j.sw, wb+inB)
		j.phi = append(j.phi, spacingTerm(A.X, A.Y, w, p, e))
	}
	return j
}

// sweep updates the side's inner nodes once and returns the residual (the
// largest proposed move over the local cell size).
func (j *join) sweep() float64 {
	ax, ay, bx, by := j.a.b.X, j.a.b.Y, j.b.b.X, j.b.b.Y
	om := math.Min(j.a.omega, j.b.omega)
	free := j.a.mode == freeMode || j.b.mode == freeMode
	star := j.a.mode == starMode && j.b.mode == starMode
	worst := 0.0
	for m := range j.pa {
		px, py := ax[j.pa[m]], ay[j.pa[m]]
		// Neighbours counter-clockwise from E, relative to the node.
		q := [8][2]float64{
			{ax[j.e[m]] - px, ay[j.e[m]] - py}, {ax[j.ne[m]] - px, ay[j.ne[m]] - py},
			{ax[j.n[m]] - px, ay[j.n[m]] - py}, {ax[j.nw[m]] - px, ay[j.nw[m]] - py},
			{ax[j.w[m]] - px, ay[j.w[m]] - py}, {bx[j.sw[m]] - px, by[j.sw[m]] - py},
			{bx[j.s[m]] - px, by[j.s[m]] - py}, {bx[j.se[m]] - px, by[j.se[m]] - py},
		}
		// q holds E=0 NE=1 N=2 NW=3 W=4 SW=5 S=6 SE=7.
		var d [2]float64
		xxi, yxi := 0.5*(q[0][0]-q[4][0]), 0.5*(q[0][1]-q[4][1])
		xeta, yeta := 0.5*(q[2][0]-q[6][0]), 0.5*(q[2][1]-q[6][1])
		xxe := 0.25 * (q[1][0] - q[3][0] - q[7][0] + q[5][0])
		yxe := 0.25 * (q[1][1] - q[3][1] - q[7][1] + q[5][1])
		al := xeta*xeta + yeta*yeta
		be := xxi*xeta + yxi*yeta
		ga := xxi*xxi + yxi*yxi
		phi := j.phi[m]
		if free {
			phi = 0
		}
		if !(al+ga > 0) {
			continue // all neighbours on the node: no direction to move in
		}
		inv := om * 0.5 / (al + ga)
		d[0] = (al*(q[0][0]+q[4][0]+phi*xxi) + ga*(q[2][0]+q[6][0]) - 2*be*xxe) * inv
		d[1] = (al*(q[0][1]+q[4][1]+phi*yxi) + ga*(q[2][1]+q[6][1]) - 2*be*yxe) * inv
		if h := math.Min(al, ga); h > 0 {
			worst = math.Max(worst, (d[0]*d[0]+d[1]*d[1])/h)
		}
		ok := func(dx, dy float64) bool {
			if free {
				return true
			}
			var c [8]float64
			for t := range c {
				u, v := q[t], q[(t+1)%8]
				c[t] = (u[0]-dx)*(v[1]-dy) - (v[0]-dx)*(u[1]-dy)
			}
			for t := 0; t < 8; t += 2 {
				if star && (c[t] <= 0 || c[t+1] <= 0) {
					return false
				}
				if !star && c[t]+c[t+1] <= 0 {
					return false
				}
			}
			return true
		}
		dx, dy := d[0], d[1]
		moved := ok(dx, dy)
		if !moved {
			j.a.damped++
			for h := 0; h < 4 && !moved; h++ {
				dx, dy = 0.5*dx, 0.5*dy
				moved = ok(dx, dy)
			}
		}
		if !moved {
			continue
		}
		ax[j.pa[m]], ay[j.pa[m]] = px+dx, py+dy
		bx[j.pb[m]], by[j.pb[m]] = px+dx, py+dy
	}
	return math.Sqrt(worst)
}
