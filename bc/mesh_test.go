package bc

import (
	"testing"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

// channel builds an nx × ny grid of quads over [0, lx] × [0, ly] with the
// sides tagged by tags (south, east, north, west; "" leaves a side
// untagged). shear moves the north row of nodes by shear·lx/nx in x, so a
// periodic south–north pair no longer matches.
func channel(t testing.TB, nx, ny int, lx, ly, shear float64, tags [4]string) *mesh.Mesh {
	t.Helper()
	var in mesh.Input
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			x := lx * float64(i) / float64(nx)
			if j == ny {
				x += shear * lx / float64(nx)
			}
			in.Nodes = append(in.Nodes, orb.Point{x, ly * float64(j) / float64(ny)})
		}
	}
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	in.CellStart = []int32{0}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			in.CellNodes = append(in.CellNodes, id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
	}
	tagIndex := map[int]int16{}
	for s, name := range tags {
		if name != "" {
			tagIndex[s] = int16(len(in.Tags))
			in.Tags = append(in.Tags, name)
		}
	}
	edge := func(side int, a, b int32) {
		if tg, ok := tagIndex[side]; ok {
			in.Edges = append(in.Edges, mesh.TaggedEdge{A: a, B: b, Tag: tg})
		}
	}
	for i := 0; i < nx; i++ {
		edge(0, id(i, 0), id(i+1, 0))
		edge(2, id(i+1, ny), id(i, ny))
	}
	for j := 0; j < ny; j++ {
		edge(1, id(nx, j), id(nx, j+1))
		edge(3, id(0, j+1), id(0, j))
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}
