package preview

import (
	"fmt"
	"math"
	"strconv"
)

// drawHistogram draws the distribution of a metric's finite values in b:
// bins equal-width bins from the smallest to the largest value, bar
// heights on a log scale, log10(1 + count) / log10(1 + largest count), so
// that a handful of bad cells still shows beside a million good ones; the
// limits as dashed lines in their status colour.
func drawHistogram(s *scene, mt Metric, b box) {
	lo, hi, n := math.Inf(1), math.Inf(-1), 0
	for _, v := range mt.Values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
		n++
	}
	s.text(b.x, b.y-8, 13, start, ink, true, mt.Name)
	s.rect(b, &white, &panelLine, 1)
	if n == 0 {
		s.text(b.x+b.w/2, b.y+b.h/2, 12, middle, faint, false, "no finite values")
		return
	}
	for _, l := range mt.Limits {
		if !math.IsNaN(l.Value) && !math.IsInf(l.Value, 0) {
			lo, hi = math.Min(lo, l.Value), math.Max(hi, l.Value)
		}
	}
	if hi == lo {
		d := math.Max(math.Abs(lo)*0.01, 1e-12)
		lo, hi = lo-d, hi+d
	}
	var count [bins]int
	for _, v := range mt.Values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		k := int(float64(bins) * (v - lo) / (hi - lo))
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
	for _, l := range mt.Limits {
		if math.IsNaN(l.Value) || math.IsInf(l.Value, 0) {
			continue
		}
		c := warnFill
		if l.Status == Fail {
			c = failFill
		}
		x := b.x + b.w*(l.Value-lo)/(hi-lo)
		s.add(shape{kind: segments, pts: []float64{x, b.y, x, b.y + b.h}, stroke: &c, width: 1.5, dashed: true})
	}
	s.text(b.x, b.y+b.h+16, 12, start, faint, false, short(lo))
	s.text(b.x+b.w, b.y+b.h+16, 12, end, faint, false, short(hi))
	s.text(b.x, b.y+b.h+34, 12, start, faint, false, fmt.Sprintf("%d values; bar height: log count, tallest %d", n, top))
}

// short formats v in four significant digits.
func short(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }
