package deck

import (
	"errors"
	"fmt"
	"regexp"
	"slices"
	"strings"
	"testing"

	"cvdeck/export/manifest"
	"cvdeck/mesh/unstructured"
	"cvdeck/samples"
)

// cylinderChannel is the cylinder-channel sample with, for each pair of
// strings, the first replaced by the second.
func cylinderChannel(t *testing.T, edits ...string) *Case {
	t.Helper()
	data, err := samples.Case("cylinder-channel")
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	for k := 0; k+1 < len(edits); k += 2 {
		if !strings.Contains(text, edits[k]) {
			t.Fatalf("the sample has no %q", edits[k])
		}
		text = strings.Replace(text, edits[k], edits[k+1], 1)
	}
	c, err := Parse("cylinder-channel.yaml", []byte(text), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestLayerNotesReachTheManifest: the cylinder-channel sample asks for 10
// layers, which fit on all 96 faces of its cylinder (97 nodes round it),
// and then for 100, which cannot fit between the cylinder and the channel
// walls. Each run's deck.yaml, and the run's result, carry the mesh note;
// the numbers in it are held against the mesh in the mesher's own tests
// (mesh/unstructured, TestLayerReport*).
func TestLayerNotesReachTheManifest(t *testing.T) {
	for _, c := range []struct {
		count      int
		want, also string
	}{
		// Top layer 0.25 mm × 1.2⁹ = 1.29 mm thick, between radii
		// r₉ = 40 + 0.25 (1.2⁹ − 1)/0.2 = 45.20 mm and r₁₀ = 46.49 mm; its
		// top edge is the chord 2 r₁₀ sin(π/96) = 3.04 mm, its cell the
		// trapezoid of area sin(π/96) cos(π/96) (r₁₀² − r₉²) = 3.87 mm²,
		// and the equilateral triangle on the edge has (√3/4) 3.04² =
		// 4.01 mm², 1.04 times as much (elementary geometry).
		{10, "layers on cylinder: 10 asked, 10 built on all 96 wall faces", "; the top layer, about 0.00129 m thick under top edges 0.00304 to 0.00304 m long, differs in area from near-equilateral triangles on those edges by about 1.04 times at most (the growth metric gives the measured jumps, larger where the triangles grow)"},
		{100, "layers on cylinder: 100 asked, ", "(all 100 on none of 96 wall faces); fewer on 96 faces where another boundary is near"},
	} {
		cs := cylinderChannel(t, "count: 10}", fmt.Sprintf("count: %d}", c.count))
		dir := t.TempDir() + "/deck"
		res, err := Run(cs, dir, RunOptions{Formats: []string{"manifest"}})
		if err != nil {
			t.Fatal(err)
		}
		man, err := manifest.Read(dir)
		if err != nil {
			t.Fatal(err)
		}
		found := false
		for _, n := range man.Mesh.Notes {
			found = found || strings.HasPrefix(n, c.want) && strings.Contains(n, c.also)
		}
		if !found {
			t.Errorf("%d layers: no mesh note starts %q with %q; notes %q", c.count, c.want, c.also, man.Mesh.Notes)
		}
		if !slices.Equal(res.Notes, man.Mesh.Notes) {
			t.Errorf("the run's notes %q differ from the manifest's %q", res.Notes, man.Mesh.Notes)
		}
	}
}

// TestOverFineRegionSize: a refinement region of size 0.001 mm asks for
// some 10¹¹ cells. The refusal comes before meshing, at the region's line,
// with the default limit of 50 million as written (not what the layers
// leave of it), the region's size in case units, and a size that fits;
// with that size and a limit of 10⁵ the estimate passes.
func TestOverFineRegionSize(t *testing.T) {
	c := cylinderChannel(t, "size: d / 10}", "size: 0.001}")
	_, _, _, err := c.buildMesh()
	var big *unstructured.CellLimitError
	if !errors.Is(err, ErrInput) || !errors.As(err, &big) {
		t.Fatalf("got %v, want an input error wrapping a *CellLimitError", err)
	}
	msg := err.Error()
	t.Log(msg)
	for _, s := range []string{"mesh.unstructured.regions[0]:", "more than the limit of 50000000 (the default", "this region's size, 0.001 mm,"} {
		if !strings.Contains(msg, s) {
			t.Errorf("the error does not say %q", s)
		}
	}
	if strings.Contains(msg, "layer") && !strings.Contains(msg, "of them in the boundary layers") || strings.Contains(msg, "49999") {
		t.Errorf("the error still blames the layers or quotes a reduced limit")
	}

	const limit = "mesh:\n  max_cells: 1e5\n"
	c = cylinderChannel(t, "size: d / 10}", "size: 0.001}", "mesh:\n", limit)
	_, _, _, err = c.buildMesh()
	fit := regexp.MustCompile(`a size of about ([0-9.e+-]+) mm would fit`).FindStringSubmatch(fmt.Sprint(err))
	if fit == nil || !strings.Contains(err.Error(), "more than the limit of 100000 (mesh.max_cells") {
		t.Fatalf("no size suggested within the case's limit: %v", err)
	}
	c = cylinderChannel(t, "size: d / 10}", "size: "+fit[1]+"}", "mesh:\n", limit)
	if _, _, _, err = c.buildMesh(); errors.As(err, &big) {
		t.Errorf("with the suggested size %s mm: %v", fit[1], err)
	}
}
