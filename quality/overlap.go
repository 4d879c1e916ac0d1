package quality

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
	"cvdeck/mesh/unstructured/predicates"
)

// checkOverlap runs overlap: no ground is covered by the cells twice.
//
// Why the winding number tells. Each positive cell's boundary, run
// counter-clockwise, winds once round the points inside the cell and not
// at all round those outside, so at any point p off the faces the number
// of cells covering p is the winding number round p of the sum of the
// cells' boundaries. Interior faces are run once each way by their two
// cells and cancel, which leaves the boundary faces, each run as its owner
// runs it (mesh.Mesh.FaceNodes): the coverage of p is the winding number
// of the boundary chain round p (the degree of the map the cells make, a
// classical result of topology; from memory). Just outside a boundary
// face, on the side away from its owner, a sound mesh covers nothing, so
// the winding number there must be 0; where two patches of cells lie on
// top of each other, or a node has been moved into a neighbouring cell,
// some boundary face has cells beyond it, and the winding number there is
// 1 or more. Boundary crossings alone do not show it: a patch laid inside
// another, or two loops pinched together at shared nodes, leave a
// boundary that nowhere crosses itself.
//
// Two boundary faces on the same two points run opposite ways are the two
// sides of a crack, or of a zero-thickness wall with its nodes doubled:
// the ground just beyond one face is the other's cell, covered once, which
// is no overlap (duplicate_node reports the doubled nodes).
//
// The winding number just beyond the midpoint p of face f is counted along
// a ray from p in the axis direction closest to f's outward normal, by the
// crossing rule of Sunday (2001, "Fast winding number inclusion of a point
// in a polygon", from memory): an edge that crosses the ray's line upwards
// with p to its left adds 1, downwards with p to its right takes 1, ends
// on the line counted on the upper side only. The ray leaves f at once on
// its outer side, so f and its twin are left out; the sides are decided by
// the exact orientation predicate, in coordinates turned by quarter turns,
// which are exact. The faces are swept in the order of their lower ends
// along the ray's normal direction, so each ray meets only the faces that
// span its line. Faces of zero length and faces of cells of zero or
// negative area, which other checks report, are not tested (they still
// count in the winding number).
func checkOverlap(m *mesh.Mesh, cn *connectivity) {
	nb := m.NumBoundary()
	if nb == 0 {
		return
	}
	twin := boundaryTwins(m)
	// The queries of each quarter turn r: the ray runs along +x after the
	// turn (turned).
	var queries [4][]int32
	for k := range nb {
		f := m.NumInterior + k
		a, b := m.Nodes[m.FaceNodes[f][0]], m.Nodes[m.FaceNodes[f][1]]
		nx, ny := b[1]-a[1], a[0]-b[0] // outward: (dy, −dx)
		if nx == 0 && ny == 0 || !(m.Geo.CellArea[m.Owner[f]] > 0) {
			continue
		}
		r := 0
		switch {
		case math.Abs(nx) >= math.Abs(ny) && nx < 0:
			r = 2
		case math.Abs(nx) < math.Abs(ny) && ny > 0:
			r = 1
		case math.Abs(nx) < math.Abs(ny):
			r = 3
		}
		queries[r] = append(queries[r], int32(k))
	}
	var found []Problem
	for r, qs := range queries {
		if len(qs) == 0 {
			continue
		}
		found = append(found, overlapSweep(m, r, qs, twin)...)
	}
	slices.SortFunc(found, func(p, q Problem) int { return cmp.Compare(p.Face, q.Face) })
	for _, p := range found {
		cn.add(p)
	}
}

// turned returns p turned by r quarter turns clockwise, so that the
// direction r (0 +x, 1 +y, 2 −x, 3 −y) becomes +x; quarter turns swap
// and negate coordinates and are exact.
func turned(p orb.Point, r int) orb.Point {
	switch r {
	case 1:
		return orb.Point{p[1], -p[0]}
	case 2:
		return orb.Point{-p[0], -p[1]}
	case 3:
		return orb.Point{-p[1], p[0]}
	}
	return p
}

// overlapSweep counts the winding number beyond each boundary face of qs
// (indices among the boundary faces) along the ray in direction r, and
// returns a problem for each where it is not what a sound mesh gives.
func overlapSweep(m *mesh.Mesh, r int, qs []int32, twin []int32) []Problem {
	nb := m.NumBoundary()
	type edge struct {
		a, b   orb.Point
		y0, y1 float64
	}
	edges := make([]edge, nb)
	order := make([]int32, nb)
	for k := range nb {
		fn := m.FaceNodes[m.NumInterior+k]
		a, b := turned(m.Nodes[fn[0]], r), turned(m.Nodes[fn[1]], r)
		edges[k] = edge{a, b, min(a[1], b[1]), max(a[1], b[1])}
		order[k] = int32(k)
	}
	slices.SortFunc(order, func(i, j int32) int { return cmp.Or(cmp.Compare(edges[i].y0, edges[j].y0), cmp.Compare(i, j)) })
	mids := make([]orb.Point, len(qs))
	for i, k := range qs {
		e := edges[k]
		mids[i] = orb.Point{0.5 * (e.a[0] + e.b[0]), 0.5 * (e.a[1] + e.b[1])}
	}
	byY := make([]int, len(qs))
	for i := range byY {
		byY[i] = i
	}
	slices.SortFunc(byY, func(i, j int) int { return cmp.Or(cmp.Compare(mids[i][1], mids[j][1]), cmp.Compare(i, j)) })
	var active []int32
	next := 0
	var found []Problem
	for _, i := range byY {
		p, k := mids[i], qs[i]
		for next < nb && edges[order[next]].y0 <= p[1] {
			active = append(active, order[next])
			next++
		}
		w := 0
		keep := active[:0]
		for _, g := range active {
			e := edges[g]
			if e.y1 < p[1] {
				continue // below every later ray too
			}
			keep = append(keep, g)
			if g == k || g == twin[k] {
				continue
			}
			switch {
			case e.a[1] <= p[1] && e.b[1] > p[1]:
				if predicates.Orient2d(e.a[0], e.a[1], e.b[0], e.b[1], p[0], p[1]) > 0 {
					w++
				}
			case e.b[1] <= p[1] && e.a[1] > p[1]:
				if predicates.Orient2d(e.a[0], e.a[1], e.b[0], e.b[1], p[0], p[1]) < 0 {
					w--
				}
			}
		}
		active = keep
		want := 0
		if twin[k] >= 0 {
			want = 1
		}
		if w == want {
			continue
		}
		f := m.NumInterior + int(k)
		mid := m.Geo.FaceMid[f]
		c := m.Owner[f]
		what := fmt.Sprintf("covered %d more time(s) by other cells: the mesh lies over itself there (two patches of cells on top of each other, or nodes moved into a neighbouring cell)", w-want)
		if w < want {
			what = "not covered by the cell beyond the crack it should close: the crack's two sides do not bound the same ground"
		}
		found = append(found, Problem{Check: CheckOverlap, Cell: int(c), Face: f, Node: -1, X: mid[0], Y: mid[1],
			Message: fmt.Sprintf("beyond boundary face %d of cell %d at (%.9g, %.9g) the ground is %s", f, c, mid[0], mid[1], what)})
	}
	return found
}

// boundaryTwins returns, for each boundary face (by its index among the
// boundary faces), another boundary face on the same two points run the
// other way, or -1: the two sides of a crack or a doubled-node wall.
func boundaryTwins(m *mesh.Mesh) []int32 {
	nb := m.NumBoundary()
	type key struct{ a, b orb.Point }
	at := make(map[key]int32, nb)
	for k := range nb {
		fn := m.FaceNodes[m.NumInterior+k]
		at[key{m.Nodes[fn[0]], m.Nodes[fn[1]]}] = int32(k)
	}
	twin := make([]int32, nb)
	for k := range nb {
		fn := m.FaceNodes[m.NumInterior+k]
		twin[k] = -1
		if j, ok := at[key{m.Nodes[fn[1]], m.Nodes[fn[0]]}]; ok && j != int32(k) {
			twin[k] = j
		}
	}
	return twin
}
