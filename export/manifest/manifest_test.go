package manifest

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/bc"
)

func sample() *Manifest {
	return &Manifest{
		Schema: Schema, Caution: Caution, Cvdeck: "test",
		Case:      Case{Name: "duct", File: "duct.yaml", Units: "mm", Refine: 2},
		InputHash: "abc",
		Mesh:      Mesh{Kind: "structured", Nodes: 9, Cells: 4, CellShapes: map[string]int{"quadrilateral": 4, "triangle": 0}, Area: Quantity{1.5, "m^2"}},
		Tags:      []Tag{{Tag: "wall", FirstFace: 4, Faces: 8}},
		Advice:    bc.Entries{{Key: "first_cell_height", Value: 1e-5, Unit: "m"}},
		Checks:    Checks{Verdict: "pass"},
		Files:     []File{{Path: "mesh.cgns", Format: "cgns-hdf5", Bytes: 10, ContentSHA256: "ff"}},
	}
}

// TestEncodeReadRoundTrip writes a manifest and reads it back through
// Read, as a script would; the bytes of two encodings are the same (maps
// are written in key order by yaml.v3), and every physical value stands
// beside its unit.
func TestEncodeReadRoundTrip(t *testing.T) {
	var a, b bytes.Buffer
	if err := Encode(&a, sample()); err != nil {
		t.Fatal(err)
	}
	if err := Encode(&b, sample()); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("two encodings of one manifest differ")
	}
	text := a.String()
	for _, want := range []string{"caution: Mesh checks do not validate a simulation", "unit: m^2", "first_cell_height: {value: 1e-05, unit: m}", "content_sha256: ff"} {
		if !strings.Contains(text, want) {
			t.Errorf("manifest lacks %q:\n%s", want, text)
		}
	}
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, FileName), a.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	got, err := Read(dir)
	if err != nil {
		t.Fatal(err)
	}
	if got.InputHash != "abc" || got.Case.Refine != 2 || got.Mesh.Cells != 4 || got.Files[0].ContentSHA256 != "ff" || got.Tags[0].Faces != 8 {
		t.Fatalf("read back %+v", got)
	}
}
