package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// slab is an unstructured zone of a 3D base read as a 2D case stored one
// cell thick: its nodes lie on two planes z = lo < hi, its cells are
// HEXA_8 and PENTA_6 elements standing between them, and the mesh is the
// lower plane. index maps each 0-based file node to its mesh node, −1 for
// the upper plane's.
type slab struct {
	zp     string
	lo, hi float64
	nodes  []orb.Point // the lower plane's, in file order
	all    []orb.Point
	z      []float64
	index  []int32
	extent float64
}

func newSlab(zp string, nodes []orb.Point, z []float64) (*slab, error) {
	sl := &slab{zp: zp, all: nodes, z: z, index: make([]int32, len(nodes))}
	z0, z1, two := z[0], 0.0, false
	for i, v := range z {
		switch {
		case v == z0:
		case !two:
			z1, two = v, true
		case v != z1:
			return nil, fmt.Errorf("%s: nodes lie on z = %g, %g and %g (node %d); in a 3D base cvdeck reads an unstructured zone only as a slab one cell thick, its nodes on two planes", zp, z0, z1, v, i+1)
		}
	}
	if !two {
		return nil, fmt.Errorf("%s: every node lies on z = %g; a 3D zone read as a slab needs two planes", zp, z0)
	}
	sl.lo, sl.hi = min(z0, z1), max(z0, z1)
	for i, p := range nodes {
		sl.index[i] = -1
		if z[i] == sl.lo {
			sl.index[i] = int32(len(sl.nodes))
			sl.nodes = append(sl.nodes, p)
			sl.extent = max(sl.extent, math.Abs(p[0]), math.Abs(p[1]))
		}
	}
	return sl, nil
}

// on reports whether the 1-based nodes vs all lie on the plane z = zp.
func (sl *slab) on(vs []int32, zp float64) bool {
	for _, v := range vs {
		if sl.z[v-1] != zp {
			return false
		}
	}
	return true
}

// The faces of HEXA_8 and PENTA_6 that may lie on a plane of the slab,
// each listed so that its right-hand normal points into the element, and
// the element's edges, by position in its node list. By the CGNS
// numbering conventions (SIDS, unstructured element figures and face
// lists; from memory) a HEXA_8 has nodes 1–4 on one face and 5–8 on the
// opposite one, node k+4 joined to node k, and the right-hand normal of
// 1–4 points towards 5–8 when the element has positive volume; a PENTA_6
// has its triangles 1–3 and 4–6 likewise, the normal of 1–3 again towards
// 4–6. (For PENTA_6 this is the opposite of the VTK wedge, whose first
// face's normal points away from its second; VTK 9.1's CGNS reader and
// the CGNS tools' cgns_to_vtk copy PENTA_6 nodes onto VTK wedges
// unchanged, and so report negative volumes for prisms read here as
// positive.) Any face of a HEXA_8 may be the lower one; a PENTA_6 stands
// between the planes only on its triangles, its quadrilaterals being
// opposite an edge, not a face.
//
// The hexahedron's faces and edges are mesh.HexFaces and mesh.HexEdges.
// Only the prism's triangles are listed here.
var pentaInward = [][]int{{0, 1, 2}, {5, 4, 3}}

// cells returns the mesh input of the lower plane: one cell per HEXA_8 or
// PENTA_6 element, its face on the lower plane (see lowerFace). TRI_3 and
// QUAD_4 elements lying in a plane are the front and back patches, QUAD_4
// spanning the planes are side faces, and BAR_2 are lines; none of them
// is a cell.
func (sl *slab) cells(secs []elemSection) (mesh.Input, error) {
	in := mesh.Input{Nodes: sl.nodes, CellStart: []int32{0}}
	nn := int32(len(sl.all))
	for si := range secs {
		s := &secs[si]
		for e := 0; e <= int(s.end-s.start); e++ {
			typ, vs := s.element(e)
			id := int(s.start) + e
			for _, v := range vs {
				if v < 1 || v > nn {
					return in, fmt.Errorf("%s: element %d refers to node %d; the zone's nodes run from 1 to %d", s.path, id, v, nn)
				}
			}
			switch typ {
			case C.HEXA_8, C.PENTA_6:
			case C.TRI_3, C.QUAD_4, C.BAR_2, C.NODE:
				continue
			default:
				return in, fmt.Errorf("%s: element %d is %s; in a slab cvdeck reads HEXA_8 and PENTA_6 cells, with QUAD_4 side faces, TRI_3 and QUAD_4 front and back faces and BAR_2 lines", s.path, id, elementTypeName(typ))
			}
			face, err := sl.lowerFace(s.path, id, typ, vs)
			if err != nil {
				return in, err
			}
			for _, v := range face {
				in.CellNodes = append(in.CellNodes, sl.index[v-1])
			}
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
	}
	if len(in.CellStart) == 1 {
		return in, fmt.Errorf("%s has no HEXA_8 or PENTA_6 elements to read as a slab", sl.zp)
	}
	return in, nil
}

// lowerFace returns the 1-based nodes of the face on the lower plane of
// element id (of section path), a HEXA_8 or PENTA_6 with nodes vs:
// whichever of its faces lies on z = sl.lo, the rest of its nodes lying on
// z = sl.hi, in the order that is counter-clockwise seen from +z when the
// element has positive volume. A HEXA_8 whose local numbering starts on
// a side face is so read as it stands. Every edge between the planes must
// be straight up (within 1e-12 of the extent, the largest coordinate of
// the lower plane).
func (sl *slab) lowerFace(path string, id int, typ C.ElementType_t, vs []int32) ([]int32, error) {
	inward, edges := mesh.HexFaces, mesh.HexEdges
	if typ == C.PENTA_6 {
		inward, edges = pentaInward, mesh.PrismEdges
	}
	low := 0
	for _, v := range vs {
		if sl.z[v-1] == sl.lo {
			low++
		}
	}
	var face []int32
	if low == len(inward[0]) {
		for _, k := range mesh.LowerFace(inward, func(k int) bool { return sl.z[vs[k]-1] == sl.lo }) {
			face = append(face, vs[k])
		}
	}
	if face == nil {
		return nil, fmt.Errorf("%s: element %d (%s) does not stand between the planes z = %g and %g with one face on each (its nodes on the lower plane: %d of %d)", path, id, elementTypeName(typ), sl.lo, sl.hi, low, len(vs))
	}
	for _, e := range edges {
		a, b := vs[e[0]], vs[e[1]]
		if sl.z[a-1] == sl.z[b-1] {
			continue
		}
		p, q := sl.all[a-1], sl.all[b-1]
		if math.Abs(p[0]-q[0]) > 1e-12*sl.extent || math.Abs(p[1]-q[1]) > 1e-12*sl.extent {
			return nil, fmt.Errorf("%s: element %d (%s): nodes %d and %d are not straight above each other; cvdeck reads slabs extruded along z", path, id, elementTypeName(typ), a, b)
		}
	}
	return face, nil
}

// faceEdge returns the function giving the lower-plane edge (mesh nodes)
// of a boundary face element: a QUAD_4 spanning the planes, or a BAR_2 on
// the lower plane.
func (sl *slab) faceEdge(secs []elemSection) func(id int32) ([2]int32, bool) {
	return func(id int32) ([2]int32, bool) {
		typ, vs, ok := findElement(secs, id)
		if !ok {
			return [2]int32{}, false
		}
		var low []int32
		for _, v := range vs {
			if sl.z[v-1] == sl.lo {
				low = append(low, sl.index[v-1])
			}
		}
		switch {
		case typ == C.QUAD_4 && len(low) == 2, typ == C.BAR_2 && len(low) == 2:
			return [2]int32{low[0], low[1]}, true
		}
		return [2]int32{}, false
	}
}

// patch returns the function reporting whether element id is a front or
// back face of the slab: a TRI_3 or QUAD_4 lying in one of its planes.
func (sl *slab) patch(secs []elemSection) func(id int32) bool {
	return func(id int32) bool {
		typ, vs, ok := findElement(secs, id)
		return ok && (typ == C.TRI_3 || typ == C.QUAD_4) && (sl.on(vs, sl.lo) || sl.on(vs, sl.hi))
	}
}
