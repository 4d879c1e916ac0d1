package geometry

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// stroke makes a stroke of one run through the points.
func stroke(where string, pts ...orb.Point) Stroke {
	return Stroke{Runs: [][]orb.Point{pts}, Where: where}
}

// TestJoinStrokes: the sides of the unit square, given out of order, two
// of them drawn backwards and with ends a hair apart, join into one loop
// of area 1 (planar.Area, orb's shoelace, against the square's known
// area); each joint is the mean of its two ends; a stroke whose own ends
// meet is a loop by itself; loops come in the order of their first
// stroke.
func TestJoinStrokes(t *testing.T) {
	const h = 1e-7 // well within the tolerance 1e-5
	strokes := []Stroke{
		stroke("bottom", orb.Point{0, 0}, orb.Point{1, 0}),
		stroke("top", orb.Point{0, 1}, orb.Point{1, 1 + h}),                  // drawn from left to right
		stroke("right", orb.Point{1, 0}, orb.Point{1, 0.5}, orb.Point{1, 1}), // bottom to top, as the loop runs
		stroke("left", orb.Point{0, 0}, orb.Point{0, 1}),                     // bottom to top, against the loop
		stroke("ring", orb.Point{3, 3}, orb.Point{4, 3}, orb.Point{4, 4}, orb.Point{3, 3 + h}),
	}
	loops, err := JoinStrokes(strokes, 1e-5)
	if err != nil {
		t.Fatal(err)
	}
	if len(loops) != 2 {
		t.Fatalf("%d loops, want 2", len(loops))
	}
	var order []string
	for _, p := range loops[0].Parts {
		way := "+"
		if p.Backwards {
			way = "-"
		}
		order = append(order, strokes[p.Stroke].Where+way)
	}
	if got := strings.Join(order, " "); got != "bottom+ right+ top- left-" {
		t.Errorf("parts %s, want bottom+ right+ top- left- (forwards +, backwards −)", got)
	}
	ring := loops[0].Ring()
	if a := planar.Area(orb.Ring(append(ring, ring[0]))); math.Abs(math.Abs(a)-1) > 2*h {
		t.Errorf("square area %g, want 1", a)
	}
	// The joint of top's end (1, 1+h) and right's end (1, 1) is their mean.
	if p := loops[0].Parts[2].Runs[0][0]; p[0] != 1 || math.Abs(p[1]-(1+h/2)) > 1e-15 {
		t.Errorf("joint %v, want (1, 1+h/2)", p)
	}
	if len(loops[1].Parts) != 1 || loops[1].Parts[0].Stroke != 4 {
		t.Errorf("second loop %+v, want the ring alone", loops[1])
	}
	r := loops[1].Ring()
	if len(r) != 3 || r[0][0] != 3 || math.Abs(r[0][1]-(3+h/2)) > 1e-15 {
		t.Errorf("ring %v, want 3 vertices starting at the joint (3, 3+h/2)", r)
	}
}

// TestJoinStrokesRefusals: loose ends (with the chain, the gap and the
// nearest loose end of another chain named), a branch, and a stroke
// that its joints shrink to nothing.
func TestJoinStrokesRefusals(t *testing.T) {
	for _, c := range []struct {
		name    string
		strokes []Stroke
		says    []string
	}{
		{"one open stroke", []Stroke{stroke("wall", orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{1, 1})},
			[]string{"wall is open: it starts at (0, 0) and ends at (1, 1), a gap of 1.41, and no other piece meets either end", "ends meet within 1e-05"}},
		{"an open chain", []Stroke{
			stroke("inlet", orb.Point{0, 1}, orb.Point{0, 0}),
			stroke("wall", orb.Point{0, 0}, orb.Point{2, 0}),
			stroke("outlet", orb.Point{2, 0}, orb.Point{2, 1}),
			stroke("lid", orb.Point{1.9, 1}, orb.Point{0, 1}),
		}, []string{"the pieces lid, inlet, wall and outlet join into an open chain that starts at (1.9, 1) (the start of lid) and ends at (2, 1) (the end of outlet), a gap of 0.1 that no other piece closes"}},
		{"two open chains", []Stroke{
			stroke("a", orb.Point{0, 0}, orb.Point{1, 0}),
			stroke("b", orb.Point{1, 0.01}, orb.Point{0, 1}, orb.Point{0, 0.02}),
		}, []string{"a is open: it starts at (0, 0) and ends at (1, 0), a gap of 1", "the nearest end to (0, 0) is the end of b, 0.02 away", "the nearest end to (1, 0) is the start of b, 0.01 away"}},
		{"a branch", []Stroke{
			stroke("left", orb.Point{0, 0}, orb.Point{1, 0}),
			stroke("right", orb.Point{2, 0}, orb.Point{1, 0}),
			stroke("stem", orb.Point{1, 0}, orb.Point{1, 1}),
		}, []string{"3 ends meet at (1, 0): the end of left, the end of right and the start of stem; a loop runs through each point once"}},
		{"a stroke shorter than the tolerance", []Stroke{
			stroke("speck", orb.Point{0, 0}, orb.Point{1e-6, 0}),
		}, []string{"speck: it is no longer than the distance within which ends meet, so it shrinks to the point"}},
	} {
		_, err := JoinStrokes(c.strokes, 1e-5)
		if !errors.Is(err, ErrFormat) {
			t.Errorf("%s: got %v", c.name, err)
			continue
		}
		for _, s := range c.says {
			if !strings.Contains(err.Error(), s) {
				t.Errorf("%s: error %q does not say %q", c.name, err, s)
			}
		}
	}
}

// FuzzJoinStrokes: strokes of any points ("x y x y ...; x y ..."), joined
// or refused, never panic, and every loop returned uses each stroke once
// and runs end to end without a gap back to its start.
func FuzzJoinStrokes(f *testing.F) {
	f.Add("0 0 1 0; 1 0 1 1; 0 1 1 1; 0 0 0 1")
	f.Add("0 0 1 0 1 1; 1 1 0 0; 5 5 6 5")
	f.Add("0 0 1 0; 1 0 2 0; 1 0 1 1")
	f.Add("0 0 1e-7 0")
	f.Fuzz(func(t *testing.T, text string) {
		var strokes []Stroke
		for k, part := range strings.Split(text, ";") {
			fs := strings.Fields(part)
			if len(fs) < 4 || len(fs)%2 != 0 || len(fs) > 200 {
				return
			}
			var pts []orb.Point
			for i := 0; i < len(fs); i += 2 {
				x, err1 := strconv.ParseFloat(fs[i], 64)
				y, err2 := strconv.ParseFloat(fs[i+1], 64)
				if err1 != nil || err2 != nil || math.IsNaN(x) || math.IsNaN(y) || math.Abs(x) > 1e6 || math.Abs(y) > 1e6 {
					return
				}
				pts = append(pts, orb.Point{x, y})
			}
			strokes = append(strokes, stroke("stroke "+strconv.Itoa(k), pts...))
		}
		if len(strokes) > 50 {
			return
		}
		loops, err := JoinStrokes(strokes, 1e-5)
		if err != nil {
			if !errors.Is(err, ErrFormat) || strings.Contains(err.Error(), "\n") {
				t.Fatalf("%q: error %v", text, err)
			}
			return
		}
		seen := make([]int, len(strokes))
		for li, l := range loops {
			var prev orb.Point
			for pi, p := range l.Parts {
				seen[p.Stroke]++
				if len(p.Runs) == 0 {
					t.Fatalf("%q: loop %d part %d has no runs", text, li, pi)
				}
				for ri, r := range p.Runs {
					if len(r) < 2 || (pi > 0 || ri > 0) && r[0] != prev {
						t.Fatalf("%q: loop %d part %d run %d does not start where the last ended", text, li, pi, ri)
					}
					prev = r[len(r)-1]
				}
			}
			if first := l.Parts[0].Runs[0][0]; prev != first {
				t.Fatalf("%q: loop %d ends at %v, not at its start %v", text, li, prev, first)
			}
		}
		for s, n := range seen {
			if n != 1 {
				t.Fatalf("%q: stroke %d is used %d times", text, s, n)
			}
		}
	})
}
