package quality

import (
	"fmt"
	"math"
	"math/bits"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// gridHash buckets items on a uniform grid of square buckets of side size,
// in an open-addressing table keyed by the bucket's (i, j), each slot
// holding the first entry of the bucket's chain (the chains are kept by the
// user). Building is linear and a look-up touches one bucket, so proximity
// queries on n items cost O(n) rather than O(n²).
type gridHash struct {
	x0, y0, size float64
	mask         uint64
	slotKey      [][2]int64
	slotHead     []int32
}

// maxBuckets bounds the grid extent in buckets along an axis, so that bucket
// indices stay exact in float64 and int64.
const maxBuckets = 1 << 50

// newGridHash prepares a hash for at most count distinct buckets over the
// box lo..hi with the given bucket size, enlarged if the box would span
// more than maxBuckets. The table has more than twice count slots, so it
// never fills.
func newGridHash(lo, hi orb.Point, size float64, count int) *gridHash {
	ext := max(hi[0]-lo[0], hi[1]-lo[1])
	if !(size > 0) || ext/size > maxBuckets {
		size = max(ext/maxBuckets, math.SmallestNonzeroFloat64)
	}
	nslots := 1 << bits.Len(uint(2*count+1))
	h := &gridHash{x0: lo[0], y0: lo[1], size: size, mask: uint64(nslots - 1),
		slotKey: make([][2]int64, nslots), slotHead: make([]int32, nslots)}
	for i := range h.slotHead {
		h.slotHead[i] = -1
	}
	return h
}

func (h *gridHash) key(p orb.Point) [2]int64 {
	return [2]int64{int64(math.Floor((p[0] - h.x0) / h.size)), int64(math.Floor((p[1] - h.y0) / h.size))}
}

// slot returns the table slot of key k: the slot holding k, or the empty
// slot where k belongs.
func (h *gridHash) slot(k [2]int64) int {
	s := (uint64(k[0])*0x9E3779B97F4A7C15 ^ uint64(k[1])*0xC2B2AE3D27D4EB4F)
	s ^= s >> 29
	for i := s & h.mask; ; i = (i + 1) & h.mask {
		if h.slotHead[i] < 0 || h.slotKey[i] == k {
			return int(i)
		}
	}
}

// bucket returns the first item in bucket k, or -1.
func (h *gridHash) bucket(k [2]int64) int32 {
	return h.slotHead[h.slot(k)]
}

// findDuplicates reports every node w of the candidate set (node indices
// in increasing order) that lies closer than tol to a candidate of lower
// index, naming the lowest such node.
//
// Nodes are bucketed on a grid of square buckets of side 16·tol; the
// bucket keys (i, j) are sorted by a radix sort, which puts every bucket's
// nodes together and the buckets of one column in order of j. Two nodes
// closer than tol lie in the same bucket or in adjacent ones, so one sweep
// compares each node with the rest of its bucket and the next bucket up,
// and a second pointer walking the next column in step covers the three
// buckets to the right: linear time after the sort, with sequential memory
// access, unlike a table look-up per node. The sweep stops with a finding
// once it has made more than 64 comparisons per node, which only a pile
// of near-coincident nodes can cause.
func findDuplicates(m *mesh.Mesh, cand []int32, first []int32, tol float64, cn *connectivity) {
	nn := len(cand)
	if nn < 2 || !(tol > 0) {
		return
	}
	pts := make([]orb.Point, nn)
	for s, v := range cand {
		pts[s] = m.Nodes[v]
	}
	lo, hi := bounds(pts)
	size := 16 * tol
	if ext := max(hi[0]-lo[0], hi[1]-lo[1]); ext/size > 1<<31 {
		size = ext / (1 << 31)
	}
	// Bucket (i, j) has key i<<shift | j, shift the bit length of the
	// largest j, so that keys use few bits and the radix sort few passes.
	ny := uint64((hi[1] - lo[1]) / size)
	shift := uint(bits.Len64(ny))
	keys := make([]uint64, nn)
	for s, p := range pts {
		keys[s] = uint64((p[0]-lo[0])/size)<<shift | uint64((p[1]-lo[1])/size)
	}
	keys, order := radixSort(keys)
	// dupOf[s] is the lowest candidate position a candidate s duplicates;
	// positions order like node indices, since cand is increasing.
	dupOf := make([]int32, nn)
	for i := range dupOf {
		dupOf[i] = -1
	}
	tol2 := tol * tol
	budget := 64*nn + 1024
	compare := func(v, w int32) {
		budget--
		p, q := pts[v], pts[w]
		dx, dy := q[0]-p[0], q[1]-p[1]
		if dx*dx+dy*dy < tol2 {
			a, b := min(v, w), max(v, w)
			if dupOf[b] < 0 || a < dupOf[b] {
				dupOf[b] = a
			}
		}
	}
	right := 0 // walks the column to the right of the current one
	for s := 0; s < nn && budget > 0; s++ {
		k := keys[s]
		col := k >> shift
		// Same bucket and the next one up: they follow in the order.
		for t := s + 1; t < nn && keys[t] <= k+1 && keys[t]>>shift == col; t++ {
			compare(order[s], order[t])
		}
		// Buckets (i+1, j−1 .. j+1).
		lowKey := (col+1)<<shift | (max(k&(1<<shift-1), 1) - 1)
		for right < nn && keys[right] < lowKey {
			right++
		}
		for t := right; t < nn && keys[t] <= lowKey+2 && keys[t]>>shift == col+1; t++ {
			compare(order[s], order[t])
		}
	}
	if budget <= 0 {
		cn.add(Problem{Check: CheckDuplicate, Cell: -1, Face: -1, Node: -1,
			Message: fmt.Sprintf("more than %d node pairs lie within %.3g of each other; the duplicate search stopped there", 64*nn, 16*tol)})
	}
	for sw, sv := range dupOf {
		if sv < 0 {
			continue
		}
		v, w := int(cand[sv]), int(cand[sw])
		p, q := m.Nodes[v], m.Nodes[w]
		cn.add(Problem{Check: CheckDuplicate, Cell: int(first[w]), Face: -1, Node: w, X: q[0], Y: q[1],
			Message: fmt.Sprintf("node %d (cell %d) and node %d (cell %d) are %.3g apart at (%.9g, %.9g), closer than the tolerance %.3g: they should be one node",
				v, first[v], w, first[w], math.Hypot(q[0]-p[0], q[1]-p[1]), p[0], p[1], tol)})
	}
}

// radixSort sorts keys (in place, returning the sorted slice, which may be
// a different one) and returns beside them the permutation that sorts
// them: sorted[s] = keys[order[s]]. It is stable (equal keys keep
// increasing index) and is a least-significant-digit radix sort on 12-bit
// digits (a histogram that fits in the first-level cache) up to the
// highest bit any key uses. Keys travel with their indices, so every pass
// reads its input in order.
func radixSort(keys []uint64) ([]uint64, []int32) {
	n := len(keys)
	order := make([]int32, n)
	for i := range order {
		order[i] = int32(i)
	}
	or := uint64(0)
	for _, k := range keys {
		or |= k
	}
	top := uint(bits.Len64(or))
	tmpKey := make([]uint64, n)
	tmpIdx := make([]int32, n)
	const digit = 12
	var count [1 << digit]int
	for shift := uint(0); shift < top; shift += digit {
		clear(count[:])
		for _, k := range keys {
			count[k>>shift&(1<<digit-1)]++
		}
		sum := 0
		for d, c := range count {
			count[d] = sum
			sum += c
		}
		for s, k := range keys {
			d := k >> shift & (1<<digit - 1)
			tmpKey[count[d]] = k
			tmpIdx[count[d]] = order[s]
			count[d]++
		}
		keys, tmpKey = tmpKey, keys
		order, tmpIdx = tmpIdx, order
	}
	return keys, order
}

// findHanging reports boundary nodes that lie inside another boundary face:
// the node of a cell that splits the face of its neighbour. Such a face is a
// boundary face inside the domain. A node lies inside face a→b when its
// parameter along the face is in (ε, 1 − ε) and its distance from the face
// line is at most ε|b − a|, with ε = relTol.
//
// Boundary faces are hashed into the buckets they pass through, with
// buckets the size of the mean boundary face, so each node looks in one
// bucket.
func findHanging(m *mesh.Mesh, bnodes []int32, relTol float64, cn *connectivity) {
	nb := m.NumBoundary()
	if nb == 0 {
		return
	}
	var total float64
	lo := orb.Point{math.Inf(1), math.Inf(1)}
	hi := orb.Point{math.Inf(-1), math.Inf(-1)}
	for _, v := range bnodes {
		p := m.Nodes[v]
		lo = orb.Point{min(lo[0], p[0]), min(lo[1], p[1])}
		hi = orb.Point{max(hi[0], p[0]), max(hi[1], p[1])}
	}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		total += m.Geo.FaceLength[f]
	}
	size := total / float64(nb)
	// Each face is cut into pieces no longer than a bucket, and each piece
	// goes into the buckets of its bounding box widened by the distance
	// tolerance (at most 3×3): at most 9(total/size + nb) = 18 nb entries.
	h := newGridHash(lo, hi, size, 18*nb)
	size = h.size
	// Entries are (face, next entry) pairs, appended in face order so each
	// chain lists faces in increasing order.
	entFace := make([]int32, 0, 8*nb)
	entNext := make([]int32, 0, 8*nb)
	tail := make([]int32, len(h.slotHead))
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		fn := m.FaceNodes[f]
		a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
		pieces := max(1, int(math.Ceil(m.Geo.FaceLength[f]/size)))
		for k := 0; k < pieces; k++ {
			s0, s1 := float64(k)/float64(pieces), float64(k+1)/float64(pieces)
			p0 := orb.Point{a[0] + s0*(b[0]-a[0]), a[1] + s0*(b[1]-a[1])}
			p1 := orb.Point{a[0] + s1*(b[0]-a[0]), a[1] + s1*(b[1]-a[1])}
			r := relTol * m.Geo.FaceLength[f] // reach of the distance test
			ka := h.key(orb.Point{min(p0[0], p1[0]) - r, min(p0[1], p1[1]) - r})
			kb := h.key(orb.Point{max(p0[0], p1[0]) + r, max(p0[1], p1[1]) + r})
			for i := ka[0]; i <= kb[0]; i++ {
				for j := ka[1]; j <= kb[1]; j++ {
					k := [2]int64{i, j}
					s := h.slot(k)
					if h.slotHead[s] >= 0 && entFace[tail[s]] == int32(f) {
						continue // already listed from the previous piece
					}
					e := int32(len(entFace))
					entFace = append(entFace, int32(f))
					entNext = append(entNext, -1)
					if h.slotHead[s] < 0 {
						h.slotKey[s] = k
						h.slotHead[s] = e
					} else {
						entNext[tail[s]] = e
					}
					tail[s] = e
				}
			}
		}
	}
	for _, vi := range bnodes {
		v := int(vi)
		p := m.Nodes[v]
		for e := h.bucket(h.key(p)); e >= 0; e = entNext[e] {
			f := int(entFace[e])
			fn := m.FaceNodes[f]
			if fn[0] == int32(v) || fn[1] == int32(v) {
				continue
			}
			a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
			ex, ey := b[0]-a[0], b[1]-a[1]
			l2 := ex*ex + ey*ey
			if l2 == 0 {
				continue
			}
			px, py := p[0]-a[0], p[1]-a[1]
			t := (px*ex + py*ey) / l2
			dist := math.Abs(px*ey-py*ex) / math.Sqrt(l2)
			if t > relTol && t < 1-relTol && dist <= relTol*math.Sqrt(l2) {
				// The fix depends on the cell: a polygon of four or more
				// nodes takes the node into its node list (its shape is
				// measured by its true corners, see cellShape), while a
				// triangle given a fourth node on a side would be a
				// degenerate quadrilateral, so it is split in two through
				// the node instead.
				fix := "split that face at the node (add the node to the cell's node list)"
				if o := int(m.Owner[f]); m.CellStart[o+1]-m.CellStart[o] == 3 {
					fix = "the cell is a triangle: split it in two through the node, from the node to the corner opposite that face"
				}
				cn.add(Problem{Check: CheckHanging, Cell: int(m.Owner[f]), Face: f, Node: v, X: p[0], Y: p[1],
					Message: fmt.Sprintf("node %d at (%.9g, %.9g) lies inside face %d (nodes %d-%d) of cell %d without being one of its nodes: a hanging node; %s",
						v, p[0], p[1], f, fn[0], fn[1], m.Owner[f], fix)})
			}
		}
	}
}

// boundaryNodes returns the nodes of the boundary faces, in increasing
// order.
func boundaryNodes(m *mesh.Mesh) []int32 {
	on := make([]bool, len(m.Nodes))
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		on[m.FaceNodes[f][0]] = true
		on[m.FaceNodes[f][1]] = true
	}
	var out []int32
	for v, b := range on {
		if b {
			out = append(out, int32(v))
		}
	}
	return out
}

// bounds returns the bounding box of the points.
func bounds(pts []orb.Point) (lo, hi orb.Point) {
	lo = orb.Point{math.Inf(1), math.Inf(1)}
	hi = orb.Point{math.Inf(-1), math.Inf(-1)}
	for _, p := range pts {
		lo = orb.Point{min(lo[0], p[0]), min(lo[1], p[1])}
		hi = orb.Point{max(hi[0], p[0]), max(hi[1], p[1])}
	}
	return lo, hi
}
