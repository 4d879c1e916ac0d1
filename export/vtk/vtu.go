package vtk

import (
	"fmt"
	"io"

	"cvdeck/mesh"
)

// WriteVTU writes m as an XML UnstructuredGrid (.vtu): binary appended raw
// data, uncompressed, header_type UInt64, little-endian. Points are Float64
// (x, y, 0); connectivity and offsets are Int32 (the mesh's own CSR
// arrays), types UInt8: VTK_TRIANGLE (5), VTK_QUAD (9) or VTK_POLYGON (7)
// by node count. Cell data: AreaName (the signed cell area from m.Geo) and
// then each cell field in order; point data: the point fields in order;
// all Float64.
//
// The data are streamed through one buffer; nothing is allocated per cell.
func WriteVTU(w io.Writer, m *mesh.Mesh, fields []Field) error {
	if err := checkArrays(m); err != nil {
		return err
	}
	nc := m.NumCells()
	if err := checkFields(fields, nc, len(m.Nodes)); err != nil {
		return err
	}
	var cells, points []Field
	for _, f := range fields {
		if f.Point {
			points = append(points, f)
		} else {
			cells = append(cells, f)
		}
	}
	d := newAppendedDoc("UnstructuredGrid")
	d.line(1, "<UnstructuredGrid>")
	d.line(2, fmt.Sprintf("<Piece NumberOfPoints=\"%d\" NumberOfCells=\"%d\">", len(m.Nodes), nc))
	d.line(3, "<Points>")
	d.array(4, pointsArray(m.Nodes, nil))
	d.line(3, "</Points>")
	d.line(3, "<Cells>")
	d.array(4, int32Array("connectivity", m.CellNodes))
	d.array(4, int32Array("offsets", m.CellStart[1:]))
	d.array(4, dataArray{name: "types", typ: "UInt8", nbytes: int64(nc), write: func(e *encoder) { e.cellTypes(m.CellStart) }})
	d.line(3, "</Cells>")
	if len(points) > 0 {
		d.line(3, "<PointData>")
		for _, f := range points {
			d.array(4, float64Array(f.Name, f.Values))
		}
		d.line(3, "</PointData>")
	}
	writeCellData(d, m.Geo.CellArea, cells)
	d.line(2, "</Piece>")
	d.line(1, "</UnstructuredGrid>")
	if err := d.write(w); err != nil {
		return fmt.Errorf("vtk: write vtu: %w", err)
	}
	return nil
}

// writeCellData adds the CellData element: the area array, then the
// fields, each restricted to the same cells as area.
func writeCellData(d *appendedDoc, area []float64, fields []Field) {
	d.line(3, fmt.Sprintf("<CellData Scalars=\"%s\">", AreaName))
	d.array(4, float64Array(AreaName, area))
	for _, f := range fields {
		d.array(4, float64Array(f.Name, f.Values))
	}
	d.line(3, "</CellData>")
}
