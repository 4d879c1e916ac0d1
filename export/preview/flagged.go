package preview

import (
	"math"

	"cvdeck/mesh"
)

// flagBin is the side in pixels of the squares that mark flagged cells too
// small, or too many, to fill one by one.
const flagBin = 6

// flagColours are the fill and, in zoom windows, the edge colour of each
// standing.
func flagColours(st Status) (fill, edge rgb) {
	if st == Fail {
		return failFill, failEdge
	}
	return warnFill, warnEdge
}

// drawFlagged marks the failing and warning cells that show in view v.
// When at most budget of them show, each is filled; otherwise each that
// spans flagBin pixels or more on screen is filled, the failing first, at
// most budget of them, and the smaller ones and those past the budget
// mark every flagBin square their bounding box touches, so that a band of
// flagged cells thinner than a pixel shows as an unbroken band. Filled
// cells are outlined in their fill colour, which keeps a cell thinner
// than a pixel visible, or with edges a shade darker when edged is set
// (the zoom windows, where a cell's shape is the point). It reports
// whether any cell was marked by squares.
func drawFlagged(s *scene, m *mesh.Mesh, st []Status, v view, clip, budget int, edged bool) bool {
	if st == nil {
		return false
	}
	bounds := func(cell int) (x0, y0, x1, y1 float64, in bool) {
		x0, y0, x1, y1 = math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
		for _, a := range m.Cell(cell) {
			// Plain comparisons: node coordinates are finite.
			p := m.Nodes[a]
			if p[0] < x0 {
				x0 = p[0]
			}
			if p[0] > x1 {
				x1 = p[0]
			}
			if p[1] < y0 {
				y0 = p[1]
			}
			if p[1] > y1 {
				y1 = p[1]
			}
		}
		return x0, y0, x1, y1, x1 >= v.x0 && x0 <= v.x1 && y1 >= v.y0 && y0 <= v.y1
	}
	showing := 0
	for cell, x := range st {
		if x == Warn || x == Fail {
			if _, _, _, _, in := bounds(cell); in {
				showing++
			}
		}
	}
	fillAll := showing <= budget
	nx, ny := int(v.b.w)/flagBin+1, int(v.b.h)/flagBin+1
	var marks [Fail + 1][]bool
	filled, marked := 0, false
	for _, want := range []Status{Fail, Warn} {
		fill, edge := flagColours(want)
		if !edged {
			edge = fill
		}
		for cell, x := range st {
			if x != want {
				continue
			}
			x0, y0, x1, y1, in := bounds(cell)
			if !in {
				continue
			}
			if fillAll || (math.Max(x1-x0, y1-y0)*v.scale >= flagBin && filled < budget) {
				nodes := m.Cell(cell)
				pts := make([]float64, 0, 2*len(nodes))
				for _, a := range nodes {
					px, py := v.px(m.Nodes[a][0], m.Nodes[a][1])
					pts = append(pts, px, py)
				}
				s.add(shape{kind: polygon, pts: pts, fill: &fill, stroke: &edge, width: 1, clip: clip})
				filled++
				continue
			}
			if marks[want] == nil {
				marks[want] = make([]bool, nx*ny)
			}
			marked = true
			ax, ay := v.px(x0, y1)
			bx, by := v.px(x1, y0)
			i0, j0 := max(0, int((ax-v.b.x)/flagBin)), max(0, int((ay-v.b.y)/flagBin))
			i1, j1 := min(nx-1, int((bx-v.b.x)/flagBin)), min(ny-1, int((by-v.b.y)/flagBin))
			for j := j0; j <= j1; j++ {
				for i := i0; i <= i1; i++ {
					marks[want][j*nx+i] = true
				}
			}
		}
	}
	if !marked {
		return false
	}
	if clip == 0 {
		clip = s.viewClip(v)
	}
	// Warnings first, so that failures show on top where both touch a
	// square.
	for _, want := range []Status{Warn, Fail} {
		grid := marks[want]
		var pts []float64
		for j := 0; grid != nil && j < ny; j++ {
			for i := 0; i < nx; {
				if !grid[j*nx+i] {
					i++
					continue
				}
				k := i + 1
				for k < nx && grid[j*nx+k] {
					k++
				}
				pts = append(pts, v.b.x+float64(i*flagBin), v.b.y+float64(j*flagBin), float64((k-i)*flagBin))
				i = k
			}
		}
		if len(pts) > 0 {
			fill, _ := flagColours(want)
			s.add(shape{kind: runs, pts: pts, fill: &fill, width: flagBin, clip: clip})
		}
	}
	return true
}

// drawMarkers rings failing cells whose bounding box is under 4 px on
// the overview, too small to see as a fill, at most maxMarkers of them.
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
