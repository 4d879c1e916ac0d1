package vtk

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// BoundaryLine is one line cell of a boundary polydata file: its two end
// points, their numbers P and Q among the file's points (two lines that
// share a number share that point; coincident points of different numbers
// may be different mesh nodes, as on the two sides of a thin plate), its
// tag ("" for untagged) and Face, the line's FaceArray value (the face
// number in the mesh the file was written from, as WriteBoundaryVTP
// writes it), −1 when the file has no such array.
type BoundaryLine struct {
	A, B orb.Point
	P, Q int
	Tag  string
	Face int
}

// ReadBoundaryVTP reads the line cells of an XML PolyData (.vtp) file, as
// WriteBoundaryVTP writes them or the VTK library does, with the tag of
// each line from the cell arrays the mesh readers use (boundary_tag or
// tag: a String array of names, or an integer array indexing the FieldData
// String array tag_names) and its face number from the integer cell array
// FaceArray when there is one. Polylines are split into their segments,
// which share the polyline's tag and have no face number (the array
// numbers whole cells). Errors name the file and the part at fault; as
// with ReadVTU, a file that is not whole is an error.
func ReadBoundaryVTP(data []byte, name string) ([]BoundaryLine, error) {
	x, p, g, err := readHead(data, name, "PolyData")
	if err != nil {
		return nil, err
	}
	nl, err := x.count(p, "NumberOfLines")
	if err != nil {
		return nil, err
	}
	cells := p.child("Lines")
	if cells == nil {
		return nil, fmt.Errorf("%s: Piece has no Lines element", name)
	}
	arrays, err := x.cellArrays(cells, []string{"connectivity", "offsets"})
	if err != nil {
		return nil, err
	}
	g.conn, g.offsets = arrays["connectivity"], arrays["offsets"]
	if len(g.offsets) != nl {
		return nil, fmt.Errorf("%s: Lines/offsets has %d values for NumberOfLines=%d", name, len(g.offsets), nl)
	}
	np := len(g.points) / 3
	g.types = make([]int64, nl)
	for i := range g.types {
		g.types[i] = cellLine
	}
	tagOf, err := g.lineTags()
	if err != nil {
		return nil, err
	}
	var face []int64
	named, err := x.readNamed(p.child("CellData"), []string{FaceArray})
	if err != nil {
		return nil, err
	}
	if a := find(named, FaceArray); a != nil {
		if a.ints == nil || a.comps > 1 || len(a.ints) != nl {
			return nil, fmt.Errorf("%s: cell array %q has %d values in %d components for %d lines; it needs one integer per line (the line's face number in the mesh)", name, FaceArray, a.length(), max(a.comps, 1), nl)
		}
		face = a.ints
	}
	var out []BoundaryLine
	start := int64(0)
	for c, end := range g.offsets {
		if end < start+2 || end > int64(len(g.conn)) {
			return nil, fmt.Errorf("%s: line %d has offsets %d..%d; a line needs at least 2 of the %d connectivity entries", name, c, start, end, len(g.conn))
		}
		f := -1
		if face != nil && end == start+2 {
			if face[c] < 0 || face[c] > math.MaxInt32 {
				return nil, fmt.Errorf("%s: line %d has %s %d; a face number is from 0 to %d", name, c, FaceArray, face[c], math.MaxInt32)
			}
			f = int(face[c])
		}
		for k := start; k+1 < end; k++ {
			a, b := g.conn[k], g.conn[k+1]
			if a < 0 || a >= int64(np) || b < 0 || b >= int64(np) {
				return nil, fmt.Errorf("%s: line %d refers to point %d or %d; points run from 0 to %d", name, c, a, b, np-1)
			}
			out = append(out, BoundaryLine{
				A:    orb.Point{g.points[3*a], g.points[3*a+1]},
				B:    orb.Point{g.points[3*b], g.points[3*b+1]},
				P:    int(a),
				Q:    int(b),
				Tag:  tagOf(c),
				Face: f,
			})
		}
		start = end
	}
	return out, nil
}

// ReadVTP builds a mesh from the bytes of an XML PolyData (.vtp) file, the
// form the VTK library gives a 2D triangulation (name is used in errors);
// see ReadFile. Polys are the cells (triangles, quads, polygons); lines
// and polylines are boundary faces, tagged as in an unstructured grid;
// vertices are skipped with a note. Cell numbers, and so the tag arrays,
// run as the VTK library numbers a PolyData's cells: verts, lines, polys,
// then strips. Triangle strips are refused: split them into triangles
// first. As with ReadVTU, a file that is not whole is an error.
func ReadVTP(data []byte, name string) (*mesh.Mesh, error) {
	g, err := parseVTP(data, name)
	if err != nil {
		return nil, err
	}
	return g.toMesh()
}

// vtpSections are the cell elements of a PolyData piece in cell-number
// order, with the attribute giving each one's count.
var vtpSections = []struct{ elem, count string }{
	{"Verts", "NumberOfVerts"}, {"Lines", "NumberOfLines"}, {"Polys", "NumberOfPolys"}, {"Strips", "NumberOfStrips"},
}

// parseVTP reads the grid of an XML PolyData file: its sections one after
// another as one cell list, each cell typed by its section and size.
func parseVTP(data []byte, name string) (*grid, error) {
	x, p, g, err := readHead(data, name, "PolyData")
	if err != nil {
		return nil, err
	}
	for _, sec := range vtpSections {
		n := 0
		if p.attr[sec.count] != "" {
			if n, err = x.count(p, sec.count); err != nil {
				return nil, err
			}
		}
		if n == 0 {
			continue
		}
		if sec.elem == "Strips" {
			return nil, fmt.Errorf("%s: %d triangle strips; cvdeck reads polys (triangles, quads, polygons), so split the strips into triangles first", name, n)
		}
		cells := p.child(sec.elem)
		if cells == nil {
			return nil, fmt.Errorf("%s: %s=%d but the Piece has no %s element", name, sec.count, n, sec.elem)
		}
		arrays, err := x.cellArrays(cells, []string{"connectivity", "offsets"})
		if err != nil {
			return nil, err
		}
		conn, offsets := arrays["connectivity"], arrays["offsets"]
		if len(offsets) != n {
			return nil, fmt.Errorf("%s: %s/offsets has %d values for %s=%d", name, sec.elem, len(offsets), sec.count, n)
		}
		if err := g.appendPolySection(sec.elem, sec.elem, conn, offsets); err != nil {
			return nil, err
		}
	}
	return g, nil
}

// appendPolySection appends to g's cells one cell section of a PolyData
// (elem Verts, Lines or Polys; label names it in errors), its offsets
// shifted past the cells already there and each cell typed by polyDataType.
func (g *grid) appendPolySection(elem, label string, conn, offsets []int64) error {
	base, start := int64(len(g.conn)), int64(0)
	for c, end := range offsets {
		if end < start || end > int64(len(conn)) {
			return fmt.Errorf("%s: %s cell %d: offset %d is out of order or past the section's %d connectivity entries", g.file, label, c, end, len(conn))
		}
		g.offsets = append(g.offsets, base+end)
		g.types = append(g.types, polyDataType(elem, end-start))
		start = end
	}
	g.conn = append(g.conn, conn...)
	return nil
}

// polyDataType is the cell type of an n-point cell of a PolyData section.
func polyDataType(elem string, n int64) int64 {
	switch {
	case elem == "Verts" && n == 1:
		return cellVertex
	case elem == "Verts":
		return cellPolyVertex
	case elem == "Lines" && n == 2:
		return cellLine
	case elem == "Lines":
		return cellPolyLine
	case n == 3:
		return cellTriangle
	case n == 4:
		return cellQuad
	}
	return cellPolygon
}
