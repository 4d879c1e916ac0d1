// Package preview draws a picture of a mesh for people to look at before a
// long run: the mesh with its coordinates and a scale bar, its boundary
// coloured by tag with a legend that names each tag under its condition,
// the cells that fail or nearly fail a limit highlighted, a view near the
// bodies when they are small beside the domain (an aerofoil in its far
// field), zoom windows around the worst cells that name the limits each
// is past, and one histogram per quality metric, in its unit.
//
// The same scene is written as SVG (SVG) or rasterised by our own
// scanline rasteriser and written as PNG with image/png (PNG); both are
// deterministic: the same input gives the same bytes.
//
// Large meshes stay fast and small: the drawing is bounded whatever the
// cell count. A view draws the faces of the cells that span a few pixels
// or more on screen as lines, at most MaxInteriorFaces of them on the
// overview (the threshold rises until they fit), and shades the smaller
// cells by the ink their lines would put on each 4 px square; it draws at
// most MaxBoundaryFaces boundary faces (one per screen bin beyond that),
// MaxFlaggedCells highlighted cells (smaller or further ones mark the
// 6 px squares they touch), MaxZoomWindows zoom windows of at most
// MaxZoomFaces faces each. An SVG therefore stays below about 1.5 MB and a
// PNG below W × H × 4 bytes before compression, however large the mesh;
// the time is a few passes over the faces per view.
package preview

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"cvdeck/mesh"
)

// Status is a cell's standing against the quality limits.
type Status uint8

// The three standings.
const (
	Pass Status = iota
	Warn
	Fail
)

// Limit is a threshold drawn on a metric's histogram.
type Limit struct {
	Value  float64
	Status Status // Warn or Fail: the colour of the line
}

// Metric is one quality metric, one value per cell (or per face), drawn as
// a histogram. Values that are NaN or infinite are left out of it. Zoom
// windows name the per-cell metrics whose limits their cell is past.
type Metric struct {
	Name string
	// Unit is the values' unit ("m²", "°"), "" for a ratio.
	Unit string
	// Lower is true when smaller values are worse: a value below a limit
	// is past it (at or below a limit of 0, as a zero area or length is a
	// collapsed cell); otherwise a value above a limit is past it.
	Lower  bool
	Values []float64
	// FaceValues optionally gives the metric on each face, for a metric
	// whose cell value is that of the cell's worst face; a zoom on a cell
	// too thin to see whole centres on that face. nil when there are none.
	FaceValues []float64
	Limits     []Limit
}

// Input is what a preview shows.
type Input struct {
	Title string
	Mesh  *mesh.Mesh
	// Conditions gives the boundary condition of each tag, indexed like
	// Mesh.Tags ("" for none); nil colours the boundary by tag.
	Conditions []string
	// Status gives each cell's standing; nil means every cell passes.
	Status []Status
	// Worst lists cells to zoom in on, worst first; nil takes the failing
	// cells, then the warning ones, in index order.
	Worst   []int32
	Metrics []Metric
}

// Bounds on what one picture draws, whatever the mesh size.
const (
	MaxInteriorFaces = 30000
	MaxBoundaryFaces = 8000
	MaxFlaggedCells  = 3000
	MaxZoomWindows   = 3
	MaxZoomFaces     = 3000
	maxMarkers       = 200
)

// Layout in canvas pixels.
const (
	canvasW = 1280
	margin  = 20
	// gutter is the room left of a view for its y coordinates.
	gutter   = 56
	viewX    = margin + gutter
	viewW    = 760
	minViewH = 240
	maxViewH = 700
	viewTop  = 50
	// panelGap is the room from one panel's footer to the next panel.
	panelGap  = 36
	zoomSize  = 256
	zoomGap   = (gutter + viewW - MaxZoomWindows*zoomSize) / (MaxZoomWindows - 1)
	frameMin  = 8
	columnX   = viewX + viewW + 24
	columnW   = canvasW - columnX - margin
	histH     = 96
	histBlock = histH + 114
	// gridColumns histograms of the right column's width, gridGap apart,
	// fill the page's width below the pictures.
	gridColumns = 3
	gridGap     = (canvasW - 2*margin - gridColumns*columnW) / (gridColumns - 1)
	bins        = 40
)

// SVG writes the preview as an SVG document.
func SVG(w io.Writer, in Input) error {
	s, err := build(in)
	if err != nil {
		return err
	}
	return writeSVG(w, s)
}

// PNG writes the preview as a PNG image drawn by our own rasteriser.
func PNG(w io.Writer, in Input) error {
	s, err := build(in)
	if err != nil {
		return err
	}
	return writePNG(w, s)
}

// view maps mesh coordinates into a canvas box, keeping the aspect ratio,
// y up in the mesh and down on the canvas.
type view struct {
	b              box
	cx, cy, scale  float64
	x0, y0, x1, y1 float64 // the mesh-space region shown
	whole          bool    // the region holds the whole mesh
}

func newView(b box, x0, y0, x1, y1 float64) view {
	w, h := x1-x0, y1-y0
	s := math.Min(b.w/math.Max(w, 1e-300), b.h/math.Max(h, 1e-300))
	if w <= 0 && h <= 0 {
		s = 1
	}
	v := view{b: b, cx: 0.5 * (x0 + x1), cy: 0.5 * (y0 + y1), scale: s}
	// The region actually visible in the box.
	v.x0, v.x1 = v.cx-0.5*b.w/s, v.cx+0.5*b.w/s
	v.y0, v.y1 = v.cy-0.5*b.h/s, v.cy+0.5*b.h/s
	return v
}

func (v view) px(x, y float64) (float64, float64) {
	return v.b.x + 0.5*v.b.w + (x-v.cx)*v.scale, v.b.y + 0.5*v.b.h - (y-v.cy)*v.scale
}

// meets reports whether the segment's bounding box meets the region.
func (v view) meets(ax, ay, bx, by float64) bool {
	if ax > bx {
		ax, bx = bx, ax
	}
	if ay > by {
		ay, by = by, ay
	}
	return bx >= v.x0 && ax <= v.x1 && by >= v.y0 && ay <= v.y1
}

func build(in Input) (*scene, error) {
	m := in.Mesh
	if m == nil || len(m.Geo.CellArea) != m.NumCells() || len(m.Nodes) == 0 {
		return nil, fmt.Errorf("preview: no mesh, or a mesh not made by mesh.Build")
	}
	if in.Conditions != nil && len(in.Conditions) != len(m.Tags) {
		return nil, fmt.Errorf("preview: %d boundary conditions for %d tags; give one per tag (\"\" for none)", len(in.Conditions), len(m.Tags))
	}
	if in.Status != nil && len(in.Status) != m.NumCells() {
		return nil, fmt.Errorf("preview: %d cell statuses for %d cells", len(in.Status), m.NumCells())
	}
	for i, c := range in.Worst {
		if c < 0 || int(c) >= m.NumCells() {
			return nil, fmt.Errorf("preview: worst cell %d is cell %d; cells run from 0 to %d", i, c, m.NumCells()-1)
		}
	}
	for _, mt := range in.Metrics {
		if mt.Name == "" {
			return nil, fmt.Errorf("preview: a metric has no name")
		}
		if mt.FaceValues != nil && len(mt.FaceValues) != m.NumFaces() {
			return nil, fmt.Errorf("preview: metric %s has %d face values for %d faces", mt.Name, len(mt.FaceValues), m.NumFaces())
		}
	}
	s := &scene{w: canvasW}
	title := in.Title
	if title == "" {
		title = "mesh preview"
	}
	s.text(margin, 34, 20, start, ink, true, title)

	overview := overviewOf(m)
	s.rect(overview.b, &white, &panelLine, 1)
	colours, legend := boundaryColours(m, in.Conditions)
	counts := statusCounts(in.Status)
	type drawnView struct {
		name string
		d    interiorDrawn
	}
	views := []drawnView{{"overview", drawInterior(s, m, overview, 0, MaxInteriorFaces, meshLine, lineWidth)}}
	drawBoundary(s, m, colours, overview, MaxBoundaryFaces, 0, 2.2)
	// Flagged cells go on top of the lines: they are what the picture
	// is for; the block outlines and their marks over them, so that
	// flagged cells do not hide them.
	binned := drawFlagged(s, m, in.Status, overview, 0, MaxFlaggedCells, false)
	blocks := drawBlocks(s, m, overview, s.viewClip(overview))
	if counts[Warn]+counts[Fail] <= MaxFlaggedCells {
		drawMarkers(s, m, in.Status, overview)
	}
	bottom := drawFooter(s, overview)

	if r, ok := bodiesRegion(m); ok {
		// Bodies far smaller than the domain (an aerofoil in its far
		// field) are a speck in the overview: a view of their
		// surroundings, framed on the overview, shows their mesh.
		top := bottom + panelGap
		h := math.Round(math.Min(math.Max(viewW*(r[3]-r[1])/(r[2]-r[0]), minViewH), maxBodiesH))
		near := newView(box{viewX, top, viewW, h}, r[0], r[1], r[2], r[3])
		clip := s.addClip(near.b)
		s.rect(near.b, &white, &zoomFrame, 1.5)
		views = append(views, drawnView{"near the bodies", drawInterior(s, m, near, clip, maxBodiesFaces, meshLine, lineWidth)})
		drawBoundary(s, m, colours, near, MaxBoundaryFaces, clip, 1.8)
		binned = drawFlagged(s, m, in.Status, near, clip, MaxFlaggedCells, false) || binned
		blocks = drawBlocks(s, m, near, clip) || blocks
		s.text(near.b.x, near.b.y-8, 12, start, ink, true, "near the bodies: the boundaries inside the domain and their surroundings")
		frameOn(s, overview, near, "B")
		bottom = drawFooter(s, near)
	}
	zoomTop := bottom + panelGap
	zooms, regions := zoomCells(m, in)
	for k, c := range zooms {
		zb := box{float64(margin + k*(zoomSize+zoomGap)), zoomTop, zoomSize, zoomSize}
		r := regions[k]
		win := newView(zb, r.x0, r.y0, r.x1, r.y1)
		clip := s.addClip(zb)
		s.rect(zb, &white, &zoomFrame, 1.5)
		drawInterior(s, m, win, clip, MaxZoomFaces, meshLine, lineWidth)
		// Flagged cells edged a shade darker, so that a band of them
		// shows each cell's shape.
		drawFlagged(s, m, in.Status, win, clip, MaxZoomFaces/2, true)
		drawBoundary(s, m, colours, win, MaxZoomFaces, clip, 1.5)
		cell := m.Cell(int(c))
		pts := make([]float64, 0, 2*len(cell))
		for _, v := range cell {
			px, py := win.px(m.Nodes[v][0], m.Nodes[v][1])
			pts = append(pts, px, py)
		}
		s.add(shape{kind: polygon, pts: pts, stroke: &zoomFrame, width: 2, clip: clip})
		s.text(zb.x, zb.y-8, 12, start, ink, true, zoomTitle(in, k, c))
		frameOn(s, overview, win, strconv.Itoa(k+1))
		// Beneath the window: the limits the cell is past, then its
		// scale and the region shown.
		y := zb.y + zb.h + rowH + 2
		for _, t := range crossingLines(in, int(c)) {
			for _, l := range wrap(t, zb.w, axisText, "  ") {
				s.text(zb.x, y, axisText, start, ink, false, l)
				y += rowH
			}
		}
		drawScaleBar(s, win, zb.x, y+2)
		y += rowH + 2
		for _, t := range extentLines(win) {
			s.text(zb.x, y, axisText, start, faint, false, t)
			y += rowH
		}
		bottom = math.Max(bottom, y)
	}

	// The right column: counts, legend, histograms.
	y := float64(viewTop + 14)
	line := func(size float64, c rgb, bold bool, t string) {
		for _, l := range wrap(t, columnW, size, "") {
			s.text(columnX, y, size, start, c, bold, l)
			y += size + 8
		}
	}
	line(13, ink, false, fmt.Sprintf("%d cells, %d nodes", m.NumCells(), len(m.Nodes)))
	line(13, ink, false, fmt.Sprintf("%d faces, %d on the boundary", m.NumFaces(), m.NumBoundary()))
	shaded := false
	for _, v := range views {
		shaded = shaded || v.d.shaded > 0
	}
	if shaded {
		line(12, faint, false, fmt.Sprintf("grid lines where a cell spans %s px or more; smaller cells shaded by the ink of their lines (darker than a line: several lines a pixel)", short(minLinePx)))
		for _, v := range views {
			if v.d.shaded > 0 && v.d.threshold > minLinePx*1.001 {
				line(12, faint, false, fmt.Sprintf("%s: lines for cells of %.3g px or more", v.name, v.d.threshold))
			}
		}
	}
	y += 6
	if in.Conditions != nil {
		line(14, ink, true, "Boundary conditions and their tags")
	} else {
		line(14, ink, true, "Boundary tags")
	}
	for _, g := range legend {
		indent := 0.0
		if g.condition != "" {
			s.text(columnX, y, 12, start, ink, true, g.condition)
			y += 18
			indent = 14
		}
		for _, e := range g.tags {
			c := e.colour
			s.add(shape{kind: segments, pts: []float64{columnX + indent, y - 5, columnX + indent + 28, y - 5}, stroke: &c, width: 3})
			s.text(columnX+indent+38, y, 12, start, ink, false, fmt.Sprintf("%s (%d faces)", e.label, e.faces))
			y += 18
		}
	}
	y += 8
	line(14, ink, true, "Cells")
	for _, e := range []struct {
		c     rgb
		label string
		n     int
	}{{warnFill, "warn: near a limit", counts[Warn]}, {failFill, "fail: past a limit", counts[Fail]}} {
		c := e.c
		s.rect(box{columnX, y - 11, 28, 12}, &c, nil, 0)
		s.text(columnX+38, y, 12, start, ink, false, fmt.Sprintf("%s (%d cells)", e.label, e.n))
		y += 20
	}
	if binned {
		line(12, faint, false, fmt.Sprintf("small cells: the %d px squares they touch", flagBin))
	}
	if blocks {
		y += 6
		line(14, ink, true, "Blocks")
		line(12, faint, false, "dashed outlines, each block named at its middle; a dot marks its first node, from which its south side runs along i and its west side along j")
	}
	y += 12
	s.h = int(math.Ceil(drawHistograms(s, in.Metrics, y, bottom) + margin))
	return s, nil
}

// drawHistograms draws the metrics' histograms down the right column from
// y while they fit beside the pictures, which end at bottom, and the rest
// in rows of gridColumns across the page below both, so that a report of
// many metrics does not run a long column past an empty left side. It
// returns the lowest y drawn on.
func drawHistograms(s *scene, metrics []Metric, y, bottom float64) float64 {
	k := 0
	for ; k < len(metrics) && y+histBlock <= bottom; k++ {
		drawHistogram(s, metrics[k], box{columnX, y + 22, columnW, histH})
		y += histBlock
	}
	low := math.Max(bottom, y)
	if k == len(metrics) {
		return low
	}
	top := low + panelGap/2
	for i, mt := range metrics[k:] {
		x := float64(margin + (i%gridColumns)*(columnW+gridGap))
		drawHistogram(s, mt, box{x, top + float64(i/gridColumns)*histBlock + 22, columnW, histH})
	}
	rows := (len(metrics) - k + gridColumns - 1) / gridColumns
	return top + float64(rows)*histBlock
}

// frameOn outlines on the overview o the region view v shows, at least
// frameMin pixels across so that a close zoom still shows where it is,
// and names it.
func frameOn(s *scene, o, v view, name string) {
	ax, ay := o.px(v.x0, v.y0)
	bx, by := o.px(v.x1, v.y1)
	if w := bx - ax; w < frameMin {
		ax, bx = ax-(frameMin-w)/2, bx+(frameMin-w)/2
	}
	if h := ay - by; h < frameMin {
		ay, by = ay+(frameMin-h)/2, by-(frameMin-h)/2
	}
	fb := clampBox(box{ax, by, bx - ax, ay - by}, o.b)
	s.rect(fb, nil, &zoomFrame, 1.5)
	s.text(fb.x+fb.w+3, fb.y+10, 12, start, zoomFrame, true, name)
}

// Bounds of the view near the bodies: its height in canvas pixels, and
// the interior faces it draws as lines (beyond that, the threshold cell
// size for lines rises), so that the picture stays as bounded as the
// package comment says.
const (
	maxBodiesH     = 420
	maxBodiesFaces = 9000
)

// bodiesRegion returns the region, as x0, y0, x1, y1, around the inner
// boundaries of the mesh — the closed chains of boundary faces other than
// the outer one, found by joining boundary faces that share a node, the
// outer being the chain whose bounding box is largest — when their
// bounding box is under a quarter of the mesh's in width and in height;
// the region pads that box by half its larger side. A mesh with one
// boundary chain, or bodies that fill much of it, has none.
func bodiesRegion(m *mesh.Mesh) ([4]float64, bool) {
	parent := map[int32]int32{}
	var find func(int32) int32
	find = func(a int32) int32 {
		for {
			p, ok := parent[a]
			if !ok || p == a {
				return a
			}
			if g, ok := parent[p]; ok {
				parent[a] = g
			}
			a = p
		}
	}
	for _, fn := range m.FaceNodes[m.NumInterior:] {
		a, b := find(fn[0]), find(fn[1])
		if a != b {
			parent[max(a, b)] = min(a, b)
		}
	}
	type bbox struct{ x0, y0, x1, y1 float64 }
	boxes := map[int32]*bbox{}
	var roots []int32
	for _, fn := range m.FaceNodes[m.NumInterior:] {
		r := find(fn[0])
		b, ok := boxes[r]
		if !ok {
			b = &bbox{math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)}
			boxes[r] = b
			roots = append(roots, r)
		}
		for _, v := range fn {
			p := m.Nodes[v]
			b.x0, b.x1 = math.Min(b.x0, p[0]), math.Max(b.x1, p[0])
			b.y0, b.y1 = math.Min(b.y0, p[1]), math.Max(b.y1, p[1])
		}
	}
	if len(roots) < 2 {
		return [4]float64{}, false
	}
	outer := roots[0]
	size := func(b *bbox) float64 { return math.Hypot(b.x1-b.x0, b.y1-b.y0) }
	for _, r := range roots[1:] {
		if size(boxes[r]) > size(boxes[outer]) {
			outer = r
		}
	}
	u := bbox{math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)}
	for _, r := range roots {
		if r != outer {
			b := boxes[r]
			u = bbox{math.Min(u.x0, b.x0), math.Min(u.y0, b.y0), math.Max(u.x1, b.x1), math.Max(u.y1, b.y1)}
		}
	}
	o := boxes[outer]
	if !(u.x1-u.x0 < 0.25*(o.x1-o.x0) && u.y1-u.y0 < 0.25*(o.y1-o.y0)) {
		return [4]float64{}, false
	}
	pad := 0.5 * math.Max(u.x1-u.x0, u.y1-u.y0)
	return [4]float64{u.x0 - pad, u.y0 - pad, u.x1 + pad, u.y1 + pad}, true
}

// clampBox clips b to within c.
func clampBox(b, c box) box {
	x0, y0 := math.Max(b.x, c.x), math.Max(b.y, c.y)
	x1, y1 := math.Min(b.x+b.w, c.x+c.w), math.Min(b.y+b.h, c.y+c.h)
	return box{x0, y0, math.Max(x1-x0, 1), math.Max(y1-y0, 1)}
}

// overviewOf frames the whole mesh with a 2 % margin in a box as wide as
// the view and as tall as the mesh's aspect asks, within limits.
func overviewOf(m *mesh.Mesh) view {
	x0, y0, x1, y1 := nodeBounds(m)
	pad := 0.02 * math.Max(x1-x0, y1-y0)
	x0, y0, x1, y1 = x0-pad, y0-pad, x1+pad, y1+pad
	h := float64(maxViewH)
	if x1 > x0 {
		h = math.Min(math.Max(viewW*(y1-y0)/(x1-x0), minViewH), maxViewH)
	}
	v := newView(box{viewX, viewTop, viewW, math.Round(h)}, x0, y0, x1, y1)
	v.whole = true
	return v
}

func nodeBounds(m *mesh.Mesh) (x0, y0, x1, y1 float64) {
	x0, y0 = math.Inf(1), math.Inf(1)
	x1, y1 = math.Inf(-1), math.Inf(-1)
	for _, p := range m.Nodes {
		x0, x1 = math.Min(x0, p[0]), math.Max(x1, p[0])
		y0, y1 = math.Min(y0, p[1]), math.Max(y1, p[1])
	}
	return
}

func statusCounts(st []Status) [3]int {
	var n [3]int
	for _, s := range st {
		if s <= Fail {
			n[s]++
		}
	}
	return n
}

// binner keeps at most one item per square screen bin of a box, so a
// decimated drawing covers the view evenly.
type binner struct {
	b      box
	size   float64
	nx, ny int
	used   []bool
}

func newBinner(b box, budget int) *binner {
	size := math.Max(math.Sqrt(b.w*b.h/float64(budget)), 0.5)
	nx, ny := int(b.w/size)+1, int(b.h/size)+1
	return &binner{b: b, size: size, nx: nx, ny: ny, used: make([]bool, nx*ny)}
}

// take reports whether the bin of (x, y) was free, and marks it used.
func (bn *binner) take(x, y float64) bool {
	i, j := int((x-bn.b.x)/bn.size), int((y-bn.b.y)/bn.size)
	if i < 0 || j < 0 || i >= bn.nx || j >= bn.ny {
		return false
	}
	k := j*bn.nx + i
	if bn.used[k] {
		return false
	}
	bn.used[k] = true
	return true
}

// faceSegments returns the canvas segments of the faces [lo, hi) that meet
// the view, at most budget of them (decimated by screen bins when the range
// holds more).
func faceSegments(m *mesh.Mesh, lo, hi int, v view, budget int) []float64 {
	var bn *binner
	if hi-lo > budget {
		bn = newBinner(v.b, budget)
	}
	var pts []float64
	for f := lo; f < hi && len(pts) < 4*budget; f++ {
		a, b := m.Nodes[m.FaceNodes[f][0]], m.Nodes[m.FaceNodes[f][1]]
		if !v.meets(a[0], a[1], b[0], b[1]) {
			continue
		}
		ax, ay := v.px(a[0], a[1])
		bx, by := v.px(b[0], b[1])
		if bn != nil && !bn.take(0.5*(ax+bx), 0.5*(ay+by)) {
			continue
		}
		pts = append(pts, ax, ay, bx, by)
	}
	return pts
}

func drawBoundary(s *scene, m *mesh.Mesh, colours []rgb, v view, budget, clip int, width float64) {
	type group struct {
		lo, hi int
		c      rgb
	}
	groups := make([]group, 0, len(m.Tags)+1)
	for t := range m.Tags {
		groups = append(groups, group{int(m.TagStart[t]), int(m.TagStart[t+1]), colours[t]})
	}
	lo, hi := m.UntaggedRange()
	groups = append(groups, group{lo, hi, untagged})
	for _, g := range groups {
		share := budget
		if n := m.NumBoundary(); n > budget {
			share = max(1, budget*(g.hi-g.lo)/n)
		}
		pts := faceSegments(m, g.lo, g.hi, v, share)
		if len(pts) > 0 {
			c := g.c
			s.add(shape{kind: segments, pts: pts, stroke: &c, width: width, clip: clip})
		}
	}
}
