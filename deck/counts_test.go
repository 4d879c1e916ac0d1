package deck

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"cvdeck/bc"
	"cvdeck/mesh"
	"cvdeck/samples"
)

// TestCountRoundingByHand checks the joint rounding against counts worked
// out by hand. Where the least sum of squared misses and the
// largest-remainder rule agree (common practice: Hamilton's method of
// apportionment — round the side's total, give every segment the floor of
// its aim, hand the edges left over to the largest remainders, the earlier
// segment first among equals), the figures are the rule's; one case shows
// where they part.
func TestCountRoundingByHand(t *testing.T) {
	v := func(target float64) countVar { return countVar{name: fmt.Sprint(target), target: target, min: 1} }
	row := func(what string, constant int, terms ...int) countRow {
		r := countRow{what: what, constant: constant}
		for k := 0; k < len(terms); k += 2 {
			r.terms = append(r.terms, countTerm{terms[k], terms[k+1]})
		}
		return r
	}
	for _, c := range []struct {
		what string
		p    countProblem
		want []int
	}{
		{
			// bump-channel refined by 1.3: three floor segments of 32 edges
			// (41.6 each) against the ceiling's 96 (124.8). Total
			// round(124.8) = 125; floors 41+41+41 = 123; the two edges left
			// go to the first two (remainders 0.6 all).
			"bump 1.3",
			countProblem{vars: []countVar{v(41.6), v(41.6), v(41.6), v(124.8)}, rows: []countRow{row("south = north", 0, 0, 1, 1, 1, 2, 1, 3, -1)}},
			[]int{42, 42, 41, 125},
		},
		{
			// The same by 0.3: 9.6 each against 28.8; total 29, floors 27,
			// two left over.
			"bump 0.3",
			countProblem{vars: []countVar{v(9.6), v(9.6), v(9.6), v(28.8)}, rows: []countRow{row("south = north", 0, 0, 1, 1, 1, 2, 1, 3, -1)}},
			[]int{10, 10, 9, 29},
		},
		{
			// Unequal aims 12.25, 30.5, 7.75 against 50.5: total
			// round(50.5) = 51 (half away from zero); floors 12+30+7 = 49;
			// the two left go to remainders 0.75 and 0.5.
			"unequal",
			countProblem{vars: []countVar{v(12.25), v(30.5), v(7.75), v(50.5)}, rows: []countRow{row("south = north", 0, 0, 1, 1, 1, 2, 1, 3, -1)}},
			[]int{12, 31, 8, 51},
		},
		{
			// Where least squares parts from largest remainder: aims 3.98,
			// 2.18, 5.25, 4.23 against 15.64. Largest remainder rounds the
			// total to 16 and splits it 4, 2, 6, 4 (misses .02 .18 .75 .23
			// .36, squares summing to 0.7778); keeping the total at 15
			// gives 4, 2, 5, 4 (misses .02 .18 .25 .23 .64, 0.5578), no
			// miss above .64.
			"nearer than largest remainder",
			countProblem{vars: []countVar{v(3.98), v(2.18), v(5.25), v(4.23), v(15.64)}, rows: []countRow{row("south = north", 0, 0, 1, 1, 1, 2, 1, 3, 1, 4, -1)}},
			[]int{4, 2, 5, 4, 15},
		},
		{
			// Linked sides: a+b = c, a = d, b = e with aims 1.5, 1.5, 3,
			// 1.5, 1.5. Each alone rounds to 2, 2, 3, 2, 2, which breaks
			// a+b = c; the nearest whole counts that keep all three are
			// 2, 1, 3, 2, 1 (sum of squared misses 1.0, against 2.0 for
			// 2, 2, 4 and 1, 1, 2).
			"linked",
			countProblem{vars: []countVar{v(1.5), v(1.5), v(3), v(1.5), v(1.5)}, rows: []countRow{
				row("a+b=c", 0, 0, 1, 1, 1, 2, -1), row("a=d", 0, 0, 1, 3, -1), row("b=e", 0, 1, 1, 4, -1)}},
			[]int{2, 1, 3, 2, 1},
		},
		{
			// An unknown in no row rounds alone, to at least its minimum
			// (a two-sided Vinokur law needs 3 edges).
			"alone",
			countProblem{vars: []countVar{v(4.5), {name: "vinokur", target: 0.9, min: 3}}},
			[]int{5, 3},
		},
	} {
		got, err := c.p.solve()
		if err != nil {
			t.Errorf("%s: %v", c.what, err)
			continue
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("%s: counts %v, want %v", c.what, got, c.want)
		}
	}
	// A row no whole counts meet is an error naming it: a side held at 5
	// edges by segments that keep their vertices, against a law needing 6.
	p := countProblem{vars: []countVar{{name: `"cut"`, target: 5, min: 6}}, rows: []countRow{row(`block "b": south ["cut"] and north ["wall"]`, -5, 0, 1)}}
	_, err := p.solve()
	if err == nil || !strings.Contains(err.Error(), `block "b": south ["cut"] and north ["wall"]`) || !strings.Contains(err.Error(), `"cut" 5`) {
		t.Fatalf("got %v", err)
	}
}

// structuredSamples returns the samples meshed by structured blocks.
func structuredSamples(t *testing.T) map[string][]byte {
	out := map[string][]byte{}
	for _, s := range samples.List() {
		data, err := samples.Case(s.Name)
		if err != nil {
			t.Fatal(err)
		}
		if strings.Contains(string(data), "\n  structured:") && strings.Contains(string(data), "\n    blocks:") {
			out[s.Name] = data
		}
	}
	if len(out) < 5 {
		t.Fatalf("found %d structured samples with blocks, expected at least bump-channel, nozzle-blocks, nozzle-half, cylinder-duct and tube-row", len(out))
	}
	return out
}

// blockEdges returns each block's edges on its four sides, from the
// spacing laws.
func blockEdges(t *testing.T, c *Case) [][4]int {
	var out [][4]int
	for _, bs := range c.Mesh.blocks {
		var n [4]int
		for s := range bs.sides {
			k, err := sideEdges(bs.sides[s])
			if err != nil {
				t.Fatal(err)
			}
			n[s] = k
		}
		out = append(out, n)
	}
	return out
}

// TestRefinedSamplesKeepSidesEqual refines every structured sample by
// factors that do not scale its counts to whole numbers (and by 1.2², 1.2³,
// the levels of a family of ratio 1.2) and meshes it. Every block's
// opposite sides must have equal edges; each side must lie within 1.5
// edges of r times its edges as written (half an edge of rounding, and up
// to one more that the joint rounding may move a side by to keep others
// equal: a tolerance of our own choosing, not a theorem); so the block's
// cells lie within (r·ni + 1.5)(r·nj + 1.5) − r²·ni·nj of r² times its
// cells as written, and the mesh has the cells of its blocks. The periodic
// pair of tube-row must still pair one to one (bc.Assign verifies it).
func TestRefinedSamplesKeepSidesEqual(t *testing.T) {
	factors := []float64{0.3, 0.7, 1.1, 1.2, 1.3, 1.44, 1.7, 1.728, 2.5}
	if testing.Short() {
		factors = []float64{0.3, 1.3, 1.7}
	}
	for name, data := range structuredSamples(t) {
		base, err := Parse(name+".yaml", data, LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		edges0 := blockEdges(t, base)
		for _, r := range factors {
			t.Run(fmt.Sprintf("%s/%g", name, r), func(t *testing.T) {
				c, err := Parse(name+".yaml", data, LoadOptions{Refine: r})
				if err != nil {
					t.Fatal(err)
				}
				want, tol := 0.0, 0.0
				for b, n := range blockEdges(t, c) {
					bname := c.Mesh.blocks[b].name
					if n[mesh.South] != n[mesh.North] || n[mesh.West] != n[mesh.East] {
						t.Errorf("block %q: south %d, north %d, west %d, east %d edges", bname, n[mesh.South], n[mesh.North], n[mesh.West], n[mesh.East])
					}
					for s, k := range n {
						if aim := r * float64(edges0[b][s]); math.Abs(float64(k)-aim) > 1.5 {
							t.Errorf("block %q, %s side: %d edges, %.4g aimed at", bname, mesh.Side(s), k, aim)
						}
					}
					ni, nj := float64(edges0[b][mesh.South]), float64(edges0[b][mesh.West])
					want += r * r * ni * nj
					tol += 1.5*r*(ni+nj) + 2.25
				}
				m, _, _, err := c.buildMesh()
				if err != nil {
					t.Fatal(err)
				}
				if got := float64(m.NumCells()); math.Abs(got-want) > tol {
					t.Errorf("%d cells, r² × as written is %.0f (tolerance %.0f)", m.NumCells(), want, tol)
				}
				if c.Boundaries != nil {
					setup := bc.Setup{Conditions: c.Boundaries.conditions}
					if c.Reference != nil {
						setup.Gas, setup.Reference = c.Reference.gas, &c.Reference.state
					}
					if _, err := bc.Assign(m, setup); err != nil {
						t.Errorf("conditions: %v", err)
					}
				}
			})
		}
	}
}

// sizedBox is a 2.4 × 1 box whose south side is two 1.2-long lines and
// whose north side is one 2.4-long line, all with size 1: as written
// round(1.2) + round(1.2) = 2 = round(2.4), but refined by 1.3 each alone
// would round to 2 + 2 against 3.
const sizedBox = `
name: sized
geometry:
  loops:
    - name: box
      start: [0, 0]
      segments:
        - {name: s1, line: [1.2, 0], tag: wall, spacing: {size: 1}}
        - {name: s2, line: [2.4, 0], tag: wall, spacing: {size: 1}}
        - {name: e, line: [2.4, 1], tag: wall, spacing: {count: 3}}
        - {name: n, line: [0, 1], tag: wall, spacing: {size: 1}}
        - {name: w, line: [0, 0], tag: wall, spacing: {count: 3}}
mesh:
  structured:
    blocks:
      - {name: box, south: [s1, s2], east: e, north: n, west: w}
`

// Size laws take their counts from lengths, and so can break a block's
// sides under refinement too; they are rounded jointly like the rest. The
// aims 1.56, 1.56 against 3.12 give 2, 1 and 3 (hand-worked, as in
// TestCountRoundingByHand).
func TestSizedSidesRoundJointly(t *testing.T) {
	c, err := Parse("sized.yaml", []byte(sizedBox), LoadOptions{Refine: 1.3})
	if err != nil {
		t.Fatal(err)
	}
	n := blockEdges(t, c)[0]
	if n[mesh.South] != 3 || n[mesh.North] != 3 {
		t.Fatalf("south %d, north %d edges; want 3 and 3", n[mesh.South], n[mesh.North])
	}
	if _, _, _, err := c.buildMesh(); err != nil {
		t.Fatal(err)
	}
}

// A case whose sides differ as written is not mended by the rounding: the
// mesher reports it, naming the block once.
func TestUnequalSidesAsWrittenAreReported(t *testing.T) {
	data, err := samples.Case("bump-channel")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(data), "spacing: {count: cells_x + 1}", "spacing: {count: cells_x + 2}", 1)
	for _, r := range []float64{1, 1.1} {
		c, err := Parse("bump-channel.yaml", []byte(text), LoadOptions{Refine: r})
		if err != nil {
			t.Fatal(err)
		}
		_, _, _, err = c.buildMesh()
		if err == nil || !strings.Contains(err.Error(), "opposite sides need equal node counts") {
			t.Fatalf("refine %g: got %v", r, err)
		}
		if k := strings.Count(err.Error(), `block "section"`); k != 1 {
			t.Errorf("refine %g: the block is named %d times: %v", r, k, err)
		}
	}
}

// A long side of many segments against one segment, with aims of every
// fraction, is solved quickly (the search is bounded) and well: the side
// totals agree and no segment, the single one included, is an edge or more
// from its aim (a side total within one edge of its aim split by largest
// remainder keeps every segment so).
func TestCountRoundingLongSide(t *testing.T) {
	var p countProblem
	r := countRow{what: "south = north"}
	total := 0.0
	for i := range 40 {
		aim := float64(3+(i*37)%29) * 1.37
		total += aim
		p.vars = append(p.vars, countVar{name: fmt.Sprint(i), target: aim, min: 1})
		r.terms = append(r.terms, countTerm{i, 1})
	}
	p.vars = append(p.vars, countVar{name: "north", target: total, min: 1})
	r.terms = append(r.terms, countTerm{40, -1})
	p.rows = []countRow{r}
	m, err := p.solve()
	if err != nil {
		t.Fatal(err)
	}
	sum := 0
	for i, k := range m[:40] {
		sum += k
		if math.Abs(float64(k)-p.vars[i].target) >= 1 {
			t.Errorf("segment %d: %d edges for %.4g", i, k, p.vars[i].target)
		}
	}
	if sum != m[40] || math.Abs(float64(m[40])-total) >= 1 {
		t.Errorf("south %d, north %d edges for %.4g", sum, m[40], total)
	}
}
