package deck

import (
	"os"
	"path/filepath"
	"reflect"
	"strings"
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

// withTags gives the mesh mesh.Build gives for the same cells and tagged
// edges, whatever mix of old and new tags and untagged faces results: on
// a 6 × 6 grid tagged "wall" along its bottom, the left side joins
// "wall", the right side becomes "outlet", half the top "inlet" (a tag
// added after them) and the rest stays untagged.
func TestWithTagsAsBuilt(t *testing.T) {
	in := squareGrid(t, 6, "wall")
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	want := in
	want.Tags = append([]string(nil), in.Tags...)
	want.Edges = append([]mesh.TaggedEdge(nil), in.Edges...)
	var adds []namedEdge
	tagIndex := map[string]int16{"wall": 0}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		p := m.Geo.FaceMid[f]
		var tag string
		switch {
		case p[0] == 0:
			tag = "wall"
		case p[0] == 6:
			tag = "outlet"
		case p[1] == 6 && p[0] < 3:
			tag = "inlet"
		default:
			continue
		}
		if _, ok := tagIndex[tag]; !ok {
			tagIndex[tag] = int16(len(want.Tags))
			want.Tags = append(want.Tags, tag)
		}
		a, b := m.FaceNodes[f][0], m.FaceNodes[f][1]
		adds = append(adds, namedEdge{b, a, tag})
		want.Edges = append(want.Edges, mesh.TaggedEdge{A: a, B: b, Tag: tagIndex[tag]})
	}
	wm, err := mesh.Build(want)
	if err != nil {
		t.Fatal(err)
	}
	got, err := withTags(m, adds)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got.Tags, wm.Tags) || !reflect.DeepEqual(got.TagStart, wm.TagStart) || !reflect.DeepEqual(got.FaceTag, wm.FaceTag) ||
		!reflect.DeepEqual(got.FaceNodes, wm.FaceNodes) || !reflect.DeepEqual(got.Owner, wm.Owner) || !reflect.DeepEqual(got.Neighbour, wm.Neighbour) ||
		!reflect.DeepEqual(got.Geo, wm.Geo) {
		t.Errorf("tags %v %v, built %v %v", got.Tags, got.TagStart, wm.Tags, wm.TagStart)
	}
	if lo, hi := got.UntaggedRange(); hi-lo != 3 {
		t.Errorf("%d faces untagged, want the 3 on the top's right half", hi-lo)
	}
	// A face given a second tag, and an edge that is no boundary face.
	m2, _ := mesh.Build(in)
	a, b := m2.FaceNodes[m2.NumInterior][0], m2.FaceNodes[m2.NumInterior][1]
	if _, err := withTags(m2, []namedEdge{{a, b, "floor"}}); err == nil || !strings.Contains(err.Error(), `tagged both "wall" and "floor"`) {
		t.Errorf("second tag: %v", err)
	}
	if _, err := withTags(m2, []namedEdge{{0, 8, "x"}}); err == nil || !strings.Contains(err.Error(), "not a boundary face") {
		t.Errorf("diagonal: %v", err)
	}
}

// TestDeckLimitsOnlyFromOwnReport: the quality.json of a deck grades the
// deck's own mesh (no limit changed, as the note says), and a check
// folder's grades its mesh.vtu; the same report copied beside a mesh of
// anything else is not taken, with a note saying why.
func TestDeckLimitsOnlyFromOwnReport(t *testing.T) {
	root := t.TempDir()
	c, err := Parse(filepath.Join(root, "square.yaml"), []byte(square), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	deck := filepath.Join(root, "deck")
	if _, err := Run(c, deck, RunOptions{}); err != nil {
		t.Fatal(err)
	}
	notes := func(path string) string {
		t.Helper()
		res, err := Check(path)
		if err != nil {
			t.Fatal(err)
		}
		return strings.Join(res.Notes, "\n")
	}
	if n := notes(filepath.Join(deck, "mesh.vtu")); !strings.Contains(n, "the deck's report (profile \"everyday\", no limit changed)") {
		t.Errorf("the deck's mesh: notes %q, want the deck's limits with no change", n)
	}
	checked := filepath.Join(root, "checked")
	if _, err := CheckAndWrite(filepath.Join(deck, "mesh.vtu"), checked); err != nil {
		t.Fatal(err)
	}
	if n := notes(filepath.Join(checked, "mesh.vtu")); !strings.Contains(n, "the check's report") {
		t.Errorf("the check folder's mesh: notes %q, want the check's limits", n)
	}
	stray := filepath.Join(root, "stray")
	if err := os.Mkdir(stray, 0o755); err != nil {
		t.Fatal(err)
	}
	for from, to := range map[string]string{"mesh.vtu": "other.vtu", "quality.json": "quality.json"} {
		data, err := os.ReadFile(filepath.Join(deck, from))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(stray, to), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if n := notes(filepath.Join(stray, "other.vtu")); strings.Contains(n, "limits taken") || !strings.Contains(n, "is not taken for the limits") {
		t.Errorf("a mesh beside a stray report: notes %q, want the report refused", n)
	}
}
