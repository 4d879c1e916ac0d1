package geometry

import (
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// parseLoops reads "x y x y ...; x y ..." into closed polylines, one per
// ';'-separated loop; the first loop is the outer one.
func parseLoops(s string) ([][]orb.Point, bool) {
	var loops [][]orb.Point
	for _, part := range strings.Split(s, ";") {
		fs := strings.Fields(part)
		if len(fs)%2 != 0 || len(fs) > 2000 {
			return nil, false
		}
		var pts []orb.Point
		for i := 0; i < len(fs); i += 2 {
			x, err1 := strconv.ParseFloat(fs[i], 64)
			y, err2 := strconv.ParseFloat(fs[i+1], 64)
			if err1 != nil || err2 != nil {
				return nil, false
			}
			pts = append(pts, orb.Point{x, y})
		}
		loops = append(loops, pts)
	}
	return loops, true
}

// FuzzValidate feeds arbitrary polygons to the outline validator,
// orientation and discretisation: any input may be rejected, none may
// panic, and whatever Normalise accepts must discretise into an outline
// whose loops are oriented.
func FuzzValidate(f *testing.F) {
	f.Add("0 0 1 0 1 1 0 1 0 0")
	f.Add("0 0 4 0 4 4 0 4 0 0; 1 1 2 1 2 2 1 2 1 1")
	f.Add("0 0 1 1 1 0 0 1 0 0")
	f.Add("0 0 1 0 0 0")
	f.Add("0 0 1e308 0 1e308 1e308 0 0")
	f.Fuzz(func(t *testing.T, s string) {
		loops, ok := parseLoops(s)
		if !ok {
			return
		}
		var o Outline
		for i, pts := range loops {
			p, err := NewPolyline(pts, Attr{})
			if err != nil {
				return
			}
			l := Loop{Segments: []Segment{p}}
			if i == 0 {
				o.Outer = l
			} else {
				o.Inner = append(o.Inner, l)
			}
		}
		n, err := o.Normalise()
		if err != nil {
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		d, err := n.Discretise()
		if err != nil {
			t.Fatalf("valid outline failed to discretise: %v", err)
		}
		if err := d.Validate(); err != nil {
			t.Fatalf("normalised outline's own vertices fail the discrete check: %v", err)
		}
	})
}

// FuzzReadGeoJSON: no GeoJSON text makes the reader panic, and every
// outline it returns passes validation.
func FuzzReadGeoJSON(f *testing.F) {
	f.Add(`{"type": "Polygon", "coordinates": [[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]]]}`)
	f.Add(`{"type": "Feature", "properties": {"tag": "wall", "edge_tags": [{"ring": 0, "from": 1, "to": 2, "tag": "inflow"}]}, "geometry": {"type": "MultiPolygon", "coordinates": [[[[0, 0], [1, 0], [1, 1], [0, 0]]]]}}`)
	f.Add(`{"type": "FeatureCollection", "features": [{"type": "Feature", "geometry": null, "properties": null}]}`)
	f.Fuzz(func(t *testing.T, doc string) {
		outs, err := ReadGeoJSON([]byte(doc))
		if err != nil {
			return
		}
		for _, o := range outs {
			if err := o.Validate(); err != nil {
				t.Fatalf("returned outline fails validation: %v", err)
			}
		}
	})
}
