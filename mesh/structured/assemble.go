package structured

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// AssembleOptions tune Assemble.
type AssembleOptions struct {
	// Tol is the largest distance between two nodes of shared sides that
	// still counts as the same node; 0 means 1e-9 times the bounding-box
	// diagonal of all blocks, or a millionth of the shortest side edge if
	// that is smaller.
	Tol float64
}

// sideRef names one side of one block.
type sideRef struct {
	block int
	side  mesh.Side
}

// sideSample holds a side's nodes and five points at arc-length fractions
// 0, ¼, ½, ¾, 1, used to recognise sides that are meant to be shared.
type sideSample struct {
	ref    sideRef
	pts    []orb.Point
	length float64
	at     [5]orb.Point
}

// Assemble joins structured blocks into one face-based mesh.
//
// Two sides are taken to be shared when their points at arc-length
// fractions 0, ¼, ½, ¾ and 1 agree, in the same or the opposite direction,
// to within 5% of the shorter side's length. A shared pair must then
// conform: equal node counts and every node within Tol of its partner,
// otherwise the error names the two blocks and sides and gives the counts,
// or the largest mismatch and where it is. The exception is two sides that
// both carry boundary tags on every edge, do not conform and do not end
// where each other ends: they are two boundaries that run close (as the
// wall and the outer side of a thin block), not an interface. Two sides of
// one block may be shared (the seam of an O-grid). Shared nodes become one
// mesh node (the first block's position is kept), so interfaces become
// interior faces and are listed in Mesh.Interfaces.
//
// Every side that is not shared must carry a boundary tag on each edge, no
// two sides that are not shared may run along each other for a stretch (a
// side meeting only part of another, or two sides along one line with
// different nodes, is a non-conforming join and an error naming both), and
// no node of one block may touch a node of another except through a shared
// side. Mesh nodes are numbered block by block in (i, j) order, skipping
// nodes already placed; cells block by block, i fastest; boundary tags in
// order of first appearance.
func Assemble(blocks []*Block, opt AssembleOptions) (*mesh.Mesh, error) {
	if len(blocks) == 0 {
		return nil, fmt.Errorf("structured: no blocks to assemble")
	}
	if err := checkBlocks(blocks); err != nil {
		return nil, err
	}
	offset := make([]int, len(blocks)+1)
	for b, blk := range blocks {
		offset[b+1] = offset[b] + blk.NI*blk.NJ
	}
	tol := opt.Tol
	if tol <= 0 {
		tol = defaultTol(blocks)
	}
	ifaces, partner, err := findShared(blocks, tol)
	if err != nil {
		return nil, err
	}
	if err := checkOverlaps(blocks, partner, tol); err != nil {
		return nil, err
	}
	parent := make([]int32, offset[len(blocks)])
	for k := range parent {
		parent[k] = int32(k)
	}
	for _, f := range ifaces {
		ba, bb := blocks[f.A], blocks[f.B]
		n := ba.SideLen(f.SideA)
		for k := 0; k < n; k++ {
			kb := k
			if f.Reversed {
				kb = n - 1 - k
			}
			union(parent, int32(offset[f.A]+ba.SideNode(f.SideA, k)), int32(offset[f.B]+bb.SideNode(f.SideB, kb)))
		}
	}

	// Number the nodes: each merged set takes the number of its first member.
	global := make([]int32, len(parent))
	nodes := make([]orb.Point, 0, len(parent))
	for b, blk := range blocks {
		for k := range blk.X {
			f := offset[b] + k
			r := find(parent, int32(f))
			if int(r) == f {
				global[f] = int32(len(nodes))
				nodes = append(nodes, orb.Point{blk.X[k], blk.Y[k]})
			} else {
				global[f] = global[r]
			}
		}
	}
	if err := checkTouching(blocks, offset, global, nodes, tol); err != nil {
		return nil, err
	}

	// Cells, structured view, boundary tags.
	in := mesh.Input{Nodes: nodes, Interfaces: ifaces}
	ncell := 0
	for _, blk := range blocks {
		ncell += (blk.NI - 1) * (blk.NJ - 1)
	}
	in.CellStart = make([]int32, 0, ncell+1)
	in.CellNodes = make([]int32, 0, 4*ncell)
	in.CellStart = append(in.CellStart, 0)
	nedge := 0
	for z, p := range partner {
		if p < 0 {
			nedge += blocks[z/4].SideLen(mesh.Side(z%4)) - 1
		}
	}
	in.Edges = make([]mesh.TaggedEdge, 0, nedge)
	tagIndex := map[string]int16{}
	for b, blk := range blocks {
		g := global[offset[b]:offset[b+1]]
		mb := mesh.Block{Name: blk.Name, NI: blk.NI, NJ: blk.NJ, Node: append([]int32(nil), g...), FirstCell: int32(len(in.CellStart) - 1)}
		in.Blocks = append(in.Blocks, mb)
		ni := blk.NI
		for j := 0; j+1 < blk.NJ; j++ {
			for i := 0; i+1 < ni; i++ {
				k := j*ni + i
				in.CellNodes = append(in.CellNodes, g[k], g[k+1], g[k+1+ni], g[k+ni])
				in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
			}
		}
		for s := mesh.South; s <= mesh.West; s++ {
			if partner[4*b+int(s)] >= 0 {
				continue
			}
			for e, tag := range blk.Tags[s] {
				if tag == "" {
					p := blk.At(nodeIJ(blk, s, e))
					return nil, fmt.Errorf("structured: block %q %s side is not shared with any block, and its edge %d (from (%.4g, %.4g)) has no boundary tag", blk.Name, s, e, p[0], p[1])
				}
				t, ok := tagIndex[tag]
				if !ok {
					if len(in.Tags) >= math.MaxInt16 {
						return nil, fmt.Errorf("structured: more than %d boundary tags", math.MaxInt16)
					}
					t = int16(len(in.Tags))
					tagIndex[tag] = t
					in.Tags = append(in.Tags, tag)
				}
				in.Edges = append(in.Edges, mesh.TaggedEdge{A: g[blk.SideNode(s, e)], B: g[blk.SideNode(s, e+1)], Tag: t})
			}
		}
	}
	m, err := mesh.Build(in)
	if err != nil {
		return nil, fmt.Errorf("structured: %w", err)
	}
	return m, nil
}

// tagged reports whether every edge of the side carries a boundary tag.
func tagged(blocks []*Block, r sideRef) bool {
	for _, t := range blocks[r.block].Tags[r.side] {
		if t == "" {
			return false
		}
	}
	return true
}

// checkBlocks verifies each block's arrays and that its cells run
// counter-clockwise.
func checkBlocks(blocks []*Block) error {
	for b, blk := range blocks {
		if err := blk.check(); err != nil {
			return fmt.Errorf("structured: %w", err)
		}
		if a := blockArea(blk); a <= 0 {
			return fmt.Errorf("structured: block %d %q has signed area %.3g: its i and j must run so that cells are counter-clockwise (i along south west to east, j south to north)", b, blk.Name, a)
		}
	}
	return nil
}

// defaultTol is 1e-9 times the bounding-box diagonal of all blocks, or a
// millionth of the shortest side edge if that is smaller (a grid that
// spans many orders of size, as a march with strong growth, must not merge
// its fine cells).
func defaultTol(blocks []*Block) float64 {
	lo := orb.Point{math.Inf(1), math.Inf(1)}
	hi := orb.Point{math.Inf(-1), math.Inf(-1)}
	shortest := math.Inf(1)
	for _, blk := range blocks {
		for k := range blk.X {
			lo = orb.Point{math.Min(lo[0], blk.X[k]), math.Min(lo[1], blk.Y[k])}
			hi = orb.Point{math.Max(hi[0], blk.X[k]), math.Max(hi[1], blk.Y[k])}
		}
		for s := mesh.South; s <= mesh.West; s++ {
			p := blk.SidePoints(s)
			for e := 1; e < len(p); e++ {
				if d := dist(p[e-1], p[e]); d > 0 {
					shortest = math.Min(shortest, d)
				}
			}
		}
	}
	return math.Min(1e-9*math.Hypot(hi[0]-lo[0], hi[1]-lo[1]), 1e-6*shortest)
}

// findShared finds the pairs of block sides that trace the same curve
// (see Assemble), checks that each pair conforms, and returns them as
// interfaces, with partner[4·block+side] the partner side's number (or −1).
// Candidate pairs are taken best match first, so that of several sides
// near one another (the sides of thin blocks) the coincident ones pair up.
func findShared(blocks []*Block, tol float64) ([]mesh.BlockInterface, []int, error) {
	var sides []sideSample
	for b, blk := range blocks {
		for s := mesh.South; s <= mesh.West; s++ {
			sides = append(sides, sampleSide(sideRef{b, s}, blk.SidePoints(s)))
		}
	}
	type candidate struct {
		x, y     int
		rev      bool
		mismatch float64
	}
	var cands []candidate
	for x := range sides {
		for y := x + 1; y < len(sides); y++ {
			if rev, d, ok := sameCurve(&sides[x], &sides[y]); ok {
				cands = append(cands, candidate{x, y, rev, d})
			}
		}
	}
	sort.SliceStable(cands, func(a, b int) bool { return cands[a].mismatch < cands[b].mismatch })
	partner := make([]int, len(sides))
	for k := range partner {
		partner[k] = -1
	}
	var ifaces []mesh.BlockInterface
	for _, c := range cands {
		if partner[c.x] >= 0 || partner[c.y] >= 0 {
			continue
		}
		sx, sy := &sides[c.x], &sides[c.y]
		if err := conform(blocks, sx, sy, c.rev, tol); err != nil {
			if tagged(blocks, sx.ref) && tagged(blocks, sy.ref) && !sameEnds(sx, sy, c.rev, tol) {
				// Two boundary sides that merely run close: not shared.
				continue
			}
			return nil, nil, err
		}
		partner[c.x], partner[c.y] = c.y, c.x
		ifaces = append(ifaces, mesh.BlockInterface{A: sx.ref.block, B: sy.ref.block, SideA: sx.ref.side, SideB: sy.ref.side, Reversed: c.rev})
	}
	// Report interfaces in block and side order, whatever order they were
	// found in.
	sort.Slice(ifaces, func(a, b int) bool {
		fa, fb := ifaces[a], ifaces[b]
		if fa.A != fb.A {
			return fa.A < fb.A
		}
		return fa.SideA < fb.SideA
	})
	return ifaces, partner, nil
}

// nodeIJ returns the (i, j) of the k-th node of side s.
func nodeIJ(b *Block, s mesh.Side, k int) (int, int) {
	q := b.SideNode(s, k)
	return q % b.NI, q / b.NI
}

func refName(blocks []*Block, r sideRef) string {
	return fmt.Sprintf("block %q %s side", blocks[r.block].Name, r.side)
}

func sampleSide(r sideRef, pts []orb.Point) sideSample {
	s := sideSample{ref: r, pts: pts}
	cum := make([]float64, len(pts))
	for k := 1; k < len(pts); k++ {
		cum[k] = cum[k-1] + dist(pts[k-1], pts[k])
	}
	s.length = cum[len(cum)-1]
	k := 0
	for q := 0; q < 5; q++ {
		target := s.length * float64(q) / 4
		for k+2 < len(pts) && cum[k+1] < target {
			k++
		}
		seg := cum[k+1] - cum[k]
		t := 0.0
		if seg > 0 {
			t = math.Min(1, math.Max(0, (target-cum[k])/seg))
		}
		a, b := pts[k], pts[k+1]
		s.at[q] = orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}
	}
	return s
}

// sameCurve reports whether two sides trace the same curve (within 5% of
// the shorter length at five arc-length fractions), whether they run in
// opposite directions, and the largest sample distance over that length.
func sameCurve(a, b *sideSample) (rev bool, mismatch float64, ok bool) {
	L := math.Min(a.length, b.length)
	if L == 0 {
		return false, 0, false
	}
	var fwd, bwd float64
	for q := 0; q < 5; q++ {
		fwd = math.Max(fwd, dist(a.at[q], b.at[q]))
		bwd = math.Max(bwd, dist(a.at[q], b.at[4-q]))
	}
	if fwd <= bwd {
		return false, fwd / L, fwd <= 0.05*L
	}
	return true, bwd / L, bwd <= 0.05*L
}

// sameEnds reports whether two sides end where each other ends (in the
// direction sameCurve found), each end within tol.
func sameEnds(a, b *sideSample, rev bool, tol float64) bool {
	b0, b1 := b.pts[0], b.pts[len(b.pts)-1]
	if rev {
		b0, b1 = b1, b0
	}
	return dist(a.pts[0], b0) <= tol && dist(a.pts[len(a.pts)-1], b1) <= tol
}

// conform checks that two sides recognised as shared match node for node.
func conform(blocks []*Block, a, b *sideSample, rev bool, tol float64) error {
	na, nb := len(a.pts), len(b.pts)
	p0, p1 := a.pts[0], a.pts[na-1]
	if na != nb {
		return fmt.Errorf("structured: %s (%d nodes) and %s (%d nodes) lie along the same curve, from (%.4g, %.4g) to (%.4g, %.4g), but differ by %d nodes; sides that meet must share their nodes: equal counts, each node on its partner",
			refName(blocks, a.ref), na, refName(blocks, b.ref), nb, p0[0], p0[1], p1[0], p1[1], abs(na-nb))
	}
	worst, at := 0.0, 0
	for k := 0; k < na; k++ {
		kb := k
		if rev {
			kb = na - 1 - k
		}
		if d := dist(a.pts[k], b.pts[kb]); d > worst {
			worst, at = d, k
		}
	}
	if worst > tol {
		kb := at
		if rev {
			kb = na - 1 - at
		}
		ba, bb := blocks[a.ref.block], blocks[b.ref.block]
		ia, ja := nodeIJ(ba, a.ref.side, at)
		ib, jb := nodeIJ(bb, b.ref.side, kb)
		d := geometry.DistinctDigits(a.pts[at], b.pts[kb])
		return fmt.Errorf("structured: %s and %s (%d nodes each) lie along the same curve, from (%.4g, %.4g) to (%.4g, %.4g), but their nodes do not match: the worst, node (%d, %d) at (%.*g, %.*g) and node (%d, %d) at (%.*g, %.*g), are %.4g apart, more than the tolerance %.3g; sides that meet must share their nodes",
			refName(blocks, a.ref), refName(blocks, b.ref), na, p0[0], p0[1], p1[0], p1[1],
			ia, ja, d, a.pts[at][0], d, a.pts[at][1], ib, jb, d, b.pts[kb][0], d, b.pts[kb][1], worst, tol)
	}
	return nil
}

// sidePath is a block side as a polyline, with the bounding box of the
// whole side and of each run of pathChunk edges, so that finding whether
// a point lies on the side takes few edge tests.
type sidePath struct {
	ref    sideRef
	pts    []orb.Point
	box    orb.Bound
	chunks []orb.Bound // chunk c holds edges pathChunk·c to pathChunk·(c+1) − 1
}

const pathChunk = 16

func newSidePath(r sideRef, pts []orb.Point) sidePath {
	p := sidePath{ref: r, pts: pts, box: orb.Bound{Min: pts[0], Max: pts[0]}}
	for lo := 0; lo+1 < len(pts); lo += pathChunk {
		hi := min(lo+pathChunk, len(pts)-1)
		b := orb.Bound{Min: pts[lo], Max: pts[lo]}
		for k := lo + 1; k <= hi; k++ {
			b = b.Extend(pts[k])
		}
		p.chunks = append(p.chunks, b)
		p.box = p.box.Union(b)
	}
	return p
}

// near reports whether q lies within tol of the side's polyline.
func (p *sidePath) near(q orb.Point, tol float64) bool {
	if !nearBound(p.box, q, tol) {
		return false
	}
	for c, b := range p.chunks {
		if !nearBound(b, q, tol) {
			continue
		}
		for k := c * pathChunk; k < min((c+1)*pathChunk, len(p.pts)-1); k++ {
			if geometry.SegmentDistance(q, p.pts[k], p.pts[k+1]) <= tol {
				return true
			}
		}
	}
	return false
}

// nearBound reports whether q lies within tol of the box b (a necessary
// condition for lying within tol of what the box holds).
func nearBound(b orb.Bound, q orb.Point, tol float64) bool {
	return q[0] >= b.Min[0]-tol && q[0] <= b.Max[0]+tol && q[1] >= b.Min[1]-tol && q[1] <= b.Max[1]+tol
}

// alongRun returns the first run of consecutive edges of a, from node k0
// to node k1, that lie on b: each edge longer than tol, with its two ends
// and its midpoint within tol of b.
func alongRun(a, b *sidePath, tol float64) (k0, k1 int, ok bool) {
	on := func(k int) bool {
		p, q := a.pts[k], a.pts[k+1]
		return dist(p, q) > tol && b.near(p, tol) && b.near(q, tol) && b.near(orb.Point{(p[0] + q[0]) / 2, (p[1] + q[1]) / 2}, tol)
	}
	for k := 0; k+1 < len(a.pts); k++ {
		if on(k) {
			k1 = k + 1
			for k1+1 < len(a.pts) && on(k1) {
				k1++
			}
			return k, k1, true
		}
	}
	return 0, 0, false
}

// checkOverlaps reports two block sides, not joined as shared, that run
// along each other for a stretch (see alongRun): blocks that meet along a
// line other than side to side with matching nodes. It finds them on
// straight stretches and wherever the two sides' polylines coincide;
// curved sides discretised differently are found by findShared when they
// end where each other ends, and otherwise by checkTouching at the nodes
// they share.
func checkOverlaps(blocks []*Block, partner []int, tol float64) error {
	var paths []sidePath
	for b, blk := range blocks {
		for s := mesh.South; s <= mesh.West; s++ {
			if partner[4*b+int(s)] < 0 {
				paths = append(paths, newSidePath(sideRef{b, s}, blk.SidePoints(s)))
			}
		}
	}
	for x := range paths {
		for y := x + 1; y < len(paths); y++ {
			a, b := &paths[x], &paths[y]
			if a.box.Min[0] > b.box.Max[0]+tol || b.box.Min[0] > a.box.Max[0]+tol || a.box.Min[1] > b.box.Max[1]+tol || b.box.Min[1] > a.box.Max[1]+tol {
				continue // too far apart to touch
			}
			if k0, k1, ok := alongRun(a, b, tol); ok {
				return overlapError(blocks, a, b, k0, k1, tol)
			}
			if k0, k1, ok := alongRun(b, a, tol); ok {
				return overlapError(blocks, b, a, k0, k1, tol)
			}
		}
	}
	return nil
}

// overlapError describes sides a and b running along each other from node
// k0 to node k1 of a: where, how many nodes each has there, and which of
// them the stretch covers only in part.
func overlapError(blocks []*Block, a, b *sidePath, k0, k1 int, tol float64) error {
	stretch := newSidePath(a.ref, a.pts[k0:k1+1])
	nb := 0
	for _, p := range b.pts {
		if stretch.near(p, tol) {
			nb++
		}
	}
	var part []string
	if k1-k0+1 < len(a.pts) {
		part = append(part, refName(blocks, a.ref))
	}
	if nb < len(b.pts) {
		part = append(part, refName(blocks, b.ref))
	}
	why := "with nodes that do not match"
	if len(part) > 0 {
		why = "that stretch is only part of " + strings.Join(part, " and of ")
	}
	p0, p1 := a.pts[k0], a.pts[k1]
	return fmt.Errorf("structured: %s and %s run along each other from (%.4g, %.4g) to (%.4g, %.4g), with %d and %d nodes there, but are not joined as a shared side: %s; blocks must meet side to side, each side meeting one whole side of one other block, node for node",
		refName(blocks, a.ref), refName(blocks, b.ref), p0[0], p0[1], p1[0], p1[1], k1-k0+1, nb, why)
}

func find(parent []int32, x int32) int32 {
	for parent[x] != x {
		parent[x] = parent[parent[x]]
		x = parent[x]
	}
	return x
}

// union joins the sets of a and b, keeping the smaller index as the root so
// that the root of a set is its first member in block order.
func union(parent []int32, a, b int32) {
	ra, rb := find(parent, a), find(parent, b)
	if ra < rb {
		parent[rb] = ra
	} else if rb < ra {
		parent[ra] = rb
	}
}

// blockArea returns the signed area of the block's cells.
func blockArea(b *Block) float64 {
	var a2 float64
	ni := b.NI
	for j := 0; j+1 < b.NJ; j++ {
		for i := 0; i+1 < ni; i++ {
			k := j*ni + i
			// Twice the quad area is the cross product of its diagonals.
			d1x, d1y := b.X[k+1+ni]-b.X[k], b.Y[k+1+ni]-b.Y[k]
			d2x, d2y := b.X[k+ni]-b.X[k+1], b.Y[k+ni]-b.Y[k+1]
			a2 += d1x*d2y - d1y*d2x
		}
	}
	return a2 / 2
}

// checkTouching reports two distinct mesh nodes on block sides that lie
// within tol of each other: the mark of a join that is not side to side.
func checkTouching(blocks []*Block, offset []int, global []int32, nodes []orb.Point, tol float64) error {
	seen := make([]bool, len(nodes))
	var ids []int32
	where := make([][2]int, len(nodes)) // mesh node -> (block, local index), first seen
	for b, blk := range blocks {
		for s := mesh.South; s <= mesh.West; s++ {
			for k := 0; k < blk.SideLen(s); k++ {
				q := blk.SideNode(s, k)
				g := global[offset[b]+q]
				if !seen[g] {
					seen[g] = true
					ids = append(ids, g)
					where[g] = [2]int{b, q}
				}
			}
		}
	}
	h := 4 * tol
	key := func(g int32) float64 { return math.Floor(nodes[g][0] / h) }
	sort.Slice(ids, func(a, b int) bool {
		ka, kb := key(ids[a]), key(ids[b])
		if ka != kb {
			return ka < kb
		}
		if nodes[ids[a]][1] != nodes[ids[b]][1] {
			return nodes[ids[a]][1] < nodes[ids[b]][1]
		}
		return ids[a] < ids[b]
	})
	for a, g := range ids {
		p := nodes[g]
		kx := key(g)
		for _, cx := range [2]float64{kx, kx + 1} {
			// First index with key cx and y ≥ p.y − tol.
			lo := sort.Search(len(ids), func(n int) bool {
				k := key(ids[n])
				return k > cx || (k == cx && nodes[ids[n]][1] >= p[1]-tol)
			})
			for n := lo; n < len(ids) && key(ids[n]) == cx && nodes[ids[n]][1] <= p[1]+tol; n++ {
				o := ids[n]
				if n == a || dist(p, nodes[o]) > tol {
					continue
				}
				w1, w2 := where[g], where[o]
				b1, b2 := blocks[w1[0]], blocks[w2[0]]
				return fmt.Errorf("structured: node (%d, %d) of block %q and node (%d, %d) of block %q both lie at (%.4g, %.4g) but are not joined by a shared side; blocks must meet side to side with matching nodes",
					w1[1]%b1.NI, w1[1]/b1.NI, b1.Name, w2[1]%b2.NI, w2[1]/b2.NI, b2.Name, p[0], p[1])
			}
		}
	}
	return nil
}
