package unstructured

import (
	"errors"
	"math"
	"slices"
	"testing"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"github.com/paulmach/orb"
)

// stackedQuads counts, for every boundary face tagged tag, the
// quadrilaterals stacked on it: its cell, the cell across that cell's
// opposite side, and so on while the cells are quadrilaterals. This is
// counted from the mesh alone, to hold the layer report against.
func stackedQuads(t *testing.T, m *mesh.Mesh, tag string) []int {
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
		u, v := m.FaceNodes[f][0], m.FaceNodes[f][1]
		c, n := int(m.Owner[f]), 0
		for n < 1000 {
			cell := m.Cell(c)
			if len(cell) != 4 {
				break
			}
			n++
			i := slices.IndexFunc([]int{0, 1, 2, 3}, func(i int) bool { return key(cell[i], cell[(i+1)%4]) == key(u, v) })
			if i < 0 {
				t.Fatalf("cell %d %v has no side %d–%d", c, cell, u, v)
			}
			u, v = cell[(i+2)%4], cell[(i+3)%4]
			next := -1
			for _, d := range cellsOf[key(u, v)] {
				if d != c {
					next = d
				}
			}
			if next < 0 {
				break
			}
			c = next
		}
		out = append(out, n)
	}
	return out
}

// checkReport holds a layer report against the quadrilaterals counted on
// the tag's faces in the mesh: the same layers per face (as a sorted
// list: the report keeps outline order, the mesh its own face order),
// and Faces, Full, Min and Max that agree with them; the shortfalls add
// up to the faces short of Asked.
func checkReport(t *testing.T, m *mesh.Mesh, r LayerReport, tag string) []int {
	t.Helper()
	got := stackedQuads(t, m, tag)
	slices.Sort(got)
	want := slices.Sorted(slices.Values(r.built))
	if !slices.Equal(got, want) {
		t.Fatalf("layers per %s face: the mesh has %v, the report %v", tag, got, want)
	}
	full := 0
	for _, n := range got {
		if n >= r.Asked {
			full++
		}
	}
	short := 0
	for _, s := range r.Short {
		short += s.Faces
	}
	if r.Faces != len(got) || r.Full != full || r.Min != got[0] || r.Max != got[len(got)-1] || short != r.Faces-r.Full {
		t.Errorf("report %+v; the mesh has %d faces, %d with all %d layers, %d to %d layers", r, len(got), full, r.Asked, got[0], got[len(got)-1])
	}
	return got
}

// TestLayerReportAllBuilt: a cylinder of radius 0.4 at least 0.6 from the
// channel walls, 12 layers of 0.002 growing by 1.25, 0.108 thick in all
// (geometric series): nothing limits them, so all 60 wall faces get all
// 12 layers, the mesh has 60 × 12 quadrilaterals (no fans on a convex
// circle) and no shortfall is reported.
func TestLayerReportAllBuilt(t *testing.T) {
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "farfield"),
		circleLoop(orb.Point{1.5, 1}, 0.4, 60, true, "cylinder"),
	}}
	m, rep, err := MeshWithReport(out, Options{Layers: []Layers{{Tags: []string{"cylinder"}, FirstHeight: 0.002, Growth: 1.25, Count: 12}}})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Layers) != 1 {
		t.Fatalf("%d layer reports, want 1", len(rep.Layers))
	}
	r := rep.Layers[0]
	checkReport(t, m, r, "cylinder")
	if r.Asked != 12 || r.Faces != 60 || r.Full != 60 || r.Min != 12 || r.Max != 12 || len(r.Short) != 0 {
		t.Errorf("report %+v, want 12 asked and built on all 60 faces", r)
	}
	if _, quads := countKinds(m); quads != 60*12 {
		t.Errorf("%d quadrilaterals, want 60 × 12", quads)
	}
}

// TestLayerReportNarrowGap: a channel 0.5 high with layers on both walls,
// 40 asked of 0.002 growing by 1.2 (5.6 m in all). The layers may fill
// gapShare (45%, the mesher's own rule) of the 0.5 across, so mid-channel
// they stop at the most n with s_n = 0.002·(1.2ⁿ − 1)/0.2 ≤ 0.225
// (geometric series): n = 17. At the inlet and outlet they grow along the
// end edges, whose first pieces are 0.05 long, up to 0.0225: 6 layers,
// rising by one per face towards the middle. The report must say so, and
// agree with the quadrilaterals in the mesh.
func TestLayerReportNarrowGap(t *testing.T) {
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{channelLoop()}}
	m, rep, err := MeshWithReport(out, Options{Layers: []Layers{{Tags: []string{"wall"}, FirstHeight: 0.002, Growth: 1.2, Count: 40}}})
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Layers[0]
	got := checkReport(t, m, r, "wall")
	t.Logf("report %+v", r)
	most := int(math.Floor(math.Log(1+0.45*0.5*0.2/0.002) / math.Log(1.2)))
	end := int(math.Floor(math.Log(1+0.45*0.05*0.2/0.002) / math.Log(1.2)))
	if most != 17 || end != 6 {
		t.Fatalf("closed forms give %d and %d layers", most, end)
	}
	if r.Asked != 40 || r.Faces != 120 || r.Full != 0 || r.Max != most || r.Min != end {
		t.Errorf("report %+v: want 40 asked, %d to %d built on none of 120 faces", r, end, most)
	}
	// The 11 faces of each ramp (6 to 16 layers) are short because of
	// the end edge, which started the smoothing; the rest because of the
	// other wall.
	if len(r.Short) != 2 || r.Short[0] != (Shortfall{StopGap, 120 - 4*11}) || r.Short[1] != (Shortfall{StopSlide, 4 * 11}) {
		t.Errorf("shortfalls %+v: want 76 faces where the other wall is near, then 44 on the ramps from the end edges", r.Short)
	}
	// Faces at the wall ends: the end rays have 6 layers and the counts
	// rise by one a face, so 17 is reached on the 12th face from each of
	// the four wall ends; the 2 × (60 − 2 × 11) faces between have 17.
	plateau := 0
	for _, n := range got {
		if n == most {
			plateau++
		}
	}
	if plateau != 2*(60-2*11) {
		t.Errorf("%d faces have %d layers, want %d", plateau, most, 2*(60-2*11))
	}
}

// TestCellLimitError: a size far too small (a box region, a near-tag
// region, the maximum size) is refused before meshing, naming it (region
// index or MaxSize), with the caller's limit (not what the layers leave of
// it), the layer cells in the estimate, and the least size that fits (to
// 0.1%): with that size, as quoted, the estimate is under the limit, and
// with 1% less it is not.
func TestCellLimitError(t *testing.T) {
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "farfield"),
		circleLoop(orb.Point{1.5, 1}, 0.4, 60, true, "cylinder"),
	}}
	circle := Region{Shape: Circle, Center: orb.Point{0.3, 0.3}, Radius: 0.1, Size: 0.05}
	cases := []struct {
		name   string
		opt    Options
		region int
	}{
		{"box", Options{Regions: []Region{circle, {Shape: Box, Min: orb.Point{2, 0.5}, Max: orb.Point{3.5, 1.5}, Size: 1e-4}}}, 1},
		{"near tag", Options{Regions: []Region{circle, {Shape: NearTag, Tag: "farfield", Distance: 0.1, Size: 1e-3}}}, 1},
		{"max size", Options{Regions: []Region{circle}, MaxSize: 2e-3}, -1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			opt := c.opt
			opt.Layers = []Layers{{Tags: []string{"cylinder"}, FirstHeight: 0.002, Growth: 1.25, Count: 12}}
			opt.MaxCells = 20000
			opt.Regions = slices.Clone(opt.Regions)
			size := &opt.MaxSize
			if c.region >= 0 {
				size = &opt.Regions[c.region].Size
			}
			_, _, err := MeshWithReport(out, opt)
			var e *CellLimitError
			if !errors.As(err, &e) {
				t.Fatalf("got %v, want a *CellLimitError", err)
			}
			t.Log(err)
			// 720 layer cells: 60 faces × 12 layers, all built (see
			// TestLayerReportAllBuilt).
			if e.Region != c.region || e.Limit != 20000 || e.LayerCells != 720 || e.Size != *size || !(e.Estimate > 20000) || !(e.Part > 0.5*e.Estimate) {
				t.Errorf("got %+v: want region %d, size %v, limit 20000, 720 layer cells", e, c.region, *size)
			}
			if !(e.Fit > *size) {
				t.Fatalf("no fitting size: %+v", e)
			}
			fit := e.Fit
			*size = RoundUp3(fit)
			if _, _, err := MeshWithReport(out, opt); errors.As(err, &e) {
				t.Errorf("with the size the error gave: %v", err)
			}
			*size = 0.99 * fit
			if _, _, err := MeshWithReport(out, opt); !errors.As(err, &e) {
				t.Errorf("with 1%% below the size the error gave, no refusal: %v", err)
			}
		})
	}
	// A boundary spaced far too finely: named by its tag, with its
	// spacing; the size that fits is only scaled (the outline would move),
	// so it is not held to the limit here.
	fine := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{
		polyLoop([]orb.Point{{0, 0}, {4, 0}, {4, 2}, {0, 2}}, 0.2, "farfield"),
		circleLoop(orb.Point{1.5, 1}, 0.4, 2000, true, "cylinder"),
	}}
	_, _, err := MeshWithReport(fine, Options{Growth: 1.01, MaxCells: 20000})
	var e *CellLimitError
	if !errors.As(err, &e) || e.Tag != "cylinder" || e.Region != -1 || math.Abs(e.Size-0.8*math.Pi/2000) > 1e-6 || !(e.Fit > e.Size) {
		t.Errorf("a finely spaced cylinder: got %v %+v, want its tag and spacing 2π·0.4/2000", err, e)
	}
	for _, x := range [][2]float64{{0.0123401, 0.0124}, {0.0124, 0.0124}, {987.01, 988}, {1, 1}} {
		if got := RoundUp3(x[0]); math.Abs(got-x[1]) > 1e-12*x[1] {
			t.Errorf("RoundUp3(%v) = %v, want %v", x[0], got, x[1])
		}
	}
}
