package cgns

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/mesh"
)

// deckCases are the test decks of our own: unstructured triangles, quads,
// triangles and quads mixed, quads with hexagons (NGON_n), two structured
// blocks joined with and without a reversing transform, an O-type block
// joined to itself side to side and a C-type block with a wake cut (part
// of one side joined to another part of it).
func deckCases(t *testing.T) []struct {
	name string
	deck *Deck
} {
	return []struct {
		name string
		deck *Deck
	}{
		{"tri", testDeck(triMesh(t, 8, 4))},
		{"quad", testDeck(quadMesh(t, 8, 4))},
		{"mixed", testDeck(mixedMesh(t, 8, 5))},
		{"poly", testDeck(polygonMesh(t, 8, 4))},
		{"twoblock", testDeck(splitRectangle(t, 8, 4, true))},
		{"twoblock-aligned", testDeck(splitRectangle(t, 8, 4, false))},
		{"ring", testDeck(ringMesh(t, 12, 3))},
		{"cgrid", testDeck(cgridMesh(t, 6, 3, 2))},
		{"cgrid-names", renamed(testDeck(cgridMesh(t, 6, 3, 2)), "farfield", "outlet_2")},
	}
}

// renamed renames a tag of the deck (mesh and BC), here to make the
// structured writer's BC names collide: the C-grid's outlet has two runs,
// "outlet" and the next free name, which must skip a tag named "outlet_2".
func renamed(d *Deck, from, to string) *Deck {
	for i, tag := range d.Mesh.Tags {
		if tag == from {
			d.Mesh.Tags[i] = to
		}
	}
	for i := range d.BCs {
		if d.BCs[i].Tag == from {
			d.BCs[i].Tag = to
		}
	}
	return d
}

// TestWriteChecked: every file passes the CGNS library's own checker with
// no error and no warning, and HDF5's h5dump reads all of it.
func TestWriteChecked(t *testing.T) {
	dir := t.TempDir()
	for _, c := range deckCases(t) {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(dir, c.name+".cgns")
			if _, err := Write(path, c.deck); err != nil {
				t.Fatal(err)
			}
			if fi, err := os.Stat(path); err != nil || fi.Mode().Perm() != 0o644 {
				t.Errorf("written file: %v, mode %v; want mode 0644", err, fi.Mode())
			}
			cgnscheck(t, path)
			out := h5dump(t, path)
			// The CGNS/HDF5 mapping stores every node as an HDF5 group
			// named after it (CGNS standard, HDF5 file mapping).
			for _, g := range []string{`GROUP "CGNSLibraryVersion"`, `GROUP "TestDeck"`, `GROUP "FlowEquationSet"`, `GROUP "ReferenceState"`, `GROUP "ZoneBC"`, `GROUP "CellQuality"`, `GROUP "wall"`} {
				if !strings.Contains(out, g) {
					t.Errorf("h5dump of %s has no %s", c.name, g)
				}
			}
		})
	}
}

// TestFieldsInFlowSolution: the FlowSolution variant is read by cgnscheck
// with no error; its only warnings are the checker's advisory about
// non-SIDS field names (the reason DiscreteData_t is the default).
func TestFieldsInFlowSolution(t *testing.T) {
	d := testDeck(quadMesh(t, 4, 2))
	d.FieldsInFlowSolution = true
	path := filepath.Join(t.TempDir(), "sol.cgns")
	if _, err := Write(path, d); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(tool(t, "cgnscheck"), "-v", path).CombinedOutput()
	if err != nil {
		t.Fatalf("cgnscheck: %v\n%s", err, out)
	}
	text := string(out)
	if !strings.Contains(text, `checking solution "CellQuality"`) || !strings.Contains(text, "Grid Location=CellCenter") {
		t.Fatalf("cgnscheck sees no CellCenter FlowSolution:\n%s", text)
	}
	for _, line := range strings.Split(text, "\n") {
		if strings.HasPrefix(line, "ERROR") || strings.HasPrefix(line, "WARNING") && !strings.Contains(line, "not a CGNS data-name identifier") {
			t.Fatalf("unexpected finding %q:\n%s", line, text)
		}
	}
}

// TestContentHash: writing the same deck twice gives the same hash and
// files the CGNS library's cgnsdiff finds equal in content, although HDF5
// time stamps may make the bytes differ; changing one coordinate changes
// the hash.
func TestContentHash(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a.cgns"), filepath.Join(dir, "b.cgns")
	d := testDeck(mixedMesh(t, 6, 3))
	ha, err := Write(a, d)
	if err != nil {
		t.Fatal(err)
	}
	hb, err := Write(b, d)
	if err != nil {
		t.Fatal(err)
	}
	if ha != hb || len(ha) != 64 {
		t.Fatalf("hashes of the same deck differ or are malformed: %s vs %s", ha, hb)
	}
	out, err := exec.Command(tool(t, "cgnsdiff"), "-d", a, b).CombinedOutput()
	if err != nil || len(strings.TrimSpace(string(out))) != 0 {
		t.Fatalf("cgnsdiff -d of two writes of one deck: %v\n%s", err, out)
	}
	d.Mesh.Nodes[3][1] += 1e-12
	hc, err := Write(b, d)
	if err != nil {
		t.Fatal(err)
	}
	if hc == ha {
		t.Fatal("moving a node did not change the content hash")
	}
	if out, _ := exec.Command(tool(t, "cgnsdiff"), "-d", a, b).CombinedOutput(); len(strings.TrimSpace(string(out))) == 0 {
		t.Fatal("cgnsdiff finds no difference after moving a node; the comparison cannot fail")
	}
}

// TestWriteRejects: bad decks get an error naming the problem, and no file
// is left behind.
func TestWriteRejects(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name string
		edit func(d *Deck)
		want string
	}{
		{"unknown BCType", func(d *Deck) { d.BCs[0].BCType = "BCSlipperyWall" }, `"BCSlipperyWall" is not a CGNS BCType`},
		{"tag without BC", func(d *Deck) { d.BCs = d.BCs[1:] }, `boundary tag "wall" has no boundary condition`},
		{"BC of unknown tag", func(d *Deck) { d.BCs = append(d.BCs, BC{Tag: "inlet", BCType: "BCInflow"}) }, `tag "inlet" is not a boundary tag`},
		{"short field", func(d *Deck) { d.CellFields[0].Values = d.CellFields[0].Values[1:] }, `cell field "CellArea" has 31 values; the mesh has 32 cells`},
		{"long name", func(d *Deck) { d.Name = strings.Repeat("x", 33) }, "at most 32"},
		{"gamma", func(d *Deck) { d.Flow.Gamma = 1 }, "Gamma is 1"},
		{"no mesh", func(d *Deck) { d.Mesh = nil }, "deck has no mesh"},
		{"field named like a node", func(d *Deck) { d.CellFields[1].Name = "GridLocation" }, `name "GridLocation" is a standard child`},
		{"null BCType", func(d *Deck) { d.BCs[1].BCType = "Null" }, `"Null" is not a CGNS BCType`},
		{"tag named like a node", func(d *Deck) { d.Mesh.Tags[0] = "ZoneBC"; d.BCs[0].Tag = "ZoneBC" }, `boundary tag "ZoneBC" is also the name of a standard CGNS node`},
		{"BC value of no SIDS name", func(d *Deck) { d.BCData = []BCData{{Tag: "wall", Values: []BCValue{{"WallTemperature", 300}}}} }, `value "WallTemperature" is not a BC data-name identifier`},
		{"BC value twice", func(d *Deck) {
			d.BCData = []BCData{{Tag: "outlet", Values: []BCValue{{"Pressure", 1e5}, {"Pressure", 2e5}}}}
		}, `value "Pressure" is given twice`},
		{"negative back pressure", func(d *Deck) { d.BCData = []BCData{{Tag: "outlet", Values: []BCValue{{"Pressure", -1}}}} }, `BC data of tag "outlet": value Pressure is -1; it must be positive`},
		{"infinite wall temperature", func(d *Deck) {
			d.BCData = []BCData{{Tag: "wall", Values: []BCValue{{"Temperature", math.Inf(1)}}}}
		}, "value Temperature is +Inf; it must be a finite number"},
		{"direction not a unit vector", func(d *Deck) {
			d.BCData = []BCData{{Tag: "farfield", Values: []BCValue{{"VelocityUnitVectorX", 1}, {"VelocityUnitVectorY", 1}}}}
		}, "flow direction (1, 1) has length 1.41421"},
		{"half a direction", func(d *Deck) { d.BCData = []BCData{{Tag: "farfield", Values: []BCValue{{"VelocityUnitVectorX", 1}}}} }, "needs both VelocityUnitVectorX and VelocityUnitVectorY"},
		{"BC values of a tag without BC", func(d *Deck) { d.BCData = []BCData{{Tag: "inlet", Values: []BCValue{{"Pressure", 1e5}}}} }, `tag "inlet" has no BC to carry its values`},
		{"BC values twice for a tag", func(d *Deck) {
			d.BCData = []BCData{{Tag: "outlet", Values: []BCValue{{"Pressure", 1e5}}}, {Tag: "outlet"}}
		}, `tag "outlet" has values twice`},
		{"turbulent inviscid flow", func(d *Deck) { d.Flow.Viscous, d.Flow.Turbulent = false, true }, "NSTurbulent needs Viscous"},
		{"equations only with a free stream", func(d *Deck) { d.Flow.EquationsOnly = true }, "Mach is 0.5, but EquationsOnly writes no ReferenceState"},
		{"equations only, viscous, no law", func(d *Deck) {
			d.Flow = &FlowState{EquationsOnly: true, Gamma: 1.4, GasConstant: 287.05, Viscous: true}
		}, "a viscous flow without a reference state needs Sutherland constants"},
	}
	for _, c := range cases {
		d := testDeck(quadMesh(t, 8, 4))
		c.edit(d)
		path := filepath.Join(dir, "bad.cgns")
		_, err := Write(path, d)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got error %v, want one containing %q", c.name, err, c.want)
		}
	}
	blockCases := []struct {
		name string
		edit func(m *mesh.Mesh)
		want string
	}{
		{"cell in no block", func(m *mesh.Mesh) { m.Blocks[1].FirstCell = 0 }, "mesh cell 0 is in block 0 (block1) and in block 1 (block2)"},
		{"wrong corners", func(m *mesh.Mesh) {
			m.Blocks[0].Node[0], m.Blocks[0].Node[1] = m.Blocks[0].Node[1], m.Blocks[0].Node[0]
		}, "does not have the block's corner node"},
		{"short node map", func(m *mesh.Mesh) { m.Blocks[1].Node = m.Blocks[1].Node[1:] }, "block 1 (block2) maps 14 nodes; 3×5 needs 15"},
	}
	for _, c := range blockCases {
		d := testDeck(splitRectangle(t, 4, 4, false))
		c.edit(d.Mesh)
		_, err := Write(filepath.Join(dir, "bad.cgns"), d)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got error %v, want one containing %q", c.name, err, c.want)
		}
	}
	if left, _ := os.ReadDir(dir); len(left) != 0 {
		t.Errorf("rejected writes left files: %v", left)
	}
}

// TestBCTypeNames: every BCType_t name of the library's table is accepted
// (SIDS 9.7 lists them), the user-defined one under both of its names.
func TestBCTypeNames(t *testing.T) {
	for _, name := range []string{"BCWall", "BCFarfield", "BCSymmetryPlane", "BCInflowSupersonic", "BCOutflowSubsonic", "BCWallViscousIsothermal", "BCExtrapolate", "UserDefined", "BCTypeUserDefined"} {
		if _, err := bcTypeByName(name); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	d := testDeck(quadMesh(t, 4, 2))
	d.BCs[0].BCType = "BCTypeUserDefined"
	path := filepath.Join(t.TempDir(), "ud.cgns")
	if _, err := Write(path, d); err != nil {
		t.Fatal(err)
	}
	cgnscheck(t, path)
	rd, err := ReadDeck(path)
	if err != nil {
		t.Fatal(err)
	}
	if rd.BCs[0] != (BC{Tag: "wall", BCType: "UserDefined"}) {
		t.Errorf("read %v, want wall UserDefined", rd.BCs[0])
	}
}
