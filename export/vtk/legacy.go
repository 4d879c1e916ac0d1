package vtk

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"cvdeck/mesh"
)

// WriteLegacy writes m as a legacy .vtk UNSTRUCTURED_GRID in the version
// 4.2 layout (CELLS as count-prefixed node lists, which every VTK version
// reads), with the same content as WriteVTU: points as double (x, y, 0),
// cells of types 5, 9 and 7, and CELL_DATA of type double: AreaName then
// each field. In binary form every number is big-endian, as the
// legacy format requires ("Simple Legacy Formats", VTK file-format
// document). The area is the active SCALARS array; the fields follow in a
// FIELD block, because the library's legacy reader loads only the first
// SCALARS array unless told otherwise but every FIELD array. In ASCII form floats are written in the shortest form that
// reads back exactly. Array names are %XX-encoded where they hold spaces,
// '%' or non-printing bytes, as the VTK library's legacy writer does.
//
// The ASCII form leaves out every field that holds a value that is not
// finite (a metric marked NaN where it does not apply): the library's
// legacy reader parses numbers as C++ streams do and stops at "nan",
// losing the rest of the file. The binary form and the XML formats keep
// such fields.
func WriteLegacy(w io.Writer, m *mesh.Mesh, fields []Field, binary bool) error {
	if err := checkArrays(m); err != nil {
		return err
	}
	nc := m.NumCells()
	if err := checkFields(fields, nc, -1); err != nil {
		return err
	}
	if !binary {
		fields = finiteFields(fields)
	}
	form := "ASCII"
	if binary {
		form = "BINARY"
	}
	e := newEncoder(w)
	e.text(fmt.Sprintf("# vtk DataFile Version 4.2\ncvdeck mesh\n%s\nDATASET UNSTRUCTURED_GRID\nPOINTS %d double\n", form, len(m.Nodes)))
	for _, p := range m.Nodes {
		if binary {
			e.f64BE(p[0])
			e.f64BE(p[1])
			e.f64BE(0)
			continue
		}
		e.float(p[0])
		e.u8(' ')
		e.float(p[1])
		e.text(" 0\n")
	}
	e.text(fmt.Sprintf("\nCELLS %d %d\n", nc, nc+len(m.CellNodes)))
	for c := 0; c < nc; c++ {
		nodes := m.Cell(c)
		if binary {
			e.i32BE(int32(len(nodes)))
			for _, v := range nodes {
				e.i32BE(v)
			}
			continue
		}
		e.int(int64(len(nodes)))
		for _, v := range nodes {
			e.u8(' ')
			e.int(int64(v))
		}
		e.u8('\n')
	}
	e.text(fmt.Sprintf("\nCELL_TYPES %d\n", nc))
	for c := 0; c < nc; c++ {
		t := cellType(m.CellStart[c+1] - m.CellStart[c])
		if binary {
			e.i32BE(int32(t))
			continue
		}
		e.int(int64(t))
		e.u8('\n')
	}
	e.text(fmt.Sprintf("\nCELL_DATA %d\n", nc))
	values := func(v []float64) {
		for _, x := range v {
			if binary {
				e.f64BE(x)
				continue
			}
			e.float(x)
			e.u8('\n')
		}
		e.u8('\n')
	}
	e.text("SCALARS " + AreaName + " double 1\nLOOKUP_TABLE default\n")
	values(m.Geo.CellArea)
	if len(fields) > 0 {
		e.text(fmt.Sprintf("FIELD FieldData %d\n", len(fields)))
		for _, f := range fields {
			e.text(fmt.Sprintf("%s 1 %d double\n", legacyName(f.Name), nc))
			values(f.Values)
		}
	}
	if err := e.finish(); err != nil {
		return fmt.Errorf("vtk: write legacy vtk: %w", err)
	}
	return nil
}

// legacyName encodes an array name as one legacy-format word: bytes that
// are spaces, '%' or not printable ASCII become %XX (two hex digits), which
// the VTK library's legacy reader decodes.
func legacyName(s string) string {
	var b []byte
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c <= ' ' || c > '~' || c == '%' {
			b = fmt.Appendf(b, "%%%02X", c)
			continue
		}
		b = append(b, c)
	}
	return string(b)
}

// float writes v as ASCII in the shortest form that reads back exactly.
func (e *encoder) float(v float64) {
	e.room(32)
	e.buf = strconv.AppendFloat(e.buf, v, 'g', -1, 64)
}

// int writes v as ASCII.
func (e *encoder) int(v int64) {
	e.room(20)
	e.buf = strconv.AppendInt(e.buf, v, 10)
}

// finiteFields returns the fields whose every value is finite.
func finiteFields(fields []Field) []Field {
	var out []Field
	for _, f := range fields {
		ok := true
		for _, v := range f.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				ok = false
				break
			}
		}
		if ok {
			out = append(out, f)
		}
	}
	return out
}
