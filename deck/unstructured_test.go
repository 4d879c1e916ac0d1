package deck

import (
	"errors"
	"fmt"
	"regexp"
	"slices"
	"strings"
	"testing"

	"cvdeck/export/manifest"
	"cvdeck/mesh"
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

// quadStacks counts the quadrilaterals stacked on each face tagged tag,
// from the mesh alone: the face's cell, the cell across its opposite
// side, and so on while they are quadrilaterals.
func quadStacks(t *testing.T, m *mesh.Mesh, tag string) []int {
	t.Helper()
	lo, hi, ok := m.TagRange(tag)
	if !ok {
		t.Fatalf("no faces tagged %q", tag)
	}
	key := func(a, b int32) [2]int32 { return [2]int32{min(a, b), max(a, b)} }
	cellsOf := map[[2]int32][]int{}
	for c := range m.NumCells() {
		cell := m.Cell(c)
		for i := range cell {
			k := key(cell[i], cell[(i+1)%len(cell)])
			cellsOf[k] = append(cellsOf[k], c)
		}
	}
	var out []int
	for f := lo; f < hi; f++ {
		side := key(m.FaceNodes[f][0], m.FaceNodes[f][1])
		c, n := int(m.Owner[f]), 0
		for c >= 0 && n < 1000 {
			cell := m.Cell(c)
			i := -1
			for k := range cell {
				if key(cell[k], cell[(k+1)%len(cell)]) == side {
					i = k
				}
			}
			if len(cell) != 4 || i < 0 {
				break
			}
			n++
			side = key(cell[(i+2)%4], cell[(i+3)%4])
			next := -1
			for _, d := range cellsOf[side] {
				if d != c {
					next = d
				}
			}
			c = next
		}
		out = append(out, n)
	}
	return out
}

// TestLayerNotesReachTheManifest: the cylinder-channel sample asks for 10
// layers, which fit, and then for 100, which cannot fit between the
// cylinder and the channel walls. Each run's deck.yaml carries a mesh note
// whose numbers are those counted in the mesh written: layers asked, the
// fewest and most quadrilaterals stacked on a cylinder face, and the
// faces with all of them.
func TestLayerNotesReachTheManifest(t *testing.T) {
	for _, count := range []int{10, 100} {
		c := cylinderChannel(t, "count: 10}", fmt.Sprintf("count: %d}", count))
		dir := t.TempDir() + "/deck"
		res, err := Run(c, dir, RunOptions{Formats: []string{"manifest"}})
		if err != nil {
			t.Fatal(err)
		}
		man, err := manifest.Read(dir)
		if err != nil {
			t.Fatal(err)
		}
		stacks := quadStacks(t, res.Mesh, "cylinder")
		full := 0
		for _, n := range stacks {
			if n >= count {
				full++
			}
		}
		lo, hi := slices.Min(stacks), slices.Max(stacks)
		var want string
		switch {
		case full == len(stacks):
			want = fmt.Sprintf("layers on cylinder: %d asked, %d built on all %d wall faces", count, lo, len(stacks))
		case full == 0:
			want = fmt.Sprintf("layers on cylinder: %d asked, %d to %d built (all %d on none of %d wall faces); fewer on ", count, lo, hi, count, len(stacks))
		default:
			t.Fatalf("%d layers: %d of %d faces full; the test expects all or none", count, full, len(stacks))
		}
		found := false
		for _, n := range man.Mesh.Notes {
			found = found || strings.HasPrefix(n, want)
		}
		if !found {
			t.Errorf("%d layers: no mesh note starts %q; notes %q", count, want, man.Mesh.Notes)
		}
		if !slices.Equal(res.Notes, man.Mesh.Notes) {
			t.Errorf("the run's notes %q differ from the manifest's %q", res.Notes, man.Mesh.Notes)
		}
		if count == 100 && !strings.Contains(strings.Join(man.Mesh.Notes, "\n"), "where another boundary is near") {
			t.Errorf("100 layers: the note does not say the channel walls stop them: %q", man.Mesh.Notes)
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
