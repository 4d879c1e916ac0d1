package vtk

import (
	"bytes"
	"encoding/base64"
	"encoding/binary"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"cvdeck/internal/hugepage"
	"cvdeck/mesh"
)

// ReadVTU builds a mesh from the bytes of an XML UnstructuredGrid file
// (name is used in errors); see ReadFile. It reads every encoding the VTK
// library writes: format ascii, binary (base64) and appended (raw or
// base64), uncompressed or zlib-compressed (vtkZLibDataCompressor),
// header_type UInt32 or UInt64, either byte order, one piece. A file
// that is not whole is an error saying where it ends and what is missing:
// every array it declares must be there, read or not, and the XML must
// close (see checkWhole).
func ReadVTU(data []byte, name string) (*mesh.Mesh, error) {
	g, err := parseVTU(data, name)
	if err != nil {
		return nil, err
	}
	return g.toMesh()
}

// parseVTU reads the grid of an XML UnstructuredGrid file.
func parseVTU(data []byte, name string) (*grid, error) {
	g, nc, err := readPiece(data, name, "UnstructuredGrid", "NumberOfCells", "Cells", "connectivity", "offsets", "types")
	if err != nil {
		return nil, err
	}
	if len(g.types) != nc {
		return nil, fmt.Errorf("%s: Cells/types has %d values for NumberOfCells=%d", name, len(g.types), nc)
	}
	return g, nil
}

// readPiece reads the one piece of an XML file of the given dataset type
// into a grid: its points, the integer arrays named in want of its cell
// element (connectivity, offsets and, for unstructured grids, types), and
// the cell-data and field-data arrays that carry boundary tags and their
// names. It returns the grid and the piece's cell count (the attribute
// countAttr).
func readPiece(data []byte, name, dataset, countAttr, cellsElem string, want ...string) (*grid, int, error) {
	x, p, g, err := readHead(data, name, dataset)
	if err != nil {
		return nil, 0, err
	}
	nc, err := x.count(p, countAttr)
	if err != nil {
		return nil, 0, err
	}
	cells := p.child(cellsElem)
	if cells == nil {
		return nil, 0, fmt.Errorf("%s: Piece has no %s element", name, cellsElem)
	}
	arrays, err := x.cellArrays(cells, want)
	if err != nil {
		return nil, 0, err
	}
	g.conn, g.offsets = arrays["connectivity"], arrays["offsets"]
	if slices.Contains(want, "types") {
		g.types = arrays["types"]
	}
	return g, nc, nil
}

// readHead reads the one piece of an XML file of the given dataset type
// into a grid with its points, cell-data tag arrays and field-data tag
// names but no cells, and returns the file and the piece for reading them.
func readHead(data []byte, name, dataset string) (*xmlFile, *element, *grid, error) {
	x, ds, p, err := openPiece(data, name, dataset)
	if err != nil {
		return nil, nil, nil, err
	}
	np, err := x.count(p, "NumberOfPoints")
	if err != nil {
		return nil, nil, nil, err
	}
	g := &grid{file: name}
	if g.points, err = x.points(p, np, ""); err != nil {
		return nil, nil, nil, err
	}
	// Of the cell and field data only the boundary tags are used; other
	// arrays (a deck's quality fields, say) are not decoded at all.
	if g.cellData, err = x.readNamed(p.child("CellData"), tagArrayNames); err != nil {
		return nil, nil, nil, err
	}
	if cd := p.child("CellData"); cd != nil {
		for _, a := range cd.arrays() {
			g.cellArrays = append(g.cellArrays, a.attr["Name"])
		}
	}
	if g.fieldData, err = x.readNamed(ds.child("FieldData"), []string{TagNamesArray}); err != nil {
		return nil, nil, nil, err
	}
	return x, p, g, nil
}

// openPiece parses an XML file of the given dataset type and returns it
// with its dataset element and its one Piece.
func openPiece(data []byte, name, dataset string) (*xmlFile, *element, *element, error) {
	x, err := parseXML(data, name)
	if err != nil {
		return nil, nil, nil, err
	}
	if t := x.root.attr["type"]; t != dataset {
		return nil, nil, nil, fmt.Errorf("%s: VTKFile type is %q; cvdeck reads %s files here", name, t, dataset)
	}
	ds := x.root.child(dataset)
	if ds == nil {
		return nil, nil, nil, fmt.Errorf("%s: no %s element", name, dataset)
	}
	var pieces []*element
	for _, c := range ds.children {
		if c.name == "Piece" {
			pieces = append(pieces, c)
		}
	}
	if len(pieces) != 1 {
		return nil, nil, nil, fmt.Errorf("%s: %d pieces; cvdeck reads single-piece files", name, len(pieces))
	}
	return x, ds, pieces[0], nil
}

// points decodes the Points of piece p, which must hold np points of 3
// components; why, if not "", says where np comes from, for the error.
func (x *xmlFile) points(p *element, np int, why string) ([]float64, error) {
	pts := p.child("Points")
	if pts == nil || len(pts.arrays()) != 1 {
		return nil, fmt.Errorf("%s: Piece needs a Points element with one DataArray", x.name)
	}
	pa, err := x.read(pts.arrays()[0], "Points")
	if err != nil {
		return nil, err
	}
	if pa.strs != nil {
		return nil, fmt.Errorf("%s: Points is a String array; it must be numeric", x.name)
	}
	if pa.comps != 3 || pa.length() != 3*np {
		return nil, fmt.Errorf("%s: Points has %d values in %d components; want 3 components for %d points%s", x.name, pa.length(), pa.comps, np, why)
	}
	return pa.asFloats(), nil
}

// cellArrays decodes the integer DataArrays named in want of the cell
// element cells (Cells, or Lines, Polys and so on), by name.
func (x *xmlFile) cellArrays(cells *element, want []string) (map[string][]int64, error) {
	out := make(map[string][]int64, len(want))
	for _, w := range want {
		var el *element
		for _, a := range cells.arrays() {
			if a.attr["Name"] == w {
				el = a
			}
		}
		if el == nil {
			return nil, fmt.Errorf("%s: %s has no %q DataArray", x.name, cells.name, w)
		}
		a, err := x.read(el, cells.name+"/"+w)
		if err != nil {
			return nil, err
		}
		if a.ints == nil {
			return nil, fmt.Errorf("%s: %s/%s is of type %s; it must be an integer array", x.name, cells.name, w, el.attr["type"])
		}
		out[w] = a.ints
	}
	return out, nil
}

// readNamed decodes the DataArrays of el (which may be nil) whose Name is
// one of names.
func (x *xmlFile) readNamed(el *element, names []string) ([]*array, error) {
	if el == nil {
		return nil, nil
	}
	var out []*array
	for _, a := range el.arrays() {
		if !slices.Contains(names, a.attr["Name"]) {
			continue
		}
		v, err := x.read(a, el.name+"/"+a.attr["Name"])
		if err != nil {
			return nil, err
		}
		out = append(out, v)
	}
	return out, nil
}

// element is an XML element of a VTK file's head.
type element struct {
	name     string
	attr     map[string]string
	children []*element
	text     []byte
}

func (e *element) child(name string) *element {
	for _, c := range e.children {
		if c.name == name {
			return c
		}
	}
	return nil
}

// arrays returns the DataArray and Array children.
func (e *element) arrays() []*element {
	var a []*element
	for _, c := range e.children {
		if c.name == "DataArray" || c.name == "Array" {
			a = append(a, c)
		}
	}
	return a
}

// xmlFile is a parsed XML VTK file.
type xmlFile struct {
	name       string
	root       *element
	order      binary.ByteOrder
	headerSize int  // 4 (UInt32) or 8 (UInt64)
	compressed bool // vtkZLibDataCompressor
	appended   []byte
	appendedAt int  // where appended starts in the file
	appended64 bool // the appended block is base64 text
}

// parseXML parses the XML head of a VTK file and checks that the file is
// whole (see checkWhole). A raw appended block is not XML, so the head is
// everything before <AppendedData>, closed by </VTKFile>; the block itself
// starts after the '_' that follows the AppendedData start tag.
func parseXML(data []byte, name string) (*xmlFile, error) {
	x := &xmlFile{name: name, order: binary.LittleEndian, headerSize: 4}
	head, whole := data, true
	if i := bytes.Index(data, []byte("<AppendedData")); i >= 0 {
		gt := bytes.IndexByte(data[i:], '>')
		if gt < 0 {
			return nil, fmt.Errorf("%s: the file ends at byte %d inside the <AppendedData> start tag: the file is cut short", name, len(data))
		}
		tag, err := parseElements(append(append([]byte{}, data[i:i+gt]...), "/>"...), name, false)
		if err != nil {
			return nil, err
		}
		switch enc := tag.attr["encoding"]; enc {
		case "raw":
		case "base64":
			x.appended64 = true
		default:
			return nil, fmt.Errorf("%s: AppendedData encoding %q; want raw or base64", name, enc)
		}
		u := bytes.IndexByte(data[i+gt:], '_')
		if u < 0 {
			if !bytes.Contains(data[i+gt:], []byte("</AppendedData")) {
				return nil, fmt.Errorf("%s: the file ends at byte %d before the '_' that starts the appended data: the file is cut short", name, len(data))
			}
			return nil, fmt.Errorf("%s: AppendedData has no '_' marking the start of its data", name)
		}
		x.appendedAt = i + gt + u + 1
		x.appended = data[x.appendedAt:]
		if x.appended64 {
			// The base64 text ends where the closing tag begins (or where
			// what is left of it begins, in a file cut short): base64 has
			// no '<'.
			if e := bytes.IndexByte(x.appended, '<'); e >= 0 {
				x.appended = x.appended[:e]
			}
			x.appended = bytes.TrimRight(x.appended, " \t\r\n")
		}
		head, whole = append(append([]byte{}, data[:i]...), "</VTKFile>"...), false
	}
	root, err := parseElements(head, name, whole)
	if err != nil {
		return nil, err
	}
	if root.name != "VTKFile" {
		return nil, fmt.Errorf("%s: root element is %q; want VTKFile", name, root.name)
	}
	x.root = root
	switch bo := root.attr["byte_order"]; bo {
	case "", "LittleEndian":
	case "BigEndian":
		x.order = binary.BigEndian
	default:
		return nil, fmt.Errorf("%s: byte_order %q; want LittleEndian or BigEndian", name, bo)
	}
	switch ht := root.attr["header_type"]; ht {
	case "", "UInt32":
	case "UInt64":
		x.headerSize = 8
	default:
		return nil, fmt.Errorf("%s: header_type %q; want UInt32 or UInt64", name, ht)
	}
	switch c := root.attr["compressor"]; c {
	case "":
	case "vtkZLibDataCompressor":
		x.compressed = true
	default:
		return nil, fmt.Errorf("%s: compressor %q is not supported; cvdeck reads uncompressed and vtkZLibDataCompressor data", name, c)
	}
	if err := x.checkWhole(data); err != nil {
		return nil, err
	}
	return x, nil
}

// parseElements parses XML into an element tree and returns the root.
// When data is the whole file (whole), XML text that ends inside an
// element is reported as a file cut short.
func parseElements(data []byte, name string, whole bool) (*element, error) {
	d := xml.NewDecoder(bytes.NewReader(data))
	var stack []*element
	var lines []int // the line each open element starts on
	var root *element
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			var se *xml.SyntaxError
			if whole && errors.As(err, &se) && strings.HasPrefix(se.Msg, "unexpected EOF") {
				where := "before its first element"
				if len(stack) > 0 {
					where = fmt.Sprintf("inside <%s> (line %d)", stack[len(stack)-1].name, lines[len(lines)-1])
				}
				return nil, fmt.Errorf("%s: the file ends at byte %d %s: no closing </VTKFile> tag: the file is cut short", name, len(data), where)
			}
			return nil, fmt.Errorf("%s: XML: %w", name, err)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			e := &element{name: t.Name.Local, attr: map[string]string{}}
			for _, a := range t.Attr {
				e.attr[a.Name.Local] = a.Value
			}
			if len(stack) > 0 {
				p := stack[len(stack)-1]
				p.children = append(p.children, e)
			} else if root == nil {
				root = e
			}
			line, _ := d.InputPos()
			stack, lines = append(stack, e), append(lines, line)
		case xml.EndElement:
			stack, lines = stack[:len(stack)-1], lines[:len(lines)-1]
		case xml.CharData:
			if len(stack) > 0 {
				e := stack[len(stack)-1]
				e.text = append(e.text, t...)
			}
		}
	}
	if root == nil && whole {
		return nil, fmt.Errorf("%s: no XML elements in its %d bytes: the file is empty or cut short", name, len(data))
	}
	if root == nil {
		return nil, fmt.Errorf("%s: no XML elements", name)
	}
	return root, nil
}

// checkWhole checks that the file is complete, so that a file cut short
// is refused even where the cut falls in data the readers do not decode.
// Every DataArray and Array declared anywhere in the file must lie within
// it: an appended array's header and the bytes it declares within the
// appended block, an inline binary array's within its text (ascii arrays
// and inline text are complete when the XML is, which parseElements
// checks). Only the headers are decoded: the data of an array is stepped
// over, not read. After the appended block must come the end tags
// </AppendedData> and </VTKFile> (VTK file-format specification, "XML
// File Formats": the appended data sits inside the AppendedData element
// of the VTKFile root, as the VTK library's XML writers write it).
func (x *xmlFile) checkWhole(data []byte) error {
	var end int64 // where the last appended array's data ends in the block
	var walk func(parent *element) error
	walk = func(parent *element) error {
		for _, e := range parent.children {
			if e.name != "DataArray" && e.name != "Array" {
				if err := walk(e); err != nil {
					return err
				}
				continue
			}
			where := parent.name
			if n := e.attr["Name"]; n != "" {
				where += "/" + n
			}
			switch e.attr["format"] {
			case "appended":
				at, err := x.appendedEnd(e, where, len(data))
				if err != nil {
					return err
				}
				end = max(end, at)
			case "binary":
				text := bytes.TrimSpace(e.text)
				if bytes.ContainsAny(text, " \t\r\n") {
					text = stripSpace(text)
				}
				if err := x.skipBlob(&base64Source{text: text}); err != nil {
					return fmt.Errorf("%s: array %q (inline binary): its text holds less than its header declares: %w", x.name, where, err)
				}
			}
		}
		return nil
	}
	if err := walk(x.root); err != nil {
		return err
	}
	if x.appended == nil {
		return nil
	}
	return x.checkEndTags(data, x.appendedAt+int(end))
}

// appendedEnd returns where the data of the appended array e (where names
// it) ends in the appended block, stepping over the data after reading
// its header. An array that runs past the block is an error; when the
// block runs to the end of the file (n bytes), the file is cut short.
func (x *xmlFile) appendedEnd(e *element, where string, n int) (int64, error) {
	if x.appended == nil {
		return 0, fmt.Errorf("%s: array %q is appended, but the file has no AppendedData block", x.name, where)
	}
	off, err := strconv.ParseInt(strings.TrimSpace(e.attr["offset"]), 10, 64)
	if err != nil || off < 0 || off > int64(len(x.appended)) {
		if err == nil && off >= 0 && x.appendedAt+len(x.appended) == n {
			return 0, fmt.Errorf("%s: the file ends at byte %d, before the appended data of array %q at offset %d: the file is cut short", x.name, n, where, off)
		}
		return 0, fmt.Errorf("%s: array %q: offset %q is not within the %d-byte appended block", x.name, where, e.attr["offset"], len(x.appended))
	}
	src := x.source(off)
	var short *shortError
	switch err := x.skipBlob(src); {
	case errors.As(err, &short) && x.appendedAt+len(x.appended) == n:
		return 0, fmt.Errorf("%s: the file ends at byte %d inside the appended data of array %q (%s): the file is cut short", x.name, n, where, err)
	case short != nil:
		return 0, fmt.Errorf("%s: array %q: its appended data runs past the end of the appended block at byte %d (%w)", x.name, where, x.appendedAt+len(x.appended), err)
	case err != nil:
		return 0, fmt.Errorf("%s: array %q (appended at offset %d): %w", x.name, where, off, err)
	}
	return int64(len(x.appended) - src.rest()), nil
}

// source returns the byte source of the appended block from offset off.
func (x *xmlFile) source(off int64) byteSource {
	if x.appended64 {
		return &base64Source{text: x.appended[off:]}
	}
	return &rawSource{data: x.appended[off:]}
}

// checkEndTags checks that what follows the appended arrays' data, from
// byte at of the file, closes the file: the end tags </AppendedData> and
// </VTKFile>, with only whitespace before and between them in base64 text
// (a raw block may hold bytes no array refers to before its end tag).
func (x *xmlFile) checkEndTags(data []byte, at int) error {
	tail := data[at:]
	i := bytes.Index(tail, []byte("</AppendedData"))
	if i < 0 {
		return fmt.Errorf("%s: no closing </AppendedData> tag after the appended data, which ends at byte %d of %d: the file is cut short", x.name, at, len(data))
	}
	if x.appended64 && len(bytes.TrimSpace(tail[:i])) > 0 {
		return fmt.Errorf("%s: %d characters after the base64 appended data at byte %d that no array refers to, before </AppendedData>", x.name, len(bytes.TrimSpace(tail[:i])), at)
	}
	rest := bytes.TrimLeft(tail[i+len("</AppendedData"):], " \t\r\n")
	if !bytes.HasPrefix(rest, []byte(">")) {
		return fmt.Errorf("%s: the </AppendedData> end tag at byte %d is not closed with '>': the file is cut short", x.name, at+i)
	}
	rest = bytes.TrimLeft(rest[1:], " \t\r\n")
	if !bytes.HasPrefix(rest, []byte("</VTKFile")) || !bytes.HasPrefix(bytes.TrimLeft(rest[len("</VTKFile"):], " \t\r\n"), []byte(">")) {
		return fmt.Errorf("%s: no closing </VTKFile> tag after </AppendedData>: the file is cut short", x.name)
	}
	return nil
}

// stripSpace returns text without its spaces, tabs and line ends.
func stripSpace(text []byte) []byte {
	return bytes.Map(func(r rune) rune {
		if r == ' ' || r == '\n' || r == '\r' || r == '\t' {
			return -1
		}
		return r
	}, text)
}

// count reads a non-negative integer attribute.
func (x *xmlFile) count(e *element, attr string) (int, error) {
	v, err := strconv.Atoi(strings.TrimSpace(e.attr[attr]))
	if err != nil || v < 0 {
		return 0, fmt.Errorf("%s: %s %s=%q is not a non-negative integer", x.name, e.name, attr, e.attr[attr])
	}
	return v, nil
}

// typeSize gives the byte size of each numeric VTK XML type.
var typeSize = map[string]int{
	"Int8": 1, "UInt8": 1, "Int16": 2, "UInt16": 2, "Int32": 4, "UInt32": 4,
	"Int64": 8, "UInt64": 8, "Float32": 4, "Float64": 8,
}

// read decodes the data of a DataArray or Array element; where names it
// in errors.
func (x *xmlFile) read(e *element, where string) (*array, error) {
	a := &array{name: e.attr["Name"], comps: 1}
	if s := e.attr["NumberOfComponents"]; s != "" {
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 {
			return nil, fmt.Errorf("%s: array %s: NumberOfComponents=%q is not a positive integer", x.name, where, s)
		}
		a.comps = n
	}
	typ := e.attr["type"]
	size, numeric := typeSize[typ]
	if !numeric && typ != "String" {
		return nil, fmt.Errorf("%s: array %s: type %q is not supported; want one of Int8..UInt64, Float32, Float64, String", x.name, where, typ)
	}
	fail := func(err error) (*array, error) {
		return nil, fmt.Errorf("%s: array %s (%s, format %s): %w", x.name, where, typ, e.attr["format"], err)
	}
	var raw []byte
	switch f := e.attr["format"]; f {
	case "ascii":
		if typ == "String" {
			s, err := asciiStrings(e.text)
			if err != nil {
				return fail(err)
			}
			a.strs = s
			return a, nil
		}
		if err := a.parseASCII(e.text, typ); err != nil {
			return fail(err)
		}
		return a, nil
	case "binary":
		b, err := x.blob(&base64Source{text: stripSpace(e.text)})
		if err != nil {
			return fail(err)
		}
		raw = b
	case "appended":
		if x.appended == nil {
			return fail(fmt.Errorf("the file has no AppendedData block"))
		}
		off, err := strconv.ParseInt(strings.TrimSpace(e.attr["offset"]), 10, 64)
		if err != nil || off < 0 || off > int64(len(x.appended)) {
			return fail(fmt.Errorf("offset %q is not within the %d-byte appended block", e.attr["offset"], len(x.appended)))
		}
		b, err := x.blob(x.source(off))
		if err != nil {
			return fail(err)
		}
		raw = b
	default:
		return fail(fmt.Errorf("unknown format; want ascii, binary or appended"))
	}
	if typ == "String" {
		a.strs = nulStrings(raw)
		if s := e.attr["NumberOfTuples"]; s != "" && s != strconv.Itoa(len(a.strs)) {
			return fail(fmt.Errorf("%d strings, but NumberOfTuples=%s", len(a.strs), s))
		}
		return a, nil
	}
	if len(raw)%size != 0 {
		return fail(fmt.Errorf("%d bytes is not a whole number of %d-byte values", len(raw), size))
	}
	if err := a.decodeBinary(raw, typ, x.order); err != nil {
		return fail(err)
	}
	return a, nil
}

// byteSource hands out the bytes of one array's data in order.
type byteSource interface {
	// next returns the next n bytes.
	next(n uint64) ([]byte, error)
	// skip steps over the next n bytes without decoding them.
	skip(n uint64) error
	// rest is the length of the input not yet taken.
	rest() int
}

// shortError says that an array's data ends before the bytes it declares.
type shortError struct {
	need, have uint64
	base64     bool // need and have count decoded bytes of base64 text
}

func (e *shortError) Error() string {
	if e.base64 {
		return fmt.Sprintf("base64 data ends %d bytes short", e.need-e.have)
	}
	return fmt.Sprintf("needs %d bytes, %d are there", e.need, e.have)
}

// rawSource reads raw binary bytes.
type rawSource struct{ data []byte }

func (s *rawSource) next(n uint64) ([]byte, error) {
	if n > uint64(len(s.data)) {
		return nil, &shortError{need: n, have: uint64(len(s.data))}
	}
	b := s.data[:n]
	s.data = s.data[n:]
	return b, nil
}

func (s *rawSource) skip(n uint64) error {
	_, err := s.next(n)
	return err
}

func (s *rawSource) rest() int { return len(s.data) }

// base64Source decodes base64 text on demand. The VTK library encodes an
// array's header and its data as separate base64 streams when it
// compresses (each padded with '=' to a multiple of four characters), so
// the text is decoded one stream at a time: up to and including each quad
// that carries padding.
type base64Source struct {
	text    []byte
	pending []byte // decoded bytes not yet handed out
}

func (s *base64Source) next(n uint64) ([]byte, error) {
	for uint64(len(s.pending)) < n {
		if len(s.text) == 0 {
			return nil, &shortError{need: n, have: uint64(len(s.pending)), base64: true}
		}
		need := n - uint64(len(s.pending))
		q := min((need+2)/3*4, uint64(len(s.text))/4*4)
		if q == 0 {
			// Fewer than four characters are left: not one whole quad.
			return nil, &shortError{need: n, have: uint64(len(s.pending)), base64: true}
		}
		if p := bytes.IndexByte(s.text[:q], '='); p >= 0 {
			q = uint64(p/4+1) * 4
		}
		buf := make([]byte, base64.StdEncoding.DecodedLen(int(q)))
		k, err := base64.StdEncoding.Decode(buf, s.text[:q])
		if err != nil {
			return nil, fmt.Errorf("base64: %w", err)
		}
		s.pending = append(s.pending, buf[:k]...)
		s.text = s.text[q:]
	}
	b := s.pending[:n:n]
	s.pending = s.pending[n:]
	return b, nil
}

// skip steps over n decoded bytes as next would take them, counting whole
// quads of text (3 bytes each, fewer in a quad padded with '=') without
// decoding them; only a last quad split by the skip is decoded, by next.
// The characters stepped over are not checked to be base64.
func (s *base64Source) skip(n uint64) error {
	k := min(n, uint64(len(s.pending)))
	s.pending, n = s.pending[k:], n-k
	for n >= 3 && len(s.text) >= 4 {
		q := min(n/3*4, uint64(len(s.text))/4*4)
		got := q / 4 * 3
		if p := bytes.IndexByte(s.text[:q], '='); p >= 0 {
			q = uint64(p/4+1) * 4
			got = q/4*3 - uint64(bytes.Count(s.text[q-2:q], []byte("=")))
		}
		s.text, n = s.text[q:], n-got
	}
	_, err := s.next(n)
	return err
}

func (s *base64Source) rest() int { return len(s.text) }

// uint reads one header integer of the file's header type.
func (x *xmlFile) uint(b []byte) uint64 {
	if x.headerSize == 8 {
		return x.order.Uint64(b)
	}
	return uint64(x.order.Uint32(b))
}

// maxArrayBytes bounds a declared array size before anything is allocated
// for it.
const maxArrayBytes = 1 << 36

// blobHeader is what the header of one array's binary data declares:
// uncompressed, the byte count; compressed, the zlib blocks' compressed
// sizes and the bytes each inflates to.
type blobHeader struct {
	bytes  uint64   // uncompressed: the data's byte count
	zipped []uint64 // compressed: each block's compressed size
	sizes  []uint64 // compressed: each block's inflated size
	stored uint64   // bytes of data after the header: bytes, or the sum of zipped
}

// header reads the header of one array's binary data and checks the sizes
// it declares: uncompressed, a header holding the byte count then the
// bytes; compressed, a header [number of blocks, block size, size of the
// last block, compressed size of each block] then the zlib-compressed
// blocks (VTK file-format document, "Binary data" and
// vtkXMLDataElement/vtkXMLWriter's layout).
func (x *xmlFile) header(src byteSource) (*blobHeader, error) {
	hs := uint64(x.headerSize)
	h, err := src.next(hs)
	if err != nil {
		return nil, fmt.Errorf("header: %w", err)
	}
	if !x.compressed {
		n := x.uint(h)
		if n > maxArrayBytes {
			return nil, fmt.Errorf("header declares %d bytes", n)
		}
		return &blobHeader{bytes: n, stored: n}, nil
	}
	nb := x.uint(h)
	if nb > maxArrayBytes/32768 {
		return nil, fmt.Errorf("header declares %d compressed blocks", nb)
	}
	h, err = src.next((2 + nb) * hs)
	if err != nil {
		return nil, fmt.Errorf("compression header: %w", err)
	}
	bs, last := x.uint(h), x.uint(h[hs:])
	if last == 0 {
		last = bs
	}
	if nb > 0 && (nb-1)*bs+last > maxArrayBytes {
		return nil, fmt.Errorf("compression header declares %d blocks of %d bytes", nb, bs)
	}
	b := &blobHeader{zipped: make([]uint64, nb), sizes: make([]uint64, nb)}
	for k := range b.zipped {
		cs := x.uint(h[(2+uint64(k))*hs:])
		if cs > maxArrayBytes {
			return nil, fmt.Errorf("block %d: compressed size %d", k, cs)
		}
		want := bs
		if uint64(k) == nb-1 {
			want = last
		}
		// zlib cannot expand data more than about 1032 times (RFC
		// 1950/1951: a 258-byte match per 2 bits at best), so a larger
		// declared size is corrupt.
		if want > 1100*cs+64 {
			return nil, fmt.Errorf("block %d: %d bytes declared from %d compressed; zlib cannot expand that much", k, want, cs)
		}
		b.zipped[k], b.sizes[k] = cs, want
		b.bytes += want
		b.stored += cs
	}
	return b, nil
}

// skipBlob steps over one array's binary data, reading only its header:
// it checks that the data declared is there without decoding it.
func (x *xmlFile) skipBlob(src byteSource) error {
	h, err := x.header(src)
	if err != nil {
		return err
	}
	return src.skip(h.stored)
}

// blob reads one array's binary data (see header), inflating compressed
// blocks.
func (x *xmlFile) blob(src byteSource) ([]byte, error) {
	h, err := x.header(src)
	if err != nil {
		return nil, err
	}
	if !x.compressed {
		return src.next(h.bytes)
	}
	// The blocks are found in order, then the output is taken at once and
	// the blocks are inflated side by side: each is a zlib stream of its
	// own. header has checked each block's size against what its
	// compressed bytes can give, and the blocks are all present before
	// anything is allocated, so the allocation is bounded by the data.
	blocks := make([][]byte, len(h.zipped))
	for k, cs := range h.zipped {
		if blocks[k], err = src.next(cs); err != nil {
			return nil, fmt.Errorf("block %d: %w", k, err)
		}
	}
	at := make([]uint64, len(blocks)+1)
	for k, n := range h.sizes {
		at[k+1] = at[k] + n
	}
	out := hugepage.Make[byte](int(h.bytes))
	err = inflateSideBySide(len(blocks), func(k int, zr *zlibReader) error {
		if err := zr.reset(blocks[k]); err != nil {
			return fmt.Errorf("block %d: zlib: %w", k, err)
		}
		if _, err := io.ReadFull(zr.r, out[at[k]:at[k+1]]); err != nil {
			return fmt.Errorf("block %d: zlib: %w (want %d bytes)", k, err, h.sizes[k])
		}
		// The stream must end there: reading on to its end is what checks
		// its Adler-32 checksum (RFC 1950), which catches a corrupt block
		// that still inflates to the declared size.
		var more [1]byte
		switch n, err := io.ReadFull(zr.r, more[:]); {
		case n > 0:
			return fmt.Errorf("block %d: zlib: the stream holds more than the declared %d bytes", k, h.sizes[k])
		case err != io.EOF:
			return fmt.Errorf("block %d: zlib: %w", k, err)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

// decodeBinary converts raw values of the VTK type typ. Each type has a
// loop of its own (a type test per value had made this the slowest part of
// reading a large raw file), and a large array is converted in ranges side
// by side.
func (a *array) decodeBinary(b []byte, typ string, o binary.ByteOrder) error {
	n := len(b) / typeSize[typ]
	switch typ {
	case "Float32", "Float64":
		f := hugepage.Make[float64](n)
		a.floats = f
		inRanges(n, func(_, lo, hi int) {
			if typ == "Float32" {
				for i := lo; i < hi; i++ {
					f[i] = float64(math.Float32frombits(o.Uint32(b[4*i:])))
				}
				return
			}
			for i := lo; i < hi; i++ {
				f[i] = math.Float64frombits(o.Uint64(b[8*i:]))
			}
		})
		return nil
	}
	v := hugepage.Make[int64](n)
	a.ints = v
	return firstRangeError(n, func(lo, hi int) error {
		switch typ {
		case "Int8":
			for i := lo; i < hi; i++ {
				v[i] = int64(int8(b[i]))
			}
		case "UInt8":
			for i := lo; i < hi; i++ {
				v[i] = int64(b[i])
			}
		case "Int16":
			for i := lo; i < hi; i++ {
				v[i] = int64(int16(o.Uint16(b[2*i:])))
			}
		case "UInt16":
			for i := lo; i < hi; i++ {
				v[i] = int64(o.Uint16(b[2*i:]))
			}
		case "Int32":
			for i := lo; i < hi; i++ {
				v[i] = int64(int32(o.Uint32(b[4*i:])))
			}
		case "UInt32":
			for i := lo; i < hi; i++ {
				v[i] = int64(o.Uint32(b[4*i:]))
			}
		case "Int64":
			for i := lo; i < hi; i++ {
				v[i] = int64(o.Uint64(b[8*i:]))
			}
		case "UInt64":
			for i := lo; i < hi; i++ {
				if v[i] = int64(o.Uint64(b[8*i:])); v[i] < 0 {
					return fmt.Errorf("value %d (%d) is too large", i, o.Uint64(b[8*i:]))
				}
			}
		}
		return nil
	})
}

// parseASCII parses whitespace-separated numbers of the VTK type typ.
func (a *array) parseASCII(text []byte, typ string) error {
	words := strings.Fields(string(text))
	float := typ == "Float32" || typ == "Float64"
	if float {
		a.floats = make([]float64, len(words))
	} else {
		a.ints = make([]int64, len(words))
	}
	for i, w := range words {
		var err error
		if float {
			a.floats[i], err = strconv.ParseFloat(w, 64)
		} else {
			a.ints[i], err = strconv.ParseInt(w, 10, 64)
		}
		if err != nil {
			return fmt.Errorf("value %d %q: %w", i, w, err)
		}
	}
	return nil
}

// asciiStrings parses a String array in ascii format: the character codes
// of each string followed by 0, as the VTK XML writer writes them.
func asciiStrings(text []byte) ([]string, error) {
	var b []byte
	for i, w := range strings.Fields(string(text)) {
		c, err := strconv.ParseUint(w, 10, 8)
		if err != nil {
			return nil, fmt.Errorf("character %d %q: %w", i, w, err)
		}
		b = append(b, byte(c))
	}
	return nulStrings(b), nil
}

// nulStrings splits NUL-terminated strings.
func nulStrings(b []byte) []string {
	s := []string{}
	for len(b) > 0 {
		i := bytes.IndexByte(b, 0)
		if i < 0 {
			i = len(b)
		}
		s = append(s, string(b[:i]))
		b = b[min(i+1, len(b)):]
	}
	return s
}
