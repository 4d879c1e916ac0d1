package sweep

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/deck"
)

// TestPipelineSweepIsDeterministic runs the sample sweep through the real
// pipeline three ways: on one worker, on two, and as three shards run in
// reverse order into one folder and merged. The decks and summaries must be
// equal as issue 8 defines it (sameDecks: bytes, CGNS by cgnsdiff -d).
func TestPipelineSweepIsDeterministic(t *testing.T) {
	f, err := ReadFile(filepath.Join("..", "..", "samples", "sweeps", "nozzle-throat-exit.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	one, two, shards := t.TempDir(), t.TempDir(), t.TempDir()
	if _, err := Run(ctx, f, one, NewPipeline(f), Options{Workers: 1}); err != nil {
		t.Fatal(err)
	}
	if _, err := Run(ctx, f, two, NewPipeline(f), Options{Workers: 2}); err != nil {
		t.Fatal(err)
	}
	for k := 3; k >= 1; k-- {
		if _, err := Run(ctx, f, shards, NewPipeline(f), Options{Workers: 2, Shard: Shard{k, 3}}); err != nil {
			t.Fatal(err)
		}
	}
	if _, _, err := MergeDirs([]string{shards}, shards); err != nil {
		t.Fatal(err)
	}
	sameDecks(t, one, two)
	sameDecks(t, one, shards)
	cgnsDiffSeesVariants(t, one)
}

// TestPipelineResumeKeepsDecks runs the refinement family twice: the second
// run reuses every deck and leaves every file as it was. The summary
// records the cvdeck build as the decks' deck.yaml do.
func TestPipelineResumeKeepsDecks(t *testing.T) {
	f, dir, first := runSampleSweep(t, "nozzle-refine.yaml")
	if d, ok, err := readDeck(filepath.Join(dir, first.Rows[0].Name)); !ok || err != nil || first.Version != deck.Build || d.Version != deck.Build {
		t.Errorf("the summary records cvdeck %q, the deck %q, want the build %q (%v)", first.Version, d.Version, deck.Build, err)
	}
	before := deckFiles(t, dir)
	second, err := Run(context.Background(), f, dir, NewPipeline(f), Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range second.Rows {
		if r.Run != RunReused {
			t.Errorf("%s: %s on the second run, want reused", r.Name, r.Run)
		}
		if r.InputHash != first.Rows[i].InputHash || r.Cells != first.Rows[i].Cells {
			t.Errorf("%s: the reused row differs from the built one", r.Name)
		}
	}
	after := deckFiles(t, dir)
	for name, data := range before {
		if string(after[name]) != string(data) {
			t.Errorf("%s changed on the second run", name)
		}
	}
	// A deck changed after the sweep built it is not rebuilt over: a
	// file of another size, and a CGNS file of the same size (as a solver
	// writing its solution into a copy of the same layout leaves it),
	// which deck.yaml records by content only and the summary by its
	// bytes. --force rebuilds that deck, and only that one.
	cgns := filepath.Join(dir, first.Rows[2].Name, "mesh.cgns")
	for _, c := range []struct{ path, want string }{
		{filepath.Join(dir, first.Rows[1].Name, "mesh.vtu"), first.Rows[1].Name + ": mesh.vtu has 10 bytes where its deck.yaml records"},
		{cgns, first.Rows[2].Name + ": mesh.cgns has the size but not the content the sweep recorded"},
	} {
		old := before[strings.TrimPrefix(c.path, dir+string(filepath.Separator))]
		changed := []byte("<VTKFile/>")
		if strings.HasSuffix(c.path, ".cgns") {
			changed = append([]byte(nil), old...)
			changed[len(changed)-1] ^= 0xff
		}
		if err := os.WriteFile(c.path, changed, 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := Run(context.Background(), f, dir, NewPipeline(f), Options{Workers: 2})
		var fe *FolderError
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), c.want) {
			t.Fatalf("after changing %s: %v", c.path, err)
		}
		if data, _ := os.ReadFile(c.path); !bytes.Equal(data, changed) {
			t.Errorf("the refused run replaced the changed %s", c.path)
		}
		forced, err := Run(context.Background(), f, dir, NewPipeline(f), Options{Workers: 2, Force: true})
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range forced.Rows {
			if r.Run != RunBuilt {
				t.Errorf("%s: %s with --force, want built", r.Name, r.Run)
			}
		}
		if data, _ := os.ReadFile(c.path); bytes.Equal(data, changed) || (!strings.HasSuffix(c.path, ".cgns") && !bytes.Equal(data, old)) {
			t.Errorf("--force did not rebuild %s as it was", c.path)
		}
		before = deckFiles(t, dir)
	}
	// Cell counts of the family: level l has 2^(l-1) times the cells in
	// each direction of the 90 x 24 base mesh.
	for i, want := range []int{90 * 24, 180 * 48, 360 * 96} {
		if first.Rows[i].Cells != want {
			t.Errorf("level %d: %d cells, want %d", i+1, first.Rows[i].Cells, want)
		}
	}
}

// TestPipelineWallResolution runs the wall-resolution study of the NACA
// O-grid: each variant's grid is grown with the first height for its
// target y+, so the largest y+ its wing cells give, by the same flat-plate
// estimate (y+ proportional to the wall distance in the viscous sublayer,
// common practice), must be the target within a few per cent. The summary
// and its CSV carry it per variant.
func TestPipelineWallResolution(t *testing.T) {
	_, _, s := runSampleSweep(t, "naca-yplus.yaml")
	if len(s.Rows) != 3 {
		t.Fatalf("%d rows", len(s.Rows))
	}
	for _, r := range s.Rows {
		target := r.Params["yplus"]
		got, ok := r.YplusMax["wing"]
		if !ok || math.Abs(got/target-1) > 0.05 || len(r.YplusMax) != 1 {
			t.Errorf("%s: y+ max %v, want the wing's near %g", r.Name, r.YplusMax, target)
		}
		if !r.Passed {
			t.Errorf("%s: verdict %s", r.Name, r.Verdict)
		}
	}
	if head := strings.SplitN(string(s.CSV()), "\n", 2)[0]; !strings.Contains(head, ",yplus_max_wing,") {
		t.Errorf("CSV header %q has no yplus_max_wing column", head)
	}
}

// runSampleSweep runs the sample sweep file name through the real
// pipeline on two workers into a fresh folder and returns the sweep, the
// folder and the summary.
func runSampleSweep(t *testing.T, name string) (*File, string, *Summary) {
	t.Helper()
	f, err := ReadFile(filepath.Join("..", "..", "samples", "sweeps", name))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	s, err := Run(context.Background(), f, dir, NewPipeline(f), Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	return f, dir, s
}
