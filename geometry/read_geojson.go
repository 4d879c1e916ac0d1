package geometry

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"

	"github.com/paulmach/orb"
)

// GeoJSON (RFC 7946) is read with encoding/json into orb's types. (orb's
// own geojson package would need a BSON module the build does not carry.)

// gjObject holds the members of any GeoJSON object that the reader uses.
type gjObject struct {
	Type        string            `json:"type"`
	Coordinates json.RawMessage   `json:"coordinates"`
	Geometry    json.RawMessage   `json:"geometry"`
	Geometries  []json.RawMessage `json:"geometries"`
	Features    []json.RawMessage `json:"features"`
	Properties  json.RawMessage   `json:"properties"`
}

// gjProperties are the feature properties that tag edges: "tag" tags
// every edge of the feature's polygons, and "edge_tags" tags ranges:
//
//	"edge_tags": [{"ring": 0, "from": 0, "to": 3, "tag": "wall"},
//	              {"polygon": 1, "ring": 0, "from": 2, "to": 2, "tag": "inflow"}]
//
// with "polygon" (the index within a MultiPolygon) and "ring" (0 the
// exterior ring, k the k-th hole) both 0 when left out. Other properties
// are ignored.
type gjProperties struct {
	Tag      json.RawMessage `json:"tag"`
	EdgeTags json.RawMessage `json:"edge_tags"`
}

// ReadGeoJSON reads the polygons of a GeoJSON text (RFC 7946): a Polygon
// or MultiPolygon geometry, a GeometryCollection, a Feature or a
// FeatureCollection. Each polygon becomes one validated, oriented
// outline, in document order, its exterior ring the outer loop and its
// holes the inner loops, one line segment per ring edge, tagged from the
// feature's "tag" and "edge_tags" properties (see gjProperties) or by
// default "outer", "inner1", ... Features whose geometry bounds no area
// (points, lines, null) are skipped. Coordinates are taken as plane
// coordinates; a third (altitude) value is ignored.
func ReadGeoJSON(data []byte) ([]Outline, error) {
	var outs []Outline
	if err := readGeoJSONObject(data, data, "GeoJSON", PolygonTags{}, &outs); err != nil {
		return nil, err
	}
	if len(outs) == 0 {
		return nil, fmt.Errorf("GeoJSON: no Polygon or MultiPolygon found: %w", ErrFormat)
	}
	return outs, nil
}

func readGeoJSONObject(doc, raw []byte, where string, tags PolygonTags, outs *[]Outline) error {
	var g gjObject
	if err := json.Unmarshal(raw, &g); err != nil {
		return jsonError(doc, raw, where, err)
	}
	switch g.Type {
	case "FeatureCollection":
		for i, f := range g.Features {
			if err := readGeoJSONObject(doc, f, fmt.Sprintf("%s feature %d", where, i), tags, outs); err != nil {
				return err
			}
		}
	case "Feature":
		t, err := featureTags(doc, g.Properties, where)
		if err != nil {
			return err
		}
		if len(g.Geometry) == 0 || string(g.Geometry) == "null" {
			return nil
		}
		return readGeoJSONObject(doc, g.Geometry, where, t, outs)
	case "GeometryCollection":
		for i, m := range g.Geometries {
			if err := readGeoJSONObject(doc, m, fmt.Sprintf("%s geometry %d", where, i), tags, outs); err != nil {
				return err
			}
		}
	case "Polygon":
		var c [][][]float64
		if err := decodeCoords(doc, g.Coordinates, where, &c); err != nil {
			return err
		}
		p, err := toPolygon(c, where)
		if err != nil {
			return err
		}
		o, err := polygonOutline(p, tags, 0, where+" (Polygon)", geojsonRingRule)
		if err != nil {
			return err
		}
		*outs = append(*outs, o)
	case "MultiPolygon":
		var c [][][][]float64
		if err := decodeCoords(doc, g.Coordinates, where, &c); err != nil {
			return err
		}
		for i, pc := range c {
			p, err := toPolygon(pc, fmt.Sprintf("%s polygon %d", where, i))
			if err != nil {
				return err
			}
			o, err := polygonOutline(p, tags, i, fmt.Sprintf("%s (MultiPolygon) polygon %d", where, i), geojsonRingRule)
			if err != nil {
				return err
			}
			*outs = append(*outs, o)
		}
	case "Point", "MultiPoint", "LineString", "MultiLineString":
		// Bounds no area: not part of an outline.
	case "":
		return fmt.Errorf("%s%s: object has no \"type\" member: %w", where, atOffset(doc, raw), ErrFormat)
	default:
		return fmt.Errorf("%s%s: unknown GeoJSON type %q (RFC 7946 types: Polygon, MultiPolygon, Feature, FeatureCollection, GeometryCollection, ...): %w", where, atOffset(doc, raw), g.Type, ErrFormat)
	}
	return nil
}

// decodeCoords decodes "coordinates" of depth 3 (Polygon) or 4
// (MultiPolygon) into c.
func decodeCoords[T any](doc, raw []byte, where string, c *T) error {
	if len(raw) == 0 {
		return fmt.Errorf("%s: geometry has no \"coordinates\": %w", where, ErrFormat)
	}
	if err := json.Unmarshal(raw, c); err != nil {
		return jsonError(doc, raw, where+" coordinates", err)
	}
	return nil
}

// toPolygon turns decoded positions into an orb.Polygon; positions of
// three or more numbers keep their first two.
func toPolygon(c [][][]float64, where string) (orb.Polygon, error) {
	p := make(orb.Polygon, len(c))
	for ri, ring := range c {
		r := make(orb.Ring, len(ring))
		for k, pos := range ring {
			if len(pos) < 2 {
				return nil, fmt.Errorf("%s ring %d position %d has %d numbers, a position needs at least 2: %w", where, ri, k, len(pos), ErrFormat)
			}
			r[k] = orb.Point{pos[0], pos[1]}
		}
		p[ri] = r
	}
	return p, nil
}

// featureTags decodes a feature's tagging properties.
func featureTags(doc, raw []byte, where string) (PolygonTags, error) {
	var t PolygonTags
	if len(raw) == 0 || string(raw) == "null" {
		return t, nil
	}
	var p gjProperties
	if err := json.Unmarshal(raw, &p); err != nil {
		return t, jsonError(doc, raw, where+" properties", err)
	}
	if len(p.Tag) > 0 && string(p.Tag) != "null" {
		if err := json.Unmarshal(p.Tag, &t.Tag); err != nil || t.Tag == "" {
			return t, fmt.Errorf("%s%s: property \"tag\" must be a non-empty string, got %s: %w", where, atOffset(doc, p.Tag), p.Tag, ErrFormat)
		}
	}
	if len(p.EdgeTags) > 0 && string(p.EdgeTags) != "null" {
		dec := json.NewDecoder(bytes.NewReader(p.EdgeTags))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&t.Edges); err != nil {
			return t, fmt.Errorf("%s%s: property \"edge_tags\" must be a list of {\"polygon\", \"ring\", \"from\", \"to\", \"tag\"} objects: %v: %w", where, atOffset(doc, p.EdgeTags), err, ErrFormat)
		}
	}
	return t, nil
}

// jsonError turns a decoding error into one located at a line and column
// of the whole document.
func jsonError(doc, raw []byte, where string, err error) error {
	var off int64 = -1
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		off = se.Offset
	case errors.As(err, &te):
		off = te.Offset
	}
	base := offsetOf(doc, raw)
	if off >= 0 && base >= 0 {
		line, col := lineCol(doc, base+int(off))
		return fmt.Errorf("%s at line %d, column %d: %v: %w", where, line, col, err, ErrFormat)
	}
	return fmt.Errorf("%s%s: %v: %w", where, atOffset(doc, raw), err, ErrFormat)
}

// atOffset returns " at line L, column C" for a sub-slice of doc.
func atOffset(doc, raw []byte) string {
	off := offsetOf(doc, raw)
	if off < 0 {
		return ""
	}
	line, col := lineCol(doc, off)
	return fmt.Sprintf(" at line %d, column %d", line, col)
}

// offsetOf returns where raw (a json.RawMessage of doc) starts in doc. The
// decoder copies raw messages, so it is found by content: the first
// occurrence, which is exact for distinct objects and close otherwise.
func offsetOf(doc, raw []byte) int {
	if len(raw) == 0 {
		return -1
	}
	if len(raw) == len(doc) {
		return 0
	}
	return bytes.Index(doc, raw)
}

// lineCol returns the 1-based line and column (in bytes) of offset off.
func lineCol(doc []byte, off int) (int, int) {
	off = min(off, len(doc))
	line := 1 + bytes.Count(doc[:off], []byte("\n"))
	col := off - bytes.LastIndexByte(doc[:off], '\n')
	return line, col
}
