package vtk

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"cvdeck/mesh"
)

// ReadLegacy builds a mesh from the bytes of a legacy .vtk
// UNSTRUCTURED_GRID or POLYDATA file (name is used in errors); see ReadFile
// and, for the cells of a POLYDATA, ReadVTP. It reads ASCII and binary
// (big-endian) files in both cell layouts: version ≤ 4.2 (CELLS, or
// VERTICES, LINES and POLYGONS, as count-prefixed lists) and 5.1 (OFFSETS
// and CONNECTIVITY, the VTK library's default since VTK 9), with CELL_DATA
// as SCALARS or FIELD arrays ("Simple Legacy Formats", VTK file-format
// document).
func ReadLegacy(data []byte, name string) (*mesh.Mesh, error) {
	r := &legacyReader{data: data, file: name}
	g, err := r.read()
	if err != nil {
		return nil, err
	}
	return g.toMesh()
}

// legacyReader walks a legacy file: keywords and counts are ASCII words;
// in a binary file the data after a keyword line are raw big-endian
// values.
type legacyReader struct {
	data   []byte
	pos    int
	file   string
	binary bool
}

// errorf reports a problem at the current line.
func (r *legacyReader) errorf(format string, a ...any) error {
	line := 1 + bytes.Count(r.data[:min(r.pos, len(r.data))], []byte{'\n'})
	return fmt.Errorf("%s:%d: %s", r.file, line, fmt.Sprintf(format, a...))
}

// line returns the rest of the current line and moves past it.
func (r *legacyReader) line() string {
	i := bytes.IndexByte(r.data[r.pos:], '\n')
	if i < 0 {
		s := string(r.data[r.pos:])
		r.pos = len(r.data)
		return strings.TrimRight(s, "\r")
	}
	s := string(r.data[r.pos : r.pos+i])
	r.pos += i + 1
	return strings.TrimRight(s, "\r")
}

// word returns the next whitespace-separated word, "" at the end.
func (r *legacyReader) word() string {
	return string(r.token())
}

// token is word without the copy: a view of the file's bytes.
func (r *legacyReader) token() []byte {
	for r.pos < len(r.data) && isSpace(r.data[r.pos]) {
		r.pos++
	}
	s := r.pos
	for r.pos < len(r.data) && !isSpace(r.data[r.pos]) {
		r.pos++
	}
	return r.data[s:r.pos]
}

func isSpace(c byte) bool { return c == ' ' || c == '\n' || c == '\r' || c == '\t' }

// count reads a non-negative integer word; what names it in errors.
func (r *legacyReader) count(what string) (int, error) {
	w := r.word()
	n, err := strconv.Atoi(w)
	if err != nil || n < 0 || n > maxArrayBytes {
		return 0, r.errorf("%s: %q is not a valid count", what, w)
	}
	return n, nil
}

// startData moves to the first byte of binary data: past the end of the
// keyword line.
func (r *legacyReader) startData() {
	if r.binary {
		r.line()
	}
}

// legacySize gives the byte size of the legacy data types.
var legacySize = map[string]int{
	"bit": 0, "unsigned_char": 1, "char": 1, "short": 2, "unsigned_short": 2,
	"int": 4, "unsigned_int": 4, "long": 8, "unsigned_long": 8,
	"vtktypeint64": 8, "vtktypeuint64": 8, "vtkIdType": 4, "float": 4, "double": 8,
}

// values reads n values of the legacy type typ; what names them in errors.
func (r *legacyReader) values(n int, typ, what string) (*array, error) {
	a := &array{comps: 1}
	size, ok := legacySize[typ]
	if !ok || size == 0 {
		return nil, r.errorf("%s: data type %q is not supported; want one of char, short, int, long, vtktypeint64, float, double (signed or unsigned)", what, typ)
	}
	float := typ == "float" || typ == "double"
	if !r.binary {
		// Each ASCII value takes at least two bytes (a digit and a
		// separator): refuse a count the file cannot hold before
		// allocating for it.
		if n > (len(r.data)-r.pos+1)/2 {
			return nil, r.errorf("%s: %d values declared, but only %d bytes are left in the file", what, n, len(r.data)-r.pos)
		}
		if float {
			a.floats = make([]float64, n)
		} else {
			a.ints = make([]int64, n)
		}
		for i := 0; i < n; i++ {
			w := r.word()
			if w == "" {
				return nil, r.errorf("%s: the file ends after %d of %d values", what, i, n)
			}
			var err error
			if float {
				a.floats[i], err = strconv.ParseFloat(w, 64)
			} else {
				a.ints[i], err = strconv.ParseInt(w, 10, 64)
			}
			if err != nil {
				return nil, r.errorf("%s: value %d of %d: %q is not a %s", what, i, n, w, typ)
			}
		}
		return a, nil
	}
	r.startData()
	if n*size > len(r.data)-r.pos {
		return nil, r.errorf("%s: %d values of %s need %d bytes, the file has %d left", what, n, typ, n*size, len(r.data)-r.pos)
	}
	b := r.data[r.pos : r.pos+n*size]
	r.pos += n * size
	o := binary.BigEndian
	if float {
		a.floats = make([]float64, n)
		for i := range a.floats {
			if size == 4 {
				a.floats[i] = float64(math.Float32frombits(o.Uint32(b[4*i:])))
			} else {
				a.floats[i] = math.Float64frombits(o.Uint64(b[8*i:]))
			}
		}
		return a, nil
	}
	unsigned := strings.HasPrefix(typ, "unsigned") || typ == "vtktypeuint64"
	a.ints = make([]int64, n)
	for i := range a.ints {
		var v int64
		switch size {
		case 1:
			v = int64(int8(b[i]))
			if unsigned || typ == "char" {
				v = int64(b[i])
			}
		case 2:
			v = int64(int16(o.Uint16(b[2*i:])))
			if unsigned {
				v = int64(o.Uint16(b[2*i:]))
			}
		case 4:
			v = int64(int32(o.Uint32(b[4*i:])))
			if unsigned {
				v = int64(o.Uint32(b[4*i:]))
			}
		case 8:
			v = int64(o.Uint64(b[8*i:]))
			if unsigned && v < 0 {
				return nil, r.errorf("%s: value %d is too large", what, i)
			}
		}
		a.ints[i] = v
	}
	return a, nil
}

// skipValues moves past n values of type typ without converting them, for
// arrays that are not used (any but the boundary tags): in binary past
// their bytes, in ASCII past n words.
func (r *legacyReader) skipValues(n int, typ, what string) error {
	size, ok := legacySize[typ]
	if !ok || size == 0 {
		return r.errorf("%s: data type %q is not supported; want one of char, short, int, long, vtktypeint64, float, double (signed or unsigned)", what, typ)
	}
	if !r.binary {
		for i := 0; i < n; i++ {
			if len(r.token()) == 0 {
				return r.errorf("%s: the file ends after %d of %d values", what, i, n)
			}
		}
		return nil
	}
	r.startData()
	if n*size > len(r.data)-r.pos {
		return r.errorf("%s: %d values of %s need %d bytes, the file has %d left", what, n, typ, n*size, len(r.data)-r.pos)
	}
	r.pos += n * size
	return nil
}

// strings reads n strings: one a line in ASCII (%XX-encoded); in binary,
// each after a length prefix whose top two bits give its size (11: one
// byte, 10: two, 01: four, 00: eight), as vtkDataWriter writes them.
func (r *legacyReader) strings(n int, what string) ([]string, error) {
	if n > len(r.data)-r.pos {
		return nil, r.errorf("%s: %d strings declared, but only %d bytes are left in the file", what, n, len(r.data)-r.pos)
	}
	s := make([]string, n)
	if !r.binary {
		r.line()
		for i := range s {
			if r.pos >= len(r.data) {
				return nil, r.errorf("%s: %d of %d strings", what, i, n)
			}
			s[i] = decodeName(r.line())
		}
		return s, nil
	}
	r.startData()
	for i := range s {
		if r.pos >= len(r.data) {
			return nil, r.errorf("%s: %d of %d strings", what, i, n)
		}
		k := 1 << (3 - r.data[r.pos]>>6) // prefix bytes: 1, 2, 4, 8
		if r.pos+k > len(r.data) {
			return nil, r.errorf("%s: string %d: truncated length", what, i)
		}
		var l uint64
		for _, c := range r.data[r.pos : r.pos+k] {
			l = l<<8 | uint64(c)
		}
		l &^= 3 << (8*k - 2)
		r.pos += k
		if l > uint64(len(r.data)-r.pos) {
			return nil, r.errorf("%s: string %d of length %d runs past the end", what, i, l)
		}
		s[i] = string(r.data[r.pos : r.pos+int(l)])
		r.pos += int(l)
	}
	return s, nil
}

// decodeName undoes the %XX encoding of legacy names and strings.
func decodeName(s string) string {
	if !strings.Contains(s, "%") {
		return s
	}
	var b []byte
	for i := 0; i < len(s); i++ {
		if s[i] == '%' && i+2 < len(s) {
			if v, err := strconv.ParseUint(s[i+1:i+3], 16, 8); err == nil {
				b = append(b, byte(v))
				i += 2
				continue
			}
		}
		b = append(b, s[i])
	}
	return string(b)
}

// skipMetadata skips a METADATA block (version 5.1), which ends at an
// empty line.
func (r *legacyReader) skipMetadata() {
	save := r.pos
	if r.word() != "METADATA" {
		r.pos = save
		return
	}
	r.line()
	for r.pos < len(r.data) {
		if strings.TrimSpace(r.line()) == "" {
			return
		}
	}
}

func (r *legacyReader) read() (*grid, error) {
	g := &grid{file: r.file}
	if h := r.line(); !strings.HasPrefix(h, "# vtk DataFile Version") {
		return nil, r.errorf("first line %q is not a legacy VTK header (# vtk DataFile Version x.y)", h)
	}
	r.line() // title
	switch f := strings.TrimSpace(r.line()); strings.ToUpper(f) {
	case "ASCII":
	case "BINARY":
		r.binary = true
	default:
		return nil, r.errorf("format %q; want ASCII or BINARY", f)
	}
	if w := r.word(); w != "DATASET" {
		return nil, r.errorf("want DATASET, found %q", w)
	}
	poly := false
	switch t := r.word(); t {
	case "UNSTRUCTURED_GRID":
	case "POLYDATA":
		poly = true
	default:
		return nil, r.errorf("dataset type %s; cvdeck reads UNSTRUCTURED_GRID and POLYDATA", t)
	}
	section := "" // "" (geometry), CELL_DATA or POINT_DATA
	nc := -1
	// The cell sections of a POLYDATA file, numbered in this order as the
	// VTK library numbers a PolyData's cells, whatever their order in the
	// file.
	polySections := map[string]*grid{}
	if poly {
		nc = 0
	}
	for {
		kw := r.word()
		if kw == "" {
			break
		}
		var err error
		switch kw {
		case "POINTS":
			var n int
			if n, err = r.count("POINTS"); err != nil {
				return nil, err
			}
			var a *array
			if a, err = r.values(3*n, r.word(), "POINTS"); err != nil {
				return nil, err
			}
			g.points = a.asFloats()
			r.skipMetadata()
		case "CELLS":
			if poly {
				return nil, r.errorf("CELLS in a POLYDATA file; its cells are VERTICES, LINES, POLYGONS and TRIANGLE_STRIPS")
			}
			err = r.cells(g, kw)
		case "VERTICES", "LINES", "POLYGONS", "TRIANGLE_STRIPS":
			if !poly {
				return nil, r.errorf("%s in an UNSTRUCTURED_GRID file; its cells are CELLS and CELL_TYPES", kw)
			}
			if kw == "TRIANGLE_STRIPS" {
				return nil, r.errorf("TRIANGLE_STRIPS; cvdeck reads polygons (triangles, quads, polygons), so split the strips into triangles first")
			}
			if polySections[kw] != nil {
				return nil, r.errorf("a second %s section", kw)
			}
			sec := &grid{}
			if err = r.cells(sec, kw); err == nil {
				polySections[kw] = sec
				nc += len(sec.offsets)
			}
		case "CELL_TYPES":
			var n int
			if n, err = r.count("CELL_TYPES"); err != nil {
				return nil, err
			}
			var a *array
			if a, err = r.values(n, "int", "CELL_TYPES"); err != nil {
				return nil, err
			}
			g.types = a.ints
			nc = n
		case "CELL_DATA", "POINT_DATA":
			var n int
			if n, err = r.count(kw); err != nil {
				return nil, err
			}
			if kw == "CELL_DATA" && n != nc {
				return nil, r.errorf("CELL_DATA %d for %d cells", n, nc)
			}
			section = kw
			err = r.attributes(g, section, n)
		case "FIELD":
			// A FIELD before any CELL_DATA/POINT_DATA is dataset field data.
			var arrays []*array
			keep := func(name string) bool { return section == "" && name == TagNamesArray }
			if arrays, err = r.field(keep); err == nil {
				g.fieldData = append(g.fieldData, arrays...)
			}
		case "METADATA":
			r.pos -= len(kw)
			r.skipMetadata()
		default:
			return nil, r.errorf("unexpected keyword %q", kw)
		}
		if err != nil {
			return nil, err
		}
	}
	if poly {
		for _, kw := range []string{"VERTICES", "LINES", "POLYGONS"} {
			sec := polySections[kw]
			if sec == nil {
				continue
			}
			elem := map[string]string{"VERTICES": "Verts", "LINES": "Lines", "POLYGONS": "Polys"}[kw]
			if err := g.appendPolySection(elem, kw, sec.conn, sec.offsets); err != nil {
				return nil, err
			}
		}
	}
	if g.types == nil && !poly {
		return nil, r.errorf("no CELL_TYPES section")
	}
	return g, nil
}

// cells reads a CELLS section (or, in POLYDATA, the section named kw) in
// either layout.
func (r *legacyReader) cells(g *grid, kw string) error {
	n, err := r.count(kw)
	if err != nil {
		return err
	}
	size, err := r.count(kw)
	if err != nil {
		return err
	}
	save := r.pos
	if r.word() == "OFFSETS" {
		// Version 5.1: n offsets (starting with 0), then size node ids.
		off, err := r.values(n, r.word(), "OFFSETS")
		if err != nil {
			return err
		}
		r.skipMetadata()
		if w := r.word(); w != "CONNECTIVITY" {
			return r.errorf("want CONNECTIVITY after OFFSETS, found %q", w)
		}
		conn, err := r.values(size, r.word(), "CONNECTIVITY")
		if err != nil {
			return err
		}
		r.skipMetadata()
		if n < 1 || off.ints[0] != 0 {
			return r.errorf("OFFSETS must start with 0")
		}
		g.offsets, g.conn = off.ints[1:], conn.ints
		return nil
	}
	r.pos = save
	a, err := r.values(size, "int", kw)
	if err != nil {
		return err
	}
	g.offsets = make([]int64, 0, n)
	g.conn = make([]int64, 0, max(size-n, 0))
	for i, c := 0, 0; c < n; c++ {
		if i >= len(a.ints) || a.ints[i] < 0 || int64(i)+1+a.ints[i] > int64(len(a.ints)) {
			return r.errorf("%s: cell %d's node count at entry %d runs past the %d entries", kw, c, i, size)
		}
		k := int(a.ints[i])
		g.conn = append(g.conn, a.ints[i+1:i+1+k]...)
		g.offsets = append(g.offsets, int64(len(g.conn)))
		i += 1 + k
	}
	return nil
}

// attributes reads the arrays of a CELL_DATA or POINT_DATA section of n
// tuples until the next section keyword. Only cell arrays that can carry
// boundary tags (tagArrayNames) are decoded and kept; the others are
// skipped.
func (r *legacyReader) attributes(g *grid, section string, n int) error {
	keep := func(name string) bool {
		if section != "CELL_DATA" {
			return false
		}
		g.cellArrays = append(g.cellArrays, name)
		return slices.Contains(tagArrayNames, name)
	}
	for {
		save := r.pos
		kw := r.word()
		var a *array
		var err error
		switch kw {
		case "SCALARS":
			name := decodeName(r.word())
			typ := r.word()
			comps := 1
			// The component count is optional and on the same line.
			if rest := strings.Fields(r.peekLine()); len(rest) > 0 {
				if comps, err = strconv.Atoi(rest[0]); err != nil || comps < 1 {
					return r.errorf("SCALARS %s: component count %q", name, rest[0])
				}
				r.word()
			}
			save2 := r.pos
			if r.word() == "LOOKUP_TABLE" {
				r.word()
			} else {
				r.pos = save2
			}
			if !keep(name) {
				err = r.skipValues(n*comps, typ, "SCALARS "+name)
			} else if a, err = r.values(n*comps, typ, "SCALARS "+name); err == nil {
				a.name, a.comps = name, comps
			}
		case "VECTORS", "NORMALS", "TENSORS":
			name := decodeName(r.word())
			k := map[string]int{"VECTORS": 3, "NORMALS": 3, "TENSORS": 9}[kw]
			err = r.skipValues(n*k, r.word(), kw+" "+name)
		case "TEXTURE_COORDINATES":
			name := decodeName(r.word())
			var k int
			if k, err = r.count(kw); err == nil {
				err = r.skipValues(n*k, r.word(), kw+" "+name)
			}
		case "GLOBAL_IDS", "PEDIGREE_IDS":
			name := decodeName(r.word())
			err = r.skipValues(n, r.word(), kw+" "+name)
		case "FIELD":
			var arrays []*array
			if arrays, err = r.field(keep); err == nil {
				g.cellData = append(g.cellData, arrays...)
			}
		case "METADATA":
			r.pos = save
			r.skipMetadata()
			continue
		default:
			r.pos = save
			return nil
		}
		if err != nil {
			return err
		}
		r.skipMetadata()
		if a != nil {
			g.cellData = append(g.cellData, a)
		}
	}
}

// peekLine returns the rest of the current line without moving.
func (r *legacyReader) peekLine() string {
	i := bytes.IndexByte(r.data[r.pos:], '\n')
	if i < 0 {
		return string(r.data[r.pos:])
	}
	return string(r.data[r.pos : r.pos+i])
}

// field reads a FIELD block: "FIELD name k", then k arrays, each
// "name components tuples type" and its values. It returns the arrays keep
// accepts by name; the numeric values of the others are skipped.
func (r *legacyReader) field(keep func(name string) bool) ([]*array, error) {
	r.word() // the field's name
	k, err := r.count("FIELD")
	if err != nil {
		return nil, err
	}
	var out []*array
	for i := 0; i < k; i++ {
		name := decodeName(r.word())
		comps, err := r.count("FIELD array " + name + " components")
		if err != nil {
			return nil, err
		}
		tuples, err := r.count("FIELD array " + name + " tuples")
		if err != nil {
			return nil, err
		}
		typ := r.word()
		a := &array{name: name, comps: comps}
		switch {
		case typ == "string":
			if a.strs, err = r.strings(comps*tuples, "FIELD array "+name); err != nil {
				return nil, err
			}
		case !keep(name):
			if err := r.skipValues(comps*tuples, typ, "FIELD array "+name); err != nil {
				return nil, err
			}
		default:
			var v *array
			if v, err = r.values(comps*tuples, typ, "FIELD array "+name); err != nil {
				return nil, err
			}
			a.ints, a.floats = v.ints, v.floats
		}
		r.skipMetadata()
		if keep(name) {
			out = append(out, a)
		}
	}
	return out, nil
}
