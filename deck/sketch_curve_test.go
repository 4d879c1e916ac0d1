package deck

import (
	"math"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
)

// A curve keeps its shape when the sketch's size is coarse beside its
// radius: a 400 × 200 box with a circular hole of radius 25 drawn as two SVG
// arcs, spaced at 50 (twice the radius), keeps the hole as a polygon of 36
// faces (10° each), whose area is about (n/2) sin(2π/n) R² (the regular n-gon
// inscribed in the circle, elementary geometry): 0.995 of πR², where
// spacing the arcs at the size alone would give a square, 0.64 of it. The
// box's straight sides keep the size.
func TestSketchCurvesKeepTheirShape(t *testing.T) {
	o, err := geometry.ReadSVGPath("M 0 0 H 400 V 200 H 0 Z M 175 100 a 25 25 0 1 0 50 0 a 25 25 0 1 0 -50 0 z", geometry.SVGOptions{Scale: 1})
	if err != nil {
		t.Fatal(err)
	}
	size, err := geometry.Size(50)
	if err != nil {
		t.Fatal(err)
	}
	d, err := respace(o, size).Discretise()
	if err != nil {
		t.Fatal(err)
	}
	box, hole := d.Loops[0], d.Loops[1]
	if len(box.Points) != 24 {
		t.Errorf("box: %d nodes, want 24 (its sides at the size 50)", len(box.Points))
	}
	if len(hole.Points) != 36 {
		t.Errorf("hole: %d nodes, want 36 (18 per half circle)", len(hole.Points))
	}
	n := float64(len(hole.Points))
	want := 400*200 - n/2*math.Sin(2*math.Pi/n)*25*25
	// The nodes lie on the flattened arcs, within the SVG reader's default
	// tolerance of 1e-4 of the extent (0.04 here) of the circle, so the
	// area may differ by up to that times the perimeter.
	if a := d.Area(); math.Abs(a-want) > 0.04*2*math.Pi*25 {
		t.Errorf("area %.9g, want %.9g", a, want)
	}
}

// curveEdges: a half circle finely sampled needs 180°/10° = 18 edges; a
// straight polyline none; a polyline turning only at a sharp corner (a
// drawing's corner, not a curve) none; and never more edges than the
// polyline has.
func TestCurveEdges(t *testing.T) {
	var half []orb.Point
	for k := 0; k <= 360; k++ {
		a := math.Pi * float64(k) / 360
		half = append(half, orb.Point{math.Cos(a), math.Sin(a)})
	}
	for _, c := range []struct {
		name string
		pts  []orb.Point
		want int
	}{
		{"half circle", half, 18},
		{"straight", []orb.Point{{0, 0}, {1, 0}, {2, 0}, {3, 0}}, 0},
		{"corner", []orb.Point{{0, 0}, {1, 0}, {1, 1}}, 0},
		{"coarse arc", []orb.Point{{1, 0}, {0, 1}, {-1, 0}}, 0},                             // 90° turn: a corner
		{"few samples", []orb.Point{half[0], half[90], half[180], half[270], half[360]}, 4}, // 45° turns: capped at its 4 edges
	} {
		if got := curveEdges(c.pts); got != c.want {
			t.Errorf("%s: %d edges, want %d", c.name, got, c.want)
		}
	}
}
