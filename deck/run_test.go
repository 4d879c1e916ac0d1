package deck

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"cvdeck/export/cgns"
	"cvdeck/export/manifest"
	"cvdeck/quality"
	"cvdeck/samples"
)

// TestRunWritesAConsistentDeck runs a case twice into two folders and
// checks the deck: every file the manifest lists is there with its hash
// (for CGNS, the content hash is recorded instead of the file's), nothing
// else is there but the manifest, and the same input gives the same bytes
// for every file cvdeck writes itself.
func TestRunWritesAConsistentDeck(t *testing.T) {
	dirs := []string{filepath.Join(t.TempDir(), "a"), filepath.Join(t.TempDir(), "b")}
	var mans []*manifest.Manifest
	for _, dir := range dirs {
		c, err := Parse("square.yaml", []byte(square+"outputs: {formats: [cgns, vtu, vtk, vts, preview, png, manifest]}\n"), LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if _, err := Run(c, dir, RunOptions{}); err != nil {
			t.Fatal(err)
		}
		m, err := manifest.Read(dir)
		if err != nil {
			t.Fatal(err)
		}
		mans = append(mans, m)
		listed := map[string]bool{manifest.FileName: true}
		for _, f := range m.Files {
			listed[f.Path] = true
			data, err := os.ReadFile(filepath.Join(dir, f.Path))
			if err != nil {
				t.Fatal(err)
			}
			if int64(len(data)) != f.Bytes {
				t.Errorf("%s: %d bytes, the manifest says %d", f.Path, len(data), f.Bytes)
			}
			sum := sha256.Sum256(data)
			if f.SHA256 != "" && f.SHA256 != hex.EncodeToString(sum[:]) {
				t.Errorf("%s: hash differs from the manifest's", f.Path)
			}
			if f.SHA256 == "" && f.ContentSHA256 == "" {
				t.Errorf("%s has no hash in the manifest", f.Path)
			}
		}
		entries, _ := os.ReadDir(dir)
		for _, e := range entries {
			if !listed[e.Name()] {
				t.Errorf("%s is in the deck but not in the manifest", e.Name())
			}
		}
	}
	for _, name := range []string{"deck.yaml", "mesh.vtu", "boundary.vtp", "mesh.vtk", "preview.svg", "preview.png", "quality.json", "blocks.vtm"} {
		a, _ := os.ReadFile(filepath.Join(dirs[0], name))
		b, _ := os.ReadFile(filepath.Join(dirs[1], name))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs between two runs of the same case (or is empty)", name)
		}
	}
	var sums []string
	for _, m := range mans {
		for _, f := range m.Files {
			if f.Path == "mesh.cgns" {
				sums = append(sums, f.ContentSHA256)
			}
		}
	}
	sort.Strings(sums)
	if len(sums) != 2 || sums[0] != sums[1] {
		t.Errorf("CGNS content hashes %v: want two equal ones", sums)
	}
}

// TestManifestDoesNotDependOnTheWorkingFolder: the same case file, named
// by paths from two working folders, gives the same manifest; the
// conditions' places in the case file are given from its folder.
func TestManifestDoesNotDependOnTheWorkingFolder(t *testing.T) {
	root := t.TempDir()
	caseDir := filepath.Join(root, "cases", "sq")
	if err := os.MkdirAll(caseDir, 0o755); err != nil {
		t.Fatal(err)
	}
	text := square + "boundaries: {wall: {kind: wall-slip}}\n"
	if err := os.WriteFile(filepath.Join(caseDir, "square.yaml"), []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	var mans [][]byte
	for i, path := range []string{filepath.Join(caseDir, "square.yaml"), filepath.Join(root, "cases", "..", "cases", "sq", "square.yaml")} {
		c, err := Load(path, LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		dir := filepath.Join(root, fmt.Sprint("deck", i))
		if _, err := Run(c, dir, RunOptions{Formats: []string{"vtu", "manifest"}}); err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(dir, manifest.FileName))
		if err != nil {
			t.Fatal(err)
		}
		mans = append(mans, b)
	}
	if !bytes.Equal(mans[0], mans[1]) {
		t.Error("the manifests of one case named by two paths differ")
	}
	if !bytes.Contains(mans[0], []byte("where: square.yaml:")) {
		t.Errorf("the manifest does not give the condition's place from the case's folder:\n%s", mans[0])
	}
}

// TestRunBadInputWritesNothing: a case whose conditions name a tag the
// mesh does not have stops before anything is written, and an existing
// deck stays as it was.
func TestRunBadInputWritesNothing(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "deck")
	good, err := Parse("square.yaml", []byte(square+"boundaries: {wall: {kind: wall-slip}}\n"), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Run(good, dir, RunOptions{}); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(filepath.Join(dir, manifest.FileName))
	bad, err := Parse("square.yaml", []byte(square+"boundaries: {wal: {kind: wall-slip}}\n"), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Run(bad, dir, RunOptions{}); !errors.Is(err, ErrInput) {
		t.Fatalf("got %v, want an input error", err)
	}
	after, _ := os.ReadFile(filepath.Join(dir, manifest.FileName))
	if !bytes.Equal(before, after) {
		t.Fatal("a failed run changed the existing deck")
	}
}

// periodicSquare is the square case with its bottom and top tagged for a
// periodic pair and the sides as walls.
var periodicSquare = strings.NewReplacer(
	"{name: s, line: [side, 0], tag: wall,", "{name: s, line: [side, 0], tag: lower,",
	"{name: n, line: [0, side], tag: wall,", "{name: n, line: [0, side], tag: upper,",
).Replace(square)

// TestPeriodicPairIsVerified: a periodic pair whose faces match under the
// translation is recorded in the manifest with its face count; a wrong
// translation is an input error naming the tag and the case-file line,
// and nothing is written.
func TestPeriodicPairIsVerified(t *testing.T) {
	good := periodicSquare + "boundaries:\n  wall: {kind: wall-slip}\n  upper: {kind: periodic, partner: lower, translation: [0, -side]}\n"
	c, err := Parse("square.yaml", []byte(good), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "deck")
	if _, err := Run(c, dir, RunOptions{Formats: []string{"cgns", "manifest"}}); err != nil {
		t.Fatal(err)
	}
	// The CGNS file carries the pair as connectivity (read back through
	// the library).
	back, err := cgns.ReadDeck(filepath.Join(dir, "mesh.cgns"))
	if err != nil {
		t.Fatal(err)
	}
	if len(back.Periodic) != 1 || len(back.Periodic[0].Pairs) != 4 || math.Abs(back.Periodic[0].Translation[1]+0.01) > 1e-9 {
		t.Fatalf("CGNS periodic pairs read back: %+v", back.Periodic)
	}
	data, _ := os.ReadFile(filepath.Join(dir, manifest.FileName))
	if !strings.Contains(string(data), "partner: lower") || !strings.Contains(string(data), "kind: periodic") {
		t.Fatalf("the manifest does not record the pairing:\n%s", data)
	}
	bad := strings.Replace(good, "translation: [0, -side]", "translation: [0.5, -side]", 1)
	c, err = Parse("square.yaml", []byte(bad), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir = filepath.Join(t.TempDir(), "deck")
	_, err = Run(c, dir, RunOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), `"upper"`) || !strings.Contains(err.Error(), "square.yaml:") {
		t.Fatalf("got %v", err)
	}
	if _, statErr := os.Stat(dir); !os.IsNotExist(statErr) {
		t.Fatal("a deck was written for a periodic pair that does not match")
	}
}

// TestWallResolution meshes the naca-ogrid sample, whose O-grid is grown
// from the wing with the first-cell height for y+ 5 and whose reference
// asks for y+ 5: the wing's measured first cells must give y+ 5 back
// (y+ is proportional to the wall distance in the viscous sublayer, common
// practice), within the few per cent the grower's first height may miss
// its request by. The farfield is no wall: it has a height, no y+.
func TestWallResolution(t *testing.T) {
	data, err := samples.Case("naca-ogrid")
	if err != nil {
		t.Fatal(err)
	}
	c, err := Parse("naca-ogrid.yaml", data, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "deck")
	res, err := Run(c, dir, RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Walls) != 1 || res.Walls[0].Tag != "wing" {
		t.Fatalf("walls %+v, want the wing alone", res.Walls)
	}
	w := res.Walls[0]
	if w.TargetYplus != 5 || !(w.TargetHeight > 0) {
		t.Fatalf("target y+ %g, height %g", w.TargetYplus, w.TargetHeight)
	}
	for _, y := range []quality.Number{w.Yplus.Min, w.Yplus.Mean, w.Yplus.Max} {
		if math.Abs(float64(y)-5) > 0.05*5 {
			t.Errorf("wing y+ spread %+v, want 5 within 5%%", w.Yplus)
		}
	}
	m, err := manifest.Read(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, tag := range m.Tags {
		if tag.FirstCellHeight == nil || tag.FirstCellHeight.Unit != "m" || !(tag.FirstCellHeight.Min > 0) {
			t.Errorf("%s: first-cell height %+v", tag.Tag, tag.FirstCellHeight)
		}
		if (tag.Yplus != nil) != (tag.Tag == "wing") {
			t.Errorf("%s: y+ estimate %+v; the wing alone should have one", tag.Tag, tag.Yplus)
		}
	}
	if got := m.Tags[0].Yplus; got == nil || got.Mean != float64(w.Yplus.Mean) {
		t.Errorf("manifest wing y+ %+v, the run's %+v", got, w.Yplus)
	}
}
