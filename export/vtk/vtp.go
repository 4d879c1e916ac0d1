package vtk

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"cvdeck/mesh"
)

// Names of the boundary file's arrays.
const (
	// TagArray holds each line's index into TagNamesArray, -1 for an
	// untagged face; or, when every tag name is a whole number written
	// plainly (numericTags), that number itself, with no TagNamesArray.
	TagArray = "tag"
	// ConditionArray holds each line's index into ConditionNamesArray, -1
	// where no condition is given.
	ConditionArray = "condition"
	// FaceArray holds each line's face index in the mesh.
	FaceArray = "face"
	// TagNamesArray and ConditionNamesArray are String arrays in FieldData.
	TagNamesArray       = "tag_names"
	ConditionNamesArray = "condition_names"
)

// WriteBoundaryVTP writes the boundary faces of m as XML PolyData (.vtp):
// one line cell per boundary face, in face order, over the boundary nodes
// only (numbered in order of first use). Cell data: TagArray, FaceArray and,
// when conditions is not nil, ConditionArray (Int32); FieldData:
// TagNamesArray (m.Tags) and ConditionNamesArray. When every tag is a
// number (a mesh from a file that numbered its boundaries), TagArray holds
// the numbers themselves and TagNamesArray is left out, so that a viewer
// colours the faces by the file's own numbers; the readers give such a
// number back as the tag name, so either form reads back the same.
//
// conditions, if not nil, gives the boundary condition of each tag, indexed
// like m.Tags ("" for none); its distinct names, in order of first use, make
// ConditionNamesArray. The data layout is that of WriteVTU.
func WriteBoundaryVTP(w io.Writer, m *mesh.Mesh, conditions []string) error {
	if err := checkArrays(m); err != nil {
		return err
	}
	if conditions != nil && len(conditions) != len(m.Tags) {
		return fmt.Errorf("vtk: %d boundary conditions for %d tags; give one per tag (\"\" for none)", len(conditions), len(m.Tags))
	}
	for t, name := range m.Tags {
		if strings.ContainsRune(name, 0) {
			return fmt.Errorf("vtk: tag %d name %q contains a NUL byte", t, name)
		}
	}
	condIndex, condNames := indexNames(conditions)
	for _, name := range condNames {
		if strings.ContainsRune(name, 0) {
			return fmt.Errorf("vtk: condition name %q contains a NUL byte", name)
		}
	}

	lo, nf := m.NumInterior, m.NumFaces()
	nb := nf - lo
	local := make([]int32, len(m.Nodes))
	for i := range local {
		local[i] = -1
	}
	var sel []int32
	conn := make([]int32, 0, 2*nb)
	for f := lo; f < nf; f++ {
		for _, v := range m.FaceNodes[f] {
			if local[v] < 0 {
				local[v] = int32(len(sel))
				sel = append(sel, v)
			}
			conn = append(conn, local[v])
		}
	}

	tagValue := func(t int16) int32 { return int32(t) }
	numbers, numeric := numericTags(m.Tags)
	if numeric {
		tagValue = func(t int16) int32 {
			if t < 0 {
				return -1
			}
			return numbers[t]
		}
	}
	d := newAppendedDoc("PolyData")
	d.line(1, "<PolyData>")
	d.line(2, "<FieldData>")
	if !numeric {
		d.array(3, stringArray(TagNamesArray, m.Tags))
	}
	if conditions != nil {
		d.array(3, stringArray(ConditionNamesArray, condNames))
	}
	d.line(2, "</FieldData>")
	d.line(2, fmt.Sprintf("<Piece NumberOfPoints=\"%d\" NumberOfVerts=\"0\" NumberOfLines=\"%d\" NumberOfStrips=\"0\" NumberOfPolys=\"0\">", len(sel), nb))
	d.line(3, "<Points>")
	d.array(4, pointsArray(m.Nodes, sel))
	d.line(3, "</Points>")
	d.line(3, "<Lines>")
	d.array(4, int32Array("connectivity", conn))
	d.array(4, dataArray{name: "offsets", typ: "Int32", nbytes: 4 * int64(nb), write: func(e *encoder) {
		for k := 1; k <= nb; k++ {
			e.i32(int32(2 * k))
		}
	}})
	d.line(3, "</Lines>")
	d.line(3, fmt.Sprintf("<CellData Scalars=\"%s\">", TagArray))
	d.array(4, dataArray{name: TagArray, typ: "Int32", nbytes: 4 * int64(nb), write: func(e *encoder) {
		for f := lo; f < nf; f++ {
			e.i32(tagValue(m.FaceTag[f]))
		}
	}})
	if conditions != nil {
		d.array(4, dataArray{name: ConditionArray, typ: "Int32", nbytes: 4 * int64(nb), write: func(e *encoder) {
			for f := lo; f < nf; f++ {
				c := int32(-1)
				if t := m.FaceTag[f]; t >= 0 {
					c = condIndex[t]
				}
				e.i32(c)
			}
		}})
	}
	d.array(4, dataArray{name: FaceArray, typ: "Int32", nbytes: 4 * int64(nb), write: func(e *encoder) {
		for f := lo; f < nf; f++ {
			e.i32(int32(f))
		}
	}})
	d.line(3, "</CellData>")
	d.line(2, "</Piece>")
	d.line(1, "</PolyData>")
	if err := d.write(w); err != nil {
		return fmt.Errorf("vtk: write vtp: %w", err)
	}
	return nil
}

// indexNames maps each entry of names to the index of its value among the
// distinct non-empty values in order of first use (-1 for ""), and returns
// those values.
func indexNames(names []string) ([]int32, []string) {
	idx := make([]int32, len(names))
	var distinct []string
	pos := map[string]int32{}
	for i, n := range names {
		if n == "" {
			idx[i] = -1
			continue
		}
		k, ok := pos[n]
		if !ok {
			k = int32(len(distinct))
			pos[n] = k
			distinct = append(distinct, n)
		}
		idx[i] = k
	}
	return idx, distinct
}

// numericTags returns the tags as numbers when every one is a whole number
// from 0 to 2³¹−1 in plain decimal (strconv.Itoa gives it back: no sign,
// no leading zero), as files that number their boundaries name them; a
// tag list holding any other name, or none, is not numeric.
func numericTags(tags []string) ([]int32, bool) {
	if len(tags) == 0 {
		return nil, false
	}
	out := make([]int32, len(tags))
	for i, name := range tags {
		n, err := strconv.ParseInt(name, 10, 32)
		if err != nil || n < 0 || strconv.FormatInt(n, 10) != name {
			return nil, false
		}
		out[i] = int32(n)
	}
	return out, true
}
