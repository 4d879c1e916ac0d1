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
	x, err := parseXML(data, name)
	if err != nil {
		return nil, err
	}
	if t := x.root.attr["type"]; t != "PolyData" {
		return nil, fmt.Errorf("%s: VTKFile type is %q; a boundary file is PolyData", name, t)
	}
	pd := x.root.child("PolyData")
	if pd == nil {
		return nil, fmt.Errorf("%s: no PolyData element", name)
	}
	var pieces []*element
	for _, c := range pd.children {
		if c.name == "Piece" {
			pieces = append(pieces, c)
		}
	}
	if len(pieces) != 1 {
		return nil, fmt.Errorf("%s: %d pieces; cvdeck reads single-piece files", name, len(pieces))
	}
	p := pieces[0]
	np, err := x.count(p, "NumberOfPoints")
	if err != nil {
		return nil, err
	}
	nl, err := x.count(p, "NumberOfLines")
	if err != nil {
		return nil, err
	}
	g := &grid{file: name}
	pts := p.child("Points")
	if pts == nil || len(pts.arrays()) != 1 {
		return nil, fmt.Errorf("%s: Piece needs a Points element with one DataArray", name)
	}
	pa, err := x.read(pts.arrays()[0], "Points")
	if err != nil {
		return nil, err
	}
	if pa.strs != nil || pa.comps != 3 || pa.length() != 3*np {
		return nil, fmt.Errorf("%s: Points must be numeric with 3 components for %d points", name, np)
	}
	g.points = pa.asFloats()
	lines := p.child("Lines")
	if lines == nil {
		return nil, fmt.Errorf("%s: Piece has no Lines element", name)
	}
	for _, want := range []string{"connectivity", "offsets"} {
		var el *element
		for _, a := range lines.arrays() {
			if a.attr["Name"] == want {
				el = a
			}
		}
		if el == nil {
			return nil, fmt.Errorf("%s: Lines has no %q DataArray", name, want)
		}
		a, err := x.read(el, "Lines/"+want)
		if err != nil {
			return nil, err
		}
		if a.ints == nil {
			return nil, fmt.Errorf("%s: Lines/%s must be an integer array", name, want)
		}
		if want == "connectivity" {
			g.conn = a.ints
		} else {
			g.offsets = a.ints
		}
	}
	if len(g.offsets) != nl {
		return nil, fmt.Errorf("%s: Lines/offsets has %d values for NumberOfLines=%d", name, len(g.offsets), nl)
	}
	g.types = make([]int64, nl)
	for i := range g.types {
		g.types[i] = cellLine
	}
	if cd := p.child("CellData"); cd != nil {
		for _, el := range cd.arrays() {
			a, err := x.read(el, "CellData/"+el.attr["Name"])
			if err != nil {
				return nil, err
			}
			g.cellData = append(g.cellData, a)
		}
	}
	if fd := pd.child("FieldData"); fd != nil {
		for _, el := range fd.arrays() {
			a, err := x.read(el, "FieldData/"+el.attr["Name"])
			if err != nil {
				return nil, err
			}
			g.fieldData = append(g.fieldData, a)
		}
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
