package unstructured

import (
	"fmt"
	"math"
	"runtime"
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
	h := math.Sqrt(area / (0.30 * float64(n)))
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, h, "wall"),
		circleLoop(orb.Point{1.5, 1}, 0.4, int(2*math.Pi*0.4/h), true, "body"),
	}}
	return out, Options{MinAngle: 25, MaxSize: h}
}

// BenchmarkRefine refines the channel to 250k, 1M and 4M triangles with a
// 25° minimum angle, on one core. It reports the triangle count, the time
// per triangle (for the n log n growth check), and the peak heap per
// triangle: the largest heap in use sampled by a watcher goroutine every
// millisecond, less the heap before the run.
func BenchmarkRefine(b *testing.B) {
	for _, n := range []int{250_000, 1_000_000, 4_000_000} {
		b.Run(fmt.Sprintf("tri=%d", n), func(b *testing.B) {
			prev := runtime.GOMAXPROCS(1)
			defer runtime.GOMAXPROCS(prev)
			out, opt := refineCase(n)
			var tris int
			var peak uint64
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
				tr, err := triangulateOutline(g, o)
				if err != nil {
					b.Fatal(err)
				}
				close(stop)
				peak = <-done
				tris = 0
				for t := int32(0); t < tr.numTri(); t++ {
					if tr.flag[t]&flagInside != 0 {
						tris++
					}
				}
				_ = tr
			}
			b.ReportMetric(float64(tris), "triangles")
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(tris), "ns/triangle")
			b.ReportMetric(float64(peak)/float64(tris), "peak-B/triangle")
		})
	}
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
