package deck

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/bc"
	"cvdeck/export/manifest"
)

// TestRunKeepsWhatItDidNotWrite: a deck folder is replaced as a whole, so
// a run refuses, before meshing, a folder that holds its own case file, or
// anything a deck does not hold (notes, a sub-folder of solver output),
// and leaves every such file as it was; a folder holding an earlier deck
// is replaced.
func TestRunKeepsWhatItDidNotWrite(t *testing.T) {
	root := t.TempDir()
	load := func(path string) *Case {
		t.Helper()
		if err := os.WriteFile(path, []byte(square), 0o644); err != nil {
			t.Fatal(err)
		}
		c, err := Load(path, LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		return c
	}

	// The case file inside the output folder, as -o "$PWD" gives it.
	work := filepath.Join(root, "work")
	if err := os.Mkdir(work, 0o755); err != nil {
		t.Fatal(err)
	}
	inside := filepath.Join(work, "square.yaml")
	if _, err := Run(load(inside), work, RunOptions{}); !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "lies inside") {
		t.Fatalf("case file inside the output folder: got %v, want an input error saying so", err)
	}
	if _, err := os.Stat(inside); err != nil {
		t.Fatalf("the case file is gone: %v", err)
	}
	// Its parent folder holds it too.
	if _, err := Run(load(inside), root, RunOptions{}); !errors.Is(err, ErrInput) {
		t.Fatalf("case file below the output folder: got %v, want an input error", err)
	}

	c := load(filepath.Join(root, "square.yaml"))
	deck := filepath.Join(root, "deck")
	for _, foreign := range []struct{ name, what string }{{"notes.txt", "file"}, {"run-1", "folder"}} {
		if err := os.MkdirAll(deck, 0o755); err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(deck, foreign.name)
		var err error
		if foreign.what == "folder" {
			err = os.Mkdir(p, 0o755)
		} else {
			err = os.WriteFile(p, []byte("kept"), 0o644)
		}
		if err != nil {
			t.Fatal(err)
		}
		_, err = Run(c, deck, RunOptions{})
		if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), foreign.name) {
			t.Fatalf("a %s %s in the output folder: got %v, want an input error naming it", foreign.what, foreign.name, err)
		}
		ents, _ := os.ReadDir(deck)
		if len(ents) != 1 || ents[0].Name() != foreign.name {
			t.Fatalf("after the refused run the folder holds %v, want %s alone", ents, foreign.name)
		}
		if err := os.RemoveAll(deck); err != nil {
			t.Fatal(err)
		}
	}

	// An earlier deck, and an empty folder, are replaced.
	for range 2 {
		if _, err := Run(c, deck, RunOptions{}); err != nil {
			t.Fatal(err)
		}
	}
	empty := filepath.Join(root, "empty")
	if err := os.Mkdir(empty, 0o755); err != nil {
		t.Fatal(err)
	}
	if _, err := Run(c, empty, RunOptions{}); err != nil {
		t.Fatal(err)
	}
}

// TestDeckFileNamesCoverEveryOutput: every file that a deck with every
// format, or a check, writes is one that checkOutDir lets a later run
// replace, and look-alike names are not.
func TestDeckFileNamesCoverEveryOutput(t *testing.T) {
	root := t.TempDir()
	c, err := Parse(filepath.Join(root, "square.yaml"), []byte(square+"outputs: {formats: ["+strings.Join(Formats, ", ")+"]}\n"), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	deck, checked := filepath.Join(root, "deck"), filepath.Join(root, "checked")
	if _, err := Run(c, deck, RunOptions{}); err != nil {
		t.Fatal(err)
	}
	if _, err := CheckAndWrite(filepath.Join(deck, "mesh.vtu"), checked); err != nil {
		t.Fatal(err)
	}
	for _, dir := range []string{deck, checked} {
		ents, err := os.ReadDir(dir)
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range ents {
			if !deckFile.MatchString(e.Name()) {
				t.Errorf("%s writes %s, which a later run would refuse to replace", filepath.Base(dir), e.Name())
			}
		}
	}
	if _, err := os.Stat(filepath.Join(deck, "blocks_0.vts")); err != nil {
		t.Errorf("the deck with every format has no block file: %v", err)
	}
	// A check of the deck, again into the same folder, replaces it.
	if _, err := CheckAndWrite(filepath.Join(deck, "mesh.vtu"), checked); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"mesh.vtu.bak", "old-mesh.vtu", "blocks_.vts", "blocks_1.vtu", "Quality.json", manifest.FileName + "~"} {
		if deckFile.MatchString(name) {
			t.Errorf("%s counts as a deck file", name)
		}
	}
}

// TestCheckKeepsWhatItDidNotWrite: check -o refuses a folder holding its
// mesh, or anything a check does not write, before reading the mesh.
func TestCheckKeepsWhatItDidNotWrite(t *testing.T) {
	root := t.TempDir()
	c, err := Parse(filepath.Join(root, "square.yaml"), []byte(square), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	deck := filepath.Join(root, "deck")
	if _, err := Run(c, deck, RunOptions{}); err != nil {
		t.Fatal(err)
	}
	if _, err := CheckAndWrite(filepath.Join(deck, "mesh.vtu"), deck); !errors.Is(err, ErrInput) {
		t.Fatalf("check into the folder of its mesh: got %v, want an input error", err)
	}
	cases := filepath.Join(root, "cases")
	if err := os.Mkdir(cases, 0o755); err != nil {
		t.Fatal(err)
	}
	kept := filepath.Join(cases, "square.yaml")
	if err := os.WriteFile(kept, []byte(square), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := CheckAndWrite(filepath.Join(deck, "mesh.cgns"), cases); !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "square.yaml") {
		t.Fatalf("check into a folder of case files: got %v, want an input error naming the file", err)
	}
	if _, err := os.Stat(kept); err != nil {
		t.Fatalf("the case file is gone: %v", err)
	}
}

// TestVTSNeedsAStructuredMesh: asking an unstructured case for block
// files is an input error, not a deck without a mesh.
func TestVTSNeedsAStructuredMesh(t *testing.T) {
	text := strings.Replace(square, "  structured:\n    blocks:\n      - {south: s, east: e, north: n, west: w}\n", "  unstructured: {max_size: 3}\n", 1)
	c, err := Parse("square.yaml", []byte(text), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "deck")
	if _, err := Run(c, dir, RunOptions{Formats: []string{"vts"}}); !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "unstructured") {
		t.Fatalf("got %v, want an input error saying the mesh is unstructured", err)
	}
	if _, err := os.Stat(dir); !os.IsNotExist(err) {
		t.Fatalf("the refused run made %s", dir)
	}
	if _, err := Run(c, dir, RunOptions{Formats: []string{"vtu"}}); err != nil {
		t.Fatalf("the same case as vtu: %v", err)
	}
}

// TestParseAssignments: --set takes numbers and constant expressions; one
// that uses a name says that --set values cannot use parameters, rather
// than that the case has none.
func TestParseAssignments(t *testing.T) {
	got, err := ParseAssignments([]string{"gap=0.03", "angle = 2*pi", "n=sqrt(16)"})
	if err != nil {
		t.Fatal(err)
	}
	if got["gap"] != 0.03 || got["angle"] != 2*math.Pi || got["n"] != 4 {
		t.Fatalf("got %v", got)
	}
	for _, a := range []string{"gap=2*overlap", "gap=abc"} {
		_, err := ParseAssignments([]string{a})
		if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "cannot use") || strings.Contains(err.Error(), "defines no parameters") {
			t.Errorf("--set %s: got %v", a, err)
		}
	}
	for _, a := range []string{"gap", "=1", "gap=1+", "gap=1/0*0"} {
		if _, err := ParseAssignments([]string{a}); !errors.Is(err, ErrInput) {
			t.Errorf("--set %s: got %v, want an input error", a, err)
		}
	}
}

// TestGasSutherlandConstants: a case's gas may carry its own Sutherland
// constants, which then give the reference viscosity (μ_ref at T = T_ref,
// by the law's form) and are recorded with the gas in the manifest; a gas
// without them borrows air's, and the deck's notes say so; a constant
// missing or not positive is an error at its place in the file.
func TestGasSutherlandConstants(t *testing.T) {
	ref := "reference: {gas: GAS, mach: 0.3, pressure: 1e5, temperature: 300}\nboundaries: {wall: {kind: wall-adiabatic}}\n"
	run := func(gas string) (*Result, *manifest.Manifest) {
		t.Helper()
		c, err := Parse("square.yaml", []byte(square+strings.Replace(ref, "GAS", gas, 1)), LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		dir := filepath.Join(t.TempDir(), "deck")
		res, err := Run(c, dir, RunOptions{Formats: []string{"cgns", "manifest"}})
		if err != nil {
			t.Fatal(err)
		}
		m, err := manifest.Read(dir)
		if err != nil {
			t.Fatal(err)
		}
		return res, m
	}
	entry := func(es bc.Entries, key string) float64 {
		for _, e := range es {
			if e.Key == key {
				return e.Value
			}
		}
		t.Fatalf("no %s in %v", key, es)
		return 0
	}
	res, m := run("{gamma: 1.3, gas_constant: 290, sutherland: {mu_ref: 2.5e-5, t_ref: 300, s: 90}}")
	if len(res.Notes) != 0 {
		t.Errorf("notes %q for a gas with its own constants", res.Notes)
	}
	if mu := entry(m.Conditions.Reference, "dynamic_viscosity"); math.Abs(mu-2.5e-5) > 1e-18 {
		t.Errorf("reference viscosity %g, want μ_ref 2.5e-5 at T_ref", mu)
	}
	if s := entry(m.Conditions.Gas, "sutherland_s"); s != 90 {
		t.Errorf("the manifest's gas has S = %g, want 90", s)
	}
	res, m = run("{gamma: 1.3, gas_constant: 290}")
	if len(res.Notes) != 1 || !strings.Contains(res.Notes[0], "air's Sutherland constants") {
		t.Errorf("notes %q, want one on the borrowed viscosity", res.Notes)
	}
	if mu, want := entry(m.Conditions.Reference, "dynamic_viscosity"), bc.AirSutherland.Viscosity(300); mu != want {
		t.Errorf("reference viscosity %g, want air's %g", mu, want)
	}
	for gas, want := range map[string]string{
		"{gamma: 1.3, gas_constant: 290, sutherland: {mu_ref: 2.5e-5, t_ref: 300}}":         `"s"`,
		"{gamma: 1.3, gas_constant: 290, sutherland: {mu_ref: 0, t_ref: 300, s: 90}}":       "greater than zero",
		"{gamma: 1.3, gas_constant: 290, sutherland: {mu_ref: 1, t_ref: 300, s: 90, x: 1}}": `"x"`,
	} {
		_, err := Parse("square.yaml", []byte(square+strings.Replace(ref, "GAS", gas, 1)), LoadOptions{})
		if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "square.yaml:") {
			t.Errorf("gas %s: got %v, want a located error about %s", gas, err, want)
		}
	}
}

// A bare sketch run into the folder that holds it is refused naming the
// sketch, the file at risk, not the label of the case made in memory.
func TestSketchInsideOutputFolder(t *testing.T) {
	dir := t.TempDir()
	sketch := filepath.Join(dir, "plate.geojson")
	if err := os.WriteFile(sketch, []byte(`{"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 1], [0, 0]]]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	c, err := SketchCase(sketch, SketchOptions{Size: 0.1}, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	_, err = Run(c, dir, RunOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), sketch+" lies inside") {
		t.Errorf("got %v, want the sketch named", err)
	}
}
