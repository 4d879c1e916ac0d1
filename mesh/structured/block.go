package structured

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// Block is one structured block: NI × NJ nodes, node (i, j) at X[j*NI+i],
// Y[j*NI+i]. Cells (i, j) have the nodes (i, j), (i+1, j), (i+1, j+1),
// (i, j+1), counter-clockwise when i runs along the south side from west to
// east and j from south to north.
type Block struct {
	Name   string
	NI, NJ int
	X, Y   []float64
	// Tags holds the boundary tag of each edge of each side, indexed by
	// mesh.Side, in increasing i (south and north) or j (east and west):
	// Tags[mesh.South][i] tags the edge from (i, 0) to (i+1, 0). An empty
	// tag marks a side that must be shared with another block.
	Tags [4][]string
	// Smooth holds, for each node of each side in the same order, whether
	// the side's curve runs smoothly through it (geometry.Chain.Smooth),
	// so that a side smoothed with sliding nodes keeps them on the curve;
	// nil for a side with no such nodes.
	Smooth [4][]bool
}

// NewBlock returns a block of NI × NJ nodes at the origin with empty tags.
func NewBlock(name string, ni, nj int) *Block {
	b := &Block{Name: name, NI: ni, NJ: nj, X: make([]float64, ni*nj), Y: make([]float64, ni*nj)}
	for s := mesh.South; s <= mesh.West; s++ {
		b.Tags[s] = make([]string, b.SideLen(s)-1)
	}
	return b
}

// At returns node (i, j).
func (b *Block) At(i, j int) orb.Point {
	k := j*b.NI + i
	return orb.Point{b.X[k], b.Y[k]}
}

// SideLen returns the number of nodes along side s.
func (b *Block) SideLen(s mesh.Side) int {
	if s == mesh.South || s == mesh.North {
		return b.NI
	}
	return b.NJ
}

// SideNode returns the flat index of the k-th node of side s, counting in
// increasing i (south, north) or j (east, west).
func (b *Block) SideNode(s mesh.Side, k int) int {
	switch s {
	case mesh.South:
		return k
	case mesh.North:
		return (b.NJ-1)*b.NI + k
	case mesh.West:
		return k * b.NI
	default:
		return k*b.NI + b.NI - 1
	}
}

// SidePoints returns the nodes of side s in increasing i or j.
func (b *Block) SidePoints(s mesh.Side) []orb.Point {
	n := b.SideLen(s)
	p := make([]orb.Point, n)
	for k := range p {
		q := b.SideNode(s, k)
		p[k] = orb.Point{b.X[q], b.Y[q]}
	}
	return p
}

// check verifies that the block's arrays have the sizes its NI and NJ say.
func (b *Block) check() error {
	if b.NI < 2 || b.NJ < 2 {
		return fmt.Errorf("block %q is %d × %d nodes; a block needs at least 2 × 2", b.Name, b.NI, b.NJ)
	}
	if len(b.X) != b.NI*b.NJ || len(b.Y) != b.NI*b.NJ {
		return fmt.Errorf("block %q: %d × %d nodes need %d coordinates, have %d x and %d y", b.Name, b.NI, b.NJ, b.NI*b.NJ, len(b.X), len(b.Y))
	}
	for s := mesh.South; s <= mesh.West; s++ {
		if len(b.Tags[s]) != b.SideLen(s)-1 {
			return fmt.Errorf("block %q %s side: %d edge tags for %d edges", b.Name, s, len(b.Tags[s]), b.SideLen(s)-1)
		}
	}
	for k := range b.X {
		if math.IsNaN(b.X[k]) || math.IsInf(b.X[k], 0) || math.IsNaN(b.Y[k]) || math.IsInf(b.Y[k], 0) {
			return fmt.Errorf("block %q node (%d, %d) is not finite: (%g, %g)", b.Name, k%b.NI, k/b.NI, b.X[k], b.Y[k])
		}
	}
	return nil
}

// Clone returns a deep copy of the block.
func (b *Block) Clone() *Block {
	c := &Block{Name: b.Name, NI: b.NI, NJ: b.NJ, X: append([]float64(nil), b.X...), Y: append([]float64(nil), b.Y...)}
	for s := range b.Tags {
		c.Tags[s] = append([]string(nil), b.Tags[s]...)
		c.Smooth[s] = append([]bool(nil), b.Smooth[s]...)
	}
	return c
}

// SplitI cuts the block at the given i indices (strictly increasing,
// strictly inside 0..NI-1) into consecutive blocks named name-1, name-2, ...;
// neighbouring pieces share the cut column, so Assemble joins them again.
// This is how an O-grid is divided so that surrounding blocks can meet it
// side to side.
func (b *Block) SplitI(cuts ...int) ([]*Block, error) {
	if err := b.check(); err != nil {
		return nil, err
	}
	prev := 0
	var out []*Block
	ends := append(append([]int(nil), cuts...), b.NI-1)
	for n, c := range ends {
		if c <= prev || c > b.NI-1 {
			return nil, fmt.Errorf("block %q: cut at i=%d is out of order or outside 1..%d", b.Name, c, b.NI-2)
		}
		p := NewBlock(fmt.Sprintf("%s-%d", b.Name, n+1), c-prev+1, b.NJ)
		for j := 0; j < b.NJ; j++ {
			copy(p.X[j*p.NI:(j+1)*p.NI], b.X[j*b.NI+prev:j*b.NI+c+1])
			copy(p.Y[j*p.NI:(j+1)*p.NI], b.Y[j*b.NI+prev:j*b.NI+c+1])
		}
		copy(p.Tags[mesh.South], b.Tags[mesh.South][prev:c])
		copy(p.Tags[mesh.North], b.Tags[mesh.North][prev:c])
		if prev == 0 {
			copy(p.Tags[mesh.West], b.Tags[mesh.West])
		}
		if c == b.NI-1 {
			copy(p.Tags[mesh.East], b.Tags[mesh.East])
		}
		out = append(out, p)
		prev = c
	}
	return out, nil
}
