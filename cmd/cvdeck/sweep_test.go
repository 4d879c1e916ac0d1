package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/deck/sweep"
)

// sampleSweep is the path of a sample sweep file.
func sampleSweep(name string) string {
	return filepath.Join("..", "..", "samples", "sweeps", name)
}

// TestSweepCommandOnTheSample runs the sample family sweep through the
// command line: decks, summaries, --json, and a second run that reuses
// every deck.
func TestSweepCommandOnTheSample(t *testing.T) {
	out := t.TempDir()
	file := sampleSweep("nozzle-refine.yaml")
	code, stdout, stderr := cvdeck(t, "sweep", file, "-o", out, "-j", "2", "--json")
	if code != 0 {
		t.Fatalf("exit %d\n%s", code, stderr)
	}
	var got sweep.Summary
	if err := json.Unmarshal([]byte(stdout), &got); err != nil || len(got.Rows) != 3 {
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
	code, _, stderr = cvdeck(t, "sweep", file, "-o", out, "--quiet")
	if code != 0 || stderr != "" {
		t.Fatalf("second run: exit %d, stderr %q", code, stderr)
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
	code, _, stderr := cvdeck(t, "sweep", bad, "-o", dir)
	if code != 2 || !strings.Contains(stderr, "bad.yaml:2:1: unknown key \"paramters\"") {
		t.Errorf("bad key: exit %d, %s", code, stderr)
	}
	base, _ := filepath.Abs(sampleSweep("nozzle.yaml"))
	typo := filepath.Join(dir, "typo.yaml")
	os.WriteFile(typo, []byte("base: "+base+"\nparameters:\n  throat_h: [20]\n  exit_ration: [1.2, 1.4]\n"), 0o644)
	code, _, stderr = cvdeck(t, "sweep", typo, "-o", filepath.Join(dir, "typo"))
	if code != 2 || !strings.Contains(stderr, `typo.yaml:4:3: the base case nozzle.yaml defines no parameter "exit_ration"`) {
		t.Errorf("misspelt parameter: exit %d, %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "typo")); err == nil {
		t.Error("a sweep with a misspelt parameter created its output folder")
	}
	file := sampleSweep("nozzle-refine.yaml")
	for _, args := range [][]string{{file}, {file, "-o", dir, "--shard", "5/4"}, {file, "-o", dir, "-j", "0"}} {
		if code, _, stderr := cvdeck(t, append([]string{"sweep"}, args...)...); code != 2 {
			t.Errorf("%v: exit %d, want 2\n%s", args, code, stderr)
		}
	}
	// A variant the pipeline refuses (a negative cell count): that variant
	// fails, the others are built, the exit code is 1.
	sw := filepath.Join(dir, "some-fail.yaml")
	os.WriteFile(sw, []byte("base: "+base+"\nparameters:\n  cells_x: [20, -5, 30]\n"), 0o644)
	code, _, stderr = cvdeck(t, "sweep", sw, "-o", filepath.Join(dir, "out"))
	if code != 1 || !strings.Contains(stderr, "cells_x=-5-") || !strings.Contains(stderr, "1 of 3 variants failed") ||
		!strings.Contains(stderr, "3 variants: 2 built, 0 reused, 1 failed") {
		t.Errorf("one failing variant: exit %d\n%s", code, stderr)
	}
}

func TestMergeCommand(t *testing.T) {
	out := t.TempDir()
	file := sampleSweep("nozzle-refine.yaml")
	for _, k := range []string{"1/2", "2/2"} {
		if code, _, stderr := cvdeck(t, "sweep", file, "-o", out, "--shard", k, "--quiet"); code != 0 {
			t.Fatalf("%s: exit %d\n%s", k, code, stderr)
		}
	}
	code, _, stderr := cvdeck(t, "sweep", "merge", out)
	if code != 0 || !strings.Contains(stderr, "merged 3 of 3 variants") {
		t.Fatalf("merge: exit %d\n%s", code, stderr)
	}
	os.Remove(filepath.Join(out, "summary-shard-2-of-2.json"))
	code, _, stderr = cvdeck(t, "sweep", "merge", out, "-o", t.TempDir())
	if code != 1 || !strings.Contains(stderr, "missing") {
		t.Errorf("merge with a missing shard: exit %d\n%s", code, stderr)
	}
}

func TestSweepList(t *testing.T) {
	code, stdout, _ := cvdeck(t, "sweep", sampleSweep("nozzle-throat-exit.yaml"), "--list", "--shard", "1/5")
	if code != 0 || !strings.HasPrefix(stdout, "5 of 24 variants (shard 1/5)\n") || strings.Count(stdout, "\n") != 6 {
		t.Errorf("--list: exit %d\n%s", code, stdout)
	}
}
