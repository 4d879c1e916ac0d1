package quality

import (
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// failedCells returns the cells that fail metric name.
func failedCells(t *testing.T, r *Report, name string) []int {
	t.Helper()
	var out []int
	l := everyday(t)
	d := metricByName(name)
	for c, v := range field(t, r, name) {
		if d.status(v, *d.bound(&l)) == Fail {
			out = append(out, c)
		}
	}
	return out
}

// problems returns the defects of one connectivity check.
func problems(r *Report, check string) []Problem {
	for _, c := range r.Connectivity {
		if c.Name == check {
			return c.Problems
		}
	}
	return nil
}

// Moving the node (1,1) of a 3×3 unit grid to (2.2, 2.2) folds cell 4 over
// its neighbours: its shoelace area is −0.2 (hand computation), the others
// stay positive.
func TestFoldedCell(t *testing.T) {
	nodes := gridNodes(3, 3, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0)
	nodes[5] = orb.Point{2.2, 2.2}
	m := build(t, nodes, quadCells(3, 3, false), true)
	r := evaluate(t, m)
	if got := failedCells(t, r, "area"); !slices.Equal(got, []int{4}) {
		t.Errorf("cells failing area: %v, want [4]", got)
	}
	if got := r.Failures(); len(got) == 0 || got[0] != "area: 1 cell" {
		t.Errorf("Failures() = %q, want area: 1 cell first", got)
	}
	if a := field(t, r, "area")[4]; !near(a, -0.2, 1e-15) {
		t.Errorf("area of cell 4 = %g, want -0.2", a)
	}
	s, _ := r.Metric("area")
	if s.Worst[0].Index != 4 || r.Verdict != Fail {
		t.Errorf("worst area cell %d, verdict %s", s.Worst[0].Index, r.Verdict)
	}
}

// A cell listed clockwise among counter-clockwise ones traverses its
// shared faces the same way as its neighbours, and its boundary faces run
// against it (mesh.Build points them out of the mesh): the orientation
// check names it on all four, and its area is negative.
func TestReversedCell(t *testing.T) {
	cells := quadCells(3, 1, false)
	slices.Reverse(cells[1])
	m := build(t, gridNodes(3, 1, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), cells, true)
	r := evaluate(t, m)
	ps := problems(r, CheckOrientation)
	if len(ps) != 4 {
		t.Fatalf("orientation problems %v, want cell 1's two shared and two boundary faces", ps)
	}
	for _, p := range ps {
		if p.Cell != 1 {
			t.Errorf("orientation problem names cell %d, want 1: %s", p.Cell, p.Message)
		}
	}
	if got := failedCells(t, r, "area"); !slices.Equal(got, []int{1}) {
		t.Errorf("cells failing area: %v", got)
	}
}

// A unit square cut into four triangles around a centre node pulled to
// (0.5, 1e-7): triangle 0, on the bottom edge, becomes a sliver with an
// angle of 180° − 2·atan(2e-7) ≈ 179.99998°, past the 179° fail limit.
func TestSliver(t *testing.T) {
	nodes := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0.5, 1e-7}}
	cells := [][]int32{{0, 1, 4}, {1, 2, 4}, {2, 3, 4}, {3, 0, 4}}
	r := evaluate(t, build(t, nodes, cells, true))
	if got := failedCells(t, r, "max_angle"); !slices.Equal(got, []int{0}) {
		t.Errorf("cells failing max_angle: %v, want [0]", got)
	}
	s, _ := r.Metric("aspect_ratio")
	if s.Worst[0].Index != 0 || !(float64(s.Worst[0].Value) > 1e6) {
		t.Errorf("worst aspect ratio %+v, want cell 0 above 1e6", s.Worst[0])
	}
	if r.Verdict != Fail {
		t.Errorf("verdict %s", r.Verdict)
	}
}

// Two unit quads on the left of a 1×2 quad: the left cells' shared node
// (1,1), node 4, lies inside the right cell's left face, which is then a
// boundary face inside the domain. All boundary faces are tagged, so only
// the hanging-node check can see it.
func TestHangingNode(t *testing.T) {
	nodes := []orb.Point{{0, 0}, {1, 0}, {2, 0}, {0, 1}, {1, 1}, {0, 2}, {1, 2}, {2, 2}}
	cells := [][]int32{{0, 1, 4, 3}, {3, 4, 6, 5}, {1, 2, 7, 6}}
	r := evaluate(t, build(t, nodes, cells, true))
	ps := problems(r, CheckHanging)
	if len(ps) != 1 || ps[0].Node != 4 || ps[0].Cell != 2 {
		t.Fatalf("hanging problems %+v, want node 4 on a face of cell 2", ps)
	}
	if !strings.Contains(ps[0].Message, "node 4") || !strings.Contains(ps[0].Message, "cell 2") {
		t.Errorf("message does not name node and cell: %s", ps[0].Message)
	}
	if r.Verdict != Fail || r.CellStatus[2] != Fail {
		t.Errorf("verdict %s, cell 2 %s", r.Verdict, r.CellStatus[2])
	}
}

// A triangle whose side carries the node its two neighbours share: the
// advice for a triangle is to split it through the node (a fourth node on
// its side would make a degenerate quadrilateral), and the mesh so split
// has no hanging node and passes.
func TestHangingNodeOnTriangle(t *testing.T) {
	nodes := []orb.Point{{0, 0}, {2, 0}, {0, 2}, {1, 1}, {2, 2}}
	r := evaluate(t, build(t, nodes, [][]int32{{0, 1, 2}, {1, 4, 3}, {3, 4, 2}}, true))
	ps := problems(r, CheckHanging)
	if len(ps) != 1 || ps[0].Cell != 0 || !strings.Contains(ps[0].Message, "triangle: split it in two through the node") {
		t.Fatalf("hanging problems %+v, want node 3 on cell 0 with the triangle's advice", ps)
	}
	r = evaluate(t, build(t, nodes, [][]int32{{0, 1, 3}, {0, 3, 2}, {1, 4, 3}, {3, 4, 2}}, true))
	if ps := problems(r, CheckHanging); len(ps) != 0 || r.Verdict == Fail {
		t.Errorf("the advised split: hanging problems %+v, verdict %s", ps, r.Verdict)
	}
}

// Two unit quads side by side that do not share their interface nodes: nodes
// 1 and 4, and 2 and 7, coincide.
func TestDuplicateNode(t *testing.T) {
	nodes := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {1, 0}, {2, 0}, {2, 1}, {1, 1 + 1e-12}}
	cells := [][]int32{{0, 1, 2, 3}, {4, 5, 6, 7}}
	r := evaluate(t, build(t, nodes, cells, true))
	ps := problems(r, CheckDuplicate)
	if len(ps) != 2 {
		t.Fatalf("duplicate problems %+v, want 2", ps)
	}
	want := [][2]int{{4, 1}, {7, 1}} // (node, cell) named
	for i, p := range ps {
		if p.Node != want[i][0] || p.Cell != want[i][1] {
			t.Errorf("duplicate %d names node %d cell %d, want %v: %s", i, p.Node, p.Cell, want[i], p.Message)
		}
	}
	// Pulled apart by more than the tolerance they are no longer duplicates.
	nodes[7] = orb.Point{1, 1.01}
	r = evaluate(t, build(t, nodes, cells, true))
	if ps := problems(r, CheckDuplicate); len(ps) != 1 || ps[0].Node != 4 {
		t.Errorf("after separating: %+v", ps)
	}
}

// A 2×2 grid whose last boundary face is lost, as a file missing one
// boundary line would give: the cell of that edge is named, and the
// boundary is open at the edge's two nodes.
func TestBoundaryGap(t *testing.T) {
	m := build(t, gridNodes(2, 2, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), quadCells(2, 2, false), true)
	f := m.NumFaces() - 1
	lost, owner := m.FaceNodes[f], int(m.Owner[f])
	dropLastFace(m)
	r := evaluate(t, m)
	ps := problems(r, CheckCellFaces)
	if len(ps) != 1 || ps[0].Cell != owner {
		t.Fatalf("cell_faces problems %+v, want cell %d", ps, owner)
	}
	var open []int
	for _, p := range problems(r, CheckWatertight) {
		if p.Node >= 0 {
			open = append(open, p.Node)
		}
	}
	want := []int{int(min(lost[0], lost[1])), int(max(lost[0], lost[1]))}
	if !slices.Equal(open, want) {
		t.Errorf("open boundary at nodes %v, want %v", open, want)
	}
	if !(float64(r.Audit.BoundaryClosure) > 0.1) || r.Verdict != Fail {
		t.Errorf("boundary closure %g, verdict %s", r.Audit.BoundaryClosure, r.Verdict)
	}
}

// dropLastFace removes the last face from m and its geometry.
func dropLastFace(m *mesh.Mesh) {
	n := m.NumFaces() - 1
	m.FaceNodes, m.Owner, m.Neighbour, m.FaceTag = m.FaceNodes[:n], m.Owner[:n], m.Neighbour[:n], m.FaceTag[:n]
	g := &m.Geo
	g.FaceLength, g.FaceNormal, g.FaceMid = g.FaceLength[:n], g.FaceNormal[:n], g.FaceMid[:n]
	for i := range m.TagStart {
		m.TagStart[i] = min(m.TagStart[i], int32(n))
	}
}

// A 3×1 grid with one boundary edge left out of the tag list: the check
// names the face and its cell.
func TestUntaggedFace(t *testing.T) {
	cells := quadCells(3, 1, false)
	in := mesh.Input{Nodes: gridNodes(3, 1, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), CellStart: []int32{0}, Tags: []string{"wall"}}
	for _, c := range cells {
		in.CellNodes = append(in.CellNodes, c...)
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	for _, e := range boundaryEdges(cells) {
		if (e.A == 5 && e.B == 6) || (e.A == 6 && e.B == 5) {
			continue // the top edge of cell 1 stays untagged
		}
		in.Edges = append(in.Edges, e)
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	r := evaluate(t, m)
	ps := problems(r, CheckBoundaryTag)
	if len(ps) != 1 || ps[0].Cell != 1 {
		t.Fatalf("boundary_tag problems %+v, want one naming cell 1", ps)
	}
	fn := m.FaceNodes[ps[0].Face]
	if min(fn[0], fn[1]) != 5 || max(fn[0], fn[1]) != 6 {
		t.Errorf("named face joins %v, want 5-6", fn)
	}
}

// Inconsistent arrays are an error naming what is wrong, not a panic.
func TestInconsistentArrays(t *testing.T) {
	m := build(t, gridNodes(2, 1, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), quadCells(2, 1, false), true)
	m.Owner[3] = 9
	_, err := Evaluate(m, everyday(t))
	if err == nil || !strings.Contains(err.Error(), "face 3 has owner 9") {
		t.Errorf("err = %v", err)
	}
	if _, err := Evaluate(m, Limits{}); err == nil {
		t.Error("empty limits accepted")
	}
	m = build(t, gridNodes(2, 1, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), quadCells(2, 1, false), true)
	m.Nodes[4][1] = math.NaN()
	if _, err := Evaluate(m, everyday(t)); err == nil || !strings.Contains(err.Error(), "node 4 is at (1, NaN)") {
		t.Errorf("NaN node: %v", err)
	}
}

// A triangle with its third node on its base has zero area: it fails the
// area check whatever the limits, its aspect ratio and Green–Gauss error
// are +Inf, and the JSON report writes those as null.
func TestZeroAreaCell(t *testing.T) {
	// Triangles 0 and 1 split the triangle (0,0), (1,0), (1,1) at node 3 =
	// (0.5, 0) on its base; cell 2, (0,0), (1,0), (0.5,0), is flat and
	// shares the two halves of that base with them.
	nodes := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0.5, 0}}
	cells := [][]int32{{0, 3, 2}, {3, 1, 2}, {0, 1, 3}}
	m := build(t, nodes, cells, true)
	r := evaluate(t, m)
	if a := field(t, r, "area")[2]; a != 0 {
		t.Fatalf("area %g, want 0", a)
	}
	if got := failedCells(t, r, "area"); !slices.Equal(got, []int{2}) {
		t.Errorf("cells failing area %v, want [2]", got)
	}
	if ar := field(t, r, "aspect_ratio")[2]; !math.IsInf(ar, 1) {
		t.Errorf("aspect ratio %g, want +Inf", ar)
	}
	var b strings.Builder
	if err := WriteJSON(&b, r); err != nil {
		t.Fatalf("JSON with infinite values: %v", err)
	}
	if !strings.Contains(b.String(), `"max": null`) {
		t.Error("no null for an infinite maximum")
	}
	b.Reset()
	if err := WriteText(&b, r); err != nil || !strings.Contains(b.String(), "+inf") {
		t.Errorf("text report: %v\n%s", err, b.String())
	}
}

// An empty mesh and a mesh with a node no cell uses: the unused node is
// named; nothing panics.
func TestEmptyAndUnused(t *testing.T) {
	m, err := mesh.Build(mesh.Input{CellStart: []int32{0}})
	if err != nil {
		t.Fatal(err)
	}
	if r := evaluate(t, m); r.Verdict != Pass || len(r.Metrics) != 0 {
		t.Errorf("empty mesh: %v, %d metrics", r, len(r.Metrics))
	}
	nodes := gridNodes(1, 1, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0)
	nodes = append(nodes, orb.Point{5, 5})
	r := evaluate(t, build(t, nodes, quadCells(1, 1, false), true))
	ps := problems(r, CheckUnused)
	if len(ps) != 1 || ps[0].Node != 4 || r.Verdict != Fail {
		t.Errorf("unused: %+v, verdict %s", ps, r.Verdict)
	}
	// No cell fails, so the one-line verdict must name the check.
	if got := r.Failures(); !slices.Equal(got, []string{"unused_node: 1 defect"}) {
		t.Errorf("Failures() = %q", got)
	}
}

// Two unit squares of two triangles each, laid over each other with a
// shift of half a side: every cell is positive, every face has its cells,
// each boundary is closed and tagged, so no other check sees anything
// wrong, yet the patches overlap by a quarter of their area. Their
// boundaries cross at (1, 0.5) and (0.5, 1) (hand geometry), and
// boundary_crossing must report one of those places and fail the mesh.
func TestOverlappingPatches(t *testing.T) {
	nodes := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0.5, 0.5}, {1.5, 0.5}, {1.5, 1.5}, {0.5, 1.5}}
	cells := [][]int32{{0, 1, 2}, {0, 2, 3}, {4, 5, 6}, {4, 6, 7}}
	r := evaluate(t, build(t, nodes, cells, true))
	for _, c := range r.Connectivity {
		if c.Name != CheckCrossing && c.Count != 0 {
			t.Errorf("check %s found %d problems: %+v", c.Name, c.Count, c.Problems)
		}
	}
	ps := problems(r, CheckCrossing)
	if len(ps) != 1 || r.Verdict != Fail {
		t.Fatalf("boundary_crossing %+v, verdict %s", ps, r.Verdict)
	}
	p := ps[0]
	if !(near(p.X, 1, 1e-15) && near(p.Y, 0.5, 1e-15) || near(p.X, 0.5, 1e-15) && near(p.Y, 1, 1e-15)) {
		t.Errorf("crossing at (%g, %g), want (1, 0.5) or (0.5, 1): %s", p.X, p.Y, p.Message)
	}
	if r.CellStatus[p.Cell] != Fail {
		t.Errorf("cell %d named but not failed", p.Cell)
	}
	// Moved clear of each other, the two patches are two separate, valid
	// regions.
	for k := 4; k < 8; k++ {
		nodes[k][0] += 1
	}
	r = evaluate(t, build(t, nodes, cells, true))
	if ps := problems(r, CheckCrossing); len(ps) != 0 {
		t.Errorf("separate patches: %+v", ps)
	}
}

// A 2 × 2 patch of unit squares laid wholly inside a 4 × 4 grid, with
// nodes of its own: every cell is positive and every boundary closed and
// tagged, and no boundary crosses another, yet the patch's ground is
// covered twice. Just beyond each of the patch's 8 boundary faces lies a
// cell of the grid (winding number 1 there, hand geometry), so overlap
// names the 8 faces and their patch cells; the grid's own boundary is
// clean.
func TestPatchInsideGrid(t *testing.T) {
	nodes := gridNodes(4, 4, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0)
	cells := quadCells(4, 4, false)
	base := int32(len(nodes))
	nodes = append(nodes, gridNodes(2, 2, orb.Point{1.3, 1.3}, orb.Point{1, 0}, orb.Point{0, 1}, 0)...)
	for _, c := range quadCells(2, 2, false) {
		cells = append(cells, []int32{c[0] + base, c[1] + base, c[2] + base, c[3] + base})
	}
	r := evaluate(t, build(t, nodes, cells, true))
	if ps := problems(r, CheckCrossing); len(ps) != 0 {
		t.Fatalf("boundary_crossing %+v: the test wants boundaries that do not cross", ps)
	}
	ps := problems(r, CheckOverlap)
	if len(ps) != 8 || r.Verdict != Fail {
		t.Fatalf("overlap %d problems, verdict %s, want the patch's 8 boundary faces", len(ps), r.Verdict)
	}
	for _, p := range ps {
		if p.Cell < 16 || r.CellStatus[p.Cell] != Fail {
			t.Errorf("overlap names cell %d (status %s), want a failed patch cell: %s", p.Cell, r.CellStatus[p.Cell], p.Message)
		}
		if !strings.Contains(p.Message, "covered 1 more time(s)") {
			t.Errorf("message %q", p.Message)
		}
	}
	// Moved clear of the grid, the patch is a second, valid region.
	for k := base; k < int32(len(nodes)); k++ {
		nodes[k][0] += 10
	}
	if ps := problems(evaluate(t, build(t, nodes, cells, true)), CheckOverlap); len(ps) != 0 {
		t.Errorf("separate patch: %+v", ps)
	}
}

// A square [0, 2]² beside two squares to its right whose shared node is
// moved from (2, 1) into the big cell, to (1.5, 1): the boundary pinches
// at (2, 0) and (2, 2) and crosses nowhere, but the small cells reach
// into the big one. The ground beyond the big cell's right face and
// beyond the small cells' slanted faces is covered (hand geometry), so
// overlap names the big cell and both small ones.
func TestNodeMovedIntoNeighbour(t *testing.T) {
	nodes := []orb.Point{{0, 0}, {2, 0}, {2, 2}, {0, 2}, {4, 0}, {4, 1}, {4, 2}, {1.5, 1}}
	cells := [][]int32{{0, 1, 2, 3}, {1, 4, 5, 7}, {7, 5, 6, 2}}
	r := evaluate(t, build(t, nodes, cells, true))
	if ps := problems(r, CheckCrossing); len(ps) != 0 {
		t.Fatalf("boundary_crossing %+v", ps)
	}
	named := map[int]bool{}
	for _, p := range problems(r, CheckOverlap) {
		named[p.Cell] = true
	}
	if len(named) != 3 || r.Verdict != Fail {
		t.Errorf("overlap names cells %v, verdict %s; want 0, 1 and 2", named, r.Verdict)
	}
}

// A channel 4 × 2 of unit squares with a zero-thickness internal wall
// along y = 1 from x = 1 to x = 3, its middle node doubled so that the
// cells above and below it are not joined: the two sides of the wall are
// boundary faces on the same points run opposite ways, each with the
// other side's cell beyond it, covered once: no overlap. The doubled node
// is what duplicate_node reports, and the only finding.
func TestCrackIsNoOverlap(t *testing.T) {
	nodes := gridNodes(4, 2, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0)
	cells := quadCells(4, 2, false)
	// An upper copy of the wall's middle node (2, 1), node 7 of the
	// 5 × 3 grid; the end nodes (1, 1) and (3, 1) stay shared.
	nodes = append(nodes, orb.Point{2, 1})
	for _, c := range cells[5:7] { // the upper cells over x ∈ [1, 3]
		for k, v := range c {
			if v == 7 {
				c[k] = 15
			}
		}
	}
	r := evaluate(t, build(t, nodes, cells, true))
	for _, c := range r.Connectivity {
		if want := b2i(c.Name == CheckDuplicate); c.Count != want {
			t.Errorf("check %s found %d problems, want %d: %+v", c.Name, c.Count, want, c.Problems)
		}
	}
}
