package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// elemSection is one Elements_t node as read.
type elemSection struct {
	path       string
	typ        C.ElementType_t
	start, end int32
	conn       []int32
	off        []int32 // ElementStartOffset of MIXED and NGON_n sections
	npe        int     // nodes per element of fixed-size sections
}

// element returns the type and 1-based nodes of element e (0-based in the
// section).
func (s *elemSection) element(e int) (C.ElementType_t, []int32) {
	switch s.typ {
	case C.MIXED:
		a, b := s.off[e], s.off[e+1]
		return C.ElementType_t(s.conn[a]), s.conn[a+1 : b]
	case C.NGON_n:
		return C.NGON_n, s.conn[s.off[e]:s.off[e+1]]
	default:
		return s.typ, s.conn[e*s.npe : (e+1)*s.npe]
	}
}

// uzone is one unstructured zone as read: its cells and the boundary
// edges its BCs and periodic connections tag, in the zone's own 0-based
// node numbers (those the mesh keeps, for a slab), and the periodic
// connections it added to the reader's, from periodic on.
type uzone struct {
	name, path string
	c          xyz
	secs       []elemSection
	in         mesh.Input
	found      []taggedEdges
	periodic   int
}

// unstructured reads the nz unstructured zones of the base (see Read):
// one zone as it stands, or several of a base of cell dimension 2 joined
// into one mesh where they touch (see joinUnstructured).
func (r *reader) unstructured(nz int) (*mesh.Mesh, error) {
	zones := make([]uzone, nz)
	for k := range zones {
		if err := r.unstructuredHead(C.int(k+1), &zones[k]); err != nil {
			return nil, err
		}
	}
	if r.thin {
		uz := &zones[0]
		sl, err := newSlab(uz.path, uz.c.points(2), uz.c.z)
		if err != nil {
			return nil, err
		}
		if uz.in, err = sl.cells(uz.secs); err != nil {
			return nil, err
		}
		r.orientZone(uz, "have negative volume by the CGNS node-order conventions (their faces on the lower plane run clockwise seen from +z)")
		left, err := r.zoneFaces(1, uz, sl.faceEdge(uz.secs), func(v int32) int32 { return sl.index[v-1] }, sl.patch(uz.secs))
		if err != nil {
			return nil, err
		}
		what := fmt.Sprintf("zone %s, a slab one cell thick between z = %g and z = %g, read as its lower plane", uz.name, sl.lo, sl.hi)
		r.notes = append(r.notes, planeNote(what, left))
		return r.buildTagged(uz.in, uz.found, uz.path)
	}
	paths, cs := make([]string, nz), make([]xyz, nz)
	for k, uz := range zones {
		paths[k], cs[k] = uz.path, uz.c
	}
	nodes, err := r.plane(paths, cs)
	if err != nil {
		return nil, err
	}
	for k := range zones {
		uz := &zones[k]
		if uz.in, err = planarCells(uz.path, uz.secs, nodes[k]); err != nil {
			return nil, err
		}
		r.orientZone(uz, "run clockwise seen from "+planeView(r.axis)+" (negative signed area)")
		noPatch := func(int32) bool { return false }
		if _, err := r.zoneFaces(C.int(k+1), uz, planarBarOf(uz.secs), func(v int32) int32 { return v - 1 }, noPatch); err != nil {
			return nil, err
		}
	}
	if nz == 1 {
		return r.buildTagged(zones[0].in, zones[0].found, zones[0].path)
	}
	return r.joinUnstructured(zones)
}

// unstructuredHead reads the name, coordinates and element sections of
// unstructured zone z into uz, the sections sorted by element number and
// checked not to overlap.
func (r *reader) unstructuredHead(z C.int, uz *uzone) error {
	size := make([]int32, 3)
	zn, err := r.zoneName(z, size)
	if err != nil {
		return err
	}
	uz.name, uz.path = zn, "/"+r.base+"/"+zn
	nn := int(size[0])
	if nn < 3 {
		return fmt.Errorf("%s has %d nodes; a mesh needs at least 3", uz.path, nn)
	}
	if uz.c, err = r.coords(z, uz.path, size[:1], nn, r.thin); err != nil {
		return err
	}
	secs, err := r.sections(z, uz.path)
	if err != nil {
		return err
	}
	sort.SliceStable(secs, func(a, b int) bool { return secs[a].start < secs[b].start })
	for i := 1; i < len(secs); i++ {
		if secs[i].start <= secs[i-1].end {
			return fmt.Errorf("%s (elements %d..%d) overlaps %s (elements %d..%d); element numbers must be unique in a zone",
				secs[i].path, secs[i].start, secs[i].end, secs[i-1].path, secs[i-1].start, secs[i-1].end)
		}
	}
	uz.secs = secs
	return nil
}

// orientZone turns the cells of uz round when most of them run clockwise
// (see mesh.TurnRound; sense says how, as a phrase), with a note naming the
// zone.
func (r *reader) orientZone(uz *uzone, sense string) {
	if note := mesh.TurnRound(&uz.in, "of "+uz.path+" "+sense); note != "" {
		r.notes = append(r.notes, note)
	}
}

// zoneFaces reads the BCs and periodic connections of zone z (uz, its
// cells read) into uz.found: barOf gives the mesh nodes of a face element,
// node maps a 1-based file node to the mesh's (−1 for one the mesh leaves
// out), and patch says whether an element is a front or back face of a
// slab. It returns the BCs on the front and back of a slab, left out.
func (r *reader) zoneFaces(z C.int, uz *uzone, barOf func(id int32) ([2]int32, bool), node func(v int32) int32, patch func(id int32) bool) ([]string, error) {
	zp, nn := uz.path, len(uz.c.x)
	in := uz.in
	bcs, err := r.bocos(z, zp, 1)
	if err != nil {
		return nil, err
	}
	var found []taggedEdges
	var vertexBCs []bcInfo
	var left []string // the BCs on the front and back of a slab
	for _, b := range bcs {
		ids := b.pts
		if b.set == C.PointRange || b.set == C.ElementRange {
			if len(ids) != 2 || ids[1] < ids[0] {
				return nil, fmt.Errorf("%s: range %v is not a range [first, last]", b.path, ids)
			}
			ids = make([]int32, 0, b.pts[1]-b.pts[0]+1)
			for id := b.pts[0]; id <= b.pts[1]; id++ {
				ids = append(ids, id)
			}
		}
		byElement := b.set == C.ElementRange || b.set == C.ElementList
		switch {
		case !byElement && b.loc == C.Vertex:
			vertexBCs = append(vertexBCs, bcInfo{path: b.path, name: b.name, tag: b.tag, pts: ids})
			continue
		case byElement || b.loc == C.EdgeCenter || b.loc == C.FaceCenter:
		default:
			return nil, fmt.Errorf("%s: GridLocation %s; cvdeck reads boundary faces at EdgeCenter, FaceCenter or Vertex",
				b.path, C.GoString(C.cg_GridLocationName(b.loc)))
		}
		t := taggedEdges{tag: b.tag}
		t.edges = make([][2]int32, 0, len(ids))
		patches := 0
		for i, id := range ids {
			e, ok := barOf(id)
			switch {
			case !ok && patch(id):
				patches++ // a front or back face of a slab
				continue
			case !ok:
				return nil, fmt.Errorf("%s: point %d is element %d, which is not a boundary face element of the zone (BAR_2; in a slab, QUAD_4 across it)", b.path, i+1, id)
			}
			t.edges = append(t.edges, e)
		}
		if patches > 0 {
			left = append(left, fmt.Sprintf("%s (tag %s, %d of its %d faces)", b.name, b.tag, patches, len(ids)))
		}
		if len(t.edges) > 0 || len(ids) == 0 {
			found = append(found, t)
		}
	}
	if len(vertexBCs) > 0 {
		// Vertex BCs tag the boundary edges whose two nodes they list, so
		// the boundary edges are needed first.
		plain, err := mesh.Build(mesh.Input{Nodes: in.Nodes, CellStart: in.CellStart, CellNodes: in.CellNodes})
		if err != nil {
			return nil, fmt.Errorf("%s: %w", zp, err)
		}
		onBoundary := make([]bool, len(in.Nodes))
		for _, fn := range plain.FaceNodes[plain.NumInterior:] {
			onBoundary[fn[0]], onBoundary[fn[1]] = true, true
		}
		for _, b := range vertexBCs {
			in := make(map[int32]bool, len(b.pts))
			inside, upper := false, false
			for i, v := range b.pts {
				if v < 1 || int(v) > nn {
					return nil, fmt.Errorf("%s: point %d is node %d; the zone's nodes run from 1 to %d", b.path, i+1, v, nn)
				}
				if n := node(v); n >= 0 {
					in[n] = true
					inside = inside || !onBoundary[n]
				} else {
					upper = true
				}
			}
			if r.thin && (len(in) == 0 || !upper || inside) {
				// Nodes on one plane only (a side of the slab has nodes
				// on both), or a node inside the lower plane: the front
				// or back, which would tag every boundary edge it covers.
				left = append(left, fmt.Sprintf("%s (tag %s, by its nodes)", b.name, b.tag))
				continue
			}
			t := taggedEdges{tag: b.tag}
			for f := plain.NumInterior; f < plain.NumFaces(); f++ {
				if fn := plain.FaceNodes[f]; in[fn[0]] && in[fn[1]] {
					t.edges = append(t.edges, fn)
				}
			}
			found = append(found, t)
		}
	}
	uz.periodic = len(r.periodic)
	conns, err := r.unstructuredConns(z, zp, uz.name, barOf)
	if err != nil {
		return nil, err
	}
	uz.found = append(found, conns...)
	return left, nil
}

// sections reads every Elements_t node of zone z.
func (r *reader) sections(z C.int, zp string) ([]elemSection, error) {
	var ns C.int
	if err := libError(C.cg_nsections(r.fn, r.b, z, &ns), "count element sections of "+zp); err != nil {
		return nil, err
	}
	out := make([]elemSection, 0, ns)
	var name [maxNameLen + 1]C.char
	for si := C.int(1); si <= ns; si++ {
		var (
			s                 elemSection
			start, end        C.int
			nbndry, parentFlg C.int
		)
		if err := libError(C.cg_section_read(r.fn, r.b, z, si, &name[0], &s.typ, &start, &end, &nbndry, &parentFlg), fmt.Sprintf("read element section %d of %s", si, zp)); err != nil {
			return nil, err
		}
		s.path = zp + "/" + C.GoString(&name[0])
		s.start, s.end = int32(start), int32(end)
		if s.start < 1 || s.end < s.start {
			return nil, fmt.Errorf("%s: ElementRange [%d, %d] is not a range of positive element numbers", s.path, s.start, s.end)
		}
		ne := int(s.end - s.start + 1)
		var dsize C.int
		if err := libError(C.cg_ElementDataSize(r.fn, r.b, z, si, &dsize), "read size of "+s.path); err != nil {
			return nil, err
		}
		s.conn = make([]int32, max(int(dsize), 1))
		switch s.typ {
		case C.MIXED, C.NGON_n:
			s.off = make([]int32, ne+1)
			if err := libError(C.cg_poly_elements_read(r.fn, r.b, z, si, ip(s.conn), ip(s.off), nil), "read "+s.path); err != nil {
				return nil, err
			}
			if s.off[0] != 0 || s.off[ne] != int32(dsize) {
				return nil, fmt.Errorf("%s: ElementStartOffset runs from %d to %d; it must run from 0 to the connectivity size %d", s.path, s.off[0], s.off[ne], dsize)
			}
			// The library's node count of each element type, asked once
			// per type rather than once per element.
			npes := map[C.ElementType_t]C.int{}
			for e := 0; e < ne; e++ {
				if s.off[e+1] <= s.off[e] {
					return nil, fmt.Errorf("%s: element %d has an empty or negative offset range", s.path, int(s.start)+e)
				}
				if s.typ == C.MIXED {
					t := C.ElementType_t(s.conn[s.off[e]])
					npe, known := npes[t]
					if !known {
						if C.cg_npe(t, &npe) != 0 {
							npe = -1
						}
						npes[t] = npe
					}
					if npe <= 0 || int(npe) != int(s.off[e+1]-s.off[e])-1 {
						return nil, fmt.Errorf("%s: element %d has type code %d and %d nodes, which do not match", s.path, int(s.start)+e, t, s.off[e+1]-s.off[e]-1)
					}
				}
			}
		case C.NFACE_n:
			return nil, fmt.Errorf("%s is NFACE_n; cvdeck reads 2D cells as TRI_3, QUAD_4, MIXED or NGON_n polygons", s.path)
		default:
			var npe C.int
			if err := libError(C.cg_npe(s.typ, &npe), "nodes per element of "+s.path); err != nil {
				return nil, err
			}
			s.npe = int(npe)
			if s.npe <= 0 || int(dsize) != ne*s.npe {
				return nil, fmt.Errorf("%s: %d connectivity entries for %d elements of %s", s.path, dsize, ne, elementTypeName(s.typ))
			}
			if err := libError(C.cg_elements_read(r.fn, r.b, z, si, ip(s.conn), nil), "read "+s.path); err != nil {
				return nil, err
			}
		}
		out = append(out, s)
	}
	return out, nil
}

// planarCells reads the cells of a 2D zone: its TRI_3, QUAD_4 and NGON_n
// elements, in element-number order (secs is sorted), checking every
// element's nodes and type first.
func planarCells(zp string, secs []elemSection, nodes []orb.Point) (in mesh.Input, err error) {
	nn := len(nodes)
	// Two passes: check and count, then fill the cell arrays at their size.
	ncell, ncn := 0, 0
	for si := range secs {
		s := &secs[si]
		for e := 0; e <= int(s.end-s.start); e++ {
			typ, vs := s.element(e)
			for _, v := range vs {
				if v < 1 || int(v) > nn {
					return in, fmt.Errorf("%s: element %d refers to node %d; the zone's nodes run from 1 to %d", s.path, int(s.start)+e, v, nn)
				}
			}
			switch typ {
			case C.TRI_3, C.QUAD_4, C.NGON_n:
				ncell++
				ncn += len(vs)
			case C.BAR_2, C.NODE:
			default:
				return in, fmt.Errorf("%s: element %d is %s; cvdeck reads TRI_3, QUAD_4, MIXED of those, NGON_n polygons and BAR_2 faces", s.path, int(s.start)+e, elementTypeName(typ))
			}
		}
	}
	if ncell == 0 {
		return in, fmt.Errorf("%s has no 2D elements (TRI_3, QUAD_4, MIXED, NGON_n)", zp)
	}
	in = mesh.Input{Nodes: nodes, CellStart: make([]int32, 1, ncell+1), CellNodes: make([]int32, 0, ncn)}
	for si := range secs {
		s := &secs[si]
		for e := 0; e <= int(s.end-s.start); e++ {
			if typ, vs := s.element(e); typ == C.TRI_3 || typ == C.QUAD_4 || typ == C.NGON_n {
				for _, v := range vs {
					in.CellNodes = append(in.CellNodes, v-1)
				}
				in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
			}
		}
	}
	return in, nil
}

// planarBarOf returns the function giving the 0-based nodes of BAR_2
// element id of a 2D zone (secs sorted by element number).
func planarBarOf(secs []elemSection) func(id int32) ([2]int32, bool) {
	return func(id int32) ([2]int32, bool) {
		typ, vs, ok := findElement(secs, id)
		if !ok || typ != C.BAR_2 {
			return [2]int32{}, false
		}
		return [2]int32{vs[0] - 1, vs[1] - 1}, true
	}
}

// findElement returns the type and 1-based nodes of element id, from
// sections sorted by element number.
func findElement(secs []elemSection, id int32) (C.ElementType_t, []int32, bool) {
	k := sort.Search(len(secs), func(i int) bool { return secs[i].end >= id })
	if k == len(secs) || id < secs[k].start {
		return 0, nil, false
	}
	typ, vs := secs[k].element(int(id - secs[k].start))
	return typ, vs, true
}

// joinUnstructured joins the unstructured zones of a base of cell
// dimension 2 into one mesh, as the structured reader joins zones that
// touch without connectivity (see mergeTouching): the zones' cells follow
// one another in zone order, and nodes on the boundaries of two different
// zones that coincide, within mergeTolerance of the local face length (the
// shortest cell edge meeting the node in its own zone; mesh.JoinCoincident
// finds them), become one node, numbered where it first appears. A zone's
// own coincident nodes are not merged: they are its defect, for the
// checks to name. The faces of BCs on boundaries so made interior are left
// out, with a note naming the BCs and zones; a note says which cells came
// from which zone, and how many nodes were merged between which zones.
// (The file's GridConnectivity_t between zones is not read: only periodic
// connections of a zone to itself are, see unstructuredConns.)
func (r *reader) joinUnstructured(zones []uzone) (*mesh.Mesh, error) {
	first := make([]int32, len(zones)+1)
	for k, uz := range zones {
		if int64(first[k])+int64(len(uz.in.Nodes)) > maxIndex {
			return nil, fmt.Errorf("%s: the zones hold more than %d nodes", uz.path, maxIndex)
		}
		first[k+1] = first[k] + int32(len(uz.in.Nodes))
	}
	total := first[len(zones)]
	parent := make([]int32, total)
	for i := range parent {
		parent[i] = int32(i)
	}
	find := func(x int32) int32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	// Each zone's boundary edges (on one of its cells only), and its side
	// nodes with their tolerances.
	bounds := make([][][2]int32, len(zones))
	var sides []mesh.SideNode
	for k := range zones {
		in := &zones[k].in
		count := map[[2]int32]int{}
		h := make([]float64, len(in.Nodes))
		for i := range h {
			h[i] = math.Inf(1)
		}
		edges := func(visit func(a, b int32)) {
			for c := range len(in.CellStart) - 1 {
				cell := in.CellNodes[in.CellStart[c]:in.CellStart[c+1]]
				for i, a := range cell {
					visit(a, cell[(i+1)%len(cell)])
				}
			}
		}
		edges(func(a, b int32) {
			count[edgeKey(a, b)]++
			l := math.Hypot(in.Nodes[a][0]-in.Nodes[b][0], in.Nodes[a][1]-in.Nodes[b][1])
			h[a], h[b] = min(h[a], l), min(h[b], l)
		})
		side := make([]bool, len(in.Nodes))
		edges(func(a, b int32) {
			if count[edgeKey(a, b)] == 1 {
				bounds[k] = append(bounds[k], [2]int32{a, b})
				side[a], side[b] = true, true
			}
		})
		for v, on := range side {
			if on {
				sides = append(sides, mesh.SideNode{ID: first[k] + int32(v), Block: k, P: in.Nodes[v], Tol: mergeTolerance * h[v]})
			}
		}
	}
	merged, pairs := joinZoneSides(sides, parent, find)
	newID := make([]int32, total)
	var in mesh.Input
	for k, uz := range zones {
		for v, p := range uz.in.Nodes {
			g := first[k] + int32(v)
			if root := find(g); root != g {
				newID[g] = newID[root]
				continue
			}
			newID[g] = int32(len(in.Nodes))
			in.Nodes = append(in.Nodes, p)
		}
	}
	id := func(k int, v int32) int32 { return newID[first[k]+v] }
	in.CellStart = []int32{0}
	ranges := make([]string, len(zones))
	for k, uz := range zones {
		c0 := len(in.CellStart) - 1
		for c := range len(uz.in.CellStart) - 1 {
			cell := uz.in.CellNodes[uz.in.CellStart[c]:uz.in.CellStart[c+1]]
			n0 := len(in.CellNodes)
			for _, v := range cell {
				if slices.Contains(in.CellNodes[n0:], id(k, v)) {
					return nil, fmt.Errorf("%s: cell %d of the zone has two nodes that the merge of coincident nodes where zones touch makes one", uz.path, c)
				}
				in.CellNodes = append(in.CellNodes, id(k, v))
			}
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
		ranges[k] = fmt.Sprintf("%d–%d %s", c0, len(in.CellStart)-2, uz.name)
	}
	// The zones each boundary edge lies on, once per zone: an edge on two
	// is interior to the joined mesh.
	on := map[[2]int32][]int{}
	for k, es := range bounds {
		for _, e := range es {
			key := edgeKey(id(k, e[0]), id(k, e[1]))
			on[key] = append(on[key], k)
		}
	}
	var found []taggedEdges
	var interior []string
	for k, uz := range zones {
		for _, t := range uz.found {
			kept := taggedEdges{tag: t.tag, edges: make([][2]int32, 0, len(t.edges))}
			var against []string
			for _, e := range t.edges {
				a := [2]int32{id(k, e[0]), id(k, e[1])}
				zs := on[edgeKey(a[0], a[1])]
				if len(zs) < 2 {
					kept.edges = append(kept.edges, a)
					continue
				}
				for _, o := range zs {
					if o != k && !slices.Contains(against, zones[o].name) {
						against = append(against, zones[o].name)
					}
				}
			}
			if n := len(t.edges) - len(kept.edges); n > 0 {
				interior = append(interior, fmt.Sprintf("tag %s of zone %s (%d of its %d faces, against %s)", t.tag, uz.name, n, len(t.edges), strings.Join(against, " and ")))
			}
			if len(kept.edges) > 0 || len(t.edges) == 0 {
				found = append(found, kept)
			}
		}
		end := len(r.periodic)
		if k+1 < len(zones) {
			end = zones[k+1].periodic
		}
		for p := uz.periodic; p < end; p++ {
			for i, f := range r.periodic[p].faces {
				r.periodic[p].faces[i] = [2][2]int32{{id(k, f[0][0]), id(k, f[0][1])}, {id(k, f[1][0]), id(k, f[1][1])}}
			}
		}
	}
	names := make([]string, len(pairs))
	for k, pr := range pairs {
		names[k] = zones[pr[0]].name + " and " + zones[pr[1]].name
	}
	note := fmt.Sprintf("%d unstructured zones joined into one mesh, their cells in zone order (cells %s)", len(zones), strings.Join(ranges, ", "))
	if merged > 0 {
		note += fmt.Sprintf(": %d coincident nodes merged where zones touch (within %g of the local face length), between %s", merged, mergeTolerance, strings.Join(names, ", "))
	} else {
		note += ": no nodes of different zones coincide, so the zones do not touch"
	}
	r.notes = append(r.notes, note)
	if len(interior) > 0 {
		r.notes = append(r.notes, "BCs on zone boundaries that the coincident-node merge joins, left out there as those faces are interior: "+strings.Join(interior, ", "))
	}
	return r.buildTagged(in, found, "/"+r.base)
}
