package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"sort"

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

// unstructured reads unstructured zone z (see Read).
func (r *reader) unstructured(z C.int) (*mesh.Mesh, error) {
	size := make([]int32, 3)
	zn, err := r.zoneName(z, size)
	if err != nil {
		return nil, err
	}
	zp := "/" + r.base + "/" + zn
	nn := int(size[0])
	if nn < 3 {
		return nil, fmt.Errorf("%s has %d nodes; a mesh needs at least 3", zp, nn)
	}
	c, err := r.coords(z, zp, size[:1], nn, r.thin)
	if err != nil {
		return nil, err
	}
	secs, err := r.sections(z, zp)
	if err != nil {
		return nil, err
	}
	sort.SliceStable(secs, func(a, b int) bool { return secs[a].start < secs[b].start })
	for i := 1; i < len(secs); i++ {
		if secs[i].start <= secs[i-1].end {
			return nil, fmt.Errorf("%s (elements %d..%d) overlaps %s (elements %d..%d); element numbers must be unique in a zone",
				secs[i].path, secs[i].start, secs[i].end, secs[i-1].path, secs[i-1].start, secs[i-1].end)
		}
	}

	// node maps a file node number (1-based) to the mesh's, −1 for a node
	// the mesh leaves out; barOf gives the mesh nodes of a face element.
	var in mesh.Input
	var barOf func(id int32) ([2]int32, bool)
	node := func(v int32) int32 { return v - 1 }
	patch := func(id int32) bool { return false } // a slab's front or back face
	var slabLo, slabHi float64
	if r.thin {
		sl, err := newSlab(zp, c.points(2), c.z)
		if err != nil {
			return nil, err
		}
		if in, err = sl.cells(secs); err != nil {
			return nil, err
		}
		barOf = sl.faceEdge(secs)
		node = func(v int32) int32 { return sl.index[v-1] }
		patch = sl.patch(secs)
		slabLo, slabHi = sl.lo, sl.hi
	} else {
		nodes, err := r.plane([]string{zp}, []xyz{c})
		if err != nil {
			return nil, err
		}
		if in, err = planarCells(zp, secs, nodes[0]); err != nil {
			return nil, err
		}
		barOf = planarBarOf(secs)
	}
	if n := mesh.OrientCounterClockwise(&in); n > 0 {
		what := "run clockwise seen from " + planeView(r.axis) + " (negative signed area)"
		if r.thin {
			what = "have negative volume by the CGNS node-order conventions (their faces on the lower plane run clockwise seen from +z)"
		}
		r.notes = append(r.notes, fmt.Sprintf("all %d cells of %s %s as the file lists them; their node order is reversed", n, zp, what))
	}

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
	conns, err := r.unstructuredConns(z, zp, zn, barOf)
	if err != nil {
		return nil, err
	}
	found = append(found, conns...)
	if r.thin {
		what := fmt.Sprintf("zone %s, a slab one cell thick between z = %g and z = %g, read as its lower plane", zn, slabLo, slabHi)
		r.notes = append(r.notes, planeNote(what, left))
	}
	return r.buildTagged(in, found, zp)
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
