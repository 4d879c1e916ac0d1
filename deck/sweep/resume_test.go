package sweep

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// flipByte changes one byte in the middle of a file, keeping its size.
func flipByte(t *testing.T, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	data[len(data)/2] ^= 1
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// refused runs the sweep into dir and requires a --force-able refusal
// that names want and leaves the folder as it was, without building.
func refused(t *testing.T, f *File, dir, want string) {
	t.Helper()
	before := treeFiles(t, dir)
	logBefore, _ := os.ReadFile(filepath.Join(dir, HashLogName(Shard{})))
	r := &fakeRunner{}
	_, err := Run(context.Background(), f, dir, r, Options{Workers: 2})
	var fe *FolderError
	if !errors.As(err, &fe) || !fe.Forceable || !strings.Contains(err.Error(), want) {
		t.Fatalf("want a refusal naming %q, got %v", want, err)
	}
	logAfter, _ := os.ReadFile(filepath.Join(dir, HashLogName(Shard{})))
	if r.builds.Load() != 0 || !reflect.DeepEqual(before, treeFiles(t, dir)) || !bytes.Equal(logBefore, logAfter) {
		t.Errorf("the refused run built %d decks or changed a file", r.builds.Load())
	}
}

// TestResumeWithoutSummary resumes a sweep whose summary is gone, as after
// a run killed before its end: the hash log written as each deck was built
// still tells a file recorded by content only (as mesh.cgns is) that was
// changed in place from one that was not. Without the log as well, such a
// file cannot be verified, and the deck is refused, not reused on trust;
// --force rebuilds it. A torn last line of the log (the kill came while it
// was written) makes only that line's deck unverifiable.
func TestResumeWithoutSummary(t *testing.T) {
	f := mustParse(t, fakeSweep)
	dir := t.TempDir()
	first, err := Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	removeSummary := func() {
		for _, name := range []string{"summary.json", "summary.csv"} {
			if err := os.Remove(filepath.Join(dir, name)); err != nil {
				t.Fatal(err)
			}
		}
	}
	removeSummary()
	r := &fakeRunner{}
	second, err := Run(context.Background(), f, dir, r, Options{Workers: 2})
	if err != nil || r.builds.Load() != 0 {
		t.Fatalf("resume from the hash log: %d builds, %v", r.builds.Load(), err)
	}
	if !reflect.DeepEqual(rowsWithoutRun(first.Rows), rowsWithoutRun(second.Rows)) {
		t.Error("the summary resumed from the hash log differs from the first")
	}

	victim := first.Rows[2]
	removeSummary()
	flipByte(t, filepath.Join(dir, victim.Name, "mesh.h5"))
	refused(t, f, dir, victim.Name+": mesh.h5 has the size but not the content the sweep recorded")

	logPath := filepath.Join(dir, HashLogName(Shard{}))
	if err := os.Remove(logPath); err != nil {
		t.Fatal(err)
	}
	refused(t, f, dir, ": mesh.h5 cannot be verified: its deck.yaml records only a hash of its content")
	r = &fakeRunner{}
	if _, err := Run(context.Background(), f, dir, r, Options{Workers: 2, Force: true}); err != nil || int(r.builds.Load()) != len(first.Rows) {
		t.Fatalf("--force: %d builds of %d, %v", r.builds.Load(), len(first.Rows), err)
	}

	// A torn last line.
	removeSummary()
	data, err := os.ReadFile(logPath)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(strings.TrimSuffix(string(data), "\n"), "\n")
	if len(lines) != len(first.Rows) {
		t.Fatalf("the log has %d lines for %d builds", len(lines), len(first.Rows))
	}
	last := lines[len(lines)-1]
	if err := os.WriteFile(logPath, []byte(strings.Join(lines[:len(lines)-1], "")+last[:len(last)/2]), 0o644); err != nil {
		t.Fatal(err)
	}
	var torn hashRecord
	if err := json.Unmarshal([]byte(last), &torn); err != nil {
		t.Fatal(err)
	}
	_, err = Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 2})
	var fe *FolderError
	if !errors.As(err, &fe) || len(fe.Problems) != 1 || !strings.HasSuffix(strings.SplitN(fe.Problems[0], ":", 2)[0], "-"+torn.ID) ||
		!strings.Contains(fe.Problems[0], "cannot be verified") {
		t.Errorf("a torn log line: %v", err)
	}
}

// TestAnotherBuildIsNamed resumes a sweep with another cvdeck build: the
// refusal says so, for the summary and for every deck, and does not blame
// an edit of the base case; a deck whose case file changed too says both.
// Merging shards of two builds says the builds differ.
func TestAnotherBuildIsNamed(t *testing.T) {
	f := mustParse(t, "base: wedge.yaml\nparameters:\n  a: [1, 2]\n")
	dir := t.TempDir()
	if _, err := Run(context.Background(), f, dir, &fakeRunner{version: "0.1.0+aaa"}, Options{Workers: 2}); err != nil {
		t.Fatal(err)
	}
	_, err := Run(context.Background(), f, dir, &fakeRunner{version: "0.1.0+bbb"}, Options{Workers: 2})
	build := "another cvdeck build (0.1.0+aaa vs this 0.1.0+bbb)"
	if err == nil || !strings.Contains(err.Error(), "summary.json: the summary of a sweep of wedge.yaml written by "+build+"; this run would replace it") ||
		strings.Count(err.Error(), ": a deck built by "+build+"; rebuilding would replace it") != 2 ||
		strings.Contains(err.Error(), "edit") || strings.Contains(err.Error(), "((") {
		t.Errorf("another build: %v", err)
	}
	_, err = Run(context.Background(), f, dir, &fakeRunner{version: "0.1.0+bbb", edit: "moved"}, Options{Workers: 2})
	if err == nil || !strings.Contains(err.Error(), ": a deck built by "+build+", and from other inputs: wedge.yaml has changed since, SHA-256 ") {
		t.Errorf("another build and an edit: %v", err)
	}
	// A summary that records the bare version may be of this build.
	_, err = Run(context.Background(), f, dir, &fakeRunner{version: "0.1.0+aaa+x"}, Options{Workers: 2})
	if err == nil || !strings.Contains(err.Error(), "another cvdeck build (0.1.0+aaa vs this 0.1.0+aaa+x), or before an edit of the base case") {
		t.Errorf("a build with the old version as its prefix: %v", err)
	}

	one, two := t.TempDir(), t.TempDir()
	Run(context.Background(), f, one, &fakeRunner{version: "0.1.0+aaa"}, Options{Workers: 1, Shard: Shard{1, 2}})
	Run(context.Background(), f, two, &fakeRunner{version: "0.1.0+bbb"}, Options{Workers: 1, Shard: Shard{2, 2}})
	_, _, err = MergeDirs([]string{one, two}, t.TempDir())
	if err == nil || !strings.Contains(err.Error(), "merge: the summaries were written by another cvdeck build (0.1.0+aaa vs 0.1.0+bbb)") ||
		!strings.Contains(err.Error(), "cvdeck 0.1.0+bbb: "+filepath.Join(two, "summary-shard-2-of-2.json")) ||
		strings.Contains(err.Error(), "base cases") {
		t.Errorf("merging two builds: %v", err)
	}
}

// TestMergeNamesVariants merges some of the shards of a sweep in which
// decks fail their checks: the missing variants, those failing and the
// shards not given are named, up to ten of each and then "and N more".
func TestMergeNamesVariants(t *testing.T) {
	f := mustParse(t, "base: wedge.yaml\nparameters:\n  a: {from: 1, to: 30, step: 1}\n  skew: [0.95]\n")
	all, err := f.Variants()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 2, Shard: Shard{1, 3}})
	Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 2, Shard: Shard{3, 3}})
	_, _, err = MergeDirs([]string{dir}, dir)
	var me *MergeError
	if !errors.As(err, &me) {
		t.Fatalf("merge: %v", err)
	}
	names := func(k int) []string {
		var out []string
		for _, v := range Select(all, Shard{k, 3}) {
			out = append(out, v.Name)
		}
		return out
	}
	missing, failing := names(2), append(names(1), names(3)...)
	sortByIndex(all, failing)
	if !reflect.DeepEqual(me.MissingNames, missing) || !reflect.DeepEqual(me.ChecksFailed, failing) || !reflect.DeepEqual(me.AbsentShards, []string{"2/3"}) {
		t.Fatalf("missing %v, failing %v, absent %v", me.MissingNames, me.ChecksFailed, me.AbsentShards)
	}
	msg := err.Error()
	for _, want := range []string{
		fmt.Sprintf("10 of 30 variants are missing: %s; no summary of shard 2/3 was given, so run or merge it", strings.Join(missing, ", ")),
		fmt.Sprintf("20 of 30 decks failed their checks: %s and 10 more", strings.Join(failing[:10], ", ")),
	} {
		if !strings.Contains(msg, want) {
			t.Errorf("the merge message lacks %q:\n%s", want, msg)
		}
	}
	// The sweep's own message names its decks that failed their checks.
	_, err = Run(context.Background(), f, t.TempDir(), &fakeRunner{}, Options{Workers: 2, Shard: Shard{2, 3}})
	var fe *FailedError
	if !errors.As(err, &fe) || !strings.Contains(err.Error(), "10 of 10 decks failed their checks: "+strings.Join(missing, ", ")) {
		t.Errorf("the sweep's message: %v", err)
	}
}

// sortByIndex puts folder names of variants of all into sweep order.
func sortByIndex(all []Variant, names []string) {
	at := map[string]int{}
	for _, v := range all {
		at[v.Name] = v.Index
	}
	slices.SortFunc(names, func(a, b string) int { return at[a] - at[b] })
}
