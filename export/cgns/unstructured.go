package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"

	"cvdeck/internal/hugepage"
	"cvdeck/mesh"
)

// unstructuredZone is the name of the single unstructured zone.
const unstructuredZone = "Mesh"

// unstructured writes the mesh as one unstructured zone.
//
// Element numbering (SIDS: element numbers are unique in a zone; each
// Elements_t covers one contiguous ElementRange): cells first, cell c of
// the mesh being element c+1, then faces, face f being element
// NumCells()+1+f. Cells are written as one section per maximal run of
// consecutive cells of one kind: TRI_3 if the run has only triangles,
// QUAD_4 if only quadrilaterals, MIXED if both, and NGON_n (polygon
// connectivity with ElementStartOffset, the CGNS 3.4/4.x form) for cells of
// more than 4 nodes, which are kept whole rather than split so cell numbers
// and the face-based view stay those of the mesh. Faces follow the mesh's
// face order as BAR_2 sections: "InteriorFaces", then one section per
// boundary tag named after the tag, then "UntaggedBoundary" for boundary
// faces with no tag. Together the face sections cover every face exactly
// once, each with ParentElements (owner, neighbour; 0 on the boundary) and
// ParentElementsPosition (the edge number of the face in each parent, SIDS
// edge numbering: edge k runs from node k to node k+1), so a cell-centred
// solver has the face-based view. The face's node order is its owner's
// counter-clockwise order, so its normal points out of the first parent as
// the SIDS require.
//
// ZoneBC has one BC per tag, named after the tag, with the BCType of the
// deck, a PointList of the tag's BAR_2 element numbers at GridLocation
// EdgeCenter (the face location of a 2D zone), FamilyName the tag and the
// condition's values, if any, as a BCDataSet (see (*writer).bcDataSet);
// the tags of periodic pairs get none, their faces being written as
// ZoneGridConnectivity (see unstructuredPeriodic).
func (w *writer) unstructured(d *Deck, pl *plan) error {
	m, bcTypes := d.Mesh, pl.bcTypes
	nn, nc := len(m.Nodes), m.NumCells()
	zn := zoneNames(m, false)[0]
	zp := "/" + w.base + "/" + zn
	z, err := w.zone(zn, C.Unstructured, []int32{int32(nn), int32(nc), 0})
	if err != nil {
		return err
	}
	x, y := make([]float64, nn), make([]float64, nn)
	for i, p := range m.Nodes {
		x[i], y[i] = p[0], p[1]
	}
	if err := w.coords(z, zn, x, y); err != nil {
		return err
	}
	x, y = nil, nil

	runs := cellRuns(m)
	names := map[string]bool{}
	for i, r := range runs {
		name := "Cells"
		if len(runs) > 1 {
			name = fmt.Sprintf("Cells_%d", i+1)
		}
		names[name] = true
		if err := w.cellSection(z, zp, name, m, r); err != nil {
			return err
		}
	}
	for _, tag := range m.Tags {
		if names[tag] {
			return fmt.Errorf("boundary tag %q has the name of a cell section; rename the tag", tag)
		}
	}
	type faceGroup struct {
		name   string
		lo, hi int
		tag    int // index into m.Tags, -1 for none
	}
	groups := []faceGroup{{"InteriorFaces", 0, m.NumInterior, -1}}
	for t, tag := range m.Tags {
		groups = append(groups, faceGroup{tag, int(m.TagStart[t]), int(m.TagStart[t+1]), t})
	}
	ulo, uhi := m.UntaggedRange()
	groups = append(groups, faceGroup{"UntaggedBoundary", ulo, uhi, -1})
	for _, g := range groups {
		if g.hi > g.lo {
			if err := w.faceSection(z, zp, g.name, m, g.lo, g.hi); err != nil {
				return err
			}
		}
	}
	for _, g := range groups {
		if g.tag < 0 || g.hi == g.lo || bcTypes[g.tag] == periodicTag {
			continue
		}
		pts := make([]int32, g.hi-g.lo)
		for i := range pts {
			pts[i] = int32(nc + 1 + g.lo + i)
		}
		if err := w.boco(z, zp, g.name, g.name, bcTypes[g.tag], pl.bcData[g.tag], C.PointList, pts, C.EdgeCenter); err != nil {
			return err
		}
	}
	if err := w.unstructuredPeriodic(z, zn, nc, d.Periodic); err != nil {
		return err
	}
	return w.cellFields(z, zn, d, []int32{int32(nc)}, func(f int) []float64 { return d.CellFields[f].Values })
}

// maxIndex is the largest element or node number of this library build
// (cgsize_t is a 32-bit int).
const maxIndex = 1<<31 - 1

// cellRun is a run [lo, hi) of consecutive cells written as one section.
type cellRun struct {
	lo, hi   int
	poly     bool // cells of more than 4 nodes (NGON_n)
	tri, qua bool // the run has triangles / quadrilaterals
}

func cellRuns(m *mesh.Mesh) []cellRun {
	var runs []cellRun
	for c := 0; c < m.NumCells(); c++ {
		n := m.CellStart[c+1] - m.CellStart[c]
		poly := n > 4
		if len(runs) == 0 || runs[len(runs)-1].poly != poly {
			runs = append(runs, cellRun{lo: c, poly: poly})
		}
		r := &runs[len(runs)-1]
		r.hi = c + 1
		r.tri = r.tri || n == 3
		r.qua = r.qua || n == 4
	}
	return runs
}

// cellSection writes the cells of one run.
func (w *writer) cellSection(z C.int, zp, name string, m *mesh.Mesh, r cellRun) error {
	lo, hi := int32(r.lo+1), int32(r.hi)
	s0, s1 := m.CellStart[r.lo], m.CellStart[r.hi]
	switch {
	case r.poly || (r.tri && r.qua):
		typ, kind := C.ElementType_t(C.NGON_n), "NGON_n"
		extra := int32(0)
		if !r.poly {
			typ, kind, extra = C.MIXED, "MIXED", 1
		}
		conn := hugepage.Make[int32](int(s1-s0) + int(extra)*(r.hi-r.lo))[:0]
		off := hugepage.Make[int32](r.hi - r.lo + 1)[:1]
		for c := r.lo; c < r.hi; c++ {
			cell := m.Cell(c)
			if !r.poly {
				t := int32(C.TRI_3)
				if len(cell) == 4 {
					t = C.QUAD_4
				}
				conn = append(conn, t)
			}
			for _, v := range cell {
				conn = append(conn, v+1)
			}
			off = append(off, int32(len(conn)))
		}
		return w.polySection(z, zp, name, typ, kind, lo, hi, conn, off)
	default:
		typ, kind := C.ElementType_t(C.TRI_3), "TRI_3"
		if r.qua {
			typ, kind = C.QUAD_4, "QUAD_4"
		}
		conn := make([]int32, s1-s0)
		for i, v := range m.CellNodes[s0:s1] {
			conn[i] = v + 1
		}
		_, err := w.section(z, zp, name, typ, kind, lo, hi, conn)
		return err
	}
}

// section writes a fixed-size element section (cg_section_write).
func (w *writer) section(z C.int, zp, name string, typ C.ElementType_t, kind string, lo, hi int32, conn []int32) (C.int, error) {
	n := cstr(name)
	defer free(n)
	var s C.int
	path := zp + "/" + name
	if err := libError(C.cg_section_write(w.fn, w.b, z, n, typ, C.int(lo), C.int(hi), 0, ip(conn), &s), "write "+kind+" section "+path); err != nil {
		return 0, err
	}
	w.sum.text(path, kind)
	w.sum.ints(path+"/ElementRange", []int32{lo, hi})
	w.sum.ints(path+"/ElementConnectivity", conn)
	return s, nil
}

// polySection writes a variable-size section (MIXED, NGON_n) with its
// ElementStartOffset (cg_poly_section_write).
func (w *writer) polySection(z C.int, zp, name string, typ C.ElementType_t, kind string, lo, hi int32, conn, off []int32) error {
	n := cstr(name)
	defer free(n)
	var s C.int
	path := zp + "/" + name
	if err := libError(C.cg_poly_section_write(w.fn, w.b, z, n, typ, C.int(lo), C.int(hi), 0, ip(conn), ip(off), &s), "write "+kind+" section "+path); err != nil {
		return err
	}
	w.sum.text(path, kind)
	w.sum.ints(path+"/ElementRange", []int32{lo, hi})
	w.sum.ints(path+"/ElementStartOffset", off)
	w.sum.ints(path+"/ElementConnectivity", conn)
	return nil
}

// faceSection writes faces [lo, hi) as a BAR_2 section with their parent
// cells (see unstructured).
func (w *writer) faceSection(z C.int, zp, name string, m *mesh.Mesh, lo, hi int) error {
	nc := m.NumCells()
	n := hi - lo
	conn := hugepage.Make[int32](2 * n)
	for i, fn := range m.FaceNodes[lo:hi] {
		conn[2*i], conn[2*i+1] = fn[0]+1, fn[1]+1
	}
	s, err := w.section(z, zp, name, C.BAR_2, "BAR_2", int32(nc+1+lo), int32(nc+hi), conn)
	if err != nil {
		return err
	}
	conn = nil
	// ParentData is the (n, 4) array, column-major: left parent, right
	// parent, left position, right position.
	pd := hugepage.Make[int32](4 * n)
	for i := 0; i < n; i++ {
		f := lo + i
		o, nb := m.Owner[f], m.Neighbour[f]
		pd[i] = o + 1
		pd[2*n+i] = edgePosition(m, o, m.FaceNodes[f][0])
		if nb >= 0 {
			pd[n+i] = nb + 1
			pd[3*n+i] = edgePosition(m, nb, m.FaceNodes[f][1])
		}
	}
	if err := libError(C.cg_parent_data_write(w.fn, w.b, z, s, ip(pd)), "write ParentElements of "+zp+"/"+name); err != nil {
		return err
	}
	w.sum.ints(zp+"/"+name+"/ParentElements", pd[:2*n])
	w.sum.ints(zp+"/"+name+"/ParentElementsPosition", pd[2*n:])
	return nil
}

// edgePosition is the 1-based SIDS edge number, in cell c, of the edge
// that starts at node v in c's node order.
func edgePosition(m *mesh.Mesh, c int32, v int32) int32 {
	for k, u := range m.Cell(int(c)) {
		if u == v {
			return int32(k + 1)
		}
	}
	return 0
}

// boco writes one BC under ZoneBC with its grid location, FamilyName
// (the tag, which is also a Family_t of the base) and the BCDataSet of
// its values, if any.
func (w *writer) boco(z C.int, zp, name, family string, typ C.BCType_t, data []BCValue, set C.PointSetType_t, pts []int32, loc C.GridLocation_t) error {
	n := cstr(name)
	defer free(n)
	path := zp + "/ZoneBC/" + name
	npts := C.int(len(pts))
	if set == C.PointRange {
		npts = 2
	}
	var bc C.int
	if err := libError(C.cg_boco_write(w.fn, w.b, z, n, typ, set, npts, ip(pts), &bc), "write BC "+path); err != nil {
		return err
	}
	if err := libError(C.cg_boco_gridlocation_write(w.fn, w.b, z, bc, loc), "write GridLocation of "+path); err != nil {
		return err
	}
	w.sum.text(path, bcTypeName(typ))
	w.sum.ints(path+"/"+C.GoString(C.cg_PointSetTypeName(set)), pts)
	w.sum.text(path+"/GridLocation", C.GoString(C.cg_GridLocationName(loc)))
	if err := w.familyName(path, family); err != nil {
		return err
	}
	return w.bcDataSet(z, bc, path, typ, data)
}
