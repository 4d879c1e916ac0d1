package vtk

import (
	"bytes"
	"strings"
	"testing"
)

func TestBoundaryVTPReadByVTK(t *testing.T) {
	m := mixedMesh(t, 6, 5, -40)
	conds := []string{"wall", "outflow", "wall"} // per tag; west is untagged
	p := writeTemp(t, "boundary.vtp", func(b *bytes.Buffer) error { return WriteBoundaryVTP(b, m, conds) })
	var got readBack
	runPython(t, readBackScript, &got, p)
	nb := m.NumBoundary()
	if got.Cells != nb {
		t.Fatalf("VTK read %d lines, want %d boundary faces", got.Cells, nb)
	}
	// Every boundary node once: on this grid, the perimeter's node count
	// equals its face count (a closed loop).
	if got.Points != nb {
		t.Fatalf("VTK read %d points, want %d boundary nodes", got.Points, nb)
	}
	if g := got.FieldStrings[TagNamesArray]; strings.Join(g, "|") != strings.Join(m.Tags, "|") {
		t.Fatalf("tag names %q, want %q", g, m.Tags)
	}
	if g := got.FieldStrings[ConditionNamesArray]; strings.Join(g, "|") != "wall|outflow" {
		t.Fatalf("condition names %q, want wall, outflow", g)
	}
	tag, cond, face := got.floats(t, TagArray), got.floats(t, ConditionArray), got.floats(t, FaceArray)
	wantCond := map[int16]float64{-1: -1, 0: 0, 1: 1, 2: 0}
	for k := 0; k < nb; k++ {
		f := m.NumInterior + k
		if got.Types[k] != cellLine {
			t.Fatalf("line %d has VTK type %d, want VTK_LINE 3", k, got.Types[k])
		}
		if int(face[k]) != f || int16(tag[k]) != m.FaceTag[f] || cond[k] != wantCond[m.FaceTag[f]] {
			t.Fatalf("line %d: face %v tag %v condition %v; want %d, %d, %v", k, face[k], tag[k], cond[k], f, m.FaceTag[f], wantCond[m.FaceTag[f]])
		}
		for e, v := range m.FaceNodes[f] {
			q := got.Conn[k][e]
			if got.XYZ[3*q] != m.Nodes[v][0] || got.XYZ[3*q+1] != m.Nodes[v][1] {
				t.Fatalf("line %d end %d at %v, want node %d at %v", k, e, got.XYZ[3*q:3*q+2], v, m.Nodes[v])
			}
		}
		if e := relErr(got.SizeLength[k], m.Geo.FaceLength[f]); e > 1e-12 {
			t.Fatalf("line %d: vtkCellSizeFilter length %v, ours %v", k, got.SizeLength[k], m.Geo.FaceLength[f])
		}
	}
}

func TestBoundaryVTPErrors(t *testing.T) {
	m := mixedMesh(t, 3, 3, 0)
	if err := WriteBoundaryVTP(&bytes.Buffer{}, m, []string{"wall"}); err == nil || !strings.Contains(err.Error(), "1 boundary conditions for 3 tags") {
		t.Fatalf("got %v", err)
	}
	// Without conditions there is no condition array.
	var b bytes.Buffer
	if err := WriteBoundaryVTP(&b, m, nil); err != nil {
		t.Fatal(err)
	}
	if bytes.Contains(b.Bytes(), []byte(`Name="`+ConditionArray+`"`)) {
		t.Fatal("condition array written without conditions")
	}
}

// TestBoundaryVTPRoundTrip reads back what WriteBoundaryVTP writes: every
// boundary face as a line with its end points and tag, in face order.
func TestBoundaryVTPRoundTrip(t *testing.T) {
	m := mixedMesh(t, 6, 5, -40) // west untagged: read back as ""
	var buf bytes.Buffer
	if err := WriteBoundaryVTP(&buf, m, nil); err != nil {
		t.Fatal(err)
	}
	lines, err := ReadBoundaryVTP(buf.Bytes(), "boundary.vtp")
	if err != nil {
		t.Fatal(err)
	}
	if len(lines) != m.NumBoundary() {
		t.Fatalf("%d lines for %d boundary faces", len(lines), m.NumBoundary())
	}
	for k, l := range lines {
		f := m.NumInterior + k
		want := ""
		if tg := m.FaceTag[f]; tg >= 0 {
			want = m.Tags[tg]
		}
		if l.A != m.Nodes[m.FaceNodes[f][0]] || l.B != m.Nodes[m.FaceNodes[f][1]] || l.Tag != want {
			t.Fatalf("line %d = %+v, want face %d of tag %q", k, l, f, want)
		}
	}
	if _, err := ReadBoundaryVTP([]byte("<VTKFile type=\"UnstructuredGrid\"></VTKFile>"), "x.vtp"); err == nil {
		t.Fatal("an UnstructuredGrid file was read as boundary polydata")
	}
}

// Tags that are numbers (as a file that numbers its boundaries names them)
// are written as those numbers, without a tag_names array, so that the
// VTK library's reader sees each line's own number (untagged lines −1);
// ReadBoundaryVTP gives the same names back. A list with any other name
// keeps the index form.
func TestBoundaryVTPNumericTags(t *testing.T) {
	m := mixedMesh(t, 6, 5, -40) // west untagged
	m.Tags = []string{"10", "2", "7"}
	p := writeTemp(t, "boundary.vtp", func(b *bytes.Buffer) error { return WriteBoundaryVTP(b, m, nil) })
	var got readBack
	runPython(t, readBackScript, &got, p)
	if _, ok := got.FieldStrings[TagNamesArray]; ok {
		t.Fatalf("numeric tags written with %s %v", TagNamesArray, got.FieldStrings[TagNamesArray])
	}
	tag := got.floats(t, TagArray)
	number := map[int16]float64{-1: -1, 0: 10, 1: 2, 2: 7}
	for k := range tag {
		if f := m.NumInterior + k; tag[k] != number[m.FaceTag[f]] {
			t.Fatalf("line %d: VTK read tag %v, want %v", k, tag[k], number[m.FaceTag[f]])
		}
	}
	var buf bytes.Buffer
	if err := WriteBoundaryVTP(&buf, m, nil); err != nil {
		t.Fatal(err)
	}
	lines, err := ReadBoundaryVTP(buf.Bytes(), "boundary.vtp")
	if err != nil {
		t.Fatal(err)
	}
	for k, l := range lines {
		want := ""
		if tg := m.FaceTag[m.NumInterior+k]; tg >= 0 {
			want = m.Tags[tg]
		}
		if l.Tag != want {
			t.Fatalf("line %d read back as tag %q, want %q", k, l.Tag, want)
		}
	}
	for _, tags := range [][]string{{"10", "02", "7"}, {"10", "-2", "7"}, {"10", "wall", "7"}} {
		if _, ok := numericTags(tags); ok {
			t.Errorf("tags %q taken as numbers", tags)
		}
	}
}
