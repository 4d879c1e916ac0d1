package deck

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"

	"cvdeck/mesh"
	"cvdeck/samples"
)

// square is a small valid case: a unit square (in mm) as one block.
const square = `
name: square
units: mm
parameters:
  side: 2 * half
  half: 5
  n: 4
geometry:
  loops:
    - name: box
      start: [0, 0]
      segments:
        - {name: s, line: [side, 0], tag: wall, spacing: {count: n + 1}}
        - {name: e, line: [side, side], tag: wall, spacing: {count: n + 1}}
        - {name: n, line: [0, side], tag: wall, spacing: {count: n + 1}}
        - {name: w, line: [0, 0], tag: wall, spacing: {count: n + 1}}
mesh:
  structured:
    blocks:
      - {south: s, east: e, north: n, west: w}
`

func TestParseResolvesParametersAndUnits(t *testing.T) {
	c, err := Parse("square.yaml", []byte(square), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// Parameters may refer to later ones: side = 2 * half = 10 (mm).
	if c.Params["side"] != 10 || strings.Join(c.ParamOrder, ",") != "side,half,n" {
		t.Fatalf("params %v order %v", c.Params, c.ParamOrder)
	}
	m, _, _, err := c.buildMesh()
	if err != nil {
		t.Fatal(err)
	}
	// 10 mm = 0.01 m: the area is 1e-4 m² (closed form), in 16 cells.
	area := 0.0
	for _, a := range m.Geo.CellArea {
		area += a
	}
	if m.NumCells() != 16 || math.Abs(area-1e-4) > 1e-18 {
		t.Fatalf("%d cells, area %v", m.NumCells(), area)
	}
}

func TestOverridesAndRefinement(t *testing.T) {
	c, err := Parse("square.yaml", []byte(square), LoadOptions{Params: map[string]float64{"n": 6}, Refine: 2})
	if err != nil {
		t.Fatal(err)
	}
	m, _, _, err := c.buildMesh()
	if err != nil {
		t.Fatal(err)
	}
	// n = 6 edges a side, refined by 2: 12 × 12 cells.
	if m.NumCells() != 144 {
		t.Fatalf("%d cells, want 144", m.NumCells())
	}
	base, _ := Parse("square.yaml", []byte(square), LoadOptions{})
	if c.InputHash == base.InputHash {
		t.Fatal("overrides and refinement must change the input hash")
	}
	_, err = Parse("square.yaml", []byte(square), LoadOptions{Params: map[string]float64{"haf": 1}})
	if err == nil || !strings.Contains(err.Error(), `did you mean "half"`) {
		t.Fatalf("override of an unknown parameter: %v", err)
	}
}

func TestParameterCycle(t *testing.T) {
	text := strings.Replace(square, "half: 5", "half: side / 2", 1)
	_, err := Parse("square.yaml", []byte(text), LoadOptions{})
	if err == nil || !strings.Contains(err.Error(), "side → half → side") || !errors.Is(err, ErrInput) {
		t.Fatalf("got %v", err)
	}
}

func TestSpacingRefinementIsConsistent(t *testing.T) {
	// A geometric law refined by r keeps the span: r cells of ratio g^(1/r)
	// start with first/r. Check through the discretised outlet side of the
	// bump-channel sample: refining by 2 doubles the edges.
	data, err := samples.Case("bump-channel")
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range []float64{1, 2} {
		c, err := Parse("bump-channel.yaml", data, LoadOptions{Refine: r})
		if err != nil {
			t.Fatal(err)
		}
		m, _, _, err := c.buildMesh()
		if err != nil {
			t.Fatal(err)
		}
		want := int(96*r) * int(32*r)
		if m.NumCells() != want {
			t.Fatalf("refine %g: %d cells, want %d", r, m.NumCells(), want)
		}
	}
}

// The blocks that the tube-row sample smooths apart (six, at refinement 2)
// run side by side and give the mesh and the smoothing notes of smoothing
// them one after another.
func TestBlocksSmoothedApartSideBySide(t *testing.T) {
	data, err := samples.Case("tube-row")
	if err != nil {
		t.Fatal(err)
	}
	build := func(procs int) (*mesh.Mesh, []string) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		c, err := Parse("tube-row.yaml", data, LoadOptions{Refine: 2})
		if err != nil {
			t.Fatal(err)
		}
		m, _, notes, err := c.buildMesh()
		if err != nil {
			t.Fatal(err)
		}
		return m, notes
	}
	ms, ns := build(1)
	mp, np := build(2)
	if !slices.Equal(ms.Nodes, mp.Nodes) || !slices.Equal(ms.CellNodes, mp.CellNodes) {
		t.Error("the meshes differ")
	}
	smoothed := 0
	for _, n := range ns {
		if strings.Contains(n, "smoothed") {
			smoothed++
		}
	}
	if smoothed < 2 || !slices.Equal(ns, np) {
		t.Errorf("%d blocks smoothed; notes one after another %q, side by side %q", smoothed, ns, np)
	}
}

func TestMaxCellsRefusesBeforeMeshing(t *testing.T) {
	text := strings.Replace(square, "mesh:\n", "mesh:\n  max_cells: 10\n", 1)
	c, err := Parse("square.yaml", []byte(text), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	_, _, _, err = c.buildMesh()
	if err == nil || !strings.Contains(err.Error(), "16 cells, more than the limit of 10") {
		t.Fatalf("got %v", err)
	}
}

// FuzzLoad feeds the case-file loader arbitrary bytes: it must return a
// case or an error, never panic. The seeds are the samples and variations.
func FuzzLoad(f *testing.F) {
	f.Add([]byte(square))
	for _, s := range samples.List() {
		data, _ := samples.Case(s.Name)
		f.Add(data)
	}
	f.Add([]byte("name: x\ngeometry: {loops: [{circle: {centre: [0, 0], radius: 1}, tag: a, spacing: {count: 9}}]}\nmesh: {structured: {blocks: []}}"))
	f.Add([]byte("name: [\n"))
	f.Add([]byte("parameters: {a: b, b: a}\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		timer := time.AfterFunc(20*time.Second, func() { panic(fmt.Sprintf("slow input %q", data)) })
		defer timer.Stop()
		c, err := Parse("fuzz.yaml", data, LoadOptions{})
		if err != nil {
			return
		}
		if c.Mesh.maxCells > 100000 {
			c.Mesh.maxCells = 100000
		}
		_, _, _, _ = c.buildMesh()
	})
}
