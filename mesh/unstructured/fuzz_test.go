package unstructured

import (
	"errors"
	"math"
	"strings"
	"testing"

	"cvdeck/geometry"
	"github.com/paulmach/orb"
)

// fuzzOutline decodes bytes into a valid outline: a star-shaped outer
// polygon (vertex k at angle 2πk/n plus a jitter below half the spacing,
// radius 0.2–1), its edges split into 1–4 pieces, tags from the bytes, and
// for n ≥ 6 a clockwise circular hole at the centre small enough to stay
// clear of the outer loop; plus options: the minimum-angle target and, for
// some inputs, boundary layers.
func fuzzOutline(data []byte) (geometry.DiscreteOutline, Options, bool) {
	if len(data) < 4 {
		return geometry.DiscreteOutline{}, Options{}, false
	}
	byteAt := func(i int) float64 { return float64(data[i%len(data)]) / 255 }
	n := 3 + int(data[0])%40
	pieces := 1 + int(data[1])%4
	angle := 20 + 13*byteAt(2)
	hole := data[3]%2 == 1 && n >= 6
	var corners []orb.Point
	rmin := 1.0
	for k := 0; k < n; k++ {
		th := 2 * math.Pi * (float64(k) + 0.45*(byteAt(4+2*k)-0.5)) / float64(n)
		r := 0.2 + 0.8*byteAt(5+2*k)
		rmin = math.Min(rmin, r)
		corners = append(corners, orb.Point{r * math.Cos(th), r * math.Sin(th)})
	}
	var outer geometry.DiscreteLoop
	for k, a := range corners {
		b := corners[(k+1)%n]
		tag := "a"
		if data[(4+k)%len(data)]%3 == 0 {
			tag = "b"
		}
		for j := 0; j < pieces; j++ {
			t := float64(j) / float64(pieces)
			outer.Points = append(outer.Points, orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])})
			outer.Tags = append(outer.Tags, tag)
		}
	}
	out := geometry.DiscreteOutline{Loops: []geometry.DiscreteLoop{outer}}
	if hole {
		// With gaps below 2π/n·1.45 ≤ 1.52 rad, every edge stays at least
		// rmin·cos(0.76) ≈ 0.72 rmin from the centre.
		out.Loops = append(out.Loops, circleLoop(orb.Point{}, 0.3*rmin, 12, true, "hole"))
	}
	opt := Options{MinAngle: angle, MaxCells: 200_000}
	if data[3]%4 >= 2 {
		// Boundary layers on the first edge's tag (and on the hole when
		// there is one).
		opt.Layers = []Layers{{Tags: []string{outer.Tags[0]}, FirstHeight: 0.001 + 0.01*byteAt(len(data)-1), Growth: 1 + 0.5*byteAt(len(data)-2), Count: 1 + int(data[len(data)-3])%12}}
		if hole {
			opt.Layers[0].Tags = append(opt.Layers[0].Tags, "hole")
		}
	}
	return out, opt, true
}

// FuzzMesh meshes random valid outlines, with and without boundary
// layers: never a panic or a hang (the cell limit bounds the work), always
// a mesh that passes the basic checks (positive areas, closed cells, every
// boundary face tagged, the outline's area and edges) or the cell-limit
// error.
func FuzzMesh(f *testing.F) {
	f.Add([]byte{0, 0, 0, 0})
	f.Add([]byte{5, 1, 128, 1, 10, 200, 30, 255, 90, 12, 250, 0, 128, 128})
	f.Add([]byte{37, 3, 255, 1, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16})
	f.Add([]byte{9, 2, 200, 0, 255, 0, 255, 0, 255, 0, 255, 0, 255, 0})
	f.Fuzz(func(t *testing.T, data []byte) {
		out, opt, ok := fuzzOutline(data)
		if !ok {
			t.Skip()
		}
		m, err := Mesh(out, opt)
		if err != nil {
			// The outlines are valid, so the only acceptable refusal is the
			// cell limit.
			if !errors.Is(err, errTooMany) && !strings.Contains(err.Error(), "above the limit") {
				t.Fatalf("valid outline refused: %v", err)
			}
			return
		}
		basicChecks(t, m, out)
		checkOutlineEdges(t, m, out)
	})
}
