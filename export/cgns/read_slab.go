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

// cells returns the mesh input of the lower plane: one cell per HEXA_8 or
// PENTA_6 element, its face on the lower plane, counter-clockwise seen
// from +z when the element has positive volume. By the CGNS numbering
// conventions (SIDS, unstructured element figures; from memory) the
// right-hand normal of an element's first face, nodes 1–4 of HEXA_8 or
// 1–3 of PENTA_6, points towards its opposite face; so the lower face
// keeps its order when it is the first face and is reversed when it is
// the opposite one. (For PENTA_6 this is the opposite of the VTK wedge,
// whose first face's normal points away from its second; VTK 9.1's CGNS
// reader and the CGNS tools' cgns_to_vtk copy PENTA_6 nodes onto VTK
// wedges unchanged, and so report negative volumes for prisms read here
// as positive.) Each element's other nodes must stand straight above
// (within 1e-12 of the extent). TRI_3 and QUAD_4 elements lying in a plane
// are the front and back patches, QUAD_4 spanning the planes are side
// faces, and BAR_2 are lines; none of them is a cell.
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
			var h int
			switch typ {
			case C.HEXA_8:
				h = 4
			case C.PENTA_6:
				h = 3
			case C.TRI_3, C.QUAD_4, C.BAR_2, C.NODE:
				continue
			default:
				return in, fmt.Errorf("%s: element %d is %s; in a slab cvdeck reads HEXA_8 and PENTA_6 cells, with QUAD_4 side faces, TRI_3 and QUAD_4 front and back faces and BAR_2 lines", s.path, id, elementTypeName(typ))
			}
			first, second := vs[:h], vs[h:]
			var face []int32
			switch {
			case sl.on(first, sl.lo) && sl.on(second, sl.hi):
				face = first
			case sl.on(first, sl.hi) && sl.on(second, sl.lo):
				face = make([]int32, h)
				for k := range face {
					face[k] = second[h-1-k]
				}
			default:
				return in, fmt.Errorf("%s: element %d (%s) does not stand between the planes z = %g and %g with one face on each", s.path, id, elementTypeName(typ), sl.lo, sl.hi)
			}
			for k := range first {
				a, b := sl.all[first[k]-1], sl.all[second[k]-1]
				if math.Abs(a[0]-b[0]) > 1e-12*sl.extent || math.Abs(a[1]-b[1]) > 1e-12*sl.extent {
					return in, fmt.Errorf("%s: element %d (%s): nodes %d and %d are not straight above each other; cvdeck reads slabs extruded along z", s.path, id, elementTypeName(typ), first[k], second[k])
				}
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
