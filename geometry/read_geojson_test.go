package geometry

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// geojsonRefused checks that doc is refused as a format error whose one
// line says every string of says.
func geojsonRefused(t *testing.T, name, doc string, says ...string) {
	t.Helper()
	_, err := ReadGeoJSON([]byte(doc))
	if !errors.Is(err, ErrFormat) {
		t.Errorf("%s: got %v, want a format error", name, err)
		return
	}
	for _, s := range says {
		if !strings.Contains(err.Error(), s) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error %q does not say %q", name, err, s)
		}
	}
}

// A line (RFC 7946 §3.1.4, §3.1.5: LineString, MultiLineString) is
// refused where it stands, naming the feature or member and its type and
// pointing at edge_tags, rather than skipped: the FeatureCollection
// example of RFC 7946 §1.5 (a Point, a LineString, a Polygon) is refused
// at its LineString, feature 1. A point (§3.1.2, §3.1.3) marks a place
// and draws no edge, and a feature whose geometry is null (§3.2: an
// unlocated feature) draws nothing: both are skipped.
func TestReadGeoJSONRefusesArealess(t *testing.T) {
	const square = `{"type": "Polygon", "coordinates": [[[0, 0], [3, 0], [3, 1], [0, 1], [0, 0]]]}`
	geojsonRefused(t, "RFC 7946 §1.5", `{"type": "FeatureCollection", "features": [
		{"type": "Feature", "geometry": {"type": "Point", "coordinates": [102.0, 0.5]}, "properties": {"prop0": "value0"}},
		{"type": "Feature", "geometry": {"type": "LineString", "coordinates": [[102.0, 0.0], [103.0, 1.0], [104.0, 0.0], [105.0, 1.0]]}, "properties": {"prop0": "value0", "prop1": 0.0}},
		{"type": "Feature", "geometry": {"type": "Polygon", "coordinates": [[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]]]}, "properties": {"prop0": "value0"}}]}`,
		"GeoJSON feature 1 at line 3, column", "a LineString bounds no area")
	geojsonRefused(t, "an inlet drawn as a line", `{"type": "FeatureCollection", "features": [
		{"type": "Feature", "properties": {"tag": "duct"}, "geometry": `+square+`},
		{"type": "Feature", "properties": {"tag": "inlet"}, "geometry": {"type": "LineString", "coordinates": [[0, 0], [0, 1]]}}]}`,
		"GeoJSON feature 1 at line 3, column", "a LineString bounds no area", `"edge_tags"`, "remove the LineString")
	geojsonRefused(t, "a collection member", `{"type": "GeometryCollection", "geometries": [`+square+`, {"type": "MultiLineString", "coordinates": [[[0, 0], [0, 1]]]}]}`,
		"GeoJSON geometry 1 at line 1, column", "a MultiLineString bounds no area")
	outs, err := ReadGeoJSON([]byte(`{"type": "FeatureCollection", "features": [
		{"type": "Feature", "properties": {"name": "legend"}, "geometry": null},
		{"type": "Feature", "properties": {"name": "probe"}, "geometry": {"type": "MultiPoint", "coordinates": [[1, 0.5], [2, 0.5]]}},
		{"type": "Feature", "properties": null, "geometry": ` + square + `}]}`))
	if err != nil || len(outs) != 1 {
		t.Fatalf("a null-geometry and a point feature beside a polygon: %d outlines, %v; want the polygon alone", len(outs), err)
	}
	if a := outlineArea(t, outs[0]); math.Abs(a-3) > 1e-12 { // the 3 × 1 rectangle
		t.Errorf("area %g, want 3", a)
	}
}

// An edge_tags range naming a polygon the feature does not have is
// refused, as ReadWKT refuses it, rather than tagging nothing: a Polygon
// is polygon 0 only, a MultiPolygon of two has polygons 0 and 1
// (RFC 7946 §3.1.7: its coordinates are an array of Polygon coordinate
// arrays), a feature without geometry none. A range within them tags
// its polygon.
func TestReadGeoJSONEdgeTagPolygonRange(t *testing.T) {
	const poly = `{"type": "Polygon", "coordinates": [[[0, 0], [3, 0], [3, 1], [0, 1], [0, 0]]]}`
	const multi = `{"type": "MultiPolygon", "coordinates": [[[[0, 0], [1, 0], [1, 1], [0, 1], [0, 0]]], [[[5, 0], [7, 0], [7, 2], [5, 2], [5, 0]]]]}`
	feature := func(polygon, geometry string) string {
		return `{"type": "Feature", "properties": {"edge_tags": [{"polygon": ` + polygon + `, "ring": 0, "from": 0, "to": 0, "tag": "floor"}]}, "geometry": ` + geometry + `}`
	}
	geojsonRefused(t, "Polygon, polygon 1", feature("1", poly), "edge tag range 0 names polygon 1, but the feature has polygon 0 only")
	geojsonRefused(t, "MultiPolygon, polygon 2", feature("2", multi), "edge tag range 0 names polygon 2, but the feature has polygons 0 to 1")
	geojsonRefused(t, "MultiPolygon, polygon -1", feature("-1", multi), "names polygon -1")
	geojsonRefused(t, "no geometry", feature("0", "null"), "names polygon 0, but the feature has no geometry")
	outs, err := ReadGeoJSON([]byte(feature("1", multi)))
	if err != nil || len(outs) != 2 {
		t.Fatalf("polygon 1 of two: %d outlines, %v", len(outs), err)
	}
	// Edge 0 of the second square runs from (5, 0) to (7, 0); the square
	// is counter-clockwise in the file, so it keeps its order.
	if s := outs[1].Outer.Segments[0]; s.Attr().Tag != "floor" || s.At(0) != [2]float64{5, 0} {
		t.Errorf("polygon 1 edge 0: tag %q from %v, want floor from (5, 0)", s.Attr().Tag, s.At(0))
	}
	if tag := outs[0].Outer.Segments[0].Attr().Tag; tag != "outer" {
		t.Errorf("polygon 0 edge 0 tagged %q, want the default outer", tag)
	}
}

// RFC 7946 §3.1.1: a position's optional third element is its altitude
// or elevation. One altitude at every position is the plane of a drawing
// and is read (the 3 × 1 rectangle keeps its area 3); an altitude that
// varies is refused, naming both positions, rather than dropped.
func TestReadGeoJSONAltitude(t *testing.T) {
	outs, err := ReadGeoJSON([]byte(`{"type": "Polygon", "coordinates": [[[0, 0, 5], [3, 0, 5], [3, 1, 5], [0, 1, 5], [0, 0, 5]]]}`))
	if err != nil {
		t.Fatal(err)
	}
	if a := outlineArea(t, outs[0]); math.Abs(a-3) > 1e-12 {
		t.Errorf("area %g, want 3", a)
	}
	geojsonRefused(t, "varying altitude", `{"type": "Polygon", "coordinates": [[[0, 0, 5], [3, 0, 5], [3, 1, 6], [0, 1, 5], [0, 0, 5]]]}`,
		"GeoJSON (Polygon) ring 0 position 2: altitude 6 differs from altitude 5 at GeoJSON (Polygon) ring 0 position 0", "plane")
	geojsonRefused(t, "altitude varying between polygons", `{"type": "MultiPolygon", "coordinates": [
		[[[0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 0, 1]]], [[[5, 5, 2], [6, 5, 2], [6, 6, 2], [5, 5, 2]]]]}`,
		"(MultiPolygon) polygon 1 ring 0 position 0: altitude 2 differs from altitude 1 at GeoJSON (MultiPolygon) polygon 0 ring 0 position 0")
}
