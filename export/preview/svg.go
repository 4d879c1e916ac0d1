package preview

import (
	"bufio"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// writeSVG writes the scene as SVG 1.1: clip boxes as clipPath elements,
// each segment set as one path, coordinates rounded to 0.1 px.
func writeSVG(w io.Writer, s *scene) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	fmt.Fprintf(bw, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%d\" height=\"%d\" viewBox=\"0 0 %d %d\" font-family=\"sans-serif\">\n", s.w, s.h, s.w, s.h)
	if len(s.clips) > 0 {
		bw.WriteString("<defs>\n")
		for i, c := range s.clips {
			fmt.Fprintf(bw, "<clipPath id=\"c%d\"><rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\"/></clipPath>\n", i+1, num(c.x), num(c.y), num(c.w), num(c.h))
		}
		bw.WriteString("</defs>\n")
	}
	fmt.Fprintf(bw, "<rect width=\"%d\" height=\"%d\" fill=\"#ffffff\"/>\n", s.w, s.h)
	var d []byte
	for _, sh := range s.shapes {
		clip := ""
		if sh.clip > 0 {
			clip = fmt.Sprintf(" clip-path=\"url(#c%d)\"", sh.clip)
		}
		switch sh.kind {
		case segments:
			d = d[:0]
			for k := 0; k+3 < len(sh.pts); k += 4 {
				d = append(d, 'M')
				d = pair(d, sh.pts[k], sh.pts[k+1])
				d = append(d, 'L')
				d = pair(d, sh.pts[k+2], sh.pts[k+3])
			}
			dash := ""
			if sh.dashed {
				dash = " stroke-dasharray=\"4 3\""
			}
			fmt.Fprintf(bw, "<path d=\"%s\" fill=\"none\" stroke=\"%s\" stroke-width=\"%s\" stroke-linecap=\"round\"%s%s/>\n", d, sh.stroke.hex(), num(sh.width), dash, clip)
		case polygon:
			d = d[:0]
			for k := 0; k+1 < len(sh.pts); k += 2 {
				if k == 0 {
					d = append(d, 'M')
				} else {
					d = append(d, 'L')
				}
				d = pair(d, sh.pts[k], sh.pts[k+1])
			}
			d = append(d, 'Z')
			fmt.Fprintf(bw, "<path d=\"%s\"%s%s/>\n", d, paint(sh), clip)
		case runs:
			d = d[:0]
			tall := appendNum(nil, sh.width)
			for k := 0; k+2 < len(sh.pts); k += 3 {
				w := appendNum(nil, sh.pts[k+2])
				d = append(d, 'M')
				d = pair(d, sh.pts[k], sh.pts[k+1])
				d = append(d, 'h')
				d = append(d, w...)
				d = append(d, 'v')
				d = append(d, tall...)
				d = append(d, 'h', '-')
				d = append(d, w...)
				d = append(d, 'z')
			}
			fmt.Fprintf(bw, "<path d=\"%s\" fill=\"%s\"%s/>\n", d, sh.fill.hex(), clip)
		case rect:
			fmt.Fprintf(bw, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\"%s%s/>\n", num(sh.pts[0]), num(sh.pts[1]), num(sh.pts[2]), num(sh.pts[3]), paint(sh), clip)
		case label:
			a := [...]string{"start", "middle", "end"}[sh.anchor]
			weight := ""
			if sh.bold {
				weight = " font-weight=\"bold\""
			}
			var t strings.Builder
			xml.EscapeText(&t, []byte(sh.text))
			fmt.Fprintf(bw, "<text x=\"%s\" y=\"%s\" font-size=\"%s\" text-anchor=\"%s\" fill=\"%s\"%s%s>%s</text>\n", num(sh.pts[0]), num(sh.pts[1]), num(sh.size), a, sh.fill.hex(), weight, clip, t.String())
		}
	}
	bw.WriteString("</svg>\n")
	return bw.Flush()
}

// paint is the fill and stroke attributes of a closed shape.
func paint(sh shape) string {
	f := " fill=\"none\""
	if sh.fill != nil {
		f = " fill=\"" + sh.fill.hex() + "\""
	}
	if sh.stroke != nil {
		f += " stroke=\"" + sh.stroke.hex() + "\" stroke-width=\"" + num(sh.width) + "\" stroke-linejoin=\"round\""
	}
	return f
}

// num formats a coordinate to 0.1 px.
func num(v float64) string { return string(appendNum(nil, v)) }

func appendNum(b []byte, v float64) []byte {
	r := math.Round(v*10) / 10
	if r == 0 {
		r = 0 // no "-0"
	}
	return strconv.AppendFloat(b, r, 'f', -1, 64)
}

func pair(b []byte, x, y float64) []byte {
	b = appendNum(b, x)
	b = append(b, ' ')
	return appendNum(b, y)
}
