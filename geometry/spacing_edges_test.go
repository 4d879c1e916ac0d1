package geometry

import (
	"math"
	"slices"
	"testing"
)

// Edges gives the unrounded count of each law (closed forms: L/h for a
// size; ln(1 + (L/first)(r − 1))/ln r for a growth law, the geometric sum
// solved for the edge count, common practice), and WithEdges at the count
// a law rounds to itself places the very same nodes.
func TestSpacingEdgesAndWithEdges(t *testing.T) {
	const length = 10.0
	size, _ := Size(0.3)
	growth, _ := Growth(0.1, 1.2, true)
	count, _ := Count(7)
	vinokur, _ := Clustered(0.1, 0.2, 9)
	for _, c := range []struct {
		name    string
		sp      Spacing
		edges   float64
		counted bool
		min     int
	}{
		{"size", size, length / 0.3, false, 1},
		{"growth", growth, math.Log1p(length/0.1*0.2) / math.Log(1.2), false, 1},
		{"count", count, 6, true, 1},
		{"two-sided", vinokur, 8, true, 3},
	} {
		e, err := c.sp.Edges(length)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(e-c.edges) > 1e-12*c.edges || c.sp.Counted() != c.counted || c.sp.MinEdges() != c.min {
			t.Errorf("%s: edges %.15g want %.15g, counted %v, min %d", c.name, e, c.edges, c.sp.Counted(), c.sp.MinEdges())
		}
		n, _ := c.sp.NodeCount(length)
		same, err := c.sp.WithEdges(n - 1)
		if err != nil {
			t.Fatal(err)
		}
		f0, _ := c.sp.Fractions(length)
		f1, _ := same.Fractions(length)
		if !slices.Equal(f0, f1) {
			t.Errorf("%s: WithEdges(%d) moves the nodes", c.name, n-1)
		}
		more, _ := c.sp.WithEdges(n + 4)
		if k, _ := more.NodeCount(length); k != n+5 {
			t.Errorf("%s: WithEdges(%d) gives %d nodes", c.name, n+4, k)
		}
	}
	if _, err := vinokur.WithEdges(2); err == nil {
		t.Error("a two-sided law took 2 edges")
	}
	if _, err := OwnVertices().WithEdges(3); err == nil {
		t.Error("the own-vertices law took a count")
	}
}
