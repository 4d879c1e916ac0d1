package preview

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// drawHistogram draws the distribution of a metric's finite values in b:
// bins equal-width bins across the axis histogramAxis gives, bar heights
// on a log scale, log10(1 + count) / log10(1 + largest count), so that a
// handful of bad cells still shows beside a million good ones; the limits
// on the axis as dashed lines in their status colour, and those off it
// named in a line of text beneath for each end.
func drawHistogram(s *scene, mt Metric, b box) {
	title := mt.Name + " (no unit)"
	if mt.Unit != "" {
		title = mt.Name + " (" + mt.Unit + ")"
	}
	s.text(b.x, b.y-8, 13, start, ink, true, title)
	s.rect(b, &white, &panelLine, 1)
	ax, n := histogramAxis(mt)
	if n == 0 {
		s.text(b.x+b.w/2, b.y+b.h/2, 12, middle, faint, false, "no finite values")
		return
	}
	lo, hi := ax.lo, ax.hi
	var count [bins]int
	scale := float64(bins) / (hi - lo)
	for _, v := range mt.Values {
		if v-v != 0 {
			continue // NaN or infinite
		}
		k := int(scale * (v - lo))
		count[min(max(k, 0), bins-1)]++
	}
	top := 0
	for _, c := range count {
		top = max(top, c)
	}
	bw := b.w / bins
	for k, c := range count {
		if c == 0 {
			continue
		}
		h := (b.h - 4) * math.Log10(1+float64(c)) / math.Log10(1+float64(top))
		s.rect(box{b.x + float64(k)*bw + 0.5, b.y + b.h - h, bw - 1, h}, &barFill, nil, 0)
	}
	for _, l := range ax.on {
		c := warnFill
		if l.Status == Fail {
			c = failFill
		}
		x := b.x + b.w*(l.Value-lo)/(hi-lo)
		s.add(shape{kind: segments, pts: []float64{x, b.y, x, b.y + b.h}, stroke: &c, width: 1.5, dashed: true})
	}
	s.text(b.x, b.y+b.h+16, 12, start, faint, false, withUnit(lo, mt.Unit))
	s.text(b.x+b.w, b.y+b.h+16, 12, end, faint, false, withUnit(hi, mt.Unit))
	s.text(b.x, b.y+b.h+34, 12, start, faint, false, fmt.Sprintf("%d values; bar height: log count, tallest %d", n, top))
	for i, line := range ax.offLines(mt.Unit) {
		s.text(b.x, b.y+b.h+52+18*float64(i), 12, start, faint, false, line)
	}
}

// axis is a histogram's value range [lo, hi] and the limits drawn on it
// (on) or beyond its ends (below, above), each in the order given.
type axis struct {
	lo, hi       float64
	on           []Limit
	below, above []Limit
}

// axisReach is how far a limit may widen a histogram's axis: the axis
// takes in a limit only while it spans at most this many times the range
// of the values, so that the values always fill a third of the width or
// more. A limit far beyond the values (a fail limit of 1e5 on aspect
// ratios of 1 to 2) would otherwise squeeze every value into one bar.
const axisReach = 3

// histogramAxis returns the axis of metric mt's histogram and the number
// of finite values. The axis runs over the values, widened to take in the
// limits nearest them while the whole stays within axisReach times their
// range; when every value is the same it is that value ± 1% (± 1e-12 at
// zero), and a limit at any other value lies off it.
func histogramAxis(mt Metric) (axis, int) {
	var ax axis
	lo, hi, n := math.Inf(1), math.Inf(-1), 0
	for _, v := range mt.Values {
		// v − v is 0 exactly when v is finite; plain comparisons then
		// suffice (math.Min and Max also sort out NaN and signed zeros,
		// at several times the cost over a million values).
		if v-v != 0 {
			continue
		}
		if v < lo {
			lo = v
		}
		if v > hi {
			hi = v
		}
		n++
	}
	if n == 0 {
		return ax, 0
	}
	var limits []Limit
	for _, l := range mt.Limits {
		if !math.IsNaN(l.Value) && !math.IsInf(l.Value, 0) {
			limits = append(limits, l)
		}
	}
	// The nearest limits first.
	gap := func(l Limit) float64 { return math.Max(lo-l.Value, l.Value-hi) }
	slices.SortStableFunc(limits, func(a, b Limit) int { return cmp.Compare(gap(a), gap(b)) })
	reach := axisReach * (hi - lo)
	alo, ahi := lo, hi
	for _, l := range limits {
		if nlo, nhi := math.Min(alo, l.Value), math.Max(ahi, l.Value); nhi-nlo <= reach {
			alo, ahi = nlo, nhi
		}
	}
	if alo == ahi {
		d := math.Max(math.Abs(alo)*0.01, 1e-12)
		alo, ahi = alo-d, ahi+d
	}
	ax.lo, ax.hi = alo, ahi
	for _, l := range mt.Limits {
		switch {
		case math.IsNaN(l.Value) || math.IsInf(l.Value, 0):
		case l.Value < alo:
			ax.below = append(ax.below, l)
		case l.Value > ahi:
			ax.above = append(ax.above, l)
		default:
			ax.on = append(ax.on, l)
		}
	}
	return ax, n
}

// offLines names the limits beyond each end of the axis, in unit, a line
// for each end that has any (short enough for the column in the raster
// font).
func (ax axis) offLines(unit string) []string {
	name := func(ls []Limit) string {
		var out []string
		for _, l := range ls {
			word := "warn"
			if l.Status == Fail {
				word = "fail"
			}
			out = append(out, word+" "+withUnit(l.Value, unit))
		}
		return strings.Join(out, ", ")
	}
	var lines []string
	if len(ax.below) > 0 {
		lines = append(lines, "below the axis: "+name(ax.below))
	}
	if len(ax.above) > 0 {
		lines = append(lines, "beyond the axis: "+name(ax.above))
	}
	return lines
}

// short formats v in four significant digits.
func short(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }
