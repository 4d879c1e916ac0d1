package quality_test

import (
	"fmt"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
	"cvdeck/quality"
)

// A 2 × 1 grid of unit squares whose shared right-hand node is pulled
// sideways: the report grades it against the everyday profile and names
// the worst cell of each metric.
func ExampleEvaluate() {
	m, err := mesh.Build(mesh.Input{
		Nodes:     []orb.Point{{0, 0}, {1, 0}, {2, 0}, {0, 1}, {1.6, 1}, {2, 1}},
		CellStart: []int32{0, 4, 8},
		CellNodes: []int32{0, 1, 4, 3, 1, 2, 5, 4},
		Tags:      []string{"wall"},
		Edges: []mesh.TaggedEdge{{A: 0, B: 1}, {A: 1, B: 2}, {A: 2, B: 5}, {A: 5, B: 4},
			{A: 4, B: 3}, {A: 3, B: 0}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	lim, err := quality.Resolve() // the everyday profile
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := quality.Evaluate(m, lim)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r)
	// Cell 0 has corners of 90°, 90°, 180° − atan(1/0.6) = 120.96° and
	// atan(1/0.6) = 59.04°: equiangle skewness (120.96 − 90)/90 = 0.3440;
	// cell 1 ties with it, and ties go to the lower index.
	s, _ := r.Metric("equiangle_skewness")
	fmt.Printf("worst equiangle skewness %.4f in cell %d\n", float64(s.Worst[0].Value), s.Worst[0].Index)
	for _, c := range r.Connectivity[:3] {
		fmt.Println(c.Name, c.Status)
	}
	// Output:
	// quality pass: 2 cells (0 fail, 0 warn), 6 nodes (0 fail)
	// worst equiangle skewness 0.3440 in cell 0
	// face_cells pass
	// cell_faces pass
	// orientation pass
}
