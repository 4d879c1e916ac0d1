package preview

import (
	"math"

	"cvdeck/mesh"
)

// How a view draws the interior faces. Cells that span at least the line
// threshold on screen have their faces drawn as lines; smaller cells,
// whose lines would merge into grey anyway, are shaded instead by the ink
// their lines would put on the screen (see drawInterior). The threshold
// is minLinePx, raised where need be so that at most the view's budget of
// lines is drawn.
const (
	minLinePx = 1.5
	lineWidth = 0.7
	// shadeBin is the side in pixels of a shading square.
	shadeBin = 4
	// sizeSteps is how many threshold steps there are per doubling.
	sizeSteps = 16
	// maxPieces bounds the pieces one face's ink is split into.
	maxPieces = 256
)

// Shading colours: lightLevels steps from white to the line colour, as
// lines of one colour overlapping at random cover a pixel, then
// denseLevels steps darker for ink of several lines a pixel (boundary
// layers far thinner than a pixel), up to denseInk.
const (
	lightLevels = 8
	denseLevels = 3
)

var denseInk = rgb{84, 96, 114}

// interiorDrawn says how a view's interior was drawn.
type interiorDrawn struct {
	lines     int     // faces drawn as lines
	shaded    int     // faces shaded
	threshold float64 // px: cells of at least this size have their faces drawn
}

// faceKey is the screen size that decides how interior face f is drawn:
// the larger of its two cells' sizes on screen, the square root of a
// cell's area in pixels (a square cell's side, and below a pixel for a
// cell of a boundary layer however long it is), so that every face of a
// cell drawn in lines is drawn. It returns the square of that size, in
// px², which is all the comparisons need.
func faceKey(m *mesh.Mesh, f int, scale float64) float64 {
	a := m.Geo.CellArea
	return math.Max(math.Abs(a[m.Owner[f]]), math.Abs(a[m.Neighbour[f]])) * scale * scale
}

// sizeStep is the threshold step of a face key (a squared size) of at
// least minLinePx².
func sizeStep(key float64) int {
	return min(int(sizeSteps*0.5*math.Log2(key/(minLinePx*minLinePx))), 64*sizeSteps)
}

// drawInterior draws the interior faces that meet view v in colour c: as
// lines of lineWidth where either of a face's cells spans the threshold
// on screen, at most budget of them; the faces of smaller cells as
// shading. Each shaded face's ink (its length on screen times lineWidth)
// is split along it into pieces of at most half a shading square and
// spread over the four nearest squares by their distance (a tent filter,
// so that a regular grid a little finer than the squares leaves no
// stripes); a square's ink over its area, c, gives its grey, 1 − e^(−c)
// of the way from white to the line colour as randomly placed lines would
// cover it, and darker again past c = 3. A region of cells too small to
// draw is therefore as grey as its lines would make it, with no gaps,
// and joins the region drawn in lines without a seam.
func drawInterior(s *scene, m *mesh.Mesh, v view, clip, budget int, c rgb, width float64) interiorDrawn {
	meets := func(f int) bool {
		if v.whole {
			return true
		}
		fn := m.FaceNodes[f]
		a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
		return v.meets(a[0], a[1], b[0], b[1])
	}
	least := minLinePx * minLinePx
	// A mesh whose largest cell is under the least size on screen has no
	// face to draw as a line: neither pass need look up cell areas per
	// face.
	largest := 0.0
	for _, a := range m.Geo.CellArea {
		largest = max(largest, math.Abs(a))
	}
	anyBig := largest*v.scale*v.scale >= least
	// The faces that meet a view smaller than the mesh, kept while they
	// are few, so that the second pass need not look at every face.
	var near []int32
	keep := !v.whole
	first := 0
	if anyBig && m.NumInterior > budget {
		var hist [64*sizeSteps + 1]int
		big := 0
		for f := 0; f < m.NumInterior; f++ {
			if !meets(f) {
				continue
			}
			if keep {
				if near = append(near, int32(f)); len(near) > 4*budget {
					keep, near = false, nil
				}
			}
			if k := faceKey(m, f, v.scale); k >= least {
				hist[sizeStep(k)]++
				big++
			}
		}
		// The lowest step whose faces and those of every larger step fit.
		for n := big; n > budget && first < len(hist); first++ {
			n -= hist[first]
		}
	} else {
		keep = false
	}
	out := interiorDrawn{threshold: minLinePx * math.Exp2(float64(first)/sizeSteps)}
	nx, ny := int(v.b.w)/shadeBin+2, int(v.b.h)/shadeBin+2
	var ink []float64
	var pts []float64
	face := func(f int) {
		fn := m.FaceNodes[f]
		a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
		ax, ay := v.px(a[0], a[1])
		bx, by := v.px(b[0], b[1])
		if anyBig {
			if k := faceKey(m, f, v.scale); k >= least && (first == 0 || sizeStep(k) >= first) {
				pts = append(pts, ax, ay, bx, by)
				out.lines++
				return
			}
		}
		if ink == nil {
			ink = make([]float64, nx*ny)
		}
		out.shaded++
		dx, dy := bx-ax, by-ay
		l := math.Sqrt(dx*dx + dy*dy)
		n, piece := 1, l*width
		if l > shadeBin/2 {
			n = min(maxPieces, int(math.Ceil(2*l/shadeBin)))
			piece /= float64(n)
		}
		for k := 0; k < n; k++ {
			t := (float64(k) + 0.5) / float64(n)
			gx := (ax+t*dx-v.b.x)/shadeBin - 0.5
			gy := (ay+t*dy-v.b.y)/shadeBin - 0.5
			var i, j int
			if gx >= 0 && gy >= 0 {
				i, j = int(gx), int(gy) // floor, without its cost
			} else {
				i, j = int(math.Floor(gx)), int(math.Floor(gy))
			}
			fx, fy := gx-float64(i), gy-float64(j)
			w00, w10, w01, w11 := (1-fx)*(1-fy)*piece, fx*(1-fy)*piece, (1-fx)*fy*piece, fx*fy*piece
			if i >= 0 && j >= 0 && i+1 < nx && j+1 < ny {
				o := j*nx + i
				ink[o] += w00
				ink[o+1] += w10
				ink[o+nx] += w01
				ink[o+nx+1] += w11
				continue
			}
			for _, q := range [4]struct {
				i, j int
				w    float64
			}{{i, j, w00}, {i + 1, j, w10}, {i, j + 1, w01}, {i + 1, j + 1, w11}} {
				if q.i >= 0 && q.j >= 0 && q.i < nx && q.j < ny {
					ink[q.j*nx+q.i] += q.w
				}
			}
		}
	}
	if keep {
		for _, f := range near {
			face(int(f))
		}
	} else {
		for f := 0; f < m.NumInterior; f++ {
			if meets(f) {
				face(f)
			}
		}
	}
	if ink != nil {
		if clip == 0 {
			clip = s.viewClip(v)
		}
		shade(s, v.b, ink, nx, c, clip)
	}
	if len(pts) > 0 {
		s.add(shape{kind: segments, pts: pts, stroke: &c, width: width, clip: clip})
	}
	return out
}

// shadeLevel is the shading level of ink per square area cover: 0 for
// none, 1 to lightLevels on the way to the line colour, beyond that the
// dense levels.
func shadeLevel(cover float64) int {
	switch {
	case cover <= 0:
		return 0
	case cover >= 12:
		return lightLevels + 3
	case cover >= 6:
		return lightLevels + 2
	case cover >= 3:
		return lightLevels + 1
	}
	a := 1 - math.Exp(-cover)
	return max(1, min(lightLevels, int(math.Ceil(a*lightLevels-0.5))))
}

// shadeColour is the colour of a shading level over white, line colour c.
func shadeColour(level int, c rgb) rgb {
	if level <= lightLevels {
		a := float64(level) / lightLevels
		return rgb{mix(255, c.r, a), mix(255, c.g, a), mix(255, c.b, a)}
	}
	a := float64(level-lightLevels) / denseLevels
	return rgb{mix(c.r, denseInk.r, a), mix(c.g, denseInk.g, a), mix(c.b, denseInk.b, a)}
}

// shade draws the ink grid, nx squares a row from the corner of b, as runs
// of squares of one level along each row.
func shade(s *scene, b box, ink []float64, nx int, c rgb, clip int) {
	var byLevel [lightLevels + denseLevels + 1][]float64
	area := float64(shadeBin * shadeBin)
	for j := 0; j*nx < len(ink); j++ {
		row := ink[j*nx : (j+1)*nx]
		for i := 0; i < nx; {
			l := shadeLevel(row[i] / area)
			k := i + 1
			for k < nx && shadeLevel(row[k]/area) == l {
				k++
			}
			if l > 0 {
				byLevel[l] = append(byLevel[l], b.x+float64(i*shadeBin), b.y+float64(j*shadeBin), float64((k-i)*shadeBin))
			}
			i = k
		}
	}
	for l, pts := range byLevel {
		if len(pts) > 0 {
			col := shadeColour(l, c)
			s.add(shape{kind: runs, pts: pts, fill: &col, width: shadeBin, clip: clip})
		}
	}
}
