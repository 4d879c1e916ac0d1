package bc

import (
	"testing"

	"github.com/paulmach/orb"
)

// BenchmarkMaxTimeStep times the spectral-radius time-step estimate on a
// 500 × 500 grid (250 000 cells, 500 000 faces).
func BenchmarkMaxTimeStep(b *testing.B) {
	m := channel(b, 500, 500, 1, 1, 0, [4]string{"s", "e", "n", "w"})
	b.ResetTimer()
	for b.Loop() {
		if _, err := MaxTimeStep(m, orb.Point{100, 20}, 340, 0.9); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkAssignPeriodic times Assign with a periodic pair of 20 000 faces
// a side on a 20 000 × 2 grid.
func BenchmarkAssignPeriodic(b *testing.B) {
	m := channel(b, 20000, 2, 100, 1, 0, [4]string{"south", "outlet", "north", "inlet"})
	ref, _ := StateFromAltitude(Air, Altitude{0, Geometric}, 0.3)
	conds := []Condition{
		{Tag: "south", Kind: Periodic, Partner: "north", Values: []Value{vector(KeyTranslation, 0, 1, "")}},
		{Tag: "inlet", Kind: Farfield},
		{Tag: "outlet", Kind: Farfield},
	}
	b.ResetTimer()
	for b.Loop() {
		a, err := Assign(m, Setup{Reference: &ref, Conditions: conds})
		if err != nil || len(a.Periodic[0].Pairs) != 20000 {
			b.Fatal(err)
		}
	}
}
