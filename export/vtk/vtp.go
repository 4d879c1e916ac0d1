package vtk

import (
	"fmt"
	"io"
	"strings"

	"cvdeck/mesh"
)

// Names of the boundary file's arrays.
const (
	// TagArray holds each line's index into TagNamesArray, -1 for an
	// untagged face.
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
// TagNamesArray (m.Tags) and ConditionNamesArray.
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

	d := newAppendedDoc("PolyData")
	d.line(1, "<PolyData>")
	d.line(2, "<FieldData>")
	d.array(3, stringArray(TagNamesArray, m.Tags))
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
			e.i32(int32(m.FaceTag[f]))
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
