package mesh

import (
	"math"

	"github.com/paulmach/orb"
)

// PlaneTolerance is how far, relative to the largest coordinate magnitude
// of the nodes, a coordinate may stray from the first node's and still
// count as constant, for the readers that take a mesh lying on a plane
// x = c, y = c or z = c as 2D: a few units of roundoff in double
// precision, so that a mesh written in such a plane is read while a
// tilted one is not. One value for every reader, so that a mesh reads
// alike from any format.
const PlaneTolerance = 1e-12

// SideNode is a node on a side of a structured block: where block
// interfaces and seams lie, so where the readers of multi-block files look
// for nodes that two blocks (or the two ends of one block) share.
type SideNode struct {
	// ID is the node's number among the nodes of all blocks.
	ID int32
	// Block is the index of the block the node belongs to.
	Block int
	P     orb.Point
	// Tol is how close another side node must be to be the same node.
	Tol float64
}

// SideNodes appends to out the nodes on the four sides of an ni × nj block
// whose nodes (i fastest) are numbered from first, each with tolerance
// rel times the shortest grid edge meeting it in the block: a tolerance
// that follows the local spacing, so that one value serves a boundary
// layer's thin cells and a far field's large ones.
func SideNodes(out []SideNode, nodes []orb.Point, ni, nj int, first int32, block int, rel float64) []SideNode {
	for j := range nj {
		for i := range ni {
			if i != 0 && i != ni-1 && j != 0 && j != nj-1 {
				continue
			}
			k := j*ni + i
			p := nodes[k]
			h := math.Inf(1)
			for _, d := range [4][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}} {
				if ii, jj := i+d[0], j+d[1]; ii >= 0 && ii < ni && jj >= 0 && jj < nj {
					q := nodes[jj*ni+ii]
					h = min(h, math.Hypot(q[0]-p[0], q[1]-p[1]))
				}
			}
			out = append(out, SideNode{ID: first + int32(k), Block: block, P: p, Tol: rel * h})
		}
	}
	return out
}

// JoinCoincident calls join(a, b) for every pair of side nodes, a listed
// before b, that lie within the smaller of their two tolerances of each
// other. The pairs are found through a hash grid of square buckets no
// smaller than the largest tolerance, so that each node is compared only
// with those in its own bucket and the eight around it; buckets no smaller
// than 1e-15 of the coordinates' extent keep the bucket numbers within
// int64.
func JoinCoincident(nodes []SideNode, join func(a, b SideNode)) {
	maxTol, extent := 0.0, 0.0
	for _, c := range nodes {
		maxTol = max(maxTol, c.Tol)
		extent = max(extent, math.Abs(c.P[0]), math.Abs(c.P[1]))
	}
	size := max(maxTol, 1e-15*extent)
	if size == 0 || math.IsInf(size, 0) || math.IsNaN(size) {
		size = 1
	}
	buckets := map[[2]int64][]SideNode{}
	for _, c := range nodes {
		key := [2]int64{int64(math.Floor(c.P[0] / size)), int64(math.Floor(c.P[1] / size))}
		for dx := int64(-1); dx <= 1; dx++ {
			for dy := int64(-1); dy <= 1; dy++ {
				for _, o := range buckets[[2]int64{key[0] + dx, key[1] + dy}] {
					if math.Hypot(c.P[0]-o.P[0], c.P[1]-o.P[1]) <= min(c.Tol, o.Tol) {
						join(o, c)
					}
				}
			}
		}
		buckets[key] = append(buckets[key], c)
	}
}
