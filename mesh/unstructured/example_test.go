package unstructured_test

import (
	"fmt"

	"cvdeck/geometry"
	"cvdeck/mesh/unstructured"
	"github.com/paulmach/orb"
)

// A square and its centre: four triangles around the centre.
func ExampleDelaunay() {
	pts := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0.5, 0.5}}
	tris, err := unstructured.Delaunay(pts)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(len(tris)/3, "triangles")
	// Output: 4 triangles
}

// A 2 × 1 duct, walls below and above, inflow and outflow at the ends,
// with eight quadrilateral layers on each wall edge (2 × 20 × 8 cells)
// that slide along the inflow and outflow edges.
func ExampleMesh() {
	var loop geometry.DiscreteLoop
	side := func(a, b orb.Point, n int, tag string) {
		for k := 0; k < n; k++ {
			t := float64(k) / float64(n)
			loop.Points = append(loop.Points, orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])})
			loop.Tags = append(loop.Tags, tag)
		}
	}
	side(orb.Point{0, 0}, orb.Point{2, 0}, 20, "wall")
	side(orb.Point{2, 0}, orb.Point{2, 1}, 10, "outflow")
	side(orb.Point{2, 1}, orb.Point{0, 1}, 20, "wall")
	side(orb.Point{0, 1}, orb.Point{0, 0}, 10, "inflow")
	m, err := unstructured.Mesh(geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{loop}}, unstructured.Options{
		MinAngle: 28,
		Layers:   []unstructured.Layers{{Tags: []string{"wall"}, FirstHeight: 0.002, Growth: 1.2, Count: 8}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	quads := 0
	for c := range m.NumCells() {
		if len(m.Cell(c)) == 4 {
			quads++
		}
	}
	fmt.Println("tags:", m.Tags)
	fmt.Println("layer cells:", quads)
	// Output:
	// tags: [wall outflow inflow]
	// layer cells: 320
}
