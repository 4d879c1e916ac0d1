package mesh

import (
	"math"
	"reflect"
	"runtime"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// grid returns an nx × ny unit-square grid of quads with its four sides
// tagged south, east, north, west.
func grid(nx, ny int) Input {
	var in Input
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			in.Nodes = append(in.Nodes, orb.Point{float64(i) / float64(nx), float64(j) / float64(ny)})
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
	in.Tags = []string{"south", "east", "north", "west"}
	for i := 0; i < nx; i++ {
		in.Edges = append(in.Edges, TaggedEdge{id(i, 0), id(i+1, 0), 0}, TaggedEdge{id(i+1, ny), id(i, ny), 2})
	}
	for j := 0; j < ny; j++ {
		in.Edges = append(in.Edges, TaggedEdge{id(nx, j), id(nx, j+1), 1}, TaggedEdge{id(0, j+1), id(0, j), 3})
	}
	return in
}

func TestBuildGrid(t *testing.T) {
	m, err := Build(grid(3, 2))
	if err != nil {
		t.Fatal(err)
	}
	// Euler's formula for a planar grid: faces = nx(ny+1) + ny(nx+1).
	if m.NumCells() != 6 || m.NumFaces() != 3*3+2*4 || m.NumBoundary() != 10 {
		t.Fatalf("cells %d faces %d boundary %d", m.NumCells(), m.NumFaces(), m.NumBoundary())
	}
	for f := 0; f < m.NumFaces(); f++ {
		interior := f < m.NumInterior
		if interior != (m.Neighbour[f] >= 0) {
			t.Fatalf("face %d out of order", f)
		}
		if interior && m.Owner[f] >= m.Neighbour[f] {
			t.Fatalf("face %d owner %d not below neighbour %d", f, m.Owner[f], m.Neighbour[f])
		}
		// The normal points from the owner centroid towards the face.
		c := m.Geo.CellCentroid[m.Owner[f]]
		d := orb.Point{m.Geo.FaceMid[f][0] - c[0], m.Geo.FaceMid[f][1] - c[1]}
		if d[0]*m.Geo.FaceNormal[f][0]+d[1]*m.Geo.FaceNormal[f][1] <= 0 {
			t.Fatalf("face %d normal points into its owner", f)
		}
	}
	for ti, name := range m.Tags {
		lo, hi, _ := m.TagRange(name)
		want := map[string]int{"south": 3, "north": 3, "east": 2, "west": 2}[name]
		if hi-lo != want {
			t.Fatalf("tag %s has %d faces, want %d", name, hi-lo, want)
		}
		for f := lo; f < hi; f++ {
			if int(m.FaceTag[f]) != ti {
				t.Fatalf("face %d in %s range has tag %d", f, name, m.FaceTag[f])
			}
		}
	}
	if lo, hi := m.UntaggedRange(); lo != hi {
		t.Fatalf("%d untagged faces", hi-lo)
	}
	var sum float64
	for _, a := range m.Geo.CellArea {
		sum += a
	}
	if math.Abs(sum-1) > 1e-15 {
		t.Fatalf("area sum %v, want 1 (the unit square)", sum)
	}
}

func TestBuildRejectsThreeCellsOnAnEdge(t *testing.T) {
	in := Input{
		Nodes:     []orb.Point{{0, 0}, {1, 0}, {0, 1}, {0, -1}, {1, 1}},
		CellStart: []int32{0, 3, 6, 9},
		CellNodes: []int32{0, 1, 2, 1, 0, 3, 0, 1, 4},
	}
	_, err := Build(in)
	if err == nil || !strings.Contains(err.Error(), "nodes 0 and 1") {
		t.Fatalf("got %v", err)
	}
}

func TestBuildUntaggedAndBadTag(t *testing.T) {
	in := grid(2, 2)
	in.Edges = in.Edges[:2]
	m, err := Build(in)
	if err != nil {
		t.Fatal(err)
	}
	if lo, hi := m.UntaggedRange(); hi-lo != 6 {
		t.Fatalf("%d untagged faces, want 6", hi-lo)
	}
	in = grid(2, 2)
	in.Edges = append(in.Edges, TaggedEdge{A: 1, B: 4, Tag: 0})
	if _, err := Build(in); err == nil || !strings.Contains(err.Error(), "interior face") {
		t.Fatalf("got %v", err)
	}
}

func TestPolygonAreaCentroidFarFromOrigin(t *testing.T) {
	// A unit square shifted by 1e8: the shift by the first vertex keeps the
	// area exact (common practice; orb planar.Area does the same).
	nodes := []orb.Point{{1e8, 1e8}, {1e8 + 1, 1e8}, {1e8 + 1, 1e8 + 1}, {1e8, 1e8 + 1}}
	a, c := PolygonAreaCentroid(nodes, []int32{0, 1, 2, 3})
	if a != 1 || c != (orb.Point{1e8 + 0.5, 1e8 + 0.5}) {
		t.Fatalf("area %v centroid %v", a, c)
	}
}

// buildOn builds in with GOMAXPROCS set to procs.
func buildOn(procs int, in Input) (*Mesh, error) {
	old := runtime.GOMAXPROCS(procs)
	defer runtime.GOMAXPROCS(old)
	return Build(in)
}

// Build gives the same mesh, and the same first error, whether its loops
// run on one goroutine or several: on a 300 × 200 grid, large enough that
// cells, half-edges and nodes are all split into ranges, and with two
// cells of two nodes, or two edges of three cells, one early and one
// late, so that several ranges meet an error and the first must win.
func TestBuildSameOnAnyProcs(t *testing.T) {
	in := grid(300, 200)
	if len(in.CellNodes) < 4*minParallel || len(in.Nodes) < 2*minParallel || len(in.CellStart) < 2*minParallel {
		t.Fatalf("grid of %d half-edges, %d nodes is too small to be split", len(in.CellNodes), len(in.Nodes))
	}
	one, err := buildOn(1, in)
	if err != nil {
		t.Fatal(err)
	}
	for _, procs := range []int{2, 3, 4} {
		got, err := buildOn(procs, in)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, one) {
			t.Fatalf("GOMAXPROCS %d: another mesh", procs)
		}
	}
	bad := func(edit func(in *Input)) Input {
		b := grid(300, 200)
		edit(&b)
		return b
	}
	cases := map[string]Input{
		// Cells 10 and 59990 lose two nodes each: the error names cell 10,
		// which the first range meets.
		"short cells": bad(func(in *Input) {
			nodes, start := in.CellNodes, in.CellStart
			in.CellNodes, in.CellStart = nil, []int32{0}
			for c := range len(start) - 1 {
				cell := nodes[start[c]:start[c+1]]
				if c == 10 || c == 59990 {
					cell = cell[:2]
				}
				in.CellNodes = append(in.CellNodes, cell...)
				in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
			}
			in.Edges = nil
		}),
		// Two more triangles on interior edges near the end and the middle:
		// the error names the middle one, whose lower node comes first.
		"three cells on an edge": bad(func(in *Input) {
			n := int32(len(in.Nodes))
			in.Nodes = append(in.Nodes, orb.Point{2, 2})
			for _, c := range []int{len(in.CellStart) - 2 - 301, len(in.CellStart)/2 + 7} {
				a, b := in.CellNodes[in.CellStart[c]+1], in.CellNodes[in.CellStart[c]+2]
				in.CellNodes = append(in.CellNodes, b, a, n)
				in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
			}
		}),
	}
	for name, b := range cases {
		_, e1 := buildOn(1, b)
		if e1 == nil {
			t.Fatalf("%s: no error", name)
		}
		for _, procs := range []int{2, 4} {
			if _, e := buildOn(procs, b); e == nil || e.Error() != e1.Error() {
				t.Errorf("%s: GOMAXPROCS %d gave %v, one gave %v", name, procs, e, e1)
			}
		}
		t.Logf("%s: %v", name, e1)
	}
}

// TestBuildClockwiseCell: in a 3 × 1 strip of unit quads whose middle one
// is listed clockwise, the faces around that cell are set by the others:
// the shared faces are owned by the outer cells and run their way, and
// the middle cell's boundary faces run against its node order, so that
// every boundary normal points out of the strip and every node starts as
// many boundary faces as it ends (hand-worked).
func TestBuildClockwiseCell(t *testing.T) {
	in := grid(3, 1)
	cell := in.CellNodes[4:8]
	cell[1], cell[3] = cell[3], cell[1]
	m, err := Build(in)
	if err != nil {
		t.Fatal(err)
	}
	if m.Geo.CellArea[1] >= 0 || m.Geo.CellArea[0] <= 0 || m.Geo.CellArea[2] <= 0 {
		t.Fatalf("areas %v, want only cell 1 negative", m.Geo.CellArea)
	}
	for f := range m.NumInterior {
		if m.Owner[f] == 1 {
			t.Errorf("interior face %d (%v) is owned by the clockwise cell", f, m.FaceNodes[f])
		}
	}
	balance := map[int32]int{}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		fn, mid, n := m.FaceNodes[f], m.Geo.FaceMid[f], m.Geo.FaceNormal[f]
		balance[fn[0]]++
		balance[fn[1]]--
		if (mid[0]-0.5)*n[0]+(mid[1]-0.5)*n[1] <= 0 {
			t.Errorf("boundary face %d %v of cell %d: normal %v points into the strip", f, fn, m.Owner[f], n)
		}
	}
	for v, b := range balance {
		if b != 0 {
			t.Errorf("node %d starts %d more boundary faces than it ends", v, b)
		}
	}
}

// TestTurnRound: a grid listed clockwise throughout is turned round,
// cell by cell, to the grid Build makes of it counter-clockwise; a grid
// with one clockwise cell among three is left as it is, and one with one
// counter-clockwise cell among three is turned, so that the odd cell is
// the one of negative area.
func TestTurnRound(t *testing.T) {
	want, err := Build(grid(3, 2))
	if err != nil {
		t.Fatal(err)
	}
	in := grid(3, 2)
	for c := range len(in.CellStart) - 1 {
		q := in.CellNodes[in.CellStart[c]:in.CellStart[c+1]]
		q[1], q[3] = q[3], q[1]
	}
	if note := TurnRound(&in, "run clockwise"); note != "all 6 cells run clockwise as the file lists them; their node order is reversed" {
		t.Fatalf("note %q", note)
	}
	got, err := Build(in)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got.CellNodes, want.CellNodes) || !reflect.DeepEqual(got.FaceNodes, want.FaceNodes) {
		t.Errorf("turned round: cells %v faces %v; want %v, %v", got.CellNodes, got.FaceNodes, want.CellNodes, want.FaceNodes)
	}
	mixed := grid(3, 1)
	q := mixed.CellNodes[4:8]
	q[1], q[3] = q[3], q[1]
	before := append([]int32(nil), mixed.CellNodes...)
	if note := TurnRound(&mixed, "run clockwise"); note != "" || !reflect.DeepEqual(mixed.CellNodes, before) {
		t.Errorf("one clockwise cell of three: note %q, nodes %v; want none, %v", note, mixed.CellNodes, before)
	}
	for _, c := range []int{0, 2} {
		q := mixed.CellNodes[4*c : 4*c+4]
		q[1], q[3] = q[3], q[1]
	}
	q[1], q[3] = q[3], q[1]
	if note := TurnRound(&mixed, "run clockwise"); !strings.Contains(note, "2 of the 3 cells run clockwise as the file lists them, 1 the other way") {
		t.Errorf("two clockwise cells of three: note %q", note)
	}
	m, err := Build(mixed)
	if err != nil {
		t.Fatal(err)
	}
	for c, a := range m.Geo.CellArea {
		if (a < 0) != (c == 1) {
			t.Errorf("cell %d area %g after turning round; want only cell 1 negative", c, a)
		}
	}
}
