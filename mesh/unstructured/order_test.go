package unstructured

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// neighbourGap is the mean index distance |P − N| between the two cells of
// an interior face: how far apart in memory the cells a face sweep reads
// together lie.
func neighbourGap(m *mesh.Mesh) float64 {
	sum := 0.0
	for f := 0; f < m.NumInterior; f++ {
		d := m.Owner[f] - m.Neighbour[f]
		sum += float64(max(d, -d))
	}
	return sum / float64(m.NumInterior)
}

// TestLocalOrder: localOrder renumbers without changing the mesh — the
// same cells as point lists (each starting at the same corner), the
// same tagged boundary edges, the fixed nodes where they were — and brings
// the cells of each face close in memory: from cells shuffled at random
// (as far apart as refinement could leave them), which leaves a mean index
// gap across faces of about n/3 (the mean distance of two random indices),
// to below √n, the order of the gap along a space-filling curve in the
// plane (from memory).
func TestLocalOrder(t *testing.T) {
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.05, "wall"),
		circleLoop(orb.Point{1.5, 1}, 0.4, 60, true, "cylinder"),
	}}
	m, err := Mesh(out, Options{})
	if err != nil {
		t.Fatal(err)
	}
	nc := m.NumCells()
	if nc < 2000 {
		t.Fatalf("only %d cells", nc)
	}
	// The mesh as an input with its cells shuffled.
	rng := rand.New(rand.NewPCG(3, 4))
	perm := rng.Perm(nc)
	in := mesh.Input{Nodes: m.Nodes, CellStart: []int32{0}, Tags: m.Tags}
	for _, c := range perm {
		in.CellNodes = append(in.CellNodes, m.Cell(c)...)
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: m.FaceNodes[f][0], B: m.FaceNodes[f][1], Tag: m.FaceTag[f]})
	}
	shuffled, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	fixed := 0
	for _, l := range out.Loops {
		fixed += len(l.Points)
	}
	got, err := mesh.Build(localOrder(in, fixed))
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(got.Nodes[:fixed], m.Nodes[:fixed]) {
		t.Error("the fixed nodes moved")
	}
	cellsAsPoints := func(m *mesh.Mesh) [][6]float64 {
		var out [][6]float64
		for c := range m.NumCells() {
			var p [6]float64
			for k, v := range m.Cell(c) {
				p[2*k], p[2*k+1] = m.Nodes[v][0], m.Nodes[v][1]
			}
			out = append(out, p)
		}
		slices.SortFunc(out, func(a, b [6]float64) int { return slices.Compare(a[:], b[:]) })
		return out
	}
	if !slices.Equal(cellsAsPoints(got), cellsAsPoints(m)) {
		t.Error("the renumbered mesh has other cells")
	}
	edges := func(m *mesh.Mesh) [][5]float64 {
		var out [][5]float64
		for f := m.NumInterior; f < m.NumFaces(); f++ {
			a, b := m.Nodes[m.FaceNodes[f][0]], m.Nodes[m.FaceNodes[f][1]]
			out = append(out, [5]float64{a[0], a[1], b[0], b[1], float64(m.FaceTag[f])})
		}
		slices.SortFunc(out, func(a, b [5]float64) int { return slices.Compare(a[:], b[:]) })
		return out
	}
	if !slices.Equal(edges(got), edges(m)) {
		t.Error("the renumbered mesh has other tagged boundary faces")
	}
	before, after := neighbourGap(shuffled), neighbourGap(got)
	if before < 0.25*float64(nc) || after > math.Sqrt(float64(nc)) {
		t.Errorf("mean neighbour gap %.0f cells shuffled, %.1f after localOrder, of %d cells", before, after, nc)
	}
	t.Logf("%d cells: mean neighbour gap %.0f shuffled, %.1f after localOrder, %.1f as meshed", nc, before, after, neighbourGap(m))
}
