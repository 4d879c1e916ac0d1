package mesh

import (
	"testing"

	"github.com/paulmach/orb"
)

// Two 3 × 3 blocks of unit spacing side by side share the three nodes of
// their common side: JoinCoincident pairs exactly those (the right side of
// block 0 with the left side of block 1), and not a node moved off the
// side by more than the tolerance (1e-6 of the unit spacing), while one
// moved by less still pairs.
func TestJoinCoincident(t *testing.T) {
	block := func(x0, shift float64) []orb.Point {
		var p []orb.Point
		for j := range 3 {
			for i := range 3 {
				x := x0 + float64(i)
				if i == 0 && j == 1 {
					x += shift
				}
				p = append(p, orb.Point{x, float64(j)})
			}
		}
		return p
	}
	for _, tc := range []struct {
		shift float64
		pairs int
	}{{0, 3}, {5e-7, 3}, {2e-6, 2}} {
		var sides []SideNode
		sides = SideNodes(sides, block(0, 0), 3, 3, 0, 0, 1e-6)
		sides = SideNodes(sides, block(2, tc.shift), 3, 3, 9, 1, 1e-6)
		if len(sides) != 16 {
			t.Fatalf("%d side nodes, want 8 per block", len(sides))
		}
		var got [][2]int32
		JoinCoincident(sides, func(a, b SideNode) { got = append(got, [2]int32{a.ID, b.ID}) })
		if len(got) != tc.pairs {
			t.Errorf("shift %g: pairs %v, want %d", tc.shift, got, tc.pairs)
		}
		for _, pr := range got {
			// Node (2, j) of block 0 is node 3j+2; node (0, j) of block 1
			// is 9 + 3j.
			if (pr[0]-2)%3 != 0 || pr[1] != pr[0]+7 {
				t.Errorf("shift %g: pair %v is not across the shared side", tc.shift, pr)
			}
		}
	}
}
