package unstructured

import (
	"fmt"
	"math"
	"runtime"
	"syscall"
	"testing"
	"time"

	"cvdeck/geometry"
	"github.com/paulmach/orb"
)

// refineCase is the refinement benchmark's domain: a 4 × 2 channel with a
// circular body, boundary spacing and maximum size h chosen so the mesh
// has about n triangles.
func refineCase(n int) (geometry.DiscreteOutline, Options) {
	area := 8 - math.Pi*0.16
	h := math.Sqrt(area / (0.41 * float64(n)))
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, h, "wall"),
		circleLoop(orb.Point{1.5, 1}, 0.4, int(2*math.Pi*0.4/h), true, "body"),
	}}
	return out, Options{MinAngle: 25, MaxSize: h}
}

// BenchmarkRefine refines the channel to 250k, 1M and 4M triangles with a
// 25° minimum angle, on one core. It reports the triangle count, the time
// per triangle (for the n log n growth check), the process CPU time (on a
// machine shared with other jobs the wall time overstates the work), and
// the peak heap per triangle: the largest heap in use sampled by a watcher
// goroutine every millisecond, less the heap before the run.
func BenchmarkRefine(b *testing.B) {
	for _, n := range []int{250_000, 1_000_000, 4_000_000} {
		b.Run(fmt.Sprintf("tri=%d", n), func(b *testing.B) {
			prev := runtime.GOMAXPROCS(1)
			defer runtime.GOMAXPROCS(prev)
			out, opt := refineCase(n)
			var tris int
			var peak uint64
			var cpu time.Duration
			for b.Loop() {
				g, err := flatten(out)
				if err != nil {
					b.Fatal(err)
				}
				o, _ := opt.withDefaults()
				runtime.GC()
				stop := make(chan struct{})
				done := make(chan uint64)
				var base runtime.MemStats
				runtime.ReadMemStats(&base)
				go watchHeap(base.HeapAlloc, stop, done)
				cpu0 := cpuTime()
				tr, err := triangulateOutline(g, g, o)
				if err != nil {
					b.Fatal(err)
				}
				cpu += cpuTime() - cpu0
				close(stop)
				peak = <-done
				b.StopTimer()
				tris = 0
				worst := 180.0
				for t := int32(0); t < tr.numTri(); t++ {
					if tr.flag[t]&flagInside != 0 {
						tris++
						worst = math.Min(worst, triMinAngle(tr, t))
					}
				}
				// The channel has no sharp corner: the bound holds everywhere.
				if worst < o.MinAngle {
					b.Fatalf("smallest angle %.2f° below the target %v°", worst, o.MinAngle)
				}
				b.StartTimer()
			}
			b.ReportMetric(float64(tris), "triangles")
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(tris), "ns/triangle")
			b.ReportMetric(float64(peak)/float64(tris), "peak-B/triangle")
			b.ReportMetric(cpu.Seconds()/float64(b.N), "cpu-s")
			b.ReportMetric(float64(cpu.Nanoseconds())/float64(b.N)/float64(tris), "cpu-ns/triangle")
		})
	}
}

// cpuTime returns the user and system CPU time of the process so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// watchHeap samples the live heap until stop closes and sends the peak
// above base. With GOMAXPROCS(1) it runs when the mesher allocates or is
// preempted, which is at least every 10 ms.
func watchHeap(base uint64, stop chan struct{}, done chan uint64) {
	var peak uint64
	var ms runtime.MemStats
	t := time.NewTicker(time.Millisecond)
	defer t.Stop()
	for {
		select {
		case <-stop:
			runtime.ReadMemStats(&ms)
			peak = max(peak, ms.HeapAlloc-min(base, ms.HeapAlloc))
			done <- peak
			return
		case <-t.C:
			runtime.ReadMemStats(&ms)
			peak = max(peak, ms.HeapAlloc-min(base, ms.HeapAlloc))
		}
	}
}

// BenchmarkMesh1M runs the whole mesher on the 1M-triangle channel, mesh
// construction (faces, owner/neighbour, derived geometry) included, on one
// core, and reports the peak heap per cell.
func BenchmarkMesh1M(b *testing.B) {
	prev := runtime.GOMAXPROCS(1)
	defer runtime.GOMAXPROCS(prev)
	out, opt := refineCase(1_000_000)
	var cells int
	var peak uint64
	var cpu time.Duration
	for b.Loop() {
		runtime.GC()
		stop := make(chan struct{})
		done := make(chan uint64)
		var base runtime.MemStats
		runtime.ReadMemStats(&base)
		go watchHeap(base.HeapAlloc, stop, done)
		cpu0 := cpuTime()
		m, err := Mesh(out, opt)
		if err != nil {
			b.Fatal(err)
		}
		cpu += cpuTime() - cpu0
		close(stop)
		peak = <-done
		cells = m.NumCells()
	}
	b.ReportMetric(float64(cells), "cells")
	b.ReportMetric(cpu.Seconds()/float64(b.N), "cpu-s")
	b.ReportMetric(float64(peak)/float64(cells), "peak-B/cell")
}

// triMinAngle returns the smallest angle of triangle t in degrees.
func triMinAngle(tr *triangulation, t int32) float64 {
	best := 180.0
	for k := int32(0); k < 3; k++ {
		p, q, r := tr.pts[tr.v[3*t+(k+2)%3]], tr.pts[tr.v[3*t+k]], tr.pts[tr.v[3*t+(k+1)%3]]
		ux, uy := p[0]-q[0], p[1]-q[1]
		vx, vy := r[0]-q[0], r[1]-q[1]
		best = math.Min(best, math.Atan2(math.Abs(ux*vy-uy*vx), ux*vx+uy*vy)*180/math.Pi)
	}
	return best
}
