package vtk

import (
	"encoding/xml"
	"fmt"
	"io"
	"strings"

	"github.com/paulmach/orb"
)

// headerBytes is the size of the byte-count header before each appended
// array: header_type="UInt64" (VTK file-format document, "AppendedData").
const headerBytes = 8

// dataArray is one array of an XML file's appended data block.
type dataArray struct {
	name  string
	typ   string // VTK XML type name: Float64, Int32, UInt8, String
	comps int    // NumberOfComponents; 0 leaves the attribute out
	// tuples is NumberOfTuples, written for String arrays, whose byte
	// length does not tell their count.
	tuples int
	nbytes int64
	write  func(e *encoder)
}

// appendedDoc builds an XML VTK file whose arrays all live in one raw
// appended block: the XML head is assembled first with every array's offset
// (known in advance from the sizes), then the arrays are streamed.
type appendedDoc struct {
	head   strings.Builder
	arrays []dataArray
	offset int64
}

// newAppendedDoc starts a file of the given VTKFile type.
func newAppendedDoc(fileType string) *appendedDoc {
	d := &appendedDoc{}
	// version 1.0 is the first that allows header_type (VTK file-format
	// document, "Serial XML File Formats").
	fmt.Fprintf(&d.head, "<?xml version=\"1.0\"?>\n<VTKFile type=%q version=\"1.0\" byte_order=\"LittleEndian\" header_type=\"UInt64\">\n", fileType)
	return d
}

// line adds one line of XML to the head.
func (d *appendedDoc) line(indent int, s string) {
	d.head.WriteString(strings.Repeat("  ", indent))
	d.head.WriteString(s)
	d.head.WriteByte('\n')
}

// array adds an array element to the head and queues its data.
func (d *appendedDoc) array(indent int, a dataArray) {
	elem := "DataArray"
	if a.typ == "String" {
		elem = "Array"
	}
	var s strings.Builder
	fmt.Fprintf(&s, "<%s type=%q Name=\"%s\"", elem, a.typ, attr(a.name))
	if a.comps > 0 {
		fmt.Fprintf(&s, " NumberOfComponents=\"%d\"", a.comps)
	}
	if a.typ == "String" {
		fmt.Fprintf(&s, " NumberOfTuples=\"%d\"", a.tuples)
	}
	fmt.Fprintf(&s, " format=\"appended\" offset=\"%d\"/>", d.offset)
	d.line(indent, s.String())
	d.arrays = append(d.arrays, a)
	d.offset += headerBytes + a.nbytes
}

// write writes the head, closed by the given closing lines, then the
// appended block.
func (d *appendedDoc) write(w io.Writer) error {
	e := newEncoder(w)
	e.text(d.head.String())
	e.text("  <AppendedData encoding=\"raw\">\n   _")
	for _, a := range d.arrays {
		e.u64(uint64(a.nbytes))
		a.write(e)
	}
	e.text("\n  </AppendedData>\n</VTKFile>\n")
	return e.finish()
}

// attr escapes s for use inside a double-quoted XML attribute.
func attr(s string) string {
	var b strings.Builder
	xml.EscapeText(&b, []byte(s))
	return strings.ReplaceAll(b.String(), `"`, "&#34;")
}

// float64Array is a Float64 array of the given values.
func float64Array(name string, v []float64) dataArray {
	return dataArray{name: name, typ: "Float64", nbytes: 8 * int64(len(v)), write: func(e *encoder) { e.f64s(v) }}
}

// int32Array is an Int32 array of the given values.
func int32Array(name string, v []int32) dataArray {
	return dataArray{name: name, typ: "Int32", nbytes: 4 * int64(len(v)), write: func(e *encoder) { e.i32s(v) }}
}

// stringArray is a String array: each value's bytes followed by a NUL, as
// the VTK XML writer stores a vtkStringArray.
func stringArray(name string, v []string) dataArray {
	n := int64(0)
	for _, s := range v {
		n += int64(len(s)) + 1
	}
	return dataArray{name: name, typ: "String", tuples: len(v), nbytes: n, write: func(e *encoder) {
		for _, s := range v {
			e.text(s)
			e.u8(0)
		}
	}}
}

// pointsArray is the Float64 (x, y, 0) array of the nodes sel[0], sel[1],
// ... or, with sel nil, of all nodes.
func pointsArray(nodes []orb.Point, sel []int32) dataArray {
	n := len(nodes)
	if sel != nil {
		n = len(sel)
	}
	return dataArray{name: "Points", typ: "Float64", comps: 3, nbytes: 24 * int64(n), write: func(e *encoder) { e.xyz(nodes, sel) }}
}
