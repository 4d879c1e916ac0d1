package structured

import (
	"encoding/binary"
	"math"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
)

// floats reads float64s from data, eight bytes each.
func floats(data []byte) []float64 {
	var v []float64
	for len(data) >= 8 {
		v = append(v, math.Float64frombits(binary.LittleEndian.Uint64(data)))
		data = data[8:]
	}
	return v
}

// sidesFrom builds four chains from the fuzz input: node counts from the
// first bytes, then perturbations of a unit square's sides.
func sidesFrom(ns, nw uint8, data []byte) BlockSides {
	ni, nj := 2+int(ns%12), 2+int(nw%12)
	f := floats(data)
	pert := func(k int) float64 {
		if len(f) == 0 {
			return 0
		}
		return f[k%len(f)]
	}
	side := func(a, b orb.Point, n, off int) geometry.Chain {
		c := line(a, b, uniform(n), "t")
		for k := 1; k+1 < n; k++ {
			c.Points[k][0] += pert(off + 2*k)
			c.Points[k][1] += pert(off + 2*k + 1)
		}
		return c
	}
	return BlockSides{Name: "fuzz",
		South: side(orb.Point{0, 0}, orb.Point{1, 0}, ni, 0),
		East:  side(orb.Point{1, 0}, orb.Point{1, 1}, nj, 7),
		North: side(orb.Point{1, 1}, orb.Point{0, 1}, ni, 13),
		West:  side(orb.Point{0, 1}, orb.Point{0, 0}, nj, 29),
	}
}

// FuzzTFISmoothAssemble: any perturbed block either fails with an error or
// yields a mesh; nothing panics. Smoothing a valid block keeps its cells
// positive or reports an error.
func FuzzTFISmoothAssemble(f *testing.F) {
	f.Add(uint8(5), uint8(4), []byte{})
	f.Add(uint8(9), uint8(9), make([]byte, 64))
	seed := make([]byte, 80)
	binary.LittleEndian.PutUint64(seed[8:], math.Float64bits(0.3))
	binary.LittleEndian.PutUint64(seed[16:], math.Float64bits(math.NaN()))
	f.Add(uint8(3), uint8(7), seed)
	f.Fuzz(func(t *testing.T, ns, nw uint8, data []byte) {
		// The low bits of ns and nw also pick a side to slide and a side to
		// control.
		var opt SmoothOptions
		opt.MaxIterations = 50
		opt.Sides[(ns>>4)%4].Mode = Slide
		if c := (nw >> 4) % 4; c != (ns>>4)%4 {
			opt.Sides[c] = SideControl{FirstHeight: 0.01 + float64(nw>>6)*0.05, Orthogonal: true}
		}
		b, err := TFI(sidesFrom(ns, nw, data))
		if err != nil {
			return
		}
		if _, err := Assemble([]*Block{b}, AssembleOptions{}); err != nil {
			return
		}
		if n, _, _ := inverted(b); n > 0 {
			return
		}
		if _, err := Smooth(b, opt); err != nil {
			return
		}
		if n, i, j := inverted(b); n > 0 {
			t.Fatalf("smoothing a valid block inverted %d cells, first (%d, %d)", n, i, j)
		}
	})
}

// FuzzMarch: hyperbolic marching from a perturbed circle either errors or
// gives a grid of positive cells; nothing panics.
func FuzzMarch(f *testing.F) {
	f.Add(uint8(16), 1e-2, 1.2, uint8(10), []byte{})
	f.Add(uint8(40), 1e-3, 1.05, uint8(30), make([]byte, 48))
	f.Fuzz(func(t *testing.T, n uint8, h, growth float64, layers uint8, data []byte) {
		loop := circleLoop(orb.Point{}, 1, 4+int(n%60), "wall")
		d := floats(data)
		for k := range loop.Points {
			if len(d) > 0 {
				loop.Points[k][0] += 0.2 * math.Tanh(d[k%len(d)])
			}
		}
		b, _, err := MarchClosed(loop, MarchOptions{Name: "f", FirstHeight: h, Growth: growth, Layers: int(layers % 40), OuterTag: "far"})
		if err != nil {
			return
		}
		for j := 0; j+1 < b.NJ; j++ {
			for i := 0; i+1 < b.NI; i++ {
				if quadArea(b, i, j) <= 0 {
					t.Fatalf("cell (%d, %d) has area %g", i, j, quadArea(b, i, j))
				}
			}
		}
	})
}

// FuzzMarchOpenAndCGrid: an open wall or an airfoil-like chain built from
// the input either errors or gives blocks that assemble into positive cells.
func FuzzMarchOpenAndCGrid(f *testing.F) {
	f.Add(uint8(20), 1e-3, 1.1, uint8(12), 3.0, uint8(10), []byte{})
	f.Add(uint8(8), 1e-2, 1.3, uint8(5), 0.0, uint8(0), make([]byte, 40))
	f.Fuzz(func(t *testing.T, n uint8, h, growth float64, layers uint8, wakeLen float64, wakeCells uint8, data []byte) {
		d := floats(data)
		bump := func(k int) float64 {
			if len(d) == 0 {
				return 0
			}
			return 0.05 * math.Tanh(d[k%len(d)])
		}
		m := 3 + int(n%40)
		wall := make([]orb.Point, m)
		for k := range wall {
			wall[k] = orb.Point{float64(k) / float64(m-1), bump(k)}
		}
		opt := MarchOptions{Name: "f", FirstHeight: h, Growth: growth, Layers: int(layers % 30), OuterTag: "far", StartTag: "a", EndTag: "b"}
		if b, _, err := MarchOpen(chainOf(wall, "wall"), opt); err == nil {
			assertPositive(t, b)
		}
		foil := nacaChain(2 + int(n%30))
		for k := 1; k+1 < len(foil.Points); k++ {
			foil.Points[k][1] += 0.2 * bump(k)
		}
		if bs, _, err := MarchCGrid(foil, WakeOptions{Length: wakeLen, Cells: int(wakeCells % 40)}, opt); err == nil {
			assertPositive(t, bs...)
		}
	})
}
