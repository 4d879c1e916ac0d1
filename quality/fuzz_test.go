package quality

import (
	"bytes"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// fuzzScales are the sizes a fuzzed mesh is drawn at: the node grid's
// spacing in metres, from spacings whose squares underflow to ones beyond
// MaxCoordinate, and one just within it.
var fuzzScales = []float64{1, 1e-3, 1e3, 1e-160, 1e160, 1e-300, 1e300, 1e85}

// fuzzMesh decodes data into a small mesh that mesh.Build accepts, or nil:
// byte 0 gives the node count, byte 1 the scale, byte 2 which boundary
// edges are tagged; then two bytes a node (its grid position, so that
// nodes coincide and line up often), then cells as a size byte followed by
// node bytes.
func fuzzMesh(data []byte) *mesh.Mesh {
	if len(data) < 3 {
		return nil
	}
	nn := 3 + int(data[0]%14)
	scale := fuzzScales[int(data[1])%len(fuzzScales)]
	tagging := data[2]
	data = data[3:]
	if len(data) < 2*nn {
		return nil
	}
	in := mesh.Input{CellStart: []int32{0}, Tags: []string{"a", "b"}}
	for v := range nn {
		in.Nodes = append(in.Nodes, orb.Point{float64(int8(data[2*v])) / 8 * scale, float64(int8(data[2*v+1])) / 8 * scale})
	}
	data = data[2*nn:]
	for len(data) > 0 && len(in.CellStart) <= 12 {
		size := 3 + int(data[0]%4)
		if len(data) < 1+size {
			break
		}
		for _, b := range data[1 : 1+size] {
			in.CellNodes = append(in.CellNodes, int32(int(b)%nn))
		}
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		data = data[1+size:]
	}
	if len(in.CellStart) == 1 {
		return nil
	}
	// Tag boundary edges by the bits of tagging: an edge used once, in
	// the cells' order, takes tag a, tag b or none.
	var cells [][]int32
	for c := 0; c+1 < len(in.CellStart); c++ {
		cells = append(cells, in.CellNodes[in.CellStart[c]:in.CellStart[c+1]])
	}
	bit := 0
	for _, e := range boundaryEdges(cells) {
		if e.A == e.B {
			continue
		}
		switch (tagging >> (bit % 8)) & 3 {
		case 1:
			in.Edges = append(in.Edges, mesh.TaggedEdge{A: e.A, B: e.B, Tag: 0})
		case 2:
			in.Edges = append(in.Edges, mesh.TaggedEdge{A: e.A, B: e.B, Tag: 1})
		}
		bit += 2
	}
	m, err := mesh.Build(in)
	if err != nil {
		return nil
	}
	return m
}

// fuzzReused is one Evaluator kept from one fuzzed mesh to the next.
var fuzzReused Evaluator

// FuzzEvaluate checks meshes of every kind of defect, at scales from
// underflow to overflow: Evaluate refuses a mesh with a node beyond
// MaxCoordinate, saying so, and never panics or errs on another mesh that
// mesh.Build made; a reused Evaluator and one without fields give the
// same report as a fresh one; the text report can be written; the counts
// add up; every cell of non-positive area fails (the issue's "inverted and
// zero-area cells flagged"); and boundary_tag counts exactly the untagged
// boundary faces.
func FuzzEvaluate(f *testing.F) {
	// Seeds: the unit square as two triangles at 1 m, one triangle at
	// 1e3 m, and two small meshes beyond MaxCoordinate (1e160 and 1e300 m).
	f.Add([]byte{1, 0, 0x55, 0, 0, 8, 0, 8, 8, 0, 8, 0, 0, 1, 2, 0, 2, 3, 0})
	f.Add([]byte{5, 2, 0x99, 0, 0, 8, 0, 8, 8, 0, 8, 16, 0, 16, 8, 0, 1, 2, 3, 4, 1, 2, 7, 6, 1, 3, 5, 4})
	f.Add([]byte{1, 4, 0xff, 0, 0, 8, 8, 8, 0, 0, 8, 1, 0, 1, 2, 3})
	f.Add([]byte{4, 6, 0x12, 0, 0, 8, 0, 8, 8, 0, 8, 8, 0, 0, 0, 1, 2, 0, 2, 3, 0, 4, 6, 0, 1, 3, 2})
	f.Fuzz(func(t *testing.T, data []byte) {
		m := fuzzMesh(data)
		if m == nil {
			return
		}
		lim := everyday(t)
		fresh, err := Evaluate(m, lim)
		far := slices.ContainsFunc(m.Nodes, func(p orb.Point) bool {
			return math.Abs(p[0]) > MaxCoordinate || math.Abs(p[1]) > MaxCoordinate
		})
		switch {
		case far && (err == nil || !strings.Contains(err.Error(), "the checks take coordinates up to")):
			t.Fatalf("a node beyond MaxCoordinate: Evaluate gave %v", err)
		case far:
			return
		case err != nil:
			t.Fatalf("Evaluate of a built mesh: %v", err)
		}
		reused, err := fuzzReused.Evaluate(m, lim)
		if err != nil {
			t.Fatal(err)
		}
		sameReport(t, "from a reused Evaluator and a fresh one", reused, fresh)
		bare, err := (&Evaluator{NoFields: true}).Evaluate(m, lim)
		if err != nil {
			t.Fatal(err)
		}
		bare.CellFields, bare.FaceFields, bare.NodeFields = fresh.CellFields, fresh.FaceFields, fresh.NodeFields
		sameReport(t, "without fields and with", bare, fresh)
		var text bytes.Buffer
		if err := WriteText(&text, fresh); err != nil {
			t.Fatal(err)
		}

		r := fresh
		if r.FailedCells+r.WarnedCells > r.Cells || len(r.CellStatus) != r.Cells {
			t.Errorf("%d failed and %d warned of %d cells, %d statuses", r.FailedCells, r.WarnedCells, r.Cells, len(r.CellStatus))
		}
		for _, s := range r.Metrics {
			most := r.Cells
			if s.Per == "node" {
				most = r.Nodes
			}
			if s.Failed+s.Warned > s.Count || s.Count > most {
				t.Errorf("%s: %d failed, %d warned, %d counted, at most %d", s.Name, s.Failed, s.Warned, s.Count, most)
			}
		}
		for c, a := range m.Geo.CellArea {
			if !(a > 0) && r.CellStatus[c] != Fail {
				t.Errorf("cell %d of area %g has status %s", c, a, r.CellStatus[c])
			}
			if r.CellStatus[c] > r.Verdict {
				t.Errorf("cell %d is %s, the verdict %s", c, r.CellStatus[c], r.Verdict)
			}
		}
		untagged := 0
		for fc := m.NumInterior; fc < m.NumFaces(); fc++ {
			if m.FaceTag[fc] < 0 {
				untagged++
			}
		}
		for _, c := range r.Connectivity {
			if c.Name == CheckBoundaryTag && c.Count != untagged {
				t.Errorf("boundary_tag counts %d faces, %d boundary faces are untagged", c.Count, untagged)
			}
		}
	})
}
