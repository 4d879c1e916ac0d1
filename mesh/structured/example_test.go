package structured_test

import (
	"fmt"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"cvdeck/mesh/structured"
)

// straight returns n evenly spaced nodes from a to b, every edge tagged.
func straight(a, b orb.Point, n int, tag string) geometry.Chain {
	c := geometry.Chain{}
	for k := 0; k < n; k++ {
		t := float64(k) / float64(n-1)
		c.Points = append(c.Points, orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])})
		if k > 0 {
			c.Tags = append(c.Tags, tag)
		}
	}
	return c
}

// A duct section meshed by TFI, smoothed with wall control on its floor,
// and turned into a face-based mesh.
func Example() {
	b, err := structured.TFI(structured.BlockSides{
		Name:  "duct",
		South: straight(orb.Point{0, 0}, orb.Point{2, 0}, 21, "wall"),
		East:  straight(orb.Point{2, 0}, orb.Point{2, 1}, 11, "outflow"),
		North: straight(orb.Point{2, 1}, orb.Point{0, 1}, 21, "wall"),
		West:  straight(orb.Point{0, 1}, orb.Point{0, 0}, 11, "inflow"),
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	var opt structured.SmoothOptions
	opt.Sides[mesh.South] = structured.SideControl{FirstHeight: 0.05, Orthogonal: true}
	res, err := structured.Smooth(b, opt)
	if err != nil {
		fmt.Println(err)
		return
	}
	m, err := structured.Assemble([]*structured.Block{b}, structured.AssembleOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("converged %v, first height within 0.1%%: %v\n", res.Converged, res.HeightError < 1e-3)
	fmt.Println(m.NumCells(), "cells,", m.NumBoundary(), "boundary faces, tags", m.Tags)
	// Output:
	// converged true, first height within 0.1%: true
	// 200 cells, 60 boundary faces, tags [wall outflow inflow]
}

// Sizing an O-grid before marching it.
func ExampleMarchOptions_Plan() {
	opt := structured.MarchOptions{FirstHeight: 1e-5, OuterDistance: 20, Layers: 120, OuterTag: "farfield"}
	rep, err := opt.Plan()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d layers, growth %.6f, outer distance %.9g\n", rep.Layers, rep.Growth, rep.OuterDistance)
	// Output:
	// 120 layers, growth 1.107760, outer distance 20
}
