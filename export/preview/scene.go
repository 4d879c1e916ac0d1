package preview

import "fmt"

// rgb is an opaque colour.
type rgb struct{ r, g, b uint8 }

func (c rgb) hex() string { return fmt.Sprintf("#%02x%02x%02x", c.r, c.g, c.b) }

// kind is the kind of a drawing primitive.
type kind uint8

const (
	// segments: pts holds x0 y0 x1 y1 for each segment, stroked.
	segments kind = iota
	// polygon: pts holds one closed polygon, filled and optionally stroked.
	polygon
	// rect: pts holds x y w h, filled and optionally stroked.
	rect
	// label: text at pts[0], pts[1] (baseline), anchored per anchor.
	label
	// runs: pts holds x y w for each run, a rectangle w wide and width
	// tall with its top-left corner at x y, filled.
	runs
)

// anchor is where a label's position sits on its text.
type anchor uint8

const (
	start anchor = iota
	middle
	end
)

// shape is one drawing primitive in canvas pixels (y down). A zero colour
// pointer means no fill or no stroke.
type shape struct {
	kind   kind
	pts    []float64
	fill   *rgb
	stroke *rgb
	width  float64
	dashed bool
	text   string
	size   float64 // text height in pixels
	anchor anchor
	bold   bool
	clip   int // 1-based index into scene.clips; 0 draws unclipped
}

// box is an axis-aligned rectangle in canvas pixels.
type box struct{ x, y, w, h float64 }

// scene is a whole picture: both the SVG writer and the rasteriser draw it,
// so the two pictures agree.
type scene struct {
	w, h   int
	clips  []box
	shapes []shape
}

func (s *scene) add(sh shape) { s.shapes = append(s.shapes, sh) }

// addClip registers a clip box and returns its 1-based index.
func (s *scene) addClip(b box) int {
	s.clips = append(s.clips, b)
	return len(s.clips)
}

// viewClip returns the clip index of a view's box, registering it once.
func (s *scene) viewClip(v view) int {
	for i, c := range s.clips {
		if c == v.b {
			return i + 1
		}
	}
	return s.addClip(v.b)
}

func (s *scene) text(x, y float64, size float64, a anchor, c rgb, bold bool, t string) {
	s.add(shape{kind: label, pts: []float64{x, y}, size: size, anchor: a, fill: &c, bold: bold, text: t})
}

func (s *scene) rect(b box, fill, stroke *rgb, width float64) {
	s.add(shape{kind: rect, pts: []float64{b.x, b.y, b.w, b.h}, fill: fill, stroke: stroke, width: width})
}

// Colours of our own choosing.
var (
	white      = rgb{255, 255, 255}
	ink        = rgb{33, 37, 41}
	faint      = rgb{108, 117, 125}
	meshLine   = rgb{176, 184, 194}
	panelLine  = rgb{206, 212, 218}
	warnFill   = rgb{255, 196, 0}
	failFill   = rgb{220, 38, 38}
	warnEdge   = rgb{166, 110, 0}
	failEdge   = rgb{140, 20, 20}
	barFill    = rgb{96, 125, 160}
	untagged   = rgb{0, 0, 0}
	zoomFrame  = rgb{124, 58, 237}
	boundaryOf = []rgb{
		{37, 99, 235}, {234, 88, 12}, {22, 163, 74}, {147, 51, 234}, {219, 39, 119},
		{13, 148, 136}, {120, 83, 9}, {79, 70, 229}, {161, 98, 7}, {71, 85, 105},
	}
)
