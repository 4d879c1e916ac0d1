package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"
	"unsafe"

	"github.com/paulmach/orb"

	"cvdeck/internal/hugepage"
	"cvdeck/mesh"
)

// szone is one structured zone as read.
type szone struct {
	name   string
	path   string
	ni, nj int // nodes along the zone's 2D index directions
	// In a 3D base, across is the index direction (0, 1, 2 for i, j, k)
	// the zone is read across: the one in which it is a single node
	// plane, or k of a zone one cell thick in k; depth is its nodes along
	// it (1 or 2; 0 in a 2D base), and dirs the other two, in order, taken
	// as the zone's 2D (i, j).
	across int
	depth  int
	dirs   [2]int
	first  int32 // global id of node (1, 1): nodes are first + j*ni + i
	nodes  []orb.Point
}

// join is one GridConnectivity1to1_t as read.
type join struct {
	path      string
	a, b      int // zone indices
	rng, drng [4]int32
	transform [2]int32
	// periodic marks a periodic join, which merges no nodes; tag is its
	// boundary tag and found its faces.
	periodic bool
	tag      string
	found    periodicFound
}

// donorOf maps 1-based index (i, j) of the receiving zone to the donor
// zone by the SIDS rule index_donor = T·(index − Begin) + Begin_donor, where
// column c of T has sign(Transform[c]) in row |Transform[c]| − 1.
func (jn *join) donorOf(i, j int32) (int32, int32) {
	d := [2]int32{jn.drng[0], jn.drng[1]}
	delta := [2]int32{i - jn.rng[0], j - jn.rng[1]}
	for c, t := range jn.transform {
		row, sign := t-1, int32(1)
		if t < 0 {
			row, sign = -t-1, -1
		}
		d[row] += sign * delta[c]
	}
	return d[0], d[1]
}

// structured reads nz structured zones and merges them (see Read).
func (r *reader) structured(nz int) (*mesh.Mesh, error) {
	zones := make([]szone, nz)
	raw, paths := make([]xyz, nz), make([]string, nz)
	byName := map[string]int{}
	total := int32(0)
	for zi := range zones {
		z := C.int(zi + 1)
		var idim C.int
		if err := libError(C.cg_index_dim(r.fn, r.b, z, &idim), fmt.Sprintf("read index dimension of zone %d of /%s", z, r.base)); err != nil {
			return nil, err
		}
		size := make([]int32, 3*idim)
		name, err := r.zoneName(z, size)
		if err != nil {
			return nil, err
		}
		s := &zones[zi]
		s.name, s.path = name, "/"+r.base+"/"+name
		if want := r.indexDim(); int(idim) != want {
			return nil, fmt.Errorf("%s is a structured zone of index dimension %d in a base of cell dimension %d; cvdeck reads zones of index dimension %d there", s.path, idim, want, want)
		}
		s.ni, s.nj = int(size[0]), int(size[1])
		rmax := []int32{size[0], size[1]}
		if r.thin {
			if err := s.readAcross(size[:3]); err != nil {
				return nil, err
			}
			rmax = []int32{size[0], size[1], size[2]}
			rmax[s.across] = 1 // the plane read
		}
		if s.ni < 2 || s.nj < 2 {
			return nil, fmt.Errorf("%s is %d×%d nodes; a structured zone needs at least 2×2", s.path, s.ni, s.nj)
		}
		if int64(total)+int64(s.ni*s.nj) > maxIndex {
			return nil, fmt.Errorf("%s: the zones hold more than %d nodes", s.path, maxIndex)
		}
		s.first = total
		total += int32(s.ni * s.nj)
		c, err := r.coords(z, s.path, rmax, s.ni*s.nj, false)
		if err != nil {
			return nil, err
		}
		raw[zi], paths[zi] = c, s.path
		byName[name] = zi
	}
	pts, err := r.plane(paths, raw)
	if err != nil {
		return nil, err
	}
	for zi := range zones {
		s := &zones[zi]
		s.nodes = pts[zi]
		if s.depth == 2 {
			if r.axis != 2 {
				return nil, fmt.Errorf("%s is one cell thick in k, but its nodes lie on a plane %s = constant, not z; cvdeck reads zones one cell thick only as slabs extruded along z", s.path, [2]string{"x", "y"}[r.axis])
			}
			if err := r.sameSecondPlane(C.int(zi+1), s); err != nil {
				return nil, err
			}
		}
	}

	// Merge the nodes of every 1-to-1 join (union-find on global ids).
	parent := make([]int32, total)
	for i := range parent {
		parent[i] = int32(i)
	}
	var find func(int32) int32
	find = func(x int32) int32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	var joins []join
	for zi := range zones {
		js, err := r.joins(C.int(zi+1), &zones[zi], zones, byName)
		if err != nil {
			return nil, err
		}
		for _, jn := range js {
			if jn.periodic {
				continue
			}
			a, b := &zones[jn.a], &zones[jn.b]
			si, sj := step(jn.rng[0], jn.rng[2]), step(jn.rng[1], jn.rng[3])
			for j := jn.rng[1]; ; j += sj {
				for i := jn.rng[0]; ; i += si {
					di, dj := jn.donorOf(i, j)
					if di < 1 || dj < 1 || int(di) > b.ni || int(dj) > b.nj {
						return nil, fmt.Errorf("%s: point (%d, %d) maps to (%d, %d), outside donor zone %s (%d×%d)", jn.path, i, j, di, dj, b.name, b.ni, b.nj)
					}
					x, y := find(a.id(i, j)), find(b.id(di, dj))
					if x != y {
						parent[max(x, y)] = min(x, y)
					}
					if i == jn.rng[2] {
						break
					}
				}
				if j == jn.rng[3] {
					break
				}
			}
		}
		joins = append(joins, js...)
	}
	// joined is each node's root under the 1-to-1 joins alone, kept when
	// the coincident-node merge joins more, so that the BCs on sides it
	// makes interior can be told from those on sides the file joins.
	var joined []int32
	if len(zones) > 1 {
		joined = hugepage.Make[int32](int(total))
		for g := range joined {
			joined[g] = find(int32(g))
		}
		if note := mergeTouching(zones, parent, find); note != "" {
			r.notes = append(r.notes, note)
		} else {
			joined = nil
		}
	}
	newID := make([]int32, total)
	var nodes []orb.Point
	for zi := range zones {
		s := &zones[zi]
		for k := 0; k < s.ni*s.nj; k++ {
			g := s.first + int32(k)
			root := find(g)
			if root == g {
				newID[g] = int32(len(nodes))
				nodes = append(nodes, s.nodes[k])
			} else {
				newID[g] = newID[root]
			}
		}
	}

	in := mesh.Input{Nodes: nodes, CellStart: []int32{0}}
	for zi := range zones {
		s := &zones[zi]
		blk := mesh.Block{Name: s.name, NI: s.ni, NJ: s.nj, Node: make([]int32, s.ni*s.nj), FirstCell: int32(len(in.CellStart) - 1)}
		for k := range blk.Node {
			blk.Node[k] = newID[s.first+int32(k)]
		}
		// A left-handed zone (negative total signed area) is turned
		// counter-clockwise.
		area := 0.0
		for j := 0; j+1 < s.nj; j++ {
			for i := 0; i+1 < s.ni; i++ {
				p := [4]orb.Point{s.nodes[j*s.ni+i], s.nodes[j*s.ni+i+1], s.nodes[(j+1)*s.ni+i+1], s.nodes[(j+1)*s.ni+i]}
				area += (p[2][0]-p[0][0])*(p[3][1]-p[1][1]) - (p[3][0]-p[1][0])*(p[2][1]-p[0][1])
			}
		}
		for j := 0; j+1 < s.nj; j++ {
			for i := 0; i+1 < s.ni; i++ {
				q := [4]int32{blk.Node[j*s.ni+i], blk.Node[j*s.ni+i+1], blk.Node[(j+1)*s.ni+i+1], blk.Node[(j+1)*s.ni+i]}
				if area < 0 {
					q[1], q[3] = q[3], q[1]
				}
				n0 := len(in.CellNodes)
				for k, v := range q {
					if v != q[(k+3)%4] {
						in.CellNodes = append(in.CellNodes, v)
					}
				}
				if len(in.CellNodes)-n0 < 3 {
					return nil, fmt.Errorf("%s: cell (%d, %d) collapses to %d distinct nodes after the 1-to-1 joins are merged", s.path, i+1, j+1, len(in.CellNodes)-n0)
				}
				in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
			}
		}
		in.Blocks = append(in.Blocks, blk)
	}
	in.Interfaces = interfaces(joins, zones)

	var found []taggedEdges
	for _, jn := range joins {
		if !jn.periodic {
			continue
		}
		pf := jn.found
		if pf.unsupported == "" {
			edges, err := joinEdges(&jn, &zones[jn.a], &zones[jn.b])
			if err != nil {
				return nil, err
			}
			t := taggedEdges{tag: jn.tag}
			for _, e := range edges {
				a := [2]int32{newID[e[0][0]], newID[e[0][1]]}
				pf.faces = append(pf.faces, [2][2]int32{a, {newID[e[1][0]], newID[e[1][1]]}})
				t.edges = append(t.edges, a)
			}
			found = append(found, t)
		}
		r.periodic = append(r.periodic, pf)
	}
	var left []string // the BCs on the front and back of the slab
	// The faces on zone sides by their node pairs, with the zones they lie
	// on (a face on two sides is interior); and where zones were merged
	// where they touch, the same under the 1-to-1 joins alone. A BC face
	// the joins make interior is an error, one the merge makes interior is
	// left out with a note.
	var sidesJoined map[[2]int32][]int
	var interior []string // the BCs on sides the merge made interior
	sides := sideFaces(zones, func(g int32) int32 { return newID[g] })
	if joined != nil {
		sidesJoined = sideFaces(zones, func(g int32) int32 { return joined[g] })
	}
	for zi := range zones {
		s := &zones[zi]
		bcs, err := r.bocos(C.int(zi+1), s.path, r.indexDim())
		if err != nil {
			return nil, err
		}
		if r.thin {
			var out []bcInfo
			if bcs, out, err = s.planeBCs(bcs); err != nil {
				return nil, err
			}
			for _, b := range out {
				left = append(left, fmt.Sprintf("%s/%s (tag %s)", s.name, b.name, b.tag))
			}
		}
		for _, b := range bcs {
			edges, err := s.bcEdges(b)
			if err != nil {
				return nil, err
			}
			t := taggedEdges{tag: b.tag}
			// The zones its interior faces lie against, and how many of
			// them the file's 1-to-1 connectivity joins.
			var against []string
			byJoin := 0
			for _, e := range edges {
				a := [2]int32{newID[e[0]], newID[e[1]]}
				zs := sides[edgeKey(a[0], a[1])]
				if len(zs) < 2 {
					t.edges = append(t.edges, a)
					continue
				}
				others := zs
				if k := slices.Index(zs, zi); k >= 0 {
					others = slices.Delete(slices.Clone(zs), k, k+1) // the BC's own side
				}
				for _, o := range others {
					if !slices.Contains(against, zones[o].name) {
						against = append(against, zones[o].name)
					}
				}
				if joined == nil || len(sidesJoined[edgeKey(joined[e[0]], joined[e[1]])]) > 1 {
					byJoin++
				}
			}
			if byJoin > 0 {
				return nil, fmt.Errorf("%s: %d of its %d faces lie where the 1-to-1 connectivity joins zone %s to %s; they are interior faces, which take no BC", b.path, byJoin, len(edges), s.name, strings.Join(against, " and "))
			}
			if n := len(edges) - len(t.edges); n > 0 {
				interior = append(interior, fmt.Sprintf("%s/%s (tag %s, %d of its %d faces, against %s)", s.name, b.name, b.tag, n, len(edges), strings.Join(against, " and ")))
			}
			if len(t.edges) > 0 || len(edges) == 0 {
				found = append(found, t)
			}
		}
	}
	if len(interior) > 0 {
		r.notes = append(r.notes, "BCs on zone sides that the coincident-node merge joins, left out there as those faces are interior (the sides are an interface the file does not connect): "+strings.Join(interior, ", "))
	}
	if r.thin {
		r.notes = append(r.notes, planeNote(acrossNote(zones), left))
	}
	return r.buildTagged(in, found, "/"+r.base)
}

func step(a, b int32) int32 {
	if b < a {
		return -1
	}
	return 1
}

// id is the global id of 1-based node (i, j) of the zone.
func (s *szone) id(i, j int32) int32 { return s.first + (j-1)*int32(s.ni) + i - 1 }

// inside reports whether the 1-based (i, j) is a node of the zone.
func (s *szone) inside(i, j int32) bool {
	return i >= 1 && j >= 1 && int(i) <= s.ni && int(j) <= s.nj
}

// joins reads the GridConnectivity1to1_t nodes of zone z.
func (r *reader) joins(z C.int, s *szone, zones []szone, byName map[string]int) ([]join, error) {
	var n C.int
	if err := libError(C.cg_n1to1(r.fn, r.b, z, &n), "count 1-to-1 joins of "+s.path); err != nil {
		return nil, err
	}
	var name, donor [maxNameLen + 1]C.char
	if err := r.noGeneralConns(z, s.path); err != nil {
		return nil, err
	}
	out := make([]join, 0, n)
	for k := C.int(1); k <= n; k++ {
		var jn join
		var rng, drng [6]int32
		var tr [3]C.int
		if err := libError(C.cg_1to1_read(r.fn, r.b, z, k, &name[0], &donor[0], ip(rng[:]), ip(drng[:]), &tr[0]), fmt.Sprintf("read 1-to-1 join %d of %s", k, s.path)); err != nil {
			return nil, err
		}
		jn.path = s.path + "/ZoneGridConnectivity/" + C.GoString(&name[0])
		d, ok := byName[C.GoString(&donor[0])]
		if !ok {
			return nil, fmt.Errorf("%s: donor zone %q is not a zone of /%s", jn.path, C.GoString(&donor[0]), r.base)
		}
		jn.a, jn.b = int(z-1), d
		if r.thin {
			var err error
			if jn.rng, jn.drng, jn.transform, err = s.joinPlane(jn.path, &zones[d], rng, drng, tr); err != nil {
				return nil, err
			}
		} else {
			copy(jn.rng[:], rng[:4])
			copy(jn.drng[:], drng[:4])
			jn.transform = [2]int32{int32(tr[0]), int32(tr[1])}
		}
		if t := jn.transform; t[0] == 0 || t[1] == 0 || abs(t[0]) > 2 || abs(t[1]) > 2 || abs(t[0]) == abs(t[1]) {
			return nil, fmt.Errorf("%s: Transform %v is not a permutation of ±1, ±2", jn.path, t)
		}
		if !s.inside(jn.rng[0], jn.rng[1]) || !s.inside(jn.rng[2], jn.rng[3]) {
			return nil, fmt.Errorf("%s: PointRange %v lies outside the zone (%d×%d)", jn.path, jn.rng, s.ni, s.nj)
		}
		if di, dj := jn.donorOf(jn.rng[2], jn.rng[3]); di != jn.drng[2] || dj != jn.drng[3] {
			return nil, fmt.Errorf("%s: the Transform %v maps the range end to (%d, %d), not to the donor range end (%d, %d)", jn.path, jn.transform, di, dj, jn.drng[2], jn.drng[3])
		}
		pf, ok, err := periodicOf(jn.path, r.axis, func(c, a, t *C.float) C.int { return C.cg_1to1_periodic_read(r.fn, r.b, z, k, c, a, t) })
		if err != nil {
			return nil, err
		}
		if ok {
			jn.periodic, jn.found = true, pf
			if jn.tag, err = r.connTag(jn.path, C.GoString(&name[0])); err != nil {
				return nil, err
			}
		}
		out = append(out, jn)
	}
	return out, nil
}

// noGeneralConns fails on GridConnectivity_t nodes (point-list joins),
// which the reader does not merge: reading on would leave the zones
// unjoined, with false boundary faces along the join.
func (r *reader) noGeneralConns(z C.int, zp string) error {
	var n C.int
	if err := libError(C.cg_nconns(r.fn, r.b, z, &n), "count GridConnectivity_t nodes of "+zp); err != nil {
		return err
	}
	if n == 0 {
		return nil
	}
	ci, err := r.connInfo(z, 1, zp)
	if err != nil {
		return err
	}
	return fmt.Errorf("%s/ZoneGridConnectivity/%s is a GridConnectivity_t (%s); cvdeck merges structured zones joined by GridConnectivity1to1_t only",
		zp, ci.name, C.GoString(C.cg_GridConnectivityTypeName(ci.typ)))
}

func abs(v int32) int32 {
	if v < 0 {
		return -v
	}
	return v
}

// fullSide returns the side a 1-based point range covers completely.
func (s *szone) fullSide(rng [4]int32) (mesh.Side, bool) {
	lo := func(a, b int32) int32 { return min(a, b) }
	hi := func(a, b int32) int32 { return max(a, b) }
	switch {
	case rng[0] == rng[2] && lo(rng[1], rng[3]) == 1 && int(hi(rng[1], rng[3])) == s.nj:
		if rng[0] == 1 {
			return mesh.West, true
		}
		if int(rng[0]) == s.ni {
			return mesh.East, true
		}
	case rng[1] == rng[3] && lo(rng[0], rng[2]) == 1 && int(hi(rng[0], rng[2])) == s.ni:
		if rng[1] == 1 {
			return mesh.South, true
		}
		if int(rng[1]) == s.nj {
			return mesh.North, true
		}
	}
	return 0, false
}

// interfaces lists the non-periodic joins of two whole sides, once per pair whether
// the file records a join from one side or from both, with the lower
// (zone, side) as A.
func interfaces(joins []join, zones []szone) []mesh.BlockInterface {
	var out []mesh.BlockInterface
	for _, jn := range joins {
		if jn.periodic {
			continue
		}
		sa, ok := zones[jn.a].fullSide(jn.rng)
		if !ok {
			continue
		}
		sb, ok := zones[jn.b].fullSide(jn.drng)
		if !ok {
			continue
		}
		// The sides run the same way if the range and donor range both
		// increase or both decrease along their side.
		along := func(rng [4]int32) int32 {
			if rng[0] == rng[2] {
				return rng[3] - rng[1]
			}
			return rng[2] - rng[0]
		}
		bi := mesh.BlockInterface{A: jn.a, B: jn.b, SideA: sa, SideB: sb, Reversed: (along(jn.rng) > 0) != (along(jn.drng) > 0)}
		if bi.A > bi.B || bi.A == bi.B && bi.SideA > bi.SideB {
			bi.A, bi.B, bi.SideA, bi.SideB = bi.B, bi.A, bi.SideB, bi.SideA
		}
		if !slices.Contains(out, bi) {
			out = append(out, bi)
		}
	}
	return out
}

// bcEdges returns the edges (global node ids) of a structured BC.
func (s *szone) bcEdges(b bcInfo) ([][2]int32, error) {
	var edges [][2]int32
	switch {
	case b.set == C.PointRange && (b.loc == C.Vertex || b.loc == C.EdgeCenter || b.loc == C.IFaceCenter || b.loc == C.JFaceCenter):
		if len(b.pts) != 4 {
			return nil, fmt.Errorf("%s: a PointRange needs 2 points, got %d values", b.path, len(b.pts))
		}
		i0, j0, i1, j1 := min(b.pts[0], b.pts[2]), min(b.pts[1], b.pts[3]), max(b.pts[0], b.pts[2]), max(b.pts[1], b.pts[3])
		// A face range (EdgeCenter in 2D, or IFaceCenter/JFaceCenter) has one
		// constant index, the face's, and a cell range along the other; a
		// single EdgeCenter face is an i-face if it lies on an i = const
		// side of the zone.
		iface := b.loc == C.IFaceCenter || b.loc == C.EdgeCenter && i0 == i1 && (j0 != j1 || i0 == 1 || int(i0) == s.ni)
		switch {
		case b.loc == C.Vertex:
			if !s.inside(i0, j0) || !s.inside(i1, j1) {
				return nil, fmt.Errorf("%s: PointRange %v lies outside the zone (%d×%d)", b.path, b.pts, s.ni, s.nj)
			}
			switch {
			case i0 == i1 && j0 < j1:
				for j := j0; j < j1; j++ {
					edges = append(edges, [2]int32{s.id(i0, j), s.id(i0, j+1)})
				}
			case j0 == j1 && i0 < i1:
				for i := i0; i < i1; i++ {
					edges = append(edges, [2]int32{s.id(i, j0), s.id(i+1, j0)})
				}
			default:
				return nil, fmt.Errorf("%s: Vertex PointRange %v is not a line of nodes along one index", b.path, b.pts)
			}
		case iface:
			if i0 != i1 || !s.inside(i0, j0) || !s.inside(i1, j1+1) {
				return nil, fmt.Errorf("%s: face PointRange %v is not a line of i-faces of the zone (%d×%d)", b.path, b.pts, s.ni, s.nj)
			}
			for j := j0; j <= j1; j++ {
				edges = append(edges, [2]int32{s.id(i0, j), s.id(i0, j+1)})
			}
		default:
			if j0 != j1 || !s.inside(i0, j0) || !s.inside(i1+1, j1) {
				return nil, fmt.Errorf("%s: face PointRange %v is not a line of j-faces of the zone (%d×%d)", b.path, b.pts, s.ni, s.nj)
			}
			for i := i0; i <= i1; i++ {
				edges = append(edges, [2]int32{s.id(i, j0), s.id(i+1, j0)})
			}
		}
	case b.set == C.PointList && b.loc == C.Vertex:
		in := map[[2]int32]bool{}
		for k := 0; k+1 < len(b.pts); k += 2 {
			if !s.inside(b.pts[k], b.pts[k+1]) {
				return nil, fmt.Errorf("%s: point %d (%d, %d) lies outside the zone (%d×%d)", b.path, k/2+1, b.pts[k], b.pts[k+1], s.ni, s.nj)
			}
			in[[2]int32{b.pts[k], b.pts[k+1]}] = true
		}
		add := func(i, j, i2, j2 int32) {
			if in[[2]int32{i, j}] && in[[2]int32{i2, j2}] {
				edges = append(edges, [2]int32{s.id(i, j), s.id(i2, j2)})
			}
		}
		ni, nj := int32(s.ni), int32(s.nj)
		for i := int32(1); i < ni; i++ {
			add(i, 1, i+1, 1)
			add(i, nj, i+1, nj)
		}
		for j := int32(1); j < nj; j++ {
			add(1, j, 1, j+1)
			add(ni, j, ni, j+1)
		}
	default:
		return nil, fmt.Errorf("%s: %s at %s; cvdeck reads structured BCs as Vertex point ranges or lists, or face ranges (EdgeCenter, IFaceCenter, JFaceCenter)",
			b.path, C.GoString(C.cg_PointSetTypeName(b.set)), C.GoString(C.cg_GridLocationName(b.loc)))
	}
	return edges, nil
}

// indexDim is the index dimension of the base's structured zones.
func (r *reader) indexDim() int {
	if r.thin {
		return 3
	}
	return 2
}

// sameSecondPlane checks that the k = 2 plane of a one-cell-thick zone
// has the nodes of its k = 1 plane, moved in z only (to within 1e-12 of
// the zone's extent), as a 2D case extruded for a 3D solver has.
func (r *reader) sameSecondPlane(z C.int, s *szone) error {
	n := s.ni * s.nj
	rmin, rmax := []int32{1, 1, 2}, []int32{int32(s.ni), int32(s.nj), 2}
	extent := 0.0
	for _, p := range s.nodes {
		extent = max(extent, math.Abs(p[0]), math.Abs(p[1]))
	}
	for axis, name := range []string{"CoordinateX", "CoordinateY"} {
		v := make([]float64, n)
		a := cstr(name)
		err := libError(C.cg_coord_read(r.fn, r.b, z, a, C.RealDouble, ip(rmin), ip(rmax), unsafe.Pointer(&v[0])), "read "+s.path+"/GridCoordinates/"+name)
		free(a)
		if err != nil {
			return err
		}
		for k, x := range v {
			if math.Abs(x-s.nodes[k][axis]) > 1e-12*extent {
				return fmt.Errorf("%s: node (%d, %d, 2) is not node (%d, %d, 1) moved in z (%s %g against %g); cvdeck reads a one-cell-thick zone as a 2D case only when its two planes match", s.path, k%s.ni+1, k/s.ni+1, k%s.ni+1, k/s.ni+1, name, x, s.nodes[k][axis])
			}
		}
	}
	return nil
}

// planeBCs turns the BCs of a zone of a 3D base into BCs of the (i, j)
// plane it is read as (see readAcross): ranges and lists lose the index
// of the direction read across, the other two becoming (i, j) in order,
// and FaceCenter ranges and the face locations of those two directions
// become IFaceCenter or JFaceCenter of the plane. BCs on the plane itself
// (the front and back of a slab, or the single node plane) are returned
// apart, as left out: ranges at the face location of the direction read
// across, or spanning both plane directions at one index of it, and
// vertex lists on one plane only of a zone one cell thick (a side of the
// slab has nodes on both), on the back plane only, or holding a node
// inside the plane (a side's nodes lie on its edges, at the first or last
// index of a plane direction). Kept, such a list would tag every boundary
// edge it covers.
func (s *szone) planeBCs(bcs []bcInfo) (kept, left []bcInfo, err error) {
	faceLoc := [3]C.GridLocation_t{C.IFaceCenter, C.JFaceCenter, C.KFaceCenter}
	u, v, w := s.dirs[0], s.dirs[1], s.across
	for _, b := range bcs {
		switch {
		case b.set == C.PointRange:
			if len(b.pts) != 6 {
				return nil, nil, fmt.Errorf("%s: a PointRange needs 2 points of 3 indices, got %d values", b.path, len(b.pts))
			}
			u0, v0, w0, u1, v1, w1 := b.pts[u], b.pts[v], b.pts[w], b.pts[3+u], b.pts[3+v], b.pts[3+w]
			if b.loc == faceLoc[w] || w0 == w1 && u0 != u1 && v0 != v1 {
				left = append(left, b)
				continue
			}
			switch b.loc {
			case C.Vertex:
			case C.FaceCenter:
				b.loc = C.JFaceCenter
				if u0 == u1 {
					b.loc = C.IFaceCenter
				}
			case faceLoc[u]:
				b.loc = C.IFaceCenter
			case faceLoc[v]:
				b.loc = C.JFaceCenter
			default:
				return nil, nil, fmt.Errorf("%s: a range at %s; in a 3D base cvdeck reads structured BCs at Vertex, FaceCenter, IFaceCenter, JFaceCenter or KFaceCenter", b.path, C.GoString(C.cg_GridLocationName(b.loc)))
			}
			b.pts = []int32{u0, v0, u1, v1}
		case b.set == C.PointList && b.loc == C.Vertex:
			var pts []int32
			inside, back := false, false
			for k := 0; k+2 < len(b.pts); k += 3 {
				i, j := b.pts[k+u], b.pts[k+v]
				inside = inside || i > 1 && i < int32(s.ni) && j > 1 && j < int32(s.nj)
				if b.pts[k+w] == 1 {
					pts = append(pts, i, j)
				} else {
					back = true
				}
			}
			if len(pts) == 0 || inside || s.depth == 2 && !back {
				left = append(left, b)
				continue
			}
			b.pts = pts
		}
		kept = append(kept, b)
	}
	return kept, left, nil
}

// readAcross chooses the index direction a zone of a 3D base of n[0] ×
// n[1] × n[2] nodes is read across (see szone): the one direction of a
// single node plane, or k of a zone one cell thick in k (two node planes),
// and sets its 2D sizes from the other two.
func (s *szone) readAcross(n []int32) error {
	var single []int
	for d, v := range n {
		if v == 1 {
			single = append(single, d)
		}
	}
	switch {
	case len(single) == 1:
		s.across, s.depth = single[0], 1
	case len(single) > 1:
		return fmt.Errorf("%s is %d×%d×%d nodes, a line or a point of nodes: no cells", s.path, n[0], n[1], n[2])
	case n[2] == 2:
		s.across, s.depth = 2, 2
	default:
		return fmt.Errorf("%s is %d×%d×%d nodes; in a 3D base cvdeck reads zones of one node plane (one index of size 1) or one cell thick in k (nk = 2)", s.path, n[0], n[1], n[2])
	}
	s.dirs = [2]int{(s.across + 1) % 3, (s.across + 2) % 3}
	if s.dirs[0] > s.dirs[1] {
		s.dirs[0], s.dirs[1] = s.dirs[1], s.dirs[0]
	}
	s.ni, s.nj = int(n[s.dirs[0]]), int(n[s.dirs[1]])
	return nil
}

// ijk names index direction d.
func ijk(d int) string { return [3]string{"i", "j", "k"}[d] }

// joinPlane takes a 1-to-1 join of zone s (of a 3D base) to zone b, given
// by its PointRange rng, PointRangeDonor drng and Transform tr in (i, j,
// k), onto the 2D planes the zones are read as (see readAcross): the
// Transform must take the direction s is read across to the one b is,
// both ranges must stay within the node planes read, and the ranges and
// Transform are returned in the planes' (i, j). A Transform that is no
// permutation comes back with a 0, which the caller refuses.
func (s *szone) joinPlane(path string, b *szone, rng, drng [6]int32, tr [3]C.int) (r2, d2 [4]int32, t2 [2]int32, err error) {
	if abs(int32(tr[s.across])) != int32(b.across+1) {
		return r2, d2, t2, fmt.Errorf("%s: Transform %v does not take %s, the direction zone %s is read across, to %s, donor zone %s's; cvdeck reads joins of 2D cases stored one node plane or one cell thick in the plane read", path, tr, ijk(s.across), s.name, ijk(b.across), b.name)
	}
	for _, end := range []struct {
		z    *szone
		r    [6]int32
		what string
	}{{s, rng, "PointRange"}, {b, drng, "PointRangeDonor"}} {
		a := end.z.across
		for _, w := range []int32{end.r[a], end.r[3+a]} {
			if w < 1 || int(w) > end.z.depth {
				return r2, d2, t2, fmt.Errorf("%s: %s %v reaches %s = %d, but zone %s has %d node plane(s) in %s", path, end.what, end.r, ijk(a), w, end.z.name, end.z.depth, ijk(a))
			}
		}
	}
	r2 = [4]int32{rng[s.dirs[0]], rng[s.dirs[1]], rng[3+s.dirs[0]], rng[3+s.dirs[1]]}
	d2 = [4]int32{drng[b.dirs[0]], drng[b.dirs[1]], drng[3+b.dirs[0]], drng[3+b.dirs[1]]}
	for c, d := range s.dirs {
		t := int32(tr[d])
		if pos := slices.Index(b.dirs[:], int(abs(t))-1); pos >= 0 {
			t2[c] = int32(pos + 1)
			if t < 0 {
				t2[c] = -t2[c]
			}
		}
	}
	return r2, d2, t2, nil
}

// acrossNote says which plane of each zone of a 3D base is read: "the
// k = 1 plane of each structured zone", or zone by zone where the zones
// are read across different directions.
func acrossNote(zones []szone) string {
	same := true
	parts := make([]string, len(zones))
	for zi := range zones {
		same = same && zones[zi].across == zones[0].across
		parts[zi] = ijk(zones[zi].across) + " = 1 of " + zones[zi].name
	}
	if same {
		return "the " + ijk(zones[0].across) + " = 1 plane of each structured zone"
	}
	return "the node plane of each structured zone (" + strings.Join(parts, ", ") + ")"
}

// sideFaces returns the faces on the four sides of every zone, keyed by
// their node pair under id (from a global node id), each with the zones
// it lies on, once per side it lies on: a face listed twice is interior.
func sideFaces(zones []szone, id func(g int32) int32) map[[2]int32][]int {
	out := map[[2]int32][]int{}
	add := func(zi int, a, b int32) {
		k := edgeKey(id(a), id(b))
		out[k] = append(out[k], zi)
	}
	for zi := range zones {
		s := &zones[zi]
		ni, nj := int32(s.ni), int32(s.nj)
		for i := int32(1); i < ni; i++ {
			add(zi, s.id(i, 1), s.id(i+1, 1))
			add(zi, s.id(i, nj), s.id(i+1, nj))
		}
		for j := int32(1); j < nj; j++ {
			add(zi, s.id(1, j), s.id(1, j+1))
			add(zi, s.id(ni, j), s.id(ni, j+1))
		}
	}
	return out
}

// mergeTolerance is how close, relative to the local face length, nodes of
// two structured zones must be to be taken as one where the file joins the
// zones by no 1-to-1 connectivity: at most mergeTolerance times the
// shorter of the two nodes' local face lengths (the shortest grid edge
// meeting the node in its own zone). As in the VTK reader's joining of
// structured blocks, it lies far above the roundoff of coordinates
// written in double precision and far below any spacing of a mesh fit to
// check; exactly coincident nodes always merge.
const mergeTolerance = 1e-6

// joinZoneSides merges, into the union-find parent (find its lookup), the
// side nodes of different zones that mesh.JoinCoincident finds
// coincident, and returns how many merges it made and the pairs of zones
// (by index, lower first) they joined. Nodes of one zone are left to its
// own connectivity (a zone's seam is its connectivity's business).
func joinZoneSides(sides []mesh.SideNode, parent []int32, find func(int32) int32) (merged int, pairs [][2]int) {
	mesh.JoinCoincident(sides, func(c, o mesh.SideNode) {
		if c.Block == o.Block {
			return
		}
		a, b := find(c.ID), find(o.ID)
		if a == b {
			return
		}
		parent[max(a, b)] = min(a, b)
		merged++
		if pr := [2]int{min(c.Block, o.Block), max(c.Block, o.Block)}; !slices.Contains(pairs, pr) {
			pairs = append(pairs, pr)
		}
	})
	return merged, pairs
}

// mergeTouching merges the nodes on the sides of different zones that
// coincide (within mergeTolerance of the local face length) but that the
// 1-to-1 connectivity has not joined, into the union-find parent (find
// its lookup), so that zones which touch without connectivity in the file
// (as a converter from a format with none writes them) become one mesh,
// as ReadVTM joins VTK blocks. It returns the note naming what was merged
// and between which zones, "" when nothing was (mesh.JoinCoincident finds
// the candidates).
func mergeTouching(zones []szone, parent []int32, find func(int32) int32) string {
	var sides []mesh.SideNode
	for zi := range zones {
		s := &zones[zi]
		sides = mesh.SideNodes(sides, s.nodes, s.ni, s.nj, s.first, zi, mergeTolerance)
	}
	merged, pairs := joinZoneSides(sides, parent, find)
	if merged == 0 {
		return ""
	}
	slices.SortFunc(pairs, func(x, y [2]int) int { return cmp.Or(cmp.Compare(x[0], y[0]), cmp.Compare(x[1], y[1])) })
	names := make([]string, len(pairs))
	for k, pr := range pairs {
		names[k] = zones[pr[0]].name + " and " + zones[pr[1]].name
	}
	return fmt.Sprintf("%d coincident nodes merged where zones touch that the file joins by no 1-to-1 connectivity (within %g of the local face length): %s", merged, mergeTolerance, strings.Join(names, ", "))
}
