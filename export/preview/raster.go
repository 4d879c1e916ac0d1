package preview

import (
	"image"
	"image/png"
	"io"
	"math"
	"sort"
)

// canvas is an RGBA picture with the current clip box.
type canvas struct {
	img                *image.RGBA
	cx0, cy0, cx1, cy1 int // clip, in pixels, half-open
	spans              []float64
}

// writePNG rasterises the scene with our own scanline rasteriser and
// encodes it with image/png.
func writePNG(w io.Writer, s *scene) error {
	cv := &canvas{img: image.NewRGBA(image.Rect(0, 0, s.w, s.h))}
	for i := range cv.img.Pix {
		cv.img.Pix[i] = 255
	}
	for _, sh := range s.shapes {
		cv.cx0, cv.cy0, cv.cx1, cv.cy1 = 0, 0, s.w, s.h
		if sh.clip > 0 {
			c := s.clips[sh.clip-1]
			cv.cx0, cv.cy0 = max(0, int(math.Floor(c.x))), max(0, int(math.Floor(c.y)))
			cv.cx1, cv.cy1 = min(s.w, int(math.Ceil(c.x+c.w))), min(s.h, int(math.Ceil(c.y+c.h)))
		}
		switch sh.kind {
		case segments:
			for k := 0; k+3 < len(sh.pts); k += 4 {
				cv.segment(sh.pts[k], sh.pts[k+1], sh.pts[k+2], sh.pts[k+3], *sh.stroke, sh.width, sh.dashed)
			}
		case polygon:
			if sh.fill != nil {
				cv.fill(sh.pts, *sh.fill)
			}
			if sh.stroke != nil {
				n := len(sh.pts)
				for k := 0; k+1 < n; k += 2 {
					cv.segment(sh.pts[k], sh.pts[k+1], sh.pts[(k+2)%n], sh.pts[(k+3)%n], *sh.stroke, sh.width, false)
				}
			}
		case rect:
			x, y, w, h := sh.pts[0], sh.pts[1], sh.pts[2], sh.pts[3]
			pts := []float64{x, y, x + w, y, x + w, y + h, x, y + h}
			if sh.fill != nil {
				cv.fill(pts, *sh.fill)
			}
			if sh.stroke != nil {
				for k := 0; k < 8; k += 2 {
					cv.segment(pts[k], pts[k+1], pts[(k+2)%8], pts[(k+3)%8], *sh.stroke, sh.width, false)
				}
			}
		case runs:
			for k := 0; k+2 < len(sh.pts); k += 3 {
				x, y, w, h := sh.pts[k], sh.pts[k+1], sh.pts[k+2], sh.width
				cv.fill([]float64{x, y, x + w, y, x + w, y + h, x, y + h}, *sh.fill)
			}
		case label:
			cv.text(sh)
		}
	}
	enc := png.Encoder{CompressionLevel: png.DefaultCompression}
	return enc.Encode(w, cv.img)
}

// blend mixes colour c into pixel (x, y) with coverage a in [0, 1].
func (cv *canvas) blend(x, y int, c rgb, a float64) {
	if x < cv.cx0 || y < cv.cy0 || x >= cv.cx1 || y >= cv.cy1 || a <= 0 {
		return
	}
	a = math.Min(a, 1)
	i := cv.img.PixOffset(x, y)
	p := cv.img.Pix[i : i+3 : i+3]
	p[0] = mix(p[0], c.r, a)
	p[1] = mix(p[1], c.g, a)
	p[2] = mix(p[2], c.b, a)
}

// mix is the channel value a of the way from p to q, rounded.
func mix(p, q uint8, a float64) uint8 {
	return uint8(math.Round(float64(p) + (float64(q)-float64(p))*a))
}

// fill paints a polygon by the even-odd rule, sampling each pixel at its
// centre on every scanline (no anti-aliasing for fills).
func (cv *canvas) fill(pts []float64, c rgb) {
	n := len(pts) / 2
	if n < 3 {
		return
	}
	y0, y1 := math.Inf(1), math.Inf(-1)
	for k := 0; k < n; k++ {
		y0, y1 = math.Min(y0, pts[2*k+1]), math.Max(y1, pts[2*k+1])
	}
	ya, yb := max(cv.cy0, int(math.Floor(y0))), min(cv.cy1-1, int(math.Ceil(y1)))
	for y := ya; y <= yb; y++ {
		sy := float64(y) + 0.5
		cv.spans = cv.spans[:0]
		for k := 0; k < n; k++ {
			ax, ay := pts[2*k], pts[2*k+1]
			bx, by := pts[(2*k+2)%(2*n)], pts[(2*k+3)%(2*n)]
			if (ay <= sy) == (by <= sy) {
				continue
			}
			cv.spans = append(cv.spans, ax+(sy-ay)*(bx-ax)/(by-ay))
		}
		sort.Float64s(cv.spans)
		for k := 0; k+1 < len(cv.spans); k += 2 {
			xa := max(cv.cx0, int(math.Ceil(cv.spans[k]-0.5)))
			xb := min(cv.cx1-1, int(math.Ceil(cv.spans[k+1]-0.5))-1)
			for x := xa; x <= xb; x++ {
				cv.blend(x, y, c, 1)
			}
		}
	}
}

// segment strokes a line of the given width: up to 1.5 px as an
// anti-aliased line (Wu's algorithm, coverage scaled by the width), wider
// as a filled quadrilateral. Dashed lines are cut into 4 px dashes with
// 3 px gaps, as in the SVG.
func (cv *canvas) segment(ax, ay, bx, by float64, c rgb, width float64, dashed bool) {
	if dashed {
		l := math.Hypot(bx-ax, by-ay)
		for t := 0.0; t < l; t += 7 {
			u := math.Min(t+4, l)
			cv.segment(ax+(bx-ax)*t/l, ay+(by-ay)*t/l, ax+(bx-ax)*u/l, ay+(by-ay)*u/l, c, width, false)
		}
		return
	}
	if width > 1.5 {
		l := math.Hypot(bx-ax, by-ay)
		if l == 0 {
			return
		}
		nx, ny := -(by-ay)/l*width/2, (bx-ax)/l*width/2
		ex, ey := (bx-ax)/l*width/4, (by-ay)/l*width/4 // short caps
		cv.fill([]float64{ax + nx - ex, ay + ny - ey, bx + nx + ex, by + ny + ey, bx - nx + ex, by - ny + ey, ax - nx - ex, ay - ny - ey}, c)
		return
	}
	cv.wu(ax, ay, bx, by, c, math.Min(width, 1))
}

// wu draws an anti-aliased line (Xiaolin Wu, "An efficient antialiasing
// technique", SIGGRAPH 1991) with peak coverage alpha.
func (cv *canvas) wu(x0, y0, x1, y1 float64, c rgb, alpha float64) {
	// Pixel centres are at +0.5.
	x0, y0, x1, y1 = x0-0.5, y0-0.5, x1-0.5, y1-0.5
	steep := math.Abs(y1-y0) > math.Abs(x1-x0)
	if steep {
		x0, y0, x1, y1 = y0, x0, y1, x1
	}
	if x0 > x1 {
		x0, x1, y0, y1 = x1, x0, y1, y0
	}
	plot := func(x, y int, a float64) {
		if steep {
			cv.blend(y, x, c, a*alpha)
		} else {
			cv.blend(x, y, c, a*alpha)
		}
	}
	dx, dy := x1-x0, y1-y0
	g := 1.0
	if dx != 0 {
		g = dy / dx
	}
	xa, xb := int(math.Round(x0)), int(math.Round(x1))
	for x := xa; x <= xb; x++ {
		y := y0 + g*(float64(x)-x0)
		fy := math.Floor(y)
		f := y - fy
		cover := 1.0
		if x == xa {
			cover = 1 - (x0 + 0.5 - float64(xa))
		}
		if x == xb {
			cover = math.Min(cover, x1+0.5-float64(xb))
		}
		cover = math.Max(cover, 0)
		plot(x, int(fy), (1-f)*cover)
		plot(x, int(fy)+1, f*cover)
	}
}

// text draws a label with the 5 × 7 bitmap font scaled by size/9 (about
// the width of the SVG's sans-serif text), each output pixel taking the
// glyph cell it falls in; bold also inks the pixel to the right.
func (cv *canvas) text(sh shape) {
	scale := math.Max(sh.size/9, 1)
	adv := 6 * scale
	w := textWidth(sh.text, sh.size)
	x := sh.pts[0]
	switch sh.anchor {
	case middle:
		x -= w / 2
	case end:
		x -= w
	}
	x = math.Round(x)
	top := math.Round(sh.pts[1] - 7*scale)
	for i, ch := range []rune(sh.text) {
		g := glyph(ch)
		gx := x + float64(i)*adv
		for py := int(top); py < int(top+7*scale); py++ {
			r := int((float64(py) + 0.5 - top) / scale)
			if r < 0 || r > 6 {
				continue
			}
			for px := int(gx); px < int(gx+5*scale); px++ {
				col := int((float64(px) + 0.5 - gx) / scale)
				if col < 0 || col > 4 || g[r]&(1<<(4-col)) == 0 {
					continue
				}
				cv.blend(px, py, *sh.fill, 1)
				if sh.bold {
					cv.blend(px+1, py, *sh.fill, 1)
				}
			}
		}
	}
}
