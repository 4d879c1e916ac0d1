package vtk

import (
	"fmt"

	"github.com/paulmach/orb"
)

// BoundaryLine is one line cell of a boundary polydata file: its two end
// points and its tag ("" for untagged).
type BoundaryLine struct {
	A, B orb.Point
	Tag  string
}

// ReadBoundaryVTP reads the line cells of an XML PolyData (.vtp) file, as
// WriteBoundaryVTP writes them or the VTK library does, with the tag of
// each line from the cell arrays the mesh readers use (boundary_tag or
// tag: a String array of names, or an integer array indexing the FieldData
// String array tag_names). Polylines are split into their segments, which
// share the polyline's tag. Errors name the file and the part at fault.
func ReadBoundaryVTP(data []byte, name string) ([]BoundaryLine, error) {
	g, nl, err := readPiece(data, name, "PolyData", "NumberOfLines", "Lines", "connectivity", "offsets")
	if err != nil {
		return nil, err
	}
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
	var out []BoundaryLine
	start := int64(0)
	for c, end := range g.offsets {
		if end < start+2 || end > int64(len(g.conn)) {
			return nil, fmt.Errorf("%s: line %d has offsets %d..%d; a line needs at least 2 of the %d connectivity entries", name, c, start, end, len(g.conn))
		}
		for k := start; k+1 < end; k++ {
			a, b := g.conn[k], g.conn[k+1]
			if a < 0 || a >= int64(np) || b < 0 || b >= int64(np) {
				return nil, fmt.Errorf("%s: line %d refers to point %d or %d; points run from 0 to %d", name, c, a, b, np-1)
			}
			out = append(out, BoundaryLine{
				A:   orb.Point{g.points[3*a], g.points[3*a+1]},
				B:   orb.Point{g.points[3*b], g.points[3*b+1]},
				Tag: tagOf(c),
			})
		}
		start = end
	}
	return out, nil
}
