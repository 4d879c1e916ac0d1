package sweep

import (
	"context"
	"fmt"
	"testing"
)

// BenchmarkSweep runs the benchmark sweep (100 variants of the sample
// nozzle, 20000 cells each, full default deck: CGNS, VTU, VTP, quality
// report, manifest) with one and two workers; the speed-up is the ratio
// of the two times per sweep. Run with -benchtime=1x.
func BenchmarkSweep(b *testing.B) {
	f, err := ReadFile("testdata/bench-sweep.yaml")
	if err != nil {
		b.Fatal(err)
	}
	vs, err := f.Variants()
	if err != nil || len(vs) != 100 {
		b.Fatalf("%d variants (%v), want 100", len(vs), err)
	}
	for _, j := range []int{1, 2} {
		b.Run(fmt.Sprintf("j=%d", j), func(b *testing.B) {
			dir := b.TempDir()
			cells := 0
			for i := 0; i < b.N; i++ {
				s, err := Run(context.Background(), f, dir, NewPipeline(f), Options{Workers: j, Force: true})
				if err != nil {
					b.Fatal(err)
				}
				cells = 0
				for _, r := range s.Rows {
					cells += r.Cells
				}
			}
			b.ReportMetric(float64(cells)/100, "cells/variant")
			b.ReportMetric(100*float64(b.N)/b.Elapsed().Seconds(), "variants/s")
		})
	}
}
