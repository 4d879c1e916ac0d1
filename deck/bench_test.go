package deck

import (
	"io"
	"math"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/export/vtk"
	"cvdeck/geometry"
	"cvdeck/mesh/structured"
)

// arcChain returns n+1 points on a circular arc of radius r from angle a0
// to a1, every edge tagged tag.
func arcChain(r, a0, a1 float64, n int, tag string) geometry.Chain {
	var c geometry.Chain
	for k := 0; k <= n; k++ {
		t := a0 + (a1-a0)*float64(k)/float64(n)
		c.Points = append(c.Points, orb.Point{r * math.Cos(t), r * math.Sin(t)})
		if k < n {
			c.Tags = append(c.Tags, tag)
		}
	}
	return c
}

// lineChain returns n+1 evenly spaced points from a to b.
func lineChain(a, b orb.Point, n int, tag string) geometry.Chain {
	var c geometry.Chain
	for k := 0; k <= n; k++ {
		f := float64(k) / float64(n)
		c.Points = append(c.Points, orb.Point{a[0] + f*(b[0]-a[0]), a[1] + f*(b[1]-a[1])})
		if k < n {
			c.Tags = append(c.Tags, tag)
		}
	}
	return c
}

// BenchmarkTFIBuildVTU1000 is the first slice's pipeline on one 1000 × 1000
// block (a quarter annulus, so TFI blends curved sides): transfinite
// interpolation, face building (mesh.Build through Assemble) and the VTU
// write of the result with its area.
func BenchmarkTFIBuildVTU1000(b *testing.B) {
	const n = 1000
	sides := structured.BlockSides{
		Name:  "annulus",
		South: lineChain(orb.Point{1, 0}, orb.Point{2, 0}, n, "cut"),
		East:  arcChain(2, 0, math.Pi/2, n, "outer"),
		North: lineChain(orb.Point{0, 2}, orb.Point{0, 1}, n, "axis"),
		West:  arcChain(1, math.Pi/2, 0, n, "inner"),
	}
	b.ReportAllocs()
	for b.Loop() {
		blk, err := structured.TFI(sides)
		if err != nil {
			b.Fatal(err)
		}
		m, err := structured.Assemble([]*structured.Block{blk}, structured.AssembleOptions{})
		if err != nil {
			b.Fatal(err)
		}
		if err := vtk.WriteVTU(io.Discard, m, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n*n), "cells/op")
}
