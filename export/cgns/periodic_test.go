package cgns

import (
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// squareMesh is the unit square on an n × n grid of quadrilaterals (or of
// triangles, each square cut along its diagonal), interior nodes slightly
// moved, tagged bottom, right, top and left.
func squareMesh(tb testing.TB, n int, tri bool) *mesh.Mesh {
	tb.Helper()
	id := func(i, j int) int32 { return int32(j*(n+1) + i) }
	var nodes []orb.Point
	for j := 0; j <= n; j++ {
		for i := 0; i <= n; i++ {
			x, y := float64(i)/float64(n), float64(j)/float64(n)
			if i > 0 && i < n && j > 0 && j < n {
				x += 0.1 / float64(n) * math.Sin(float64(3*i+7*j))
				y += 0.1 / float64(n) * math.Cos(float64(5*i+2*j))
			}
			nodes = append(nodes, orb.Point{x, y})
		}
	}
	start := []int32{0}
	var cn []int32
	add := func(v ...int32) {
		cn = append(cn, v...)
		start = append(start, int32(len(cn)))
	}
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			a, b, c, d := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			if tri {
				add(a, b, c)
				add(a, c, d)
			} else {
				add(a, b, c, d)
			}
		}
	}
	var e []mesh.TaggedEdge
	for k := 0; k < n; k++ {
		e = append(e,
			mesh.TaggedEdge{A: id(k, 0), B: id(k+1, 0), Tag: 0},
			mesh.TaggedEdge{A: id(n, k), B: id(n, k+1), Tag: 1},
			mesh.TaggedEdge{A: id(k, n), B: id(k+1, n), Tag: 2},
			mesh.TaggedEdge{A: id(0, k), B: id(0, k+1), Tag: 3})
	}
	m, err := mesh.Build(mesh.Input{Nodes: nodes, CellStart: start, CellNodes: cn, Tags: []string{"bottom", "right", "top", "left"}, Edges: e})
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// pairFaces pairs the faces of tag a with those of tag b whose end nodes
// are a's moved by t, exactly (the test meshes' boundary nodes are exact
// multiples of the spacing), in a's face order: an independent brute-force
// pairing of our own, so the writer's checks are not used to make their
// own input.
func pairFaces(tb testing.TB, m *mesh.Mesh, a, b string, t [2]float64) [][2]int32 {
	tb.Helper()
	alo, ahi, _ := m.TagRange(a)
	blo, bhi, _ := m.TagRange(b)
	var pairs [][2]int32
	for f := alo; f < ahi; f++ {
		fa := m.FaceNodes[f]
		p0 := orb.Point{m.Nodes[fa[0]][0] + t[0], m.Nodes[fa[0]][1] + t[1]}
		p1 := orb.Point{m.Nodes[fa[1]][0] + t[0], m.Nodes[fa[1]][1] + t[1]}
		found := false
		for g := blo; g < bhi; g++ {
			q0, q1 := m.Nodes[m.FaceNodes[g][0]], m.Nodes[m.FaceNodes[g][1]]
			if math.Abs(p0.X()-q1.X())+math.Abs(p0.Y()-q1.Y())+math.Abs(p1.X()-q0.X())+math.Abs(p1.Y()-q0.Y()) < 1e-12 ||
				math.Abs(p0.X()-q0.X())+math.Abs(p0.Y()-q0.Y())+math.Abs(p1.X()-q1.X())+math.Abs(p1.Y()-q1.Y()) < 1e-12 {
				pairs = append(pairs, [2]int32{int32(f), int32(g)})
				found = true
				break
			}
		}
		if !found {
			tb.Fatalf("face %d of %s has no partner in %s", f, a, b)
		}
	}
	return pairs
}

// periodicDeck is a test deck whose tags a and b are a periodic pair by
// translation t; the other tags of the mesh get walls.
func periodicDeck(tb testing.TB, m *mesh.Mesh, a, b string, t [2]float64) *Deck {
	d := testDeck(m)
	d.BCs = nil
	for _, tag := range m.Tags {
		if tag != a && tag != b {
			d.BCs = append(d.BCs, BC{Tag: tag, BCType: "BCWall"})
		}
	}
	d.Periodic = []Periodic{{A: a, B: b, Translation: t, Pairs: pairFaces(tb, m, a, b, t)}}
	return d
}

// channelMesh is the channel [0, 2] × [0, 1] on an nx × ny grid (the
// rectangle of gridNodes) as two structured blocks, split at x = 1
// (split 'x', the second block's indices reversed if reverse) or at
// y = 1/2 (split 'y'), tagged bottom, right, top, left. With partial, the
// last two edges of bottom and top are tagged "wall" instead, so the
// periodic tags cover part of a block side only.
func channelMesh(tb testing.TB, nx, ny int, split byte, reverse, partial bool) *mesh.Mesh {
	tb.Helper()
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	type box struct{ i0, j0, ni, nj int }
	boxes := []box{{0, 0, nx/2 + 1, ny + 1}, {nx / 2, 0, nx/2 + 1, ny + 1}}
	if split == 'y' {
		boxes = []box{{0, 0, nx + 1, ny/2 + 1}, {0, ny / 2, nx + 1, ny/2 + 1}}
	}
	var blocks []mesh.Block
	start := []int32{0}
	var cn []int32
	for b, bx := range boxes {
		gi := func(i, j int) int32 {
			if b == 1 && reverse {
				return id(bx.i0+bx.ni-1-i, bx.j0+bx.nj-1-j)
			}
			return id(bx.i0+i, bx.j0+j)
		}
		blk := mesh.Block{Name: fmt.Sprintf("block%d", b+1), NI: bx.ni, NJ: bx.nj, Node: make([]int32, bx.ni*bx.nj), FirstCell: int32(len(start) - 1)}
		for j := 0; j < bx.nj; j++ {
			for i := 0; i < bx.ni; i++ {
				blk.Node[j*bx.ni+i] = gi(i, j)
			}
		}
		for j := 0; j+1 < bx.nj; j++ {
			for i := 0; i+1 < bx.ni; i++ {
				cn = append(cn, gi(i, j), gi(i+1, j), gi(i+1, j+1), gi(i, j+1))
				start = append(start, int32(len(cn)))
			}
		}
		blocks = append(blocks, blk)
	}
	var e []mesh.TaggedEdge
	for i := 0; i < nx; i++ {
		bottom, top := int16(0), int16(2)
		if partial && i >= nx-2 {
			bottom, top = 4, 4
		}
		e = append(e, mesh.TaggedEdge{A: id(i, 0), B: id(i+1, 0), Tag: bottom}, mesh.TaggedEdge{A: id(i, ny), B: id(i+1, ny), Tag: top})
	}
	for j := 0; j < ny; j++ {
		e = append(e, mesh.TaggedEdge{A: id(nx, j), B: id(nx, j+1), Tag: 1}, mesh.TaggedEdge{A: id(0, j), B: id(0, j+1), Tag: 3})
	}
	tags := []string{"bottom", "right", "top", "left"}
	if partial {
		tags = append(tags, "wall")
	}
	m, err := mesh.Build(mesh.Input{Nodes: gridNodes(nx, ny), CellStart: start, CellNodes: cn, Tags: tags, Edges: e, Blocks: blocks})
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// translations reads every Periodic_t Translation of the file with the
// HDF5 library's h5dump (Debian hdf5-tools), by the CGNS/HDF5 mapping
// (each node a group, its values the dataset " data"), in dump order.
func translations(t *testing.T, path string) []string {
	t.Helper()
	text := h5dump(t, path)
	re := regexp.MustCompile(`GROUP "Translation" \{(?s:.*?)DATASET " data" \{(?s:.*?)DATA \{\s*\(0\): ([^\n]*)`)
	var got []string
	for _, m := range re.FindAllStringSubmatch(text, -1) {
		got = append(got, strings.TrimSpace(m[1]))
	}
	return got
}

// checkPeriodicFile runs the standard's checker and h5dump on a written
// periodic deck and reads it back through the library: no error and no
// warning, the checker walks the periodic property, h5dump finds the
// translation and its negative (SIDS: an interface is written from both
// sides, each with the transformation to its donor), and the pairs, BCs
// and mesh come back as written.
func checkPeriodicFile(t *testing.T, path string, d *Deck) *Deck {
	t.Helper()
	report := cgnscheck(t, path)
	if n := strings.Count(report, "checking periodic property"); n < 2 {
		t.Errorf("cgnscheck checked %d periodic properties, want at least 2:\n%s", n, report)
	}
	p := d.Periodic[0]
	want := map[string]bool{fmt.Sprintf("%g, %g", p.Translation[0], p.Translation[1]): true, fmt.Sprintf("%g, %g", 0-p.Translation[0], 0-p.Translation[1]): true}
	got := translations(t, path)
	if len(got) < 2 {
		t.Fatalf("h5dump shows translations %q; want both directions", got)
	}
	for _, g := range got {
		if !want[g] {
			t.Errorf("h5dump shows translation %q; want one of %v", g, want)
		}
	}
	rd, err := ReadDeck(path)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(rd.BCs, d.BCs) {
		t.Errorf("read BCs %v, wrote %v", rd.BCs, d.BCs)
	}
	if len(rd.Periodic) != 1 {
		t.Fatalf("read %d periodic pairs, wrote 1: %+v", len(rd.Periodic), rd.Periodic)
	}
	r := rd.Periodic[0]
	if r.A != p.A || r.B != p.B || r.Translation != p.Translation || !slices.Equal(r.Pairs, p.Pairs) {
		t.Errorf("read periodic %s→%s %v pairs %v; wrote %s→%s %v pairs %v", r.A, r.B, r.Translation, r.Pairs, p.A, p.B, p.Translation, p.Pairs)
	}
	sameCounts(t, rd.Mesh, d.Mesh)
	return rd
}

// TestPeriodicUnstructured: the unit square as quadrilaterals and as
// triangles, bottom and top paired by the translation (0, 1) (and, the
// other way round, top and bottom by (0, −1)), written as Abutting1to1
// GridConnectivity_t with Periodic_t.
func TestPeriodicUnstructured(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name string
		m    *mesh.Mesh
		a, b string
		t    [2]float64
	}{
		{"quad", squareMesh(t, 4, false), "bottom", "top", [2]float64{0, 1}},
		{"tri", squareMesh(t, 5, true), "bottom", "top", [2]float64{0, 1}},
		{"quad-down", squareMesh(t, 3, false), "top", "bottom", [2]float64{0, -1}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := periodicDeck(t, c.m, c.a, c.b, c.t)
			path := filepath.Join(dir, c.name+".cgns")
			if _, err := Write(path, d); err != nil {
				t.Fatal(err)
			}
			rd := checkPeriodicFile(t, path, d)
			sameUnstructured(t, rd.Mesh, d.Mesh)
		})
	}
}

// TestPeriodicStructured: a two-block channel with bottom and top paired
// by (0, 1), split across the flow (each block joined to itself, the
// second with reversed indices) and along it (the lower block's bottom
// joined to the upper block's top), written as 1-to-1 periodic joins.
func TestPeriodicStructured(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name    string
		split   byte
		reverse bool
	}{{"across", 'x', false}, {"across-reversed", 'x', true}, {"along", 'y', false}} {
		t.Run(c.name, func(t *testing.T) {
			m := channelMesh(t, 8, 4, c.split, c.reverse, false)
			d := periodicDeck(t, m, "bottom", "top", [2]float64{0, 1})
			path := filepath.Join(dir, c.name+".cgns")
			if _, err := Write(path, d); err != nil {
				t.Fatal(err)
			}
			rd := checkPeriodicFile(t, path, d)
			sameBlocks(t, rd.Mesh, d.Mesh)
			// The periodic joins are not block interfaces: only the
			// split is.
			if len(rd.Mesh.Interfaces) != 1 {
				t.Errorf("read interfaces %+v; want only the split", rd.Mesh.Interfaces)
			}
		})
	}
}

// TestPeriodicHash: two writes of a periodic deck give one content hash
// and files cgnsdiff finds equal; a translation changed by 1e-6 (still
// above single precision) changes the hash.
func TestPeriodicHash(t *testing.T) {
	dir := t.TempDir()
	d := periodicDeck(t, squareMesh(t, 4, true), "bottom", "top", [2]float64{0, 1})
	a, b := filepath.Join(dir, "a.cgns"), filepath.Join(dir, "b.cgns")
	ha, err := Write(a, d)
	if err != nil {
		t.Fatal(err)
	}
	hb, err := Write(b, d)
	if err != nil {
		t.Fatal(err)
	}
	if ha != hb {
		t.Fatalf("two writes of one periodic deck hash %s and %s", ha, hb)
	}
	if out, err := exec.Command(tool(t, "cgnsdiff"), "-d", a, b).CombinedOutput(); err != nil || len(strings.TrimSpace(string(out))) != 0 {
		t.Fatalf("cgnsdiff -d of two writes: %v\n%s", err, out)
	}
	d.Periodic[0].Translation[1] = 1 + 1e-6
	hc, err := Write(b, d)
	if err != nil {
		t.Fatal(err)
	}
	if hc == ha {
		t.Error("changing the translation did not change the content hash")
	}
}

// TestPeriodicRejects: bad periodic input gets an error naming the pair,
// tag, pair index or face, and no file is left behind.
func TestPeriodicRejects(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name string
		edit func(d *Deck)
		want string
	}{
		{"unknown tag", func(d *Deck) { d.Periodic[0].B = "inlet" }, `tag "inlet" is not a boundary tag of the mesh`},
		{"unequal length", func(d *Deck) { d.Periodic[0].Pairs = d.Periodic[0].Pairs[1:] }, `has 3 face pairs; tag "bottom" has 4 faces and tag "top" has 4`},
		{"face out of range", func(d *Deck) { d.Periodic[0].Pairs[2][1] = 9999 }, `pair 2: face 9999 is not a face of tag "top", whose faces are`},
		{"negative face", func(d *Deck) { d.Periodic[0].Pairs[0][0] = -1 }, `pair 0: face -1 is not a face of tag "bottom"`},
		{"face twice", func(d *Deck) { d.Periodic[0].Pairs[1][1] = d.Periodic[0].Pairs[0][1] }, `pair 1: face`},
		{"pairs out of step", func(d *Deck) {
			p := d.Periodic[0].Pairs
			p[0][1], p[1][1] = p[1][1], p[0][1]
		}, "the pairs do not match this mesh"},
		{"tag without faces", func(d *Deck) {
			d.Mesh.Tags = append(d.Mesh.Tags, "spare")
			d.Mesh.TagStart = append(d.Mesh.TagStart, d.Mesh.TagStart[len(d.Mesh.TagStart)-1])
			d.Periodic = append(d.Periodic, Periodic{A: "left", B: "spare", Translation: [2]float64{1, 0}})
			d.BCs = []BC{{Tag: "right", BCType: "BCWall"}}
		}, `tag "left" has 4 faces and tag "spare" has 0`},
		{"tag with itself", func(d *Deck) { d.Periodic[0].B = "bottom" }, "pairs a tag with itself"},
		{"zero translation", func(d *Deck) { d.Periodic[0].Translation = [2]float64{} }, "translation (0, 0) must be finite and not zero"},
		{"NaN translation", func(d *Deck) { d.Periodic[0].Translation[0] = math.NaN() }, "must be finite"},
		{"periodic tag with a BC", func(d *Deck) { d.BCs = append(d.BCs, BC{Tag: "top", BCType: "BCWall"}) }, `tag "top" also has a boundary condition`},
		{"tag in two pairs", func(d *Deck) {
			d.Periodic = append(d.Periodic, Periodic{A: "left", B: "top", Translation: [2]float64{1, 0}})
			d.BCs = []BC{{Tag: "right", BCType: "BCWall"}}
		}, `tag "top" is already in periodic pair 0`},
	}
	for _, c := range cases {
		d := periodicDeck(t, squareMesh(t, 4, false), "bottom", "top", [2]float64{0, 1})
		c.edit(d)
		_, err := Write(filepath.Join(dir, "bad.cgns"), d)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got error %v, want one containing %q", c.name, err, c.want)
		}
	}
	// A structured deck whose periodic tags cover part of a block side.
	d := periodicDeck(t, channelMesh(t, 8, 4, 'x', false, true), "bottom", "top", [2]float64{0, 1})
	_, err := Write(filepath.Join(dir, "bad.cgns"), d)
	if want := `periodic pair ("bottom", "top"): tag "bottom" covers only part of side`; err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("partial side: got error %v, want one containing %q", err, want)
	}
	// Written unstructured, the same deck is fine.
	d.Unstructured = true
	path := filepath.Join(dir, "partial-unstructured.cgns")
	if _, err := Write(path, d); err != nil {
		t.Fatalf("partial sides written unstructured: %v", err)
	}
	checkPeriodicFile(t, path, d)
	os.Remove(path)
	if left, _ := os.ReadDir(dir); len(left) != 0 {
		t.Errorf("rejected writes left files: %v", left)
	}
}
