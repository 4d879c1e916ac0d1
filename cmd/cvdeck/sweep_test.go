package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/deck"
	"cvdeck/deck/sweep"
)

// sweepCLI runs `cvdeck sweep ...` in-process through the root command
// and returns the error with stdout and stderr.
func sweepCLI(t *testing.T, args ...string) (error, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	root := newRootCommand(&out, &errb)
	registered := false
	for _, c := range root.Commands() {
		registered = registered || c.Name() == "sweep"
	}
	if !registered {
		root.AddCommand(newSweepCommand())
	}
	root.SetArgs(append([]string{"sweep"}, args...))
	err := root.Execute()
	return err, out.String(), errb.String()
}

func exitCode(err error) int {
	var coded interface{ ExitCode() int }
	switch {
	case err == nil:
		return 0
	case errors.As(err, &coded):
		return coded.ExitCode()
	case errors.Is(err, deck.ErrInput):
		return 2
	}
	return -1
}

// TestSweepCommandOnTheSample runs the sample family sweep through the
// command line: decks, summaries, --json, and a second run that reuses
// every deck.
func TestSweepCommandOnTheSample(t *testing.T) {
	out := t.TempDir()
	file := filepath.Join("..", "..", "samples", "sweeps", "nozzle-refine.yaml")
	err, stdout, stderr := sweepCLI(t, file, "-o", out, "-j", "2", "--json")
	if err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	var got sweep.Summary
	if err := jsonDecode(stdout, &got); err != nil || len(got.Rows) != 3 {
		t.Fatalf("--json gave %d rows (%v):\n%s", len(got.Rows), err, stdout)
	}
	if !strings.Contains(stderr, "3 variants: 3 built, 0 reused, 0 failed") {
		t.Errorf("stderr %q", stderr)
	}
	for _, r := range got.Rows {
		if _, err := os.Stat(filepath.Join(out, r.Name, "deck.yaml")); err != nil {
			t.Errorf("%s: %v", r.Name, err)
		}
	}
	// Level l has (2^(l-1) cells_x) x (2^(l-1) cells_y) cells: the ratio
	// h_coarse/h_fine is the refinement ratio 2 (Celik et al. 2008, eq. 1).
	for _, r := range got.Rows[1:] {
		if r.Ratio < 1.99 || r.Ratio > 2.01 {
			t.Errorf("level %d: effective ratio %v, want 2", r.Level, r.Ratio)
		}
	}
	err, _, stderr = sweepCLI(t, file, "-o", out, "--quiet")
	if err != nil || stderr != "" {
		t.Fatalf("second run: %v, stderr %q", err, stderr)
	}
	s, err := sweep.ReadSummary(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range s.Rows {
		if r.Run != sweep.RunReused {
			t.Errorf("%s: run %s on the second run, want reused", r.Name, r.Run)
		}
	}
}

func TestSweepCommandErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.yaml")
	os.WriteFile(bad, []byte("base: ../nozzle.yaml\nparamters: {}\n"), 0o644)
	err, _, _ := sweepCLI(t, bad, "-o", dir)
	if exitCode(err) != 2 || !strings.Contains(err.Error(), "bad.yaml:2:1: unknown key \"paramters\"") {
		t.Errorf("bad key: %v (exit %d)", err, exitCode(err))
	}
	base, _ := filepath.Abs(filepath.Join("..", "..", "samples", "sweeps", "nozzle.yaml"))
	typo := filepath.Join(dir, "typo.yaml")
	os.WriteFile(typo, []byte("base: "+base+"\nparameters:\n  throat_h: [20]\n  exit_ration: [1.2, 1.4]\n"), 0o644)
	err, _, _ = sweepCLI(t, typo, "-o", filepath.Join(dir, "typo"))
	if exitCode(err) != 2 || !strings.Contains(err.Error(), `typo.yaml:4:3: the base case nozzle.yaml defines no parameter "exit_ration"`) {
		t.Errorf("misspelt parameter: %v (exit %d)", err, exitCode(err))
	}
	if _, serr := os.Stat(filepath.Join(dir, "typo")); serr == nil {
		t.Error("a sweep with a misspelt parameter created its output folder")
	}
	file := filepath.Join("..", "..", "samples", "sweeps", "nozzle-refine.yaml")
	for _, args := range [][]string{{file}, {file, "-o", dir, "--shard", "5/4"}, {file, "-o", dir, "-j", "0"}} {
		if err, _, _ := sweepCLI(t, args...); exitCode(err) != 2 {
			t.Errorf("%v: %v (exit %d), want exit 2", args, err, exitCode(err))
		}
	}
	// A variant the pipeline refuses (a negative cell count): that variant
	// fails, the others are built.
	sw := filepath.Join(dir, "some-fail.yaml")
	os.WriteFile(sw, []byte("base: "+base+"\nparameters:\n  cells_x: [20, -5, 30]\n"), 0o644)
	err, _, stderr := sweepCLI(t, sw, "-o", filepath.Join(dir, "out"))
	var fe *sweep.FailedError
	if !errors.As(err, &fe) || exitCode(err) != 1 || fe.Failed != 1 {
		t.Fatalf("one failing variant: %v (exit %d)\n%s", err, exitCode(err), stderr)
	}
	if !strings.Contains(stderr, "failed: ") || !strings.Contains(stderr, "3 variants: 2 built, 0 reused, 1 failed") {
		t.Errorf("stderr %q", stderr)
	}
}

func TestMergeCommand(t *testing.T) {
	out := t.TempDir()
	file := filepath.Join("..", "..", "samples", "sweeps", "nozzle-refine.yaml")
	for _, k := range []string{"1/2", "2/2"} {
		if err, _, stderr := sweepCLI(t, file, "-o", out, "--shard", k, "--quiet"); err != nil {
			t.Fatalf("%s: %v\n%s", k, err, stderr)
		}
	}
	err, _, stderr := sweepCLI(t, "merge", out)
	if err != nil || !strings.Contains(stderr, "merged 3 of 3 variants") {
		t.Fatalf("merge: %v\n%s", err, stderr)
	}
	os.Remove(filepath.Join(out, "summary-shard-2-of-2.json"))
	err, _, _ = sweepCLI(t, "merge", out, "-o", t.TempDir())
	if exitCode(err) != 1 || !strings.Contains(err.Error(), "missing") {
		t.Errorf("merge with a missing shard: %v (exit %d)", err, exitCode(err))
	}
}

func jsonDecode(s string, v any) error { return json.Unmarshal([]byte(s), v) }

func TestSweepList(t *testing.T) {
	file := filepath.Join("..", "..", "samples", "sweeps", "nozzle-throat-exit.yaml")
	err, stdout, _ := sweepCLI(t, file, "--list", "--shard", "1/5")
	if err != nil || !strings.HasPrefix(stdout, "5 of 24 variants (shard 1/5)\n") || strings.Count(stdout, "\n") != 6 {
		t.Errorf("--list: %v\n%s", err, stdout)
	}
}
