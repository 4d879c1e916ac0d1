package vtk

import (
	"bytes"
	"testing"
)

func TestLegacyReadByVTK(t *testing.T) {
	m := mixedMesh(t, 8, 7, 1e3)
	fields := []Field{squareField(m.NumCells()), {Name: "50%", Values: m.Geo.CellArea}}
	for _, binary := range []bool{false, true} {
		p := writeTemp(t, "mesh.vtk", func(b *bytes.Buffer) error { return WriteLegacy(b, m, fields, binary) })
		var got readBack
		runPython(t, readBackScript, &got, p)
		checkUnstructured(t, got, m, fields)
	}
}

func TestLegacyName(t *testing.T) {
	// The VTK library's legacy writer encodes these bytes as %XX
	// (vtkDataWriter, observed in its output: "index%20squared").
	if g := legacyName("index squared 50%\t"); g != "index%20squared%2050%25%09" {
		t.Fatalf("got %q", g)
	}
}
