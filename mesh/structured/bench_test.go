package structured

import (
	"testing"

	"github.com/paulmach/orb"
)

// bumpSides is a 1000 × 1000 node channel of our own with a circular-arc
// style bump on its floor, the sides clustered towards the floor.
func bumpSides(n int) BlockSides {
	floor := make([]orb.Point, n)
	for k := range floor {
		x := 3 * float64(k) / float64(n-1)
		y := 0.0
		if x > 1 && x < 2 {
			y = 0.1 * (1 - (2*x-3)*(2*x-3))
		}
		floor[k] = orb.Point{x, y}
	}
	return BlockSides{
		Name:  "bump",
		South: chainOf(floor, "wall"),
		East:  line(orb.Point{3, 0}, orb.Point{3, 1}, geometric(n, 1e-4), "outflow"),
		North: line(orb.Point{3, 1}, orb.Point{0, 1}, uniform(n), "top"),
		West:  reversed(line(orb.Point{0, 0}, orb.Point{0, 1}, geometric(n, 1e-4), "inflow")),
	}
}

// BenchmarkTFI1000 fills a 1000 × 1000 node block by TFI.
func BenchmarkTFI1000(b *testing.B) {
	s := bumpSides(1000)
	for b.Loop() {
		if _, err := TFI(s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkTFIMesh1000 is TFI on a 1000 × 1000 block plus Assemble, which
// merges, tags and builds the face-based mesh (mesh.Build).
func BenchmarkTFIMesh1000(b *testing.B) {
	s := bumpSides(1000)
	for b.Loop() {
		blk, err := TFI(s)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := Assemble([]*Block{blk}, AssembleOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
