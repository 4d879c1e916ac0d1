package geometry

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"

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
// default "outer", "inner1", ...; an "edge_tags" range naming a polygon
// the feature does not have is refused. A feature with no geometry (null,
// RFC 7946 §3.2) is skipped, and so is a Point or MultiPoint, which
// marks a place and draws no edge; a LineString or MultiLineString is
// refused, naming where it is, rather than left out of the outline
// unseen: a line drawn to mark an inlet would otherwise be lost, where
// "edge_tags" is the way to tag edges. Coordinates are taken as plane coordinates: a third (altitude)
// value must be the same at every position of the text, the plane of a
// drawing exported from a 3D program, and is then dropped; an altitude
// that varies is refused, since the drawing would not be plane.
func ReadGeoJSON(data []byte) ([]Outline, error) {
	var outs []Outline
	r := &gjReader{doc: data}
	if err := r.object(data, "GeoJSON", PolygonTags{}, nil, &outs); err != nil {
		return nil, err
	}
	if len(outs) == 0 {
		return nil, fmt.Errorf("GeoJSON: no Polygon or MultiPolygon found: %w", ErrFormat)
	}
	return outs, nil
}

// gjReader reads one GeoJSON document: doc is its whole text, for
// locating messages, and the rest is the altitude seen so far, which
// every position with a third value must share.
type gjReader struct {
	doc    []byte
	hasZ   bool    // a position with an altitude has been read
	z      float64 // its altitude
	zWhere string  // where it was, for messages
	size   float64 // the largest |x| or |y| read so far, the round-off scale for z
}

// object reads the GeoJSON object raw, named where in messages, tagging
// its polygons by tags (a Feature's own properties replace them) and
// appending their outlines to outs. polys, when not nil, is raised to one
// more than the largest polygon index (within a MultiPolygon; 0 for a
// Polygon) read, so that a Feature can refuse an edge_tags range naming a
// polygon it does not have.
func (r *gjReader) object(raw []byte, where string, tags PolygonTags, polys *int, outs *[]Outline) error {
	doc := r.doc
	var g gjObject
	if err := json.Unmarshal(raw, &g); err != nil {
		return jsonError(doc, raw, where, err)
	}
	seen := func(n int) {
		if polys != nil {
			*polys = max(*polys, n)
		}
	}
	switch g.Type {
	case "FeatureCollection":
		for i, f := range g.Features {
			if err := r.object(f, fmt.Sprintf("%s feature %d", where, i), tags, nil, outs); err != nil {
				return err
			}
		}
	case "Feature":
		t, err := featureTags(doc, g.Properties, where)
		if err != nil {
			return err
		}
		n := 0
		if len(g.Geometry) > 0 && string(g.Geometry) != "null" {
			if err := r.object(g.Geometry, where, t, &n, outs); err != nil {
				return err
			}
		}
		for k, e := range t.Edges {
			if e.Polygon >= 0 && e.Polygon < n {
				continue
			}
			has := "no geometry"
			switch {
			case n == 1:
				has = "polygon 0 only (\"polygon\" counts the polygons of a MultiPolygon)"
			case n > 1:
				has = fmt.Sprintf("polygons 0 to %d", n-1)
			}
			return fmt.Errorf("%s%s: edge tag range %d names polygon %d, but the feature has %s: %w", where, atOffset(doc, g.Properties), k, e.Polygon, has, ErrFormat)
		}
	case "GeometryCollection":
		for i, m := range g.Geometries {
			if err := r.object(m, fmt.Sprintf("%s geometry %d", where, i), tags, polys, outs); err != nil {
				return err
			}
		}
	case "Polygon":
		var c [][][]float64
		if err := decodeCoords(doc, g.Coordinates, where, &c); err != nil {
			return err
		}
		p, err := r.polygon(c, where+" (Polygon)")
		if err != nil {
			return err
		}
		o, err := polygonOutline(p, tags, 0, where+" (Polygon)", geojsonRingRule)
		if err != nil {
			return err
		}
		seen(1)
		*outs = append(*outs, o)
	case "MultiPolygon":
		var c [][][][]float64
		if err := decodeCoords(doc, g.Coordinates, where, &c); err != nil {
			return err
		}
		for i, pc := range c {
			w := fmt.Sprintf("%s (MultiPolygon) polygon %d", where, i)
			p, err := r.polygon(pc, w)
			if err != nil {
				return err
			}
			o, err := polygonOutline(p, tags, i, w, geojsonRingRule)
			if err != nil {
				return err
			}
			*outs = append(*outs, o)
		}
		seen(len(c))
	case "Point", "MultiPoint":
		// A point marks a place (a label, a probe) and draws no edge:
		// nothing of the outline is lost without it.
	case "LineString", "MultiLineString":
		return fmt.Errorf("%s%s: a %s bounds no area; a sketch is read from its Polygon and MultiPolygon geometries only, and cvdeck refuses the others rather than leave them out. "+
			"To tag edges of the polygon (an inlet, a wall), give the polygon's feature the property \"edge_tags\": [{\"ring\": 0, \"from\": 2, \"to\": 2, \"tag\": \"inlet\"}] "+
			"(edge k runs from position k to position k+1 of the ring) and remove the %s: %w", where, atOffset(doc, raw), g.Type, g.Type, ErrFormat)
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

// polygon turns decoded positions into an orb.Polygon of their first two
// numbers. A third number (RFC 7946 §3.1.1: altitude or elevation) must
// be the same at every position of the document, within round-off of
// the coordinates' size (a plane exported from 3D may carry 1e-17 beside
// 0, as x-y point files allow); positions without one are taken to lie
// in that plane. Further numbers, whose meaning RFC 7946 leaves
// unspecified, are ignored.
func (r *gjReader) polygon(c [][][]float64, where string) (orb.Polygon, error) {
	p := make(orb.Polygon, len(c))
	for ri, ring := range c {
		pr := make(orb.Ring, len(ring))
		for k, pos := range ring {
			if len(pos) < 2 {
				return nil, fmt.Errorf("%s ring %d position %d has %d numbers, a position needs at least 2: %w", where, ri, k, len(pos), ErrFormat)
			}
			r.size = max(r.size, math.Abs(pos[0]), math.Abs(pos[1]))
			if len(pos) >= 3 {
				at := fmt.Sprintf("%s ring %d position %d", where, ri, k)
				if !r.hasZ {
					r.hasZ, r.z, r.zWhere = true, pos[2], at
				} else if math.Abs(pos[2]-r.z) > 1e-9*max(r.size, math.Abs(r.z)) {
					return nil, fmt.Errorf("%s: altitude %g differs from altitude %g at %s; cvdeck reads a plane drawing, so a third coordinate must be the same at every position (or left out): %w", at, pos[2], r.z, r.zWhere, ErrFormat)
				}
			}
			pr[k] = orb.Point{pos[0], pos[1]}
		}
		p[ri] = pr
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
