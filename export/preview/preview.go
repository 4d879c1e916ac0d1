// Package preview draws a picture of a mesh for people to look at before a
// long run: the mesh, its boundary coloured by condition (or by tag) with a
// legend, the cells that fail or nearly fail a limit highlighted, a view
// near the bodies when they are small beside the domain (an aerofoil in
// its far field), zoom windows around the worst cells, and one histogram
// per quality metric.
//
// The same scene is written as SVG (SVG) or rasterised by our own
// scanline rasteriser and written as PNG with image/png (PNG); both are
// deterministic: the same input gives the same bytes.
//
// Large meshes stay fast and small: the drawing is bounded whatever the
// cell count. At most MaxInteriorFaces interior faces are drawn (beyond
// that, one face per screen bin of the overview, the decimated interior),
// at most MaxBoundaryFaces boundary faces (likewise), MaxFlaggedCells
// highlighted cells, MaxZoomWindows zoom windows of at most
// MaxZoomFaces faces each. An SVG therefore stays below about 1.5 MB and a
// PNG below W × H × 4 bytes before compression, however large the mesh;
// the time is one pass over the faces per view.
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
// a histogram. Values that are NaN or infinite are left out of it.
type Metric struct {
	Name   string
	Values []float64
	Limits []Limit
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
	canvasW   = 1280
	margin    = 20
	viewW     = 800
	minViewH  = 240
	maxViewH  = 700
	viewTop   = 50
	zoomSize  = 256
	zoomGap   = 16
	columnX   = margin + viewW + 24
	columnW   = canvasW - columnX - margin
	histH     = 96
	histBlock = histH + 114
	bins      = 40
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
	dense := m.NumInterior > MaxInteriorFaces
	if dense {
		drawDensity(s, m, overview)
	} else {
		drawInterior(s, m, overview, 0)
	}
	drawBoundary(s, m, colours, overview, MaxBoundaryFaces, 0, 2.2)
	// Flagged cells go on top of the lines: they are what the picture
	// is for.
	binned := counts[Warn]+counts[Fail] > MaxFlaggedCells
	if binned {
		drawFlaggedBins(s, m, in.Status, overview)
	} else {
		drawFlagged(s, m, in.Status, overview, 0, MaxFlaggedCells)
		drawMarkers(s, m, in.Status, overview)
	}

	bottom := overview.b.y + overview.b.h
	if r, ok := bodiesRegion(m); ok {
		// Bodies far smaller than the domain (an aerofoil in its far
		// field) are a speck in the overview: a view of their
		// surroundings, framed on the overview, shows their mesh.
		top := bottom + 36
		h := math.Round(math.Min(math.Max(viewW*(r[3]-r[1])/(r[2]-r[0]), minViewH), maxBodiesH))
		near := newView(box{margin, top, viewW, h}, r[0], r[1], r[2], r[3])
		clip := s.addClip(near.b)
		s.rect(near.b, &white, &zoomFrame, 1.5)
		if facesMeeting(m, near, maxBodiesFaces) > maxBodiesFaces {
			drawDensity(s, m, near)
		} else {
			drawInterior(s, m, near, clip)
		}
		drawBoundary(s, m, colours, near, MaxBoundaryFaces, clip, 1.8)
		drawFlagged(s, m, in.Status, near, clip, MaxFlaggedCells)
		s.text(near.b.x, near.b.y-8, 12, start, ink, true, "near the bodies: the boundaries inside the domain and their surroundings")
		ax, ay := overview.px(near.x0, near.y0)
		bx, by := overview.px(near.x1, near.y1)
		fb := clampBox(box{ax, by, bx - ax, ay - by}, overview.b)
		s.rect(fb, nil, &zoomFrame, 1.5)
		s.text(fb.x+fb.w+3, fb.y+10, 12, start, zoomFrame, true, "B")
		bottom = near.b.y + near.b.h
	}
	zoomTop := bottom + 36
	zooms, regions := zoomCells(m, in)
	for k, c := range zooms {
		zb := box{float64(margin + k*(zoomSize+zoomGap)), zoomTop, zoomSize, zoomSize}
		r := regions[k]
		win := newView(zb, r.x0, r.y0, r.x1, r.y1)
		clip := s.addClip(zb)
		s.rect(zb, &white, &zoomFrame, 1.5)
		drawInterior(s, m, win, clip)
		drawBoundary(s, m, colours, win, MaxZoomFaces, clip, 1.5)
		drawFlagged(s, m, in.Status, win, clip, MaxZoomFaces/2)
		cell := m.Cell(int(c))
		pts := make([]float64, 0, 2*len(cell))
		for _, v := range cell {
			px, py := win.px(m.Nodes[v][0], m.Nodes[v][1])
			pts = append(pts, px, py)
		}
		s.add(shape{kind: polygon, pts: pts, stroke: &zoomFrame, width: 1.2, clip: clip})
		st := "selected"
		if in.Status != nil {
			st = [...]string{"pass", "warn", "fail"}[in.Status[c]]
		}
		s.text(zb.x, zb.y-8, 12, start, ink, true, fmt.Sprintf("zoom %d: cell %d (%s)", k+1, c, st))
		// Frame and number on the overview.
		ax, ay := overview.px(win.x0, win.y0)
		bx, by := overview.px(win.x1, win.y1)
		fb := clampBox(box{ax, by, bx - ax, ay - by}, overview.b)
		s.rect(fb, nil, &zoomFrame, 1.5)
		s.text(fb.x+fb.w+3, fb.y+10, 12, start, zoomFrame, true, strconv.Itoa(k+1))
		bottom = zb.y + zb.h
	}

	// The right column: counts, legend, histograms.
	y := float64(viewTop + 14)
	line := func(size float64, c rgb, bold bool, t string) {
		s.text(columnX, y, size, start, c, bold, t)
		y += size + 8
	}
	line(13, ink, false, fmt.Sprintf("%d cells, %d nodes", m.NumCells(), len(m.Nodes)))
	line(13, ink, false, fmt.Sprintf("%d faces, %d on the boundary", m.NumFaces(), m.NumBoundary()))
	if dense {
		line(12, faint, false, fmt.Sprintf("interior: %d faces, drawn as cell density", m.NumInterior))
		line(12, faint, false, fmt.Sprintf("(darker: more cells per %d px square)", densityBin))
	}
	y += 6
	if in.Conditions != nil {
		line(14, ink, true, "Boundary conditions")
	} else {
		line(14, ink, true, "Boundary tags")
	}
	for _, e := range legend {
		c := e.colour
		s.add(shape{kind: segments, pts: []float64{columnX, y - 5, columnX + 28, y - 5}, stroke: &c, width: 3})
		s.text(columnX+38, y, 12, start, ink, false, fmt.Sprintf("%s (%d faces)", e.label, e.faces))
		y += 20
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
		line(12, faint, false, fmt.Sprintf("overview marks each %d px square holding one", flagBin))
	}
	y += 12
	for _, mt := range in.Metrics {
		drawHistogram(s, mt, box{columnX, y + 22, columnW, histH})
		y += histBlock
	}
	s.h = int(math.Ceil(math.Max(bottom, y) + margin))
	return s, nil
}

// Bounds of the view near the bodies: its height in canvas pixels, and
// the interior faces it draws one by one (beyond that, the cell density),
// so that the picture stays as bounded as the package comment says.
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

// facesMeeting counts the interior faces that meet the view, stopping
// past limit.
func facesMeeting(m *mesh.Mesh, v view, limit int) int {
	n := 0
	for _, fn := range m.FaceNodes[:m.NumInterior] {
		a, b := m.Nodes[fn[0]], m.Nodes[fn[1]]
		if v.meets(a[0], a[1], b[0], b[1]) {
			if n++; n > limit {
				break
			}
		}
	}
	return n
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
	return newView(box{margin, viewTop, viewW, math.Round(h)}, x0, y0, x1, y1)
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

// legendEntry is one line of the boundary legend.
type legendEntry struct {
	label  string
	colour rgb
	faces  int
}

// boundaryColours gives each tag its colour: by condition when conditions
// are given (tags without one get their own entry), else by tag; untagged
// faces are black.
func boundaryColours(m *mesh.Mesh, conditions []string) ([]rgb, []legendEntry) {
	colours := make([]rgb, len(m.Tags))
	var legend []legendEntry
	index := map[string]int{}
	for t, tag := range m.Tags {
		key, label := "tag:"+tag, tag
		if conditions != nil {
			if c := conditions[t]; c != "" {
				key, label = "bc:"+c, c
			} else {
				label = tag + " (no condition)"
			}
		}
		k, ok := index[key]
		if !ok {
			k = len(legend)
			index[key] = k
			legend = append(legend, legendEntry{label: label, colour: boundaryOf[k%len(boundaryOf)]})
		}
		colours[t] = legend[k].colour
		legend[k].faces += int(m.TagStart[t+1] - m.TagStart[t])
	}
	if lo, hi := m.UntaggedRange(); hi > lo {
		legend = append(legend, legendEntry{label: "untagged", colour: untagged, faces: hi - lo})
	}
	return colours, legend
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

// drawInterior draws the interior faces that meet the view; callers use it
// only where they number at most MaxInteriorFaces (small meshes, zoom
// windows).
func drawInterior(s *scene, m *mesh.Mesh, v view, clip int) {
	pts := faceSegments(m, 0, m.NumInterior, v, m.NumInterior)
	if len(pts) > 0 {
		s.add(shape{kind: segments, pts: pts, stroke: &meshLine, width: 0.7, clip: clip})
	}
}

// Bin sizes, in canvas pixels, of the decimated overview.
const (
	densityBin = 8
	flagBin    = 6
	levels     = 8
)

// binCounts counts the cell centroids per square bin of size px over the
// view's box; keep selects the cells counted (nil: all).
func binCounts(m *mesh.Mesh, v view, size int, keep func(c int) bool) (counts []int, nx int) {
	nx, ny := int(v.b.w)/size+1, int(v.b.h)/size+1
	counts = make([]int, nx*ny)
	for c, p := range m.Geo.CellCentroid {
		if keep != nil && !keep(c) {
			continue
		}
		x, y := v.px(p[0], p[1])
		i, j := int((x-v.b.x)/float64(size)), int((y-v.b.y)/float64(size))
		if i >= 0 && j >= 0 && i < nx && j < ny {
			counts[j*nx+i]++
		}
	}
	return counts, nx
}

// drawDensity shades the overview by cell density for meshes too large to
// draw face by face: each densityBin square is one of levels greys, from
// log(1 + n) / log(1 + the largest n), n the cells whose centroid falls in
// it. It draws at most (view area / densityBin²) squares.
func drawDensity(s *scene, m *mesh.Mesh, v view) {
	counts, nx := binCounts(m, v, densityBin, nil)
	top := 0
	for _, n := range counts {
		top = max(top, n)
	}
	var sq [levels][]float64
	for k, n := range counts {
		if n == 0 {
			continue
		}
		l := min(levels-1, int(float64(levels)*math.Log1p(float64(n))/math.Log1p(float64(top))))
		sq[l] = append(sq[l], v.b.x+float64(k%nx*densityBin), v.b.y+float64(k/nx*densityBin))
	}
	for l, pts := range sq {
		if len(pts) == 0 {
			continue
		}
		// From a near-white grey to the mesh line grey, darker for denser.
		f := float64(l+1) / levels
		c := rgb{mix(240, 150, f), mix(243, 160, f), mix(247, 172, f)}
		s.add(shape{kind: squares, pts: pts, fill: &c, width: densityBin, clip: s.viewClip(v)})
	}
}

// drawFlaggedBins marks, when there are too many flagged cells to fill one
// by one, each flagBin square holding a failing (red) or else a warning
// (amber) cell's centroid.
func drawFlaggedBins(s *scene, m *mesh.Mesh, st []Status, v view) {
	for _, want := range []Status{Warn, Fail} {
		counts, nx := binCounts(m, v, flagBin, func(c int) bool { return st[c] == want })
		var pts []float64
		for k, n := range counts {
			if n > 0 {
				pts = append(pts, v.b.x+float64(k%nx*flagBin), v.b.y+float64(k/nx*flagBin))
			}
		}
		c := failFill
		if want == Warn {
			c = warnFill
		}
		if len(pts) > 0 {
			s.add(shape{kind: squares, pts: pts, fill: &c, width: flagBin, clip: s.viewClip(v)})
		}
	}
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

// drawFlagged fills the failing, then the warning cells that show in the
// view, at most budget of them.
func drawFlagged(s *scene, m *mesh.Mesh, st []Status, v view, clip, budget int) {
	if st == nil {
		return
	}
	drawn := 0
	for _, want := range []Status{Fail, Warn} {
		c := failFill
		if want == Warn {
			c = warnFill
		}
		for cell, x := range st {
			if x != want || drawn >= budget {
				continue
			}
			nodes := m.Cell(cell)
			pts := make([]float64, 0, 2*len(nodes))
			in := false
			for k, a := range nodes {
				p, q := m.Nodes[a], m.Nodes[nodes[(k+1)%len(nodes)]]
				in = in || v.meets(p[0], p[1], q[0], q[1])
				px, py := v.px(p[0], p[1])
				pts = append(pts, px, py)
			}
			if !in {
				continue
			}
			// The outline in the fill colour keeps cells thinner than
			// a pixel visible.
			s.add(shape{kind: polygon, pts: pts, fill: &c, stroke: &c, width: 1, clip: clip})
			drawn++
		}
	}
}

// drawMarkers rings failing cells whose bounding box is under 4 px on
// the overview, too small to see as a fill.
func drawMarkers(s *scene, m *mesh.Mesh, st []Status, v view) {
	n := 0
	for c, x := range st {
		if x != Fail || n >= maxMarkers {
			continue
		}
		if cellExtent(m, c)*v.scale >= 4 {
			continue
		}
		cx, cy := v.px(m.Geo.CellCentroid[c][0], m.Geo.CellCentroid[c][1])
		s.add(shape{kind: polygon, pts: ring(cx, cy, 6, 16), stroke: &failFill, width: 1.5})
		n++
	}
}

// cellExtent is the larger side of cell c's bounding box.
func cellExtent(m *mesh.Mesh, c int) float64 {
	x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, v := range m.Cell(c) {
		p := m.Nodes[v]
		x0, x1 = math.Min(x0, p[0]), math.Max(x1, p[0])
		y0, y1 = math.Min(y0, p[1]), math.Max(y1, p[1])
	}
	return math.Max(x1-x0, y1-y0)
}

// ring is a regular n-gon of radius r around (cx, cy).
func ring(cx, cy, r float64, n int) []float64 {
	pts := make([]float64, 0, 2*n)
	for k := 0; k < n; k++ {
		a := 2 * math.Pi * float64(k) / float64(n)
		pts = append(pts, cx+r*math.Cos(a), cy+r*math.Sin(a))
	}
	return pts
}

// zoomCells picks the cells to zoom in on, up to MaxZoomWindows, each
// outside the earlier windows: from in.Worst in its order; without it,
// spread over the failing cells (or, if none fail, the warning ones) by
// farthest-point sampling from the lowest-numbered one, so the windows
// show different places. It returns the cells and the regions framing
// them.
func zoomCells(m *mesh.Mesh, in Input) ([]int32, []view) {
	var out []int32
	var wins []view
	inside := func(c int32) bool {
		p := m.Geo.CellCentroid[c]
		for _, w := range wins {
			if p[0] >= w.x0 && p[0] <= w.x1 && p[1] >= w.y0 && p[1] <= w.y1 {
				return true
			}
		}
		return false
	}
	pick := func(c int32) {
		out = append(out, c)
		wins = append(wins, zoomView(m, c, box{0, 0, zoomSize, zoomSize}))
	}
	if in.Worst != nil {
		for _, c := range in.Worst {
			if len(out) < MaxZoomWindows && !inside(c) {
				pick(c)
			}
		}
		return out, wins
	}
	var cand []int32
	for _, want := range []Status{Fail, Warn} {
		for c, x := range in.Status {
			if x == want {
				cand = append(cand, int32(c))
			}
		}
		if len(cand) > 0 {
			break
		}
	}
	if len(cand) == 0 {
		return nil, nil
	}
	dist := make([]float64, len(cand))
	for i := range dist {
		dist[i] = math.Inf(1)
	}
	next := cand[0]
	for len(out) < MaxZoomWindows {
		pick(next)
		p := m.Geo.CellCentroid[next]
		best, bestD := int32(-1), -1.0
		for i, c := range cand {
			q := m.Geo.CellCentroid[c]
			dist[i] = math.Min(dist[i], math.Hypot(q[0]-p[0], q[1]-p[1]))
			if dist[i] > bestD && !inside(c) {
				best, bestD = c, dist[i]
			}
		}
		if best < 0 {
			break
		}
		next = best
	}
	return out, wins
}

// zoomView frames cell c: a square six cell sizes wide, shrunk until it
// holds at most MaxZoomFaces faces.
func zoomView(m *mesh.Mesh, c int32, b box) view {
	x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, v := range m.Cell(int(c)) {
		p := m.Nodes[v]
		x0, x1 = math.Min(x0, p[0]), math.Max(x1, p[0])
		y0, y1 = math.Min(y0, p[1]), math.Max(y1, p[1])
	}
	cx, cy := 0.5*(x0+x1), 0.5*(y0+y1)
	half := 3 * math.Max(math.Max(x1-x0, y1-y0), 1e-300)
	for {
		v := newView(b, cx-half, cy-half, cx+half, cy+half)
		n := 0
		for _, fn := range m.FaceNodes {
			a, q := m.Nodes[fn[0]], m.Nodes[fn[1]]
			if v.meets(a[0], a[1], q[0], q[1]) {
				if n++; n > MaxZoomFaces {
					break
				}
			}
		}
		if n <= MaxZoomFaces || half < 1e-300 {
			return v
		}
		half *= 0.5
	}
}
