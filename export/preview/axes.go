package preview

import (
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Sizes of the coordinate labels and scale bars, in canvas pixels.
const (
	axisText   = 10 // label height
	tickLen    = 4  // tick marks, outside the panel
	tickGapX   = 90 // the least spacing of x ticks
	tickGapY   = 40 // of y ticks
	barShare   = 0.22
	footerRows = 2 // rows beneath an overview-width panel: x ticks, scale bar
	rowH       = 14
)

// textWidth estimates the width of t drawn at size px, as the raster font
// draws it (6 font pixels a character of 5 plus a space, size/9 canvas
// pixels each); the SVG's sans-serif text is about as wide.
func textWidth(t string, size float64) float64 {
	scale := math.Max(size/9, 1)
	return float64(utf8.RuneCountInString(t))*6*scale - scale
}

// wrap breaks t at spaces into lines no wider than width at size px,
// the lines after the first led by indent; a word wider than width stays
// whole on its own line.
func wrap(t string, width, size float64, indent string) []string {
	var lines []string
	for t != "" {
		if len(lines) > 0 {
			t = indent + t
		}
		if textWidth(t, size) <= width {
			return append(lines, t)
		}
		cut := -1
		for i, r := range t {
			if r == ' ' && i > len(indent) && textWidth(t[:i], size) <= width {
				cut = i
			}
		}
		if cut < 0 {
			cut = strings.IndexByte(t[len(indent)+1:], ' ')
			if cut < 0 {
				return append(lines, t)
			}
			cut += len(indent) + 1
		}
		lines = append(lines, t[:cut])
		t = strings.TrimLeft(t[cut:], " ")
	}
	return lines
}

// niceStep is the smallest of 1, 2 and 5 times a power of ten that is at
// least raw.
func niceStep(raw float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, f := range []float64{1, 2, 5, 10} {
		if f*p >= raw*(1-1e-12) {
			return f * p
		}
	}
	return 10 * p
}

// niceBelow is the largest of 1, 2 and 5 times a power of ten that is at
// most v: the length of a scale bar that fits in v.
func niceBelow(v float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, f := range []float64{5, 2, 1} {
		if f*p <= v*(1+1e-12) {
			return f * p
		}
	}
	return p
}

// fixed formats v with dec decimals, never as "-0".
func fixed(v float64, dec int) string {
	t := strconv.FormatFloat(v, 'f', dec, 64)
	if z, err := strconv.ParseFloat(t, 64); err == nil && z == 0 {
		t = strconv.FormatFloat(0, 'f', dec, 64)
	}
	return t
}

// stepDecimals is the number of decimals that tells apart values step
// apart, step one of 1, 2 and 5 times a power of ten.
func stepDecimals(step float64) int {
	return max(0, int(-math.Floor(math.Log10(step)+1e-9)))
}

// spanDecimals is the number of decimals that shows a range of width span
// to about one part in a hundred.
func spanDecimals(span float64) int {
	if span <= 0 || span-span != 0 {
		return 3
	}
	return min(15, max(0, int(math.Ceil(-math.Log10(span)))+2))
}

// lengthLabel writes a length in metres with the SI prefix that puts its
// number in [1, 1000): 0.05 is "50 mm", 2e-5 "20 µm", 3000 "3 km".
func lengthLabel(l float64) string {
	units := []struct {
		f    float64
		name string
	}{{1e3, "km"}, {1, "m"}, {1e-3, "mm"}, {1e-6, "µm"}, {1e-9, "nm"}}
	for _, u := range units {
		if l >= u.f*(1-1e-9) {
			return strconv.FormatFloat(math.Round(l/u.f*1e6)/1e6, 'f', -1, 64) + " " + u.name
		}
	}
	return strconv.FormatFloat(l, 'g', 3, 64) + " m"
}

// drawTicks draws the coordinates of view v along its bottom and left
// edges: ticks at round values at least tickGapX (x) and tickGapY (y)
// pixels apart, labelled outside the panel, x beneath it and y to its left.
func drawTicks(s *scene, v view) {
	b := v.b
	xs := niceStep((v.x1 - v.x0) * tickGapX / b.w)
	dec := stepDecimals(xs)
	var pts []float64
	lastRight := math.Inf(-1)
	for x := math.Ceil(v.x0/xs) * xs; x <= v.x1; x += xs {
		px, _ := v.px(x, v.cy)
		pts = append(pts, px, b.y+b.h, px, b.y+b.h+tickLen)
		t := fixed(x, dec)
		w := textWidth(t, axisText)
		if px-w/2 < lastRight+8 || px+w/2 > b.x+b.w+margin {
			continue
		}
		s.text(px, b.y+b.h+tickLen+axisText+1, axisText, middle, faint, false, t)
		lastRight = px + w/2
	}
	ys := niceStep((v.y1 - v.y0) * tickGapY / b.h)
	dec = stepDecimals(ys)
	for y := math.Ceil(v.y0/ys) * ys; y <= v.y1; y += ys {
		_, py := v.px(v.cx, y)
		pts = append(pts, b.x-tickLen, py, b.x, py)
		s.text(b.x-tickLen-3, py+axisText/2-1, axisText, end, faint, false, fixed(y, dec))
	}
	s.add(shape{kind: segments, pts: pts, stroke: &faint, width: 1})
	s.text(b.x-tickLen-3, b.y-5, axisText, end, faint, true, "y (m)")
}

// drawScaleBar draws, with its left end at (x, y) on a text baseline, a
// bar of a round length about barShare of view v's width, with end
// ticks, and its length after it.
func drawScaleBar(s *scene, v view, x, y float64) {
	l := niceBelow(barShare * v.b.w / v.scale)
	w := l * v.scale
	y -= 3
	s.add(shape{kind: segments, pts: []float64{x, y, x + w, y, x, y - 4, x, y + 3, x + w, y - 4, x + w, y + 3}, stroke: &ink, width: 1.6})
	s.text(x+w+6, y+4, axisText, start, ink, false, lengthLabel(l))
}

// drawFooter draws the coordinates of a large view: its ticks, then
// beneath them a scale bar at the left and the x axis's name at the
// right. It returns the y below the footer.
func drawFooter(s *scene, v view) float64 {
	drawTicks(s, v)
	y := v.b.y + v.b.h + tickLen + float64(footerRows)*rowH + 2
	drawScaleBar(s, v, v.b.x, y)
	s.text(v.b.x+v.b.w, y, axisText, end, faint, true, "x (m)")
	return y + 4
}
