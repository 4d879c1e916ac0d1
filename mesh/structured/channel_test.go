package structured

import (
	"math"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// A channel of our own, the square [−2, 2]² with walls top and bottom,
// inflow on the left and outflow on the right, holding a cylinder of
// radius 0.5. A hyperbolic O-grid reaches radius 1.5; it is cut into four
// quarters that meet four TFI blocks filling the rest, each between a
// quarter of the O-grid's outer ring and a corner of the channel. Eight
// blocks, twelve interfaces, smoothed together, all conforming.
func TestChannelWithCylinder(t *testing.T) {
	const n, layers = 64, 30
	ring, rep, err := MarchClosed(circleLoop(orb.Point{}, 0.5, n, "cylinder"),
		MarchOptions{Name: "ring", FirstHeight: 2e-3, Layers: layers, OuterDistance: 1, OuterTag: "ring-outer"})
	if err != nil {
		t.Fatal(err)
	}
	// The outer ring joins other blocks: it is an interface, not a boundary.
	fillTag(ring.Tags[mesh.North], "")
	quarters, err := ring.SplitI(n/4, n/2, 3*n/4)
	if err != nil {
		t.Fatal(err)
	}
	tagAt := func(p, q orb.Point) string {
		mx, my := 0.5*(p[0]+q[0]), 0.5*(p[1]+q[1])
		switch {
		case my > 2-1e-9 || my < -2+1e-9:
			return "wall"
		case mx < -2+1e-9:
			return "inflow"
		case mx > 2-1e-9:
			return "outflow"
		}
		return ""
	}
	blocks := append([]*Block(nil), quarters...)
	for q, part := range quarters {
		inner := part.SidePoints(mesh.North) // clockwise quarter of radius 1.5
		a, z := inner[0], inner[len(inner)-1]
		// The channel corner between the quarter's two end rays, and the
		// points where those rays meet the channel walls.
		ea, ez := scaleTo(a), scaleTo(z)
		corner := orb.Point{ea[0] + ez[0], ea[1] + ez[1]}
		half := len(inner) / 2
		outer := make([]orb.Point, 0, len(inner))
		for k := 0; k <= half; k++ {
			outer = append(outer, lerp(ez, corner, float64(k)/float64(half)))
		}
		for k := 1; k <= half; k++ {
			outer = append(outer, lerp(corner, ea, float64(k)/float64(half)))
		}
		sides := BlockSides{
			Name:  "around-" + part.Name,
			South: geometry.Chain{Points: inner, Tags: make([]string, len(inner)-1)},
			East:  line(z, ez, uniform(9), ""),
			North: chainTagged(outer, tagAt),
			West:  line(ea, a, uniform(9), ""),
		}
		b, err := TFI(sides)
		if err != nil {
			t.Fatalf("quarter %d: %v", q, err)
		}
		blocks = append(blocks, b)
	}
	// Smooth all eight together, holding the first-cell height and
	// orthogonality on the cylinder: twelve interfaces, four points where
	// four blocks meet.
	opts := make([]SmoothOptions, len(blocks))
	for b := range opts {
		opts[b].MaxIterations = 20000
		if b < 4 {
			opts[b].Sides[mesh.South] = SideControl{FirstHeight: 2e-3, Orthogonal: true}
		}
	}
	results, err := SmoothBlocks(blocks, opts)
	if err != nil {
		t.Fatal(err)
	}
	for b, res := range results {
		if !res.Converged || (b < 4 && (res.HeightError > 0.01 || res.MeanAngleError > 2)) {
			t.Errorf("smoothing %q: %+v", blocks[b].Name, res)
		}
	}
	t.Logf("joint smoothing: %d iterations; cylinder first height within %.2g, mean wall angle error %.3g°", results[0].Iterations, results[0].HeightError, results[0].MeanAngleError)
	m := assertPositive(t, blocks...)
	assertNoDuplicateNodes(t, m)
	if len(m.Interfaces) != 12 {
		t.Errorf("%d interfaces, want 12: %+v", len(m.Interfaces), m.Interfaces)
	}
	// Area: the channel minus the inscribed 64-gon of the cylinder (closed
	// form ½ n R² sin(2π/n)).
	total := 0.0
	for _, a := range m.Geo.CellArea {
		total += a
	}
	want := 16 - 0.5*n*0.25*math.Sin(2*math.Pi/n)
	if math.Abs(total-want) > 1e-12*want {
		t.Errorf("area %.15g, want %.15g", total, want)
	}
	for _, tag := range []string{"cylinder", "wall", "inflow", "outflow"} {
		if _, _, ok := m.TagRange(tag); !ok {
			t.Errorf("tag %q missing: %v", tag, m.Tags)
		}
	}
	if l, h := m.UntaggedRange(); h != l {
		t.Errorf("%d untagged boundary faces", h-l)
	}
	t.Logf("%d nodes, %d cells, %d blocks; O-grid growth %.4f", len(m.Nodes), m.NumCells(), len(m.Blocks), rep.Growth)
}

// scaleTo moves a point on a coordinate axis out to the channel wall
// (distance 2 from the centre).
func scaleTo(p orb.Point) orb.Point {
	r := math.Hypot(p[0], p[1])
	return orb.Point{math.Round(2*p[0]/r*1e12) / 1e12, math.Round(2*p[1]/r*1e12) / 1e12}
}

func lerp(a, b orb.Point, t float64) orb.Point {
	return orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}
}

func chainTagged(p []orb.Point, tag func(a, b orb.Point) string) geometry.Chain {
	c := geometry.Chain{Points: p, Tags: make([]string, len(p)-1)}
	for k := range c.Tags {
		c.Tags[k] = tag(p[k], p[k+1])
	}
	return c
}
