package deck

import (
	"fmt"
	"math"

	"cvdeck/bc"
	"cvdeck/geometry"
)

// spacingKeys are the keys of a spacing mapping.
var spacingKeys = []string{"count", "size", "cosine", "first", "last", "first_yplus", "last_yplus", "growth", "law"}

// decodeSpacing reads a spacing law and applies the case's refinement
// factor r consistently to every law:
//
//   - count: N nodes → about (N−1)·r edges;
//   - size: h → h/r;
//   - first/last spacing → spacing/r, and a growth ratio g → g^(1/r), so
//     that r refined cells span what one cell spanned (the geometric mean
//     of r ratios g^(1/r) is g);
//   - cosine: N nodes → as count.
//
// A law that fixes its count (count, cosine, and the laws with a count) is
// returned with the count as written: the whole refined counts are chosen
// afterwards, all segments together, by roundCounts, so that the sides a
// structured block needs equal stay equal (rounding each segment alone
// would not keep a three-segment side equal to a one-segment one).
//
// The forms are: {count}, {size}, {cosine}, {first, growth}, {last,
// growth}, {first, count}, {last, count} (geometric growth with the ratio
// solved; with law: vinokur, Vinokur's one-sided stretching instead), and
// {first, last, count} (Vinokur's two-sided stretching). In place of first
// or last, first_yplus or last_yplus give the end spacing as the
// first-cell height for that y+ in the case's reference state (see
// bc.FirstCellHeight), so a wall spacing follows the flow.
func decodeSpacing(v value, c *Case) (geometry.Spacing, error) {
	refine := c.Refine
	o, err := v.object()
	if err != nil {
		return geometry.Spacing{}, err
	}
	o.known(spacingKeys...)
	if err := o.done(); err != nil {
		return geometry.Spacing{}, err
	}
	num := func(key string) (float64, bool, error) {
		x, ok := o.get(key)
		if !ok {
			return 0, false, nil
		}
		f, err := x.positive()
		return f, true, err
	}
	length := func(key string) (float64, bool, error) {
		f, ok, err := num(key)
		return f * v.d.scale / refine, ok, err
	}
	nodes := func(key string) (int, bool, error) {
		x, ok := o.get(key)
		if !ok {
			return 0, false, nil
		}
		n, err := x.count(2)
		if err != nil {
			return 0, true, err
		}
		return n, true, nil
	}
	count, hasCount, err := nodes("count")
	if err != nil {
		return geometry.Spacing{}, err
	}
	cosine, hasCosine, err := nodes("cosine")
	if err != nil {
		return geometry.Spacing{}, err
	}
	size, hasSize, err := length("size")
	if err != nil {
		return geometry.Spacing{}, err
	}
	first, hasFirst, err := length("first")
	if err != nil {
		return geometry.Spacing{}, err
	}
	last, hasLast, err := length("last")
	if err != nil {
		return geometry.Spacing{}, err
	}
	for _, end := range []struct {
		key string
		h   *float64
		has *bool
	}{{"first_yplus", &first, &hasFirst}, {"last_yplus", &last, &hasLast}} {
		x, ok := o.get(end.key)
		if !ok {
			continue
		}
		if *end.has {
			return geometry.Spacing{}, x.errf("give %s or %s, not both", end.key[:len(end.key)-6], end.key)
		}
		h, err := c.wallHeight(x)
		if err != nil {
			return geometry.Spacing{}, err
		}
		*end.h, *end.has = h/refine, true
	}
	growth, hasGrowth, err := num("growth")
	if err != nil {
		return geometry.Spacing{}, err
	}
	if hasGrowth {
		if !(growth >= 1) {
			x, _ := o.get("growth")
			return geometry.Spacing{}, x.errf("a growth ratio is at least 1 (each cell no smaller than the one before), got %g", growth)
		}
		growth = math.Pow(growth, 1/refine)
	}
	vinokur := false
	if x, ok := o.get("law"); ok {
		law, err := x.oneOf("geometric", "vinokur")
		if err != nil {
			return geometry.Spacing{}, err
		}
		vinokur = law == "vinokur"
	}
	var sp geometry.Spacing
	switch {
	case hasCount && !hasSize && !hasCosine && !hasFirst && !hasLast && !hasGrowth:
		sp, err = geometry.Count(count)
	case hasSize && !hasCount && !hasCosine && !hasFirst && !hasLast && !hasGrowth:
		sp, err = geometry.Size(size)
	case hasCosine && !hasCount && !hasSize && !hasFirst && !hasLast && !hasGrowth:
		sp, err = geometry.Cosine(cosine)
	case hasFirst && hasGrowth && !hasLast && !hasCount && !hasSize && !hasCosine:
		sp, err = geometry.Growth(first, growth, false)
	case hasLast && hasGrowth && !hasFirst && !hasCount && !hasSize && !hasCosine:
		sp, err = geometry.Growth(last, growth, true)
	case hasFirst && hasCount && !hasLast && !hasGrowth && !hasSize && !hasCosine:
		if vinokur {
			sp, err = geometry.OneSided(first, count, false)
		} else {
			sp, err = geometry.GrowthCount(first, count, false)
		}
	case hasLast && hasCount && !hasFirst && !hasGrowth && !hasSize && !hasCosine:
		if vinokur {
			sp, err = geometry.OneSided(last, count, true)
		} else {
			sp, err = geometry.GrowthCount(last, count, true)
		}
	case hasFirst && hasLast && hasCount && !hasGrowth && !hasSize && !hasCosine:
		sp, err = geometry.Clustered(first, last, count)
	default:
		return geometry.Spacing{}, v.errf("a spacing is one of {count: N}, {size: h}, {cosine: N}, {first: h, growth: g}, {last: h, growth: g}, {first: h, count: N}, {last: h, count: N} or {first: h, last: h, count: N}")
	}
	if err != nil {
		return geometry.Spacing{}, v.wrap(err)
	}
	return sp, nil
}

// wallHeight reads a target y+ and returns the first-cell height that gives
// it in the reference state, at the reference length (bc.FirstCellHeight),
// keeping the estimate's remarks (a laminar station, say) for the deck's
// notes.
func (c *Case) wallHeight(x value) (float64, error) {
	yplus, err := x.positive()
	if err != nil {
		return 0, err
	}
	if c.Reference == nil || c.Reference.length == 0 {
		return 0, x.errf("a height from y+ needs a reference state with a reference length (reference: {..., length: L})")
	}
	ws, err := bc.FirstCellHeight(c.Reference.state, c.Reference.length, yplus)
	if err != nil {
		return 0, x.wrap(err)
	}
	c.yplusNotes = ws.Notes
	return ws.Height, nil
}

// checkedNodes is the most nodes checkSpacing places on a segment to try
// its law.
const checkedNodes = 100000

// checkSpacing discretises a segment of the case as written (refinement
// factor 1) once, so that a spacing law the segment cannot meet — a first
// spacing longer than the segment, a size that asks for too many nodes —
// is reported at the spacing in the case file (o's spacing key, or the
// segment item it when the spacing is its loop's) rather than later, at
// the block side or loop that uses the segment. The law's lengths are in
// metres; for a case in other units the message says so. Under
// refinement the counts are chosen later (roundCounts), and the mesher
// reports such a law.
func (c *Case) checkSpacing(seg geometry.Segment, o *object, it value) error {
	if c.Refine != 1 {
		return nil
	}
	// A law that asks for very many nodes is left for the mesher, after
	// the cell-count estimate, rather than allocated here (an impossible
	// count is an error of NodeCount and is reported below).
	if sp := seg.Attr().Spacing; !sp.KeepsVertices() {
		if n, err := sp.NodeCount(seg.Length()); err == nil && n > checkedNodes {
			return nil
		}
	}
	_, err := geometry.DiscretiseSegment(seg)
	if err == nil {
		return nil
	}
	err = inMetres(err, unitScale[c.Units])
	if v, ok := o.get("spacing"); ok {
		return v.wrap(err)
	}
	return it.wrap(fmt.Errorf("its loop's spacing: %w", err))
}
