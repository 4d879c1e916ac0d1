package preview

import (
	"slices"

	"cvdeck/mesh"
)

// blockLine is the colour of the dashed block outlines.
var blockLine = rgb{52, 58, 64}

// maxBlockSegments bounds the outline segments one view draws for the
// blocks of a structured mesh, whatever their size.
const maxBlockSegments = 8000

// drawBlocks outlines each block of a structured mesh's view (Mesh.Blocks)
// in v, dashed, names it at its middle node, and marks its first node
// (i = j = 0, where its south and west sides meet) with a dot, so that a
// reader can tell the blocks apart, see the interfaces between them, and
// find the side an error names: south runs from the dot along i, west
// along j. A side with more nodes than its share of maxBlockSegments is
// drawn through every k-th node and its last. It reports whether anything
// was drawn.
func drawBlocks(s *scene, m *mesh.Mesh, v view, clip int) bool {
	total := 0
	for _, b := range m.Blocks {
		total += 2 * (b.NI + b.NJ)
	}
	if total == 0 {
		return false
	}
	stride := max(1, (total+maxBlockSegments-1)/maxBlockSegments)
	var pts []float64
	for _, b := range m.Blocks {
		for s := mesh.South; s <= mesh.West; s++ {
			nodes := b.SideNodes(s)
			n := len(nodes)
			prev := int32(-1)
			for k := 0; k < n; k += stride {
				prev = segmentTo(m, v, &pts, prev, nodes[k])
			}
			if (n-1)%stride != 0 {
				segmentTo(m, v, &pts, prev, nodes[n-1])
			}
		}
	}
	if len(pts) > 0 {
		s.add(shape{kind: segments, pts: pts, stroke: &blockLine, width: 1.2, dashed: true, clip: clip})
	}
	inView := func(x, y float64) bool {
		return x >= v.b.x && x <= v.b.x+v.b.w && y >= v.b.y && y <= v.b.y+v.b.h
	}
	// A name that would overlap one already placed (the pieces of a
	// grid split round a small body) is left out rather than smeared.
	var placed []box
	for _, b := range m.Blocks {
		p := m.Nodes[b.Node[0]]
		if x, y := v.px(p[0], p[1]); inView(x, y) {
			s.add(shape{kind: polygon, pts: ring(x, y, 3, 8), fill: &blockLine, clip: clip})
		}
		c := m.Nodes[b.Node[(b.NJ/2)*b.NI+b.NI/2]]
		x, y := v.px(c[0], c[1])
		if b.Name == "" || !inView(x, y) {
			continue
		}
		w := textWidth(b.Name, 11)
		lb := box{x - w/2 - 2, y - 8, w + 4, 14}
		if slices.ContainsFunc(placed, func(o box) bool { return overlaps(o, lb) }) {
			continue
		}
		placed = append(placed, lb)
		s.text(x, y+4, 11, middle, blockLine, true, b.Name)
	}
	return len(pts) > 0
}

// segmentTo adds the segment from node prev to node next (if prev ≥ 0
// and the segment meets v) to pts in v's pixels, and returns next.
func segmentTo(m *mesh.Mesh, v view, pts *[]float64, prev, next int32) int32 {
	if prev >= 0 {
		a, b := m.Nodes[prev], m.Nodes[next]
		if v.meets(a[0], a[1], b[0], b[1]) {
			ax, ay := v.px(a[0], a[1])
			bx, by := v.px(b[0], b[1])
			*pts = append(*pts, ax, ay, bx, by)
		}
	}
	return next
}

// overlaps reports whether two boxes share any area.
func overlaps(a, b box) bool {
	return a.x < b.x+b.w && b.x < a.x+a.w && a.y < b.y+b.h && b.y < a.y+a.h
}
