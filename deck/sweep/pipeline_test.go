package sweep

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
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
// run reuses every deck and leaves every file as it was.
func TestPipelineResumeKeepsDecks(t *testing.T) {
	f, dir, first := runSampleSweep(t, "nozzle-refine.yaml")
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
	// A deck damaged by hand is rebuilt, and only that one.
	damaged := filepath.Join(dir, first.Rows[1].Name, "mesh.vtu")
	if err := os.WriteFile(damaged, []byte("<VTKFile/>"), 0o644); err != nil {
		t.Fatal(err)
	}
	third, err := Run(context.Background(), f, dir, NewPipeline(f), Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range third.Rows {
		want := RunReused
		if i == 1 {
			want = RunBuilt
		}
		if r.Run != want {
			t.Errorf("%s: %s after damaging level 2, want %s", r.Name, r.Run, want)
		}
	}
	if data, _ := os.ReadFile(damaged); string(data) != string(before[filepath.Join(first.Rows[1].Name, "mesh.vtu")]) {
		t.Error("the damaged file was not rebuilt as it was")
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
