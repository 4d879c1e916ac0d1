package structured

import (
	"syscall"
	"testing"
	"time"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
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

// BenchmarkSmooth1000 runs 200 elliptic SOR sweeps on a 1000 × 1000 node
// block (TFI start, all sides fixed, Thomas–Middlecoff terms on, one grid
// level) and reports interior node updates per second.
func BenchmarkSmooth1000(b *testing.B) {
	blk0, err := TFI(bumpSides(1000))
	if err != nil {
		b.Fatal(err)
	}
	const iters = 200
	opt := SmoothOptions{MaxIterations: iters, Tolerance: -1, SingleLevel: true}
	var updates float64
	var cpu time.Duration
	for b.Loop() {
		b.StopTimer()
		blk := blk0.Clone()
		c0 := cpuTime()
		b.StartTimer()
		res, err := Smooth(blk, opt)
		if err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		cpu += cpuTime() - c0
		b.StartTimer()
		updates += float64(res.Iterations) * float64((blk.NI-2)*(blk.NJ-2))
	}
	b.ReportMetric(updates/b.Elapsed().Seconds()/1e6, "Mupdates/s")
	// On a shared machine wall time undercounts; CPU time of the process
	// is the per-core figure.
	b.ReportMetric(updates/cpu.Seconds()/1e6, "Mupdates/cpu-s")
}

// BenchmarkSmoothToTolerance smooths two 257 × 257 node blocks with
// first-height and orthogonality control at the wall to the default
// tolerance, on one grid level and with grid sequencing (129, 65, 33 and
// 17 nodes a side first), and reports the sweeps of the fine grid and the
// CPU seconds per smoothing: the block round a cylinder (cylinderBlock),
// whose sweeps are set by the grid size, and the channel with a bump
// (bumpSides), whose sweeps are set by the wall-control feedback.
func BenchmarkSmoothToTolerance(b *testing.B) {
	cases := []struct {
		name   string
		sides  BlockSides
		height float64
	}{
		{"cylinder", cylinderBlock(257, 0.001), 0.001 * 1.65},
		{"bump", bumpSides(257), 1e-3 * 121 / 257},
	}
	for _, c := range cases {
		start, err := TFI(c.sides)
		if err != nil {
			b.Fatal(err)
		}
		for _, single := range []bool{true, false} {
			name := c.name + "/sequenced"
			if single {
				name = c.name + "/one-level"
			}
			b.Run(name, func(b *testing.B) {
				var opt SmoothOptions
				opt.Sides[mesh.South] = SideControl{FirstHeight: c.height, Orthogonal: true}
				opt.MaxIterations, opt.SingleLevel = 20000, single
				var sweeps int
				var cpu time.Duration
				for b.Loop() {
					blk := start.Clone()
					c0 := cpuTime()
					res, err := Smooth(blk, opt)
					cpu += cpuTime() - c0
					if err != nil || !res.Converged {
						b.Fatalf("%+v %v", res, err)
					}
					sweeps = res.Iterations
				}
				b.ReportMetric(float64(sweeps), "fine-sweeps")
				b.ReportMetric(cpu.Seconds()/float64(b.N), "cpu-s/op")
			})
		}
	}
}

// cpuTime returns the user CPU time of the process so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano())
}

// BenchmarkMarchOGrid400x200 grows a 400 × 200 node hyperbolic O-grid
// around a NACA 0012 section out to 20 chords.
func BenchmarkMarchOGrid400x200(b *testing.B) {
	ch := nacaChain(200)
	loop := geometry.DiscreteLoop{Points: ch.Points[:len(ch.Points)-1], Tags: ch.Tags}
	opt := MarchOptions{Name: "naca", FirstHeight: 1e-5, Layers: 199, OuterDistance: 20, OuterTag: "farfield"}
	for b.Loop() {
		if _, _, err := MarchClosed(loop, opt); err != nil {
			b.Fatal(err)
		}
	}
}
