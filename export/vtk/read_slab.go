package vtk

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// slabPlanes are the two planes of a slab one cell thick: z = lo is the
// mesh, z = hi its copy.
type slabPlanes struct{ lo, hi float64 }

// slab reports whether the grid is a slab one cell thick (see ReadFile):
// points on exactly two z values and at least one hexahedron, voxel or
// wedge. A grid with points on two planes but no such cell, or on more
// than two, is an error only if it holds 3D cells; otherwise toMesh's
// plane test speaks.
func (g *grid) slab() (slabPlanes, bool, error) {
	if !g.has3D() {
		return slabPlanes{}, false, nil
	}
	z0, z1, two := g.points[2], 0.0, false
	for i := 2; i < len(g.points); i += 3 {
		switch z := g.points[i]; {
		case z == z0:
		case !two:
			z1, two = z, true
		case z != z1:
			return slabPlanes{}, false, fmt.Errorf("%s: points lie on z = %g, %g and %g; cvdeck reads a 3D grid only as a slab one cell thick, its points on two planes", g.file, z0, z1, z)
		}
	}
	if !two {
		return slabPlanes{}, false, fmt.Errorf("%s: the grid has 3D cells but all its points lie on z = %g; they have no thickness", g.file, z0)
	}
	return slabPlanes{min(z0, z1), max(z0, z1)}, true, nil
}

// has3D reports whether the grid holds a hexahedron, voxel or wedge.
func (g *grid) has3D() bool {
	return slices.ContainsFunc(g.types, func(t int64) bool { return t == cellHex || t == cellVoxel || t == cellWedge })
}

// slabMesh builds the mesh of the lower plane of a slab.
func (g *grid) slabMesh(sl slabPlanes) (*mesh.Mesh, error) {
	np := len(g.points) / 3
	z := func(v int64) float64 { return g.points[3*v+2] }
	// The lower plane's points, renumbered in file order.
	index := make([]int32, np)
	in := mesh.Input{CellStart: []int32{0}}
	extent := 0.0
	for i := range index {
		index[i] = -1
		if g.points[3*i+2] == sl.lo {
			index[i] = int32(len(in.Nodes))
			p := orb.Point{g.points[3*i], g.points[3*i+1]}
			in.Nodes = append(in.Nodes, p)
			extent = max(extent, math.Abs(p[0]), math.Abs(p[1]))
		}
	}
	tags, err := g.newEdgeTagger(&in)
	if err != nil {
		return nil, err
	}
	onPlane := func(nodes []int64, zp float64) bool {
		for _, v := range nodes {
			if z(v) != zp {
				return false
			}
		}
		return true
	}
	var patches, upper leftOut
	for c := range g.types {
		nodes := g.cell(c)
		t := g.types[c]
		var face []int64
		switch t {
		case cellHex, cellWedge, cellVoxel:
			want := fixedPoints(t)
			if len(nodes) != want {
				return nil, fmt.Errorf("%s: cell %d is a %s with %d points", g.file, c, cellTypeName[t], len(nodes))
			}
			var err error
			if face, err = g.lowerFace(c, t, nodes, sl, extent); err != nil {
				return nil, err
			}
		case cellTriangle, cellQuad, cellPixel, cellPolygon:
			if onPlane(nodes, sl.lo) || onPlane(nodes, sl.hi) {
				patches.add(tags.tagOf(c)) // a front or back patch
				continue
			}
			var low []int64
			for _, v := range nodes {
				if z(v) == sl.lo {
					low = append(low, v)
				}
			}
			if len(nodes) != 4 || len(low) != 2 {
				return nil, fmt.Errorf("%s: cell %d, a %s, neither lies in a plane of the slab nor spans it as a side face", g.file, c, cellTypeName[t])
			}
			if err := tags.add(c, index[low[0]], index[low[1]]); err != nil {
				return nil, err
			}
			continue
		case cellLine, cellPolyLine:
			switch {
			case onPlane(nodes, sl.hi):
				upper.add(tags.tagOf(c))
				continue
			case !onPlane(nodes, sl.lo):
				return nil, fmt.Errorf("%s: cell %d, a %s, runs between the planes of the slab; boundary lines must lie in a plane", g.file, c, cellTypeName[t])
			}
			if err := tags.chain(c, nodes, func(v int64) int32 { return index[v] }); err != nil {
				return nil, err
			}
			continue
		default:
			return nil, fmt.Errorf("%s: cell %d has VTK type %d (%s); in a slab cvdeck reads hexahedra (12), voxels (11) and wedges (13), with quads, pixels and lines as boundary faces", g.file, c, t, typeName(t))
		}
		for _, v := range face {
			in.CellNodes = append(in.CellNodes, index[v])
		}
		if len(in.CellNodes) > math.MaxInt32 {
			return nil, fmt.Errorf("%s: more than %d cell nodes", g.file, math.MaxInt32)
		}
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	g.numberingNote(func(t int64) bool { return t == cellHex || t == cellVoxel || t == cellWedge }, "boundary face and line", "3D")
	g.orient(&in, "have negative volume by the VTK node-order conventions (their faces on the lower plane run clockwise seen from +z)")
	m, err := mesh.Build(in)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", g.file, err)
	}
	note := fmt.Sprintf("a slab one cell thick between z = %g and z = %g, read as its lower plane", sl.lo, sl.hi)
	var out []string
	if patches.count > 0 {
		out = append(out, patches.String("cell", "in the front and back planes"))
	}
	if upper.count > 0 {
		out = append(out, upper.String("line", "on the upper plane"))
	}
	if len(out) > 0 {
		note += "; left out: " + strings.Join(out, " and ")
	}
	g.notes = append(g.notes, note)
	return m, nil
}

// leftOut counts the cells of a slab that are not part of its 2D mesh,
// and the tags they carried.
type leftOut struct {
	count int
	tags  []string
}

func (l *leftOut) add(tag string) {
	l.count++
	if tag != "" && !slices.Contains(l.tags, tag) {
		l.tags = append(l.tags, tag)
	}
}

// String says "24 cells in the front and back planes (tag symmetry)".
func (l *leftOut) String(what, where string) string {
	s := fmt.Sprintf("%d %s", l.count, what)
	if l.count != 1 {
		s += "s"
	}
	s += " " + where
	switch len(l.tags) {
	case 0:
	case 1:
		s += fmt.Sprintf(" (tag %s)", l.tags[0])
	default:
		s += fmt.Sprintf(" (tags %s)", strings.Join(l.tags, ", "))
	}
	return s
}

// The faces of the 3D cells a slab is made of, each listed so that its
// right-hand normal points into the cell (the reverse of the outward
// order), and the edges, by position in the cell's point list. A
// hexahedron's points are 0–3 on one face and 4–7 on the opposite one,
// point k+4 joined to point k; a wedge's 0–2 and 3–5 likewise; a voxel is
// a hexahedron with its points in (i, j, k) order, taken through
// voxelAsHex. With positive volume the right-hand normal of a
// hexahedron's face 0–3 points towards 4–7 and a wedge's face 0–2 away
// from 3–5 (VTK file-format document, figure of linear cell types; VTK's
// vtkHexahedron and vtkWedge face lists give the same, outward, from
// memory).
//
// The hexahedron's faces and edges, and the wedge's edges, are
// mesh.HexFaces, mesh.HexEdges and mesh.PrismEdges.
var (
	// A wedge stands between the planes only on its triangles; its
	// quadrilateral faces are opposite an edge, not a face.
	wedgeInward = [][]int{{2, 1, 0}, {3, 4, 5}}
	voxelAsHex  = []int{0, 1, 3, 2, 4, 5, 7, 6}
)

// lowerFace returns the face on the lower plane of file cell c, a
// hexahedron, voxel or wedge of type t with points nodes: whichever of its
// faces lies on z = sl.lo, the face opposite on z = sl.hi, in the order
// that is counter-clockwise seen from +z when the cell has positive
// volume. Any face of a hexahedron or voxel may be the lower one, so a
// cell whose local numbering starts on a side face is read as it stands.
// Every edge between the planes must be straight up (within 1e-12 of
// extent, the largest coordinate of the lower plane).
func (g *grid) lowerFace(c int, t int64, nodes []int64, sl slabPlanes, extent float64) ([]int64, error) {
	pts := nodes
	inward, edges := mesh.HexFaces, mesh.HexEdges
	switch t {
	case cellVoxel:
		pts = make([]int64, 8)
		for k, p := range voxelAsHex {
			pts[k] = nodes[p]
		}
	case cellWedge:
		inward, edges = wedgeInward, mesh.PrismEdges
	}
	z := func(v int64) float64 { return g.points[3*v+2] }
	low := 0
	for _, v := range pts {
		switch z(v) {
		case sl.lo:
			low++
		case sl.hi:
		default:
			low = -1
		}
		if low < 0 {
			break
		}
	}
	var face []int64
	if low == len(inward[0]) {
		for _, k := range mesh.LowerFace(inward, func(k int) bool { return z(pts[k]) == sl.lo }) {
			face = append(face, pts[k])
		}
	}
	if face == nil {
		return nil, fmt.Errorf("%s: cell %d, a %s, does not stand between the planes z = %g and %g with one face on each (its points on the lower plane: %d of %d)", g.file, c, cellTypeName[t], sl.lo, sl.hi, max(low, 0), len(pts))
	}
	for _, e := range edges {
		a, b := pts[e[0]], pts[e[1]]
		if z(a) == z(b) {
			continue
		}
		if math.Abs(g.points[3*a]-g.points[3*b]) > 1e-12*extent || math.Abs(g.points[3*a+1]-g.points[3*b+1]) > 1e-12*extent {
			return nil, fmt.Errorf("%s: cell %d, a %s: its points %d and %d are not straight above each other; cvdeck reads slabs extruded along z", g.file, c, cellTypeName[t], a, b)
		}
	}
	return face, nil
}
