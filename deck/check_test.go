package deck

import (
	"reflect"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// squareGrid is the n×n grid of unit quads with its bottom edges tagged
// with tag (the other boundary faces untagged).
func squareGrid(t *testing.T, n int, tag string) mesh.Input {
	t.Helper()
	id := func(i, j int) int32 { return int32(j*(n+1) + i) }
	in := mesh.Input{CellStart: []int32{0}, Tags: []string{tag}}
	for j := 0; j <= n; j++ {
		for i := 0; i <= n; i++ {
			in.Nodes = append(in.Nodes, orb.Point{float64(i), float64(j)})
		}
	}
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			in.CellNodes = append(in.CellNodes, id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
	}
	for i := 0; i < n; i++ {
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: id(i, 0), B: id(i+1, 0)})
	}
	return in
}

// Tagging the untagged faces of a mesh in place gives the very mesh that
// Build makes when those edges are listed under DefaultTag, and a mesh
// that already has a DefaultTag group gets its untagged faces added to it.
func TestTagUntagged(t *testing.T) {
	for _, first := range []string{"wall", DefaultTag} {
		in := squareGrid(t, 4, first)
		m, err := mesh.Build(in)
		if err != nil {
			t.Fatal(err)
		}
		lo, hi := m.UntaggedRange()
		want := in
		want.Tags = append([]string(nil), in.Tags...)
		want.Edges = append([]mesh.TaggedEdge(nil), in.Edges...)
		if first != DefaultTag {
			want.Tags = append(want.Tags, DefaultTag)
		}
		for f := lo; f < hi; f++ {
			want.Edges = append(want.Edges, mesh.TaggedEdge{A: m.FaceNodes[f][0], B: m.FaceNodes[f][1], Tag: int16(len(want.Tags) - 1)})
		}
		wm, err := mesh.Build(want)
		if err != nil {
			t.Fatal(err)
		}
		got, err := tagUntagged(m)
		if err != nil {
			t.Fatal(err)
		}
		if l, h := got.UntaggedRange(); h > l {
			t.Errorf("first tag %q: %d faces still untagged", first, h-l)
		}
		if !reflect.DeepEqual(got.Tags, wm.Tags) || !reflect.DeepEqual(got.TagStart, wm.TagStart) || !reflect.DeepEqual(got.FaceTag, wm.FaceTag) ||
			!reflect.DeepEqual(got.FaceNodes, wm.FaceNodes) || !reflect.DeepEqual(got.Owner, wm.Owner) || !reflect.DeepEqual(got.Neighbour, wm.Neighbour) ||
			!reflect.DeepEqual(got.Geo, wm.Geo) {
			t.Errorf("first tag %q: tags %v %v, built %v %v", first, got.Tags, got.TagStart, wm.Tags, wm.TagStart)
		}
	}
}
