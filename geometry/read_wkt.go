package geometry

import (
	"fmt"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkt"
)

// ReadWKT reads a POLYGON, MULTIPOLYGON or GEOMETRYCOLLECTION of them in
// well-known text (decoded by orb's encoding/wkt) into one validated,
// oriented outline per polygon, in text order: the exterior ring the outer
// loop, the holes the inner loops, one line segment per ring edge. Edges
// are tagged by tags (EdgeTag.Polygon counts the polygons in text order,
// across a collection) or by default "outer", "inner1", ...
func ReadWKT(text string, tags PolygonTags) ([]Outline, error) {
	g, err := wkt.Unmarshal(strings.TrimSpace(text))
	if err != nil {
		return nil, fmt.Errorf("WKT: %v (expected POLYGON ((x y, ...), ...) or MULTIPOLYGON (((x y, ...)), ...)): %w", err, ErrFormat)
	}
	var polys []orb.Polygon
	var collect func(g orb.Geometry) error
	collect = func(g orb.Geometry) error {
		switch v := g.(type) {
		case orb.Polygon:
			polys = append(polys, v)
		case orb.MultiPolygon:
			polys = append(polys, v...)
		case orb.Collection:
			for _, m := range v {
				if err := collect(m); err != nil {
					return err
				}
			}
		default:
			return fmt.Errorf("WKT: a %s bounds no area; give a POLYGON or MULTIPOLYGON: %w", g.GeoJSONType(), ErrFormat)
		}
		return nil
	}
	if err := collect(g); err != nil {
		return nil, err
	}
	if len(polys) == 0 {
		return nil, fmt.Errorf("WKT: no polygon found: %w", ErrFormat)
	}
	for k, e := range tags.Edges {
		if e.Polygon < 0 || e.Polygon >= len(polys) {
			return nil, fmt.Errorf("WKT: edge tag range %d names polygon %d, but the text has polygons 0 to %d: %w", k, e.Polygon, len(polys)-1, ErrFormat)
		}
	}
	outs := make([]Outline, len(polys))
	for i, p := range polys {
		o, err := polygonOutline(p, tags, i, fmt.Sprintf("WKT polygon %d", i), wktRingRule)
		if err != nil {
			return nil, err
		}
		outs[i] = o
	}
	return outs, nil
}
