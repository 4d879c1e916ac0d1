package sweep

import (
	"context"
	"fmt"
	"runtime"
	"syscall"
	"testing"
	"time"
)

// cpuTime is the user plus system CPU time the process and its finished
// children have used.
func cpuTime(b *testing.B) time.Duration {
	var self, kids syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &self); err != nil {
		b.Fatal(err)
	}
	if err := syscall.Getrusage(syscall.RUSAGE_CHILDREN, &kids); err != nil {
		b.Fatal(err)
	}
	return time.Duration(self.Utime.Nano() + self.Stime.Nano() + kids.Utime.Nano() + kids.Stime.Nano())
}

// BenchmarkSweep runs the benchmark sweep (100 variants of the sample
// nozzle, 20000 cells each, full default deck: CGNS, VTU, VTP, quality
// report, manifest) with one and two workers; the speed-up is the ratio
// of the two times per sweep. Run with -benchtime=1x. Besides the wall
// time it reports the CPU time per variant and the cores used (CPU time
// over wall time): on a machine shared with other work the wall times
// depend on the load, the CPU time per variant much less.
func BenchmarkSweep(b *testing.B) {
	f, err := ReadFile("testdata/bench-sweep.yaml")
	if err != nil {
		b.Fatal(err)
	}
	vs, err := f.Variants()
	if err != nil || len(vs) != 100 {
		b.Fatalf("%d variants (%v), want 100", len(vs), err)
	}
	// Each variant is built by a child cvdeck process, as `cvdeck sweep`
	// does with more than one worker, so both runs measure the same work.
	exe := buildCvdeck(b)
	for _, j := range []int{1, 2} {
		b.Run(fmt.Sprintf("j=%d", j), func(b *testing.B) {
			dir := b.TempDir()
			cells := 0
			p := NewPipeline(f)
			p.Exe, p.Threads = exe, max(1, runtime.NumCPU()/j)
			cpu0, wall0 := cpuTime(b), time.Now()
			for i := 0; i < b.N; i++ {
				s, err := Run(context.Background(), f, dir, p, Options{Workers: j, Force: true})
				if err != nil {
					b.Fatal(err)
				}
				cells = 0
				for _, r := range s.Rows {
					cells += r.Cells
				}
			}
			cpu, wall := cpuTime(b)-cpu0, time.Since(wall0)
			n := float64(100 * b.N)
			b.ReportMetric(float64(cells)/100, "cells/variant")
			b.ReportMetric(n/wall.Seconds(), "variants/s")
			b.ReportMetric(cpu.Seconds()*1000/n, "cpu-ms/variant")
			b.ReportMetric(cpu.Seconds()/wall.Seconds(), "cores-used")
		})
	}
}
