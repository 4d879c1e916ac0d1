package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

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
	second, err := sweep.ReadSummary(filepath.Join(out, "summary-shard-2-of-2.json"))
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, r := range second.Rows {
		names = append(names, r.Name)
	}
	os.Remove(filepath.Join(out, "summary-shard-2-of-2.json"))
	code, _, stderr = cvdeck(t, "sweep", "merge", out, "-o", t.TempDir())
	want := fmt.Sprintf("%d of 3 variants are missing: %s; no summary of shard 2/2 was given", len(names), strings.Join(names, ", "))
	if code != 1 || !strings.Contains(stderr, want) {
		t.Errorf("merge with a missing shard: exit %d, want %q in\n%s", code, want, stderr)
	}
}

func TestSweepList(t *testing.T) {
	code, stdout, _ := cvdeck(t, "sweep", sampleSweep("nozzle-throat-exit.yaml"), "--list", "--shard", "1/5")
	if code != 0 || !strings.HasPrefix(stdout, "5 of 24 variants (shard 1/5)\n") || strings.Count(stdout, "\n") != 6 {
		t.Errorf("--list: exit %d\n%s", code, stdout)
	}
}

// slowSweep writes a sweep of n variants of the sample nozzle whose block
// is smoothed to a tolerance it never reaches, so that each variant takes
// a second or two, and returns the sweep file.
func slowSweep(t *testing.T, n int) string {
	t.Helper()
	dir := t.TempDir()
	base, err := os.ReadFile(sampleSweep("nozzle.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	block := "{name: nozzle, south: axis, east: exit, north: wall, west: inlet}"
	if !strings.Contains(string(base), block) {
		t.Fatal("the sample nozzle's block line has changed; update slowSweep")
	}
	slow := strings.Replace(string(base), block, "{name: nozzle, south: axis, east: exit, north: wall, west: inlet, smooth: {iterations: 20000, tolerance: 1e-15}}", 1)
	if err := os.WriteFile(filepath.Join(dir, "slow.yaml"), []byte(slow), 0o644); err != nil {
		t.Fatal(err)
	}
	var values []string
	for i := 0; i < n; i++ {
		values = append(values, strconv.Itoa(20+i))
	}
	sw := filepath.Join(dir, "slow-sweep.yaml")
	text := "base: slow.yaml\nparameters:\n  throat_h: [" + strings.Join(values, ", ") + "]\n  cells_x: 121\n  cells_y: 33\n"
	if err := os.WriteFile(sw, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return sw
}

// startSweep starts this test binary as `cvdeck sweep` (see TestMain) in
// a process group of its own, as a shell starts a job, and waits until it
// has two variants in child processes. It returns the command, its
// stderr, and the children's process ids.
func startSweep(t *testing.T, file, out string) (*exec.Cmd, *bytes.Buffer, []int) {
	t.Helper()
	if runtime.GOOS != "linux" {
		t.Skip("process groups and parent-death signals are tested on Linux")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(exe, "sweep", file, "-o", out, "-j", "2")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if cmd.ProcessState == nil {
			cmd.Process.Kill()
			cmd.Wait()
		}
	})
	deadline := time.Now().Add(20 * time.Second)
	for time.Now().Before(deadline) {
		if kids := children(cmd.Process.Pid); len(kids) == 2 {
			return cmd, &stderr, kids
		}
		time.Sleep(20 * time.Millisecond)
	}
	t.Fatalf("the sweep started no two children in 20 s\n%s", stderr.String())
	return nil, nil, nil
}

// children returns the process ids of pid's children, from
// /proc/PID/task/TID/children (Linux).
func children(pid int) []int {
	tasks, _ := filepath.Glob(fmt.Sprintf("/proc/%d/task/*/children", pid))
	var out []int
	for _, f := range tasks {
		data, _ := os.ReadFile(f)
		for _, field := range strings.Fields(string(data)) {
			if n, err := strconv.Atoi(field); err == nil {
				out = append(out, n)
			}
		}
	}
	return out
}

// alive reports whether process pid exists and is not a zombie.
func alive(pid int) bool {
	data, err := os.ReadFile(fmt.Sprintf("/proc/%d/stat", pid))
	if err != nil {
		return false
	}
	// The state follows the command name in parentheses.
	i := bytes.LastIndexByte(data, ')')
	return i > 0 && i+2 < len(data) && data[i+2] != 'Z'
}

// TestSweepInterrupts sends a terminal's Ctrl-C (SIGINT to the whole
// process group) to a running sweep: the variants being built finish and
// are kept, the others are reported not started, exit code 1. A second
// SIGINT stops the builds in progress, which are reported as stopped, not
// failed. SIGKILL of the sweep takes its children with it.
func TestSweepInterrupts(t *testing.T) {
	if testing.Short() {
		t.Skip("runs slow variants in child processes")
	}
	file := slowSweep(t, 5)

	t.Run("once", func(t *testing.T) {
		out := t.TempDir()
		cmd, stderr, _ := startSweep(t, file, out)
		if err := syscall.Kill(-cmd.Process.Pid, syscall.SIGINT); err != nil {
			t.Fatal(err)
		}
		err := cmd.Wait()
		if cmd.ProcessState.ExitCode() != 1 {
			t.Fatalf("exit %v\n%s", err, stderr)
		}
		s, err := sweep.ReadSummary(filepath.Join(out, "summary.json"))
		if err != nil {
			t.Fatal(err)
		}
		runs := map[string]int{}
		for _, r := range s.Rows {
			runs[r.Run]++
		}
		if runs[sweep.RunBuilt] != 2 || runs[sweep.RunNotRun] != 3 || len(runs) != 2 {
			t.Errorf("runs %v, want the 2 in hand built and 3 not run\n%s", runs, stderr)
		}
		for _, want := range []string{"interrupt (SIGINT, Ctrl-C): starting no more variants and letting those being built finish",
			"5 variants: 2 built, 0 reused, 0 failed, 3 not started",
			"the sweep was stopped before its end: 3 of 5 variants not started"} {
			if !strings.Contains(stderr.String(), want) {
				t.Errorf("stderr lacks %q:\n%s", want, stderr)
			}
		}
	})

	t.Run("twice", func(t *testing.T) {
		out := t.TempDir()
		cmd, stderr, kids := startSweep(t, file, out)
		syscall.Kill(-cmd.Process.Pid, syscall.SIGINT)
		time.Sleep(200 * time.Millisecond)
		syscall.Kill(-cmd.Process.Pid, syscall.SIGINT)
		cmd.Wait()
		if cmd.ProcessState.ExitCode() != 1 {
			t.Fatalf("exit %d\n%s", cmd.ProcessState.ExitCode(), stderr)
		}
		s, err := sweep.ReadSummary(filepath.Join(out, "summary.json"))
		if err != nil {
			t.Fatal(err)
		}
		runs := map[string]int{}
		for _, r := range s.Rows {
			runs[r.Run]++
			if r.Status == sweep.StatusFailed {
				t.Errorf("%s failed: %s", r.Name, r.Error)
			}
		}
		if runs[sweep.RunInterrupted] != 2 || runs[sweep.RunNotRun] != 3 {
			t.Errorf("runs %v, want 2 interrupted and 3 not run\n%s", runs, stderr)
		}
		if strings.Contains(stderr.String(), "killed") || !strings.Contains(stderr.String(), "2 stopped while being built") {
			t.Errorf("stderr:\n%s", stderr)
		}
		for _, k := range kids {
			if alive(k) {
				t.Errorf("child %d still runs", k)
			}
		}
	})

	t.Run("kill", func(t *testing.T) {
		cmd, _, kids := startSweep(t, file, t.TempDir())
		cmd.Process.Kill()
		cmd.Wait()
		// The variants have a second or more to go; killed with the sweep
		// they end within milliseconds.
		deadline := time.Now().Add(500 * time.Millisecond)
		for _, k := range kids {
			for alive(k) && time.Now().Before(deadline) {
				time.Sleep(20 * time.Millisecond)
			}
			if alive(k) {
				t.Errorf("child %d runs on after the sweep was killed", k)
				syscall.Kill(k, syscall.SIGKILL)
			}
		}
	})
}

// TestSweepListChecksTheBase: --list loads the base case and checks the
// swept names as a run does, so a list that succeeds is one a run builds.
func TestSweepListChecksTheBase(t *testing.T) {
	dir := t.TempDir()
	missing := filepath.Join(dir, "missing.yaml")
	os.WriteFile(missing, []byte("base: nozzle-missing.yaml\nparameters:\n  throat_h: [30, 40]\n"), 0o644)
	code, stdout, stderr := cvdeck(t, "sweep", missing, "--list")
	if code != 2 || stdout != "" || !strings.Contains(stderr, "missing.yaml:1:7: the base case as written does not load") {
		t.Errorf("missing base: exit %d\n%s%s", code, stdout, stderr)
	}
	base, _ := filepath.Abs(sampleSweep("nozzle.yaml"))
	typo := filepath.Join(dir, "typo.yaml")
	os.WriteFile(typo, []byte("base: "+base+"\nparameters:\n  throat: [30, 40]\n"), 0o644)
	code, stdout, stderr = cvdeck(t, "sweep", typo, "--list")
	if code != 2 || stdout != "" || !strings.Contains(stderr, `typo.yaml:3:3: the base case nozzle.yaml defines no parameter "throat"`) {
		t.Errorf("unknown parameter: exit %d\n%s%s", code, stdout, stderr)
	}
}

// TestSweepRefusesAnotherStudysFolder runs two studies without swept
// parameters (the same folder names) into one folder: the second is
// refused with exit code 2, naming the decks it would replace, and the
// first study's decks and summary stay as they were.
func TestSweepRefusesAnotherStudysFolder(t *testing.T) {
	out := t.TempDir()
	if code, _, stderr := cvdeck(t, "sweep", sampleSweep("nozzle-refine.yaml"), "-o", out, "--quiet"); code != 0 {
		t.Fatalf("exit %d\n%s", code, stderr)
	}
	before, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	s, err := sweep.ReadSummary(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	deck0, _ := os.ReadFile(filepath.Join(out, s.Rows[0].Name, "deck.yaml"))
	other := filepath.Join(t.TempDir(), "naca-family.yaml")
	naca, _ := filepath.Abs(filepath.Join("..", "..", "samples", "naca-ogrid.yaml"))
	os.WriteFile(other, []byte("base: "+naca+"\nrefine: {levels: 2, ratio: 2}\n"), 0o644)
	for _, force := range []bool{false, true} {
		args := []string{"sweep", other, "-o", out}
		if force {
			args = append(args, "--force")
		}
		code, _, stderr := cvdeck(t, args...)
		if code != 2 || !strings.Contains(stderr, "summary.json: the summary of a sweep of nozzle.yaml, not of this sweep's base case naca-ogrid.yaml") ||
			!strings.Contains(stderr, s.Rows[0].Name+`: a deck of case "nozzle-sweep" (nozzle.yaml), not of this sweep's base case "naca-ogrid" (naca-ogrid.yaml)`) {
			t.Errorf("force %v: exit %d\n%s", force, code, stderr)
		}
	}
	after, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	deck1, _ := os.ReadFile(filepath.Join(out, s.Rows[0].Name, "deck.yaml"))
	if !bytes.Equal(before, after) || !bytes.Equal(deck0, deck1) {
		t.Error("the refused sweep changed the first study's summary or deck")
	}
}
