package structured

import (
	"math"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// cylinderBlock is the block between a cylinder of radius 0.5 and the
// side x = 2 of a square of half-width 2 round it, n × n nodes, the
// radial sides clustered towards the cylinder with a first step of h (a
// fraction of their length): the shape of a cylinder-in-a-box quadrant.
func cylinderBlock(n int, h float64) BlockSides {
	c := 0.5 * math.Sqrt2 / 2
	return BlockSides{
		Name:  "quadrant",
		South: arc(orb.Point{0, 0}, 0.5, math.Pi/4, -math.Pi/4, n, "wall"),
		East:  line(orb.Point{c, -c}, orb.Point{2, -2}, geometric(n, h), "cut"),
		North: line(orb.Point{2, -2}, orb.Point{2, 2}, uniform(n), "far"),
		West:  reversed(line(orb.Point{c, c}, orb.Point{2, 2}, geometric(n, h), "cut")),
	}
}

// Grid sequencing changes where the sweeps start, not where they end: the
// 257 × 257 node block round a cylinder, with first-height and
// orthogonality control at the wall, smoothed on its own grid and after
// smoothing on 129, 65, 33 and 17 nodes a side, reaches the same grid
// within a small fraction of the smallest cell, in fewer sweeps of the
// fine grid.
func TestSmoothSequencedSameGrid(t *testing.T) {
	start, err := TFI(cylinderBlock(257, 0.001))
	if err != nil {
		t.Fatal(err)
	}
	var opt SmoothOptions
	opt.Sides[mesh.South] = SideControl{FirstHeight: 0.001 * 1.65, Orthogonal: true}
	opt.MaxIterations = 20000
	single := opt
	single.SingleLevel = true
	one, many := start.Clone(), start.Clone()
	r1, err := Smooth(one, single)
	if err != nil {
		t.Fatal(err)
	}
	r2, err := Smooth(many, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !r1.Converged || !r2.Converged {
		t.Fatalf("not converged: one level %+v, sequenced %+v", r1, r2)
	}
	shortest, diff := math.Inf(1), 0.0
	for j := 0; j < one.NJ; j++ {
		for i := 0; i < one.NI; i++ {
			p, q := one.At(i, j), many.At(i, j)
			diff = max(diff, math.Hypot(p[0]-q[0], p[1]-q[1]))
			if i+1 < one.NI {
				r := one.At(i+1, j)
				shortest = min(shortest, math.Hypot(r[0]-p[0], r[1]-p[1]))
			}
			if j+1 < one.NJ {
				r := one.At(i, j+1)
				shortest = min(shortest, math.Hypot(r[0]-p[0], r[1]-p[1]))
			}
		}
	}
	t.Logf("one level: %d sweeps; sequenced: %d sweeps of the fine grid; largest node difference %.3g of the shortest edge %.3g",
		r1.Iterations, r2.Iterations, diff/shortest, shortest)
	if diff > 1e-3*shortest {
		t.Errorf("the grids differ by %.3g, more than 1e-3 of the shortest edge %.3g", diff, shortest)
	}
	if r2.Iterations >= r1.Iterations {
		t.Errorf("sequenced smoothing took %d fine sweeps, one level %d", r2.Iterations, r1.Iterations)
	}
	assertPositive(t, many)
}

// prolong reproduces a correction that is bilinear in the node indices:
// every fine node moves by the correction at its own (half) index.
func TestProlongBilinear(t *testing.T) {
	fine := NewBlock("b", 9, 7)
	from := coarsen(fine)
	to := from.Clone()
	d := func(i, j float64) (float64, float64) { return 0.1*i + 0.2*j - 0.05*i*j, -0.3*i + 0.01 }
	for j := 0; j < to.NJ; j++ {
		for i := 0; i < to.NI; i++ {
			dx, dy := d(float64(i), float64(j))
			to.X[j*to.NI+i] += dx
			to.Y[j*to.NI+i] += dy
		}
	}
	prolong(fine, from, to)
	for j := 0; j < fine.NJ; j++ {
		for i := 0; i < fine.NI; i++ {
			dx, dy := d(float64(i)/2, float64(j)/2)
			if p := fine.At(i, j); math.Abs(p[0]-dx) > 1e-15 || math.Abs(p[1]-dy) > 1e-15 {
				t.Fatalf("node (%d, %d) moved by (%g, %g), want (%g, %g)", i, j, p[0], p[1], dx, dy)
			}
		}
	}
}

// The default over-relaxation factor is the optimum of point SOR for
// Laplace's equation, 2/(1 + sin(π/n)) on an n × n grid (Young's formula,
// from memory): 1.6735 for n = 16 (by hand), held within [1.5, 1.95].
func TestDefaultOmega(t *testing.T) {
	if w := defaultOmega(16, 16); math.Abs(w-2/(1+math.Sin(math.Pi/16))) > 1e-12 || math.Abs(w-1.6735) > 1e-4 {
		t.Errorf("ω(16, 16) = %.6f, want 1.6735", w)
	}
	if w := defaultOmega(4, 4); w != 1.5 {
		t.Errorf("ω(4, 4) = %g, want the floor 1.5", w)
	}
	if w := defaultOmega(1000, 1000); w != 1.95 {
		t.Errorf("ω(1000, 1000) = %g, want the cap 1.95", w)
	}
	if a, b := defaultOmega(64, 8), defaultOmega(64, 64); !(a < b) {
		t.Errorf("a 64 × 8 block gets ω %g, not below the %g of 64 × 64", a, b)
	}
}
