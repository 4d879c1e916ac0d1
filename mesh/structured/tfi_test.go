package structured

import (
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// Gordon and Hall (1973), Int. J. Numer. Meth. Eng. 7: the transfinite
// (Boolean sum) interpolant reproduces every bilinear map, hence every affine
// map, exactly. Here the sides are the affine image of a tensor grid with
// different clustering in i and j, so the arc-length blending must recover
// the image of every interior node to round-off.
func TestTFIReproducesAffineMap(t *testing.T) {
	fx := geometric(13, 0.01)
	fy := []float64{0, 0.05, 0.2, 0.45, 0.7, 0.9, 1}
	affine := func(u, v float64) orb.Point {
		return orb.Point{3 + 2.0*u + 0.7*v, -1 + 0.4*u + 1.5*v}
	}
	pts := func(n int, at func(k int) orb.Point) []orb.Point {
		p := make([]orb.Point, n)
		for k := range p {
			p[k] = at(k)
		}
		return p
	}
	s := BlockSides{
		Name:  "affine",
		South: chainOf(pts(len(fx), func(k int) orb.Point { return affine(fx[k], 0) }), "wall"),
		East:  chainOf(pts(len(fy), func(k int) orb.Point { return affine(1, fy[k]) }), "outflow"),
		North: chainOf(pts(len(fx), func(k int) orb.Point { return affine(fx[len(fx)-1-k], 1) }), "top"),
		West:  chainOf(pts(len(fy), func(k int) orb.Point { return affine(0, fy[len(fy)-1-k]) }), "inflow"),
	}
	b, err := TFI(s)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for j := range fy {
		for i := range fx {
			want := affine(fx[i], fy[j])
			worst = math.Max(worst, dist(b.At(i, j), want))
		}
	}
	if worst > 1e-14*4 {
		t.Errorf("TFI departs from the affine map by %g", worst)
	}
	m, err := Assemble([]*Block{b}, AssembleOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if m.NumCells() != 12*6 || len(m.Blocks) != 1 || m.Blocks[0].NI != 13 || m.Blocks[0].NJ != 7 {
		t.Fatalf("mesh has %d cells, blocks %+v", m.NumCells(), m.Blocks)
	}
	// Boundary faces carry the side tags: the south side has 12 wall faces.
	lo, hi, ok := m.TagRange("wall")
	if !ok || hi-lo != 12 {
		t.Errorf("wall faces [%d, %d) ok=%v, want 12", lo, hi, ok)
	}
	if l, h := m.UntaggedRange(); h != l {
		t.Errorf("%d untagged boundary faces", h-l)
	}
	// Affine image of the unit square: area |det| = 2·1.5 − 0.7·0.4.
	total := 0.0
	for _, a := range m.Geo.CellArea {
		if a <= 0 {
			t.Fatalf("non-positive cell area %g", a)
		}
		total += a
	}
	if want := 2*1.5 - 0.7*0.4; math.Abs(total-want) > 1e-13*want {
		t.Errorf("cell areas sum to %.16g, want %.16g", total, want)
	}
}

// The cells of an annular sector whose arcs carry n+1 nodes evenly spaced in
// angle tile the polygon with those nodes; its area (closed form, shoelace
// on the inscribed polygon) is ½ (R² − r²) n sin(Δθ/n).
func TestTFIAreaOfAnnularSector(t *testing.T) {
	const r, R, dth = 1.0, 3.0, 1.2
	const n = 40
	c := orb.Point{0.5, -2}
	radial := func(a, b orb.Point) geometry.Chain { return line(a, b, geometric(25, 0.002), "x") }
	in, out := arc(c, r, 0, dth, n+1, "wall"), arc(c, R, 0, dth, n+1, "far")
	// The region lies to the left of each side: the inner arc runs with
	// falling angle, the outer with rising angle.
	s := BlockSides{
		Name:  "sector",
		South: reversed(in),
		East:  radial(in.Points[0], out.Points[0]),
		North: out,
		West:  reversed(radial(in.Points[n], out.Points[n])),
	}
	b, err := TFI(s)
	if err != nil {
		t.Fatal(err)
	}
	m, err := Assemble([]*Block{b}, AssembleOptions{})
	if err != nil {
		t.Fatal(err)
	}
	total := 0.0
	for _, a := range m.Geo.CellArea {
		if a <= 0 {
			t.Fatalf("non-positive cell area %g", a)
		}
		total += a
	}
	want := 0.5 * (R*R - r*r) * n * math.Sin(dth/n)
	if math.Abs(total-want) > 1e-12*want {
		t.Errorf("cell areas sum to %.15g, want %.15g", total, want)
	}
	// The interior nodes of the radial lines i = const lie on the sector
	// rays: on an annular sector TFI with these sides is the polar grid.
	for j := 0; j < b.NJ; j++ {
		for _, i := range []int{0, n / 2, n} {
			p := b.At(i, j)
			ang := math.Atan2(p[1]-c[1], p[0]-c[0])
			if want := dth * float64(n-i) / n; math.Abs(ang-want) > 1e-3 {
				t.Fatalf("node (%d, %d) at angle %g, want %g", i, j, ang, want)
			}
		}
	}
}

// Sides given in either direction are reoriented; the result must not
// depend on it.
func TestTFIReversedSides(t *testing.T) {
	sq := func(rev bool) BlockSides {
		s := BlockSides{
			South: line(orb.Point{0, 0}, orb.Point{2, 0}, uniform(5), "s"),
			East:  line(orb.Point{2, 0}, orb.Point{2, 1}, uniform(4), "e"),
			North: line(orb.Point{2, 1}, orb.Point{0, 1.5}, uniform(5), "n"),
			West:  line(orb.Point{0, 1.5}, orb.Point{0, 0}, uniform(4), "w"),
		}
		if rev {
			s.South, s.North, s.West = reversed(s.South), reversed(s.North), reversed(s.West)
		}
		return s
	}
	a, err := TFI(sq(false))
	if err != nil {
		t.Fatal(err)
	}
	b, err := TFI(sq(true))
	if err != nil {
		t.Fatal(err)
	}
	for k := range a.X {
		if a.X[k] != b.X[k] || a.Y[k] != b.Y[k] {
			t.Fatalf("node %d differs: (%g,%g) vs (%g,%g)", k, a.X[k], a.Y[k], b.X[k], b.Y[k])
		}
	}
	if b.Tags[mesh.North][0] != "n" || b.Tags[mesh.West][0] != "w" {
		t.Errorf("tags %v", b.Tags)
	}
}

// Issue 3 bad inputs, plus the TFI ones of issue 2: each error names the
// block, the sides and what is wrong.
func TestTFIBadInput(t *testing.T) {
	base := func() BlockSides {
		return BlockSides{
			Name:  "duct",
			South: line(orb.Point{0, 0}, orb.Point{2, 0}, uniform(5), "s"),
			East:  line(orb.Point{2, 0}, orb.Point{2, 1}, uniform(4), "e"),
			North: line(orb.Point{2, 1}, orb.Point{0, 1}, uniform(5), "n"),
			West:  line(orb.Point{0, 1}, orb.Point{0, 0}, uniform(4), "w"),
		}
	}
	cases := []struct {
		name string
		edit func(*BlockSides)
		want []string
	}{
		{"north count", func(s *BlockSides) { s.North = line(orb.Point{2, 1}, orb.Point{0, 1}, uniform(7), "n") },
			[]string{`block "duct"`, "south side has 5 nodes and north side 7", "differ by 2"}},
		{"west count", func(s *BlockSides) { s.West = line(orb.Point{0, 1}, orb.Point{0, 0}, uniform(3), "w") },
			[]string{"west side has 3 nodes and east side 4", "differ by 1"}},
		{"gap at corner", func(s *BlockSides) { s.North = line(orb.Point{2, 1.1}, orb.Point{0, 1}, uniform(5), "n") },
			[]string{"north side does not meet the east side's end (2, 1)"}},
		{"open loop", func(s *BlockSides) { s.West = line(orb.Point{0, 1}, orb.Point{0.2, 0}, uniform(4), "w") },
			[]string{"west side ends at (0.2, 0)", "from the south side's start (0, 0)"}},
		{"clockwise", func(s *BlockSides) { s.East, s.West = reversed(s.West), reversed(s.East) },
			[]string{"clockwise"}},
		{"zero edge", func(s *BlockSides) { s.South.Points[2] = s.South.Points[1] },
			[]string{"south side edge 1 has zero length"}},
		{"tag count", func(s *BlockSides) { s.East.Tags = s.East.Tags[:1] },
			[]string{"east side has 4 nodes but 1 edge tags"}},
	}
	for _, c := range cases {
		s := base()
		c.edit(&s)
		_, err := TFI(s)
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q lacks %q", c.name, err, w)
			}
		}
	}
}
