package sweep

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"

	"cvdeck/deck"
)

const fakeSweep = `
base: wedge.yaml
parameters:
  thickness: {from: 0.06, to: 0.14, step: 0.02}
  angle: [0, 4, 8, 12]
  skew: [0.2]
constraints:
  - thickness * 100 + angle <= 22
refine: {levels: 2, ratio: 2}
`

func TestShardsPartitionTheSweep(t *testing.T) {
	f := mustParse(t, fakeSweep)
	all, err := f.Variants()
	if err != nil {
		t.Fatal(err)
	}
	for n := 1; n <= 7; n++ {
		seen := map[string]int{}
		var loads []float64
		for k := 1; k <= n; k++ {
			part := Select(all, Shard{K: k, N: n})
			load := 0.0
			for i, v := range part {
				if i > 0 && part[i-1].Index >= v.Index {
					t.Errorf("shard %d/%d is not in sweep order", k, n)
				}
				// The same id and name whatever the slicing.
				if all[v.Index].ID != v.ID || all[v.Index].Name != v.Name {
					t.Errorf("shard %d/%d changed variant %d", k, n, v.Index)
				}
				seen[v.ID]++
				load += cost(v)
			}
			loads = append(loads, load)
		}
		if len(seen) != len(all) {
			t.Errorf("%d shards cover %d of %d variants", n, len(seen), len(all))
		}
		for id, c := range seen {
			if c != 1 {
				t.Errorf("%d shards: variant %s is in %d shards", n, id, c)
			}
		}
		// LPT bound (Graham 1969): no shard exceeds the mean by more than
		// the largest single job.
		sort.Float64s(loads)
		total := 0.0
		for _, l := range loads {
			total += l
		}
		if loads[len(loads)-1] > total/float64(n)+4 {
			t.Errorf("%d shards: loads %v are not balanced", n, loads)
		}
	}
	// Equal costs: a round robin, sizes differ by at most one.
	g := mustParse(t, "base: a.yaml\nparameters:\n  a: {from: 1, to: 10, count: 10}\n")
	vs, _ := g.Variants()
	if got := Assign(vs, 3); !reflect.DeepEqual(got, []int{1, 2, 3, 1, 2, 3, 1, 2, 3, 1}) {
		t.Errorf("round robin: %v", got)
	}
}

func TestParseShard(t *testing.T) {
	if s, err := ParseShard("3/8"); err != nil || s != (Shard{3, 8}) {
		t.Errorf("3/8: %v %v", s, err)
	}
	for _, bad := range []string{"0/4", "5/4", "4", "a/b", "1/0", "-1/2"} {
		if _, err := ParseShard(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// rowsWithoutRun strips the run columns, which describe a run rather
// than the sweep.
func rowsWithoutRun(rows []Row) []Row {
	out := append([]Row(nil), rows...)
	for i := range out {
		out[i].Run, out[i].Seconds, out[i].FileHashes = "", 0, nil
	}
	return out
}

// csvWithoutRun drops the last two CSV columns (run, seconds).
func csvWithoutRun(t *testing.T, data []byte) string {
	t.Helper()
	var b strings.Builder
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		f := strings.Split(line, ",")
		if len(f) < 3 {
			t.Fatalf("short CSV line %q", line)
		}
		b.WriteString(strings.Join(f[:len(f)-2], ","))
		b.WriteByte('\n')
	}
	return b.String()
}

// treeFiles returns every file under dir except the summaries, relative
// path to content.
func treeFiles(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() || strings.HasPrefix(d.Name(), "summary") {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		out[rel], err = os.ReadFile(p)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func TestShardsTogetherEqualTheWholeRun(t *testing.T) {
	f := mustParse(t, fakeSweep)
	whole := t.TempDir()
	ws, err := Run(context.Background(), f, whole, &fakeRunner{}, Options{Workers: 3})
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{1, 3, 5} {
		shared := t.TempDir()
		for k := n; k >= 1; k-- { // any order of the shards
			if _, err := Run(context.Background(), f, shared, &fakeRunner{}, Options{Workers: 1 + k%2, Shard: Shard{k, n}}); err != nil {
				t.Fatal(err)
			}
		}
		if n == 1 {
			// 1/1 is the whole sweep and writes summary.json itself.
			if _, err := os.Stat(filepath.Join(shared, "summary.json")); err != nil {
				t.Fatal(err)
			}
		}
		merged, rep, err := MergeDirs([]string{shared}, shared)
		if err != nil || len(rep.Duplicates) > 0 {
			t.Fatalf("%d shards: merge: %v %+v", n, err, rep)
		}
		if !reflect.DeepEqual(rowsWithoutRun(merged.Rows), rowsWithoutRun(ws.Rows)) || merged.Plan != ws.Plan {
			t.Errorf("%d shards: merged rows differ from the whole run", n)
		}
		a, _ := os.ReadFile(filepath.Join(whole, "summary.csv"))
		b, _ := os.ReadFile(filepath.Join(shared, "summary.csv"))
		if csvWithoutRun(t, a) != csvWithoutRun(t, b) {
			t.Errorf("%d shards: summary.csv differs apart from the run columns:\n%s\n%s", n, a, b)
		}
		wa, wb := treeFiles(t, whole), treeFiles(t, shared)
		if !reflect.DeepEqual(wa, wb) {
			t.Errorf("%d shards: decks differ: %d files against %d", n, len(wa), len(wb))
		}
	}
}

func TestMergeReportsMissingAndDuplicates(t *testing.T) {
	f := mustParse(t, fakeSweep)
	dir := t.TempDir()
	for _, k := range []int{1, 3} {
		if _, err := Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 1, Shard: Shard{k, 3}}); err != nil {
			t.Fatal(err)
		}
	}
	merged, rep, err := MergeDirs([]string{dir}, t.TempDir())
	var me *MergeError
	if !errors.As(err, &me) || me.ExitCode() != 1 {
		t.Fatalf("merging 2 of 3 shards: %v", err)
	}
	all, _ := f.Variants()
	want := 0
	for _, s := range Assign(all, 3) {
		if s == 2 {
			want++
		}
	}
	if len(rep.Missing) != want || len(merged.Rows)+want != len(all) {
		t.Errorf("missing %v, want the %d variants of shard 2", rep.Missing, want)
	}
	for _, i := range rep.Missing {
		if Assign(all, 3)[i] != 2 {
			t.Errorf("variant %d reported missing but belongs to a merged shard", i)
		}
	}
	if !strings.Contains(err.Error(), "are missing") {
		t.Errorf("error %q", err)
	}
	// The same shard twice: duplicates, reported, not an error.
	other := t.TempDir()
	for _, k := range []int{1, 2, 3} {
		Run(context.Background(), f, other, &fakeRunner{}, Options{Workers: 1, Shard: Shard{k, 3}})
	}
	// Into a folder that does not exist yet: it is made.
	fresh := filepath.Join(t.TempDir(), "merged", "all")
	_, rep, err = MergeDirs([]string{dir, other}, fresh)
	if err != nil || len(rep.Duplicates) == 0 {
		t.Errorf("duplicates: %v %+v", err, rep)
	}
	if _, err := os.Stat(filepath.Join(fresh, "summary.csv")); err != nil {
		t.Errorf("merging into a new folder: %v", err)
	}
	// Into a path that is a file: an error, and no summary to report.
	blocked := filepath.Join(t.TempDir(), "file")
	if err := os.WriteFile(blocked, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if s, _, err := MergeDirs([]string{dir, other}, blocked); err == nil || s != nil {
		t.Errorf("merging into a file: summary %v, error %v; want none and an error", s != nil, err)
	}
	// A different sweep cannot be merged in.
	g := mustParse(t, strings.Replace(fakeSweep, "[0, 4, 8, 12]", "[0, 4, 8]", 1))
	third := t.TempDir()
	Run(context.Background(), g, third, &fakeRunner{}, Options{Workers: 1})
	if _, _, err := MergeDirs([]string{dir, third}, t.TempDir()); err == nil || !strings.Contains(err.Error(), "another sweep") {
		t.Errorf("merging two sweeps: %v", err)
	}
}

func TestResumeRedoesNothing(t *testing.T) {
	f := mustParse(t, fakeSweep)
	dir := t.TempDir()
	r := &fakeRunner{}
	first, err := Run(context.Background(), f, dir, r, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	n := int(r.builds.Load())
	if n != len(first.Rows) {
		t.Fatalf("first run built %d of %d", n, len(first.Rows))
	}
	before := treeFiles(t, dir)
	r2 := &fakeRunner{}
	second, err := Run(context.Background(), f, dir, r2, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if r2.builds.Load() != 0 {
		t.Errorf("the resumed sweep built %d decks, want 0", r2.builds.Load())
	}
	for _, row := range second.Rows {
		if row.Run != RunReused {
			t.Errorf("%s: run %q, want reused", row.Name, row.Run)
		}
	}
	if !reflect.DeepEqual(rowsWithoutRun(first.Rows), rowsWithoutRun(second.Rows)) {
		t.Error("the resumed summary differs from the first apart from the run columns")
	}
	if !reflect.DeepEqual(before, treeFiles(t, dir)) {
		t.Error("the resumed sweep changed a deck")
	}
	r3 := &fakeRunner{}
	if _, err := Run(context.Background(), f, dir, r3, Options{Workers: 2, Force: true}); err != nil || int(r3.builds.Load()) != n {
		t.Errorf("--force rebuilt %d of %d (%v)", r3.builds.Load(), n, err)
	}
}

// TestChangedDecksAreNotRebuiltOver changes one file of a deck after the
// sweep built it, three ways: a file recorded by its hash, with another
// size and with the same size, and a file recorded by size only (as a
// CGNS file is) with the same size, which only the summary's record of
// its bytes reveals. Each time the next run refuses the folder, names the
// file and writes nothing; --force rebuilds the deck.
func TestChangedDecksAreNotRebuiltOver(t *testing.T) {
	f := mustParse(t, fakeSweep)
	dir := t.TempDir()
	first, err := Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	victim := first.Rows[3]
	for _, c := range []struct {
		file, content, want string
	}{
		{"mesh.dat", "a solver's output", "mesh.dat has 17 bytes where its deck.yaml records"},
		{"mesh.dat", "", "mesh.dat has the size but not the content its deck.yaml records"},
		{"mesh.h5", "", "mesh.h5 has the size but not the content the sweep recorded"},
	} {
		path := filepath.Join(dir, victim.Name, c.file)
		old, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		changed := []byte(c.content)
		if c.content == "" { // the same size, one byte other
			changed = append([]byte(nil), old...)
			changed[len(changed)/2] ^= 1
		}
		if err := os.WriteFile(path, changed, 0o644); err != nil {
			t.Fatal(err)
		}
		before := treeFiles(t, dir)
		summary, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
		r := &fakeRunner{}
		_, err = Run(context.Background(), f, dir, r, Options{Workers: 2})
		var fe *FolderError
		if !errors.As(err, &fe) || !errors.Is(err, deck.ErrInput) || fe.ExitCode() != 2 || !fe.Forceable ||
			!strings.Contains(err.Error(), victim.Name+": "+c.want) || !strings.Contains(err.Error(), "--force") {
			t.Fatalf("%s changed: %v", c.file, err)
		}
		if r.builds.Load() != 0 || !reflect.DeepEqual(before, treeFiles(t, dir)) {
			t.Errorf("%s changed: the refused run built %d decks or changed a file", c.file, r.builds.Load())
		}
		if now, _ := os.ReadFile(filepath.Join(dir, "summary.json")); !bytes.Equal(now, summary) {
			t.Errorf("%s changed: the refused run rewrote the summary", c.file)
		}
		r = &fakeRunner{}
		if _, err := Run(context.Background(), f, dir, r, Options{Workers: 2, Force: true}); err != nil {
			t.Fatal(err)
		}
		if data, _ := os.ReadFile(path); !bytes.Equal(data, old) {
			t.Errorf("%s changed: --force did not rebuild it", c.file)
		}
	}
}

// TestFolderOfAnotherStudyIsRefused runs a sweep into a folder that holds
// another study's decks and summary (the same folder names, another base
// case), and one whose base case was edited since: the first is refused
// even with --force, the second without it; nothing is written either way.
func TestFolderOfAnotherStudyIsRefused(t *testing.T) {
	// No swept parameters: every such study has the same folder names.
	f := mustParse(t, "base: wedge.yaml\nrefine: {levels: 2, ratio: 2}\n")
	dir := t.TempDir()
	if _, err := Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 2}); err != nil {
		t.Fatal(err)
	}
	before := treeFiles(t, dir)
	summary, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
	unchanged := func(what string) {
		t.Helper()
		now, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
		if !reflect.DeepEqual(before, treeFiles(t, dir)) || !bytes.Equal(now, summary) {
			t.Errorf("%s: the refused run changed the folder", what)
		}
	}
	for _, force := range []bool{false, true} {
		r := &fakeRunner{name: "aerofoil"}
		_, err := Run(context.Background(), f, dir, r, Options{Workers: 2, Force: force})
		var fe *FolderError
		if !errors.As(err, &fe) || fe.Forceable || r.builds.Load() != 0 ||
			!strings.Contains(err.Error(), `level1-`+ID("")+`: a deck of case "wedge" (wedge.yaml), not of this sweep's base case "aerofoil" (wedge.yaml)`) ||
			!strings.Contains(err.Error(), "never replaces another study's") {
			t.Errorf("another case, force %v: %v", force, err)
		}
		unchanged("another case")
	}
	// Another base file: the summary says so, whatever the decks.
	g := mustParse(t, "base: other.yaml\nparameters:\n  a: [1, 2]\n")
	_, err := Run(context.Background(), g, dir, &fakeRunner{}, Options{Workers: 2, Force: true})
	if err == nil || !strings.Contains(err.Error(), "summary.json: the summary of a sweep of wedge.yaml, not of this sweep's base case other.yaml") {
		t.Errorf("another base file: %v", err)
	}
	unchanged("another base file")
	// Another sweep file of the same base case.
	h, err := Parse("/cases/other-sweep.yaml", []byte("base: wedge.yaml\nparameters:\n  a: [1, 2]\n"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = Run(context.Background(), h, dir, &fakeRunner{}, Options{Workers: 2})
	if err == nil || !strings.Contains(err.Error(), "summary.json: the summary of the sweep file sweep.yaml, not of other-sweep.yaml") {
		t.Errorf("another sweep file: %v", err)
	}
	unchanged("another sweep file")
	// The base case edited: refused, naming what changed; --force rebuilds.
	r := &fakeRunner{edit: "cells doubled"}
	_, err = Run(context.Background(), f, dir, r, Options{Workers: 2})
	var fe *FolderError
	if !errors.As(err, &fe) || !fe.Forceable || r.builds.Load() != 0 ||
		!strings.Contains(err.Error(), "summary.json: the summary of a sweep of wedge.yaml as it was before an edit") ||
		!strings.Contains(err.Error(), ": a deck built from other inputs than this sweep's: wedge.yaml has changed since, SHA-256 ") {
		t.Errorf("edited base: %v", err)
	}
	unchanged("edited base")
	s, err := Run(context.Background(), f, dir, r, Options{Workers: 2, Force: true})
	if err != nil || r.builds.Load() != 2 || s.BaseHash != r.base.InputHash {
		t.Errorf("edited base with --force: %d builds, %v", r.builds.Load(), err)
	}
}

func TestInterruptedSweepContinues(t *testing.T) {
	f := mustParse(t, fakeSweep)
	dir := t.TempDir()
	stop := make(chan struct{})
	var once sync.Once
	var mu sync.Mutex
	started := 0
	r := &fakeRunner{onBuild: func(v Variant) {
		mu.Lock()
		started++
		if started == 5 {
			once.Do(func() { close(stop) })
		}
		mu.Unlock()
	}}
	s, err := Run(context.Background(), f, dir, r, Options{Workers: 2, Stop: stop})
	var fe *FailedError
	if !errors.As(err, &fe) || fe.ExitCode() != 1 || !fe.Stopped || fe.Failed != 0 || fe.Interrupted != 0 {
		t.Fatalf("stopped run: %v", err)
	}
	built := int(r.builds.Load())
	notRun := 0
	for _, row := range s.Rows {
		switch row.Run {
		case RunNotRun:
			notRun++
			if row.Status != StatusNotRun || !strings.HasPrefix(row.Error, "not started") {
				t.Errorf("%s: status %q, error %q", row.Name, row.Status, row.Error)
			}
		case RunBuilt: // the builds in hand when the stop came finish
		default:
			t.Errorf("%s: run %q after a stop", row.Name, row.Run)
		}
	}
	if built+notRun != len(s.Rows) || notRun == 0 || built < 5 || fe.NotRun != notRun {
		t.Fatalf("built %d, not run %d (error says %d), of %d", built, notRun, fe.NotRun, len(s.Rows))
	}
	if !strings.Contains(err.Error(), fmt.Sprintf("the sweep was stopped before its end: %d of %d variants not started", notRun, len(s.Rows))) {
		t.Errorf("error %q", err)
	}
	r2 := &fakeRunner{}
	s2, err := Run(context.Background(), f, dir, r2, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if int(r2.builds.Load()) != notRun {
		t.Errorf("the continued sweep built %d, want the %d not run", r2.builds.Load(), notRun)
	}
	for _, row := range s2.Rows {
		if row.Status != StatusOK {
			t.Errorf("%s: %s", row.Name, row.Status)
		}
	}
}

// TestCancelStopsBuildsInProgress cancels the run's context while two
// builds wait for it, as the second Ctrl-C does: those rows say the build
// was stopped, not that it failed, and the rest were not started.
func TestCancelStopsBuildsInProgress(t *testing.T) {
	f := mustParse(t, fakeSweep)
	ctx, cancel := context.WithCancel(context.Background())
	var waiting sync.WaitGroup
	waiting.Add(2)
	r := &fakeRunner{build: func(ctx context.Context, v Variant) error {
		waiting.Done()
		<-ctx.Done()
		return fmt.Errorf("%w: %w", errStopped, ctx.Err())
	}}
	go func() {
		waiting.Wait()
		cancel()
	}()
	s, err := Run(ctx, f, t.TempDir(), r, Options{Workers: 2})
	var fe *FailedError
	if !errors.As(err, &fe) || !fe.Stopped || fe.Interrupted != 2 || fe.Failed != 0 || fe.NotRun != len(s.Rows)-2 {
		t.Fatalf("cancelled run: %+v %v", fe, err)
	}
	for _, row := range s.Rows[:2] {
		if row.Run != RunInterrupted || row.Status != StatusNotRun || !strings.HasPrefix(row.Error, "stopped while being built") {
			t.Errorf("%s: run %q, status %q, error %q", row.Name, row.Run, row.Status, row.Error)
		}
	}
	if !strings.Contains(s.Tally(), "2 stopped while being built") {
		t.Errorf("tally %q", s.Tally())
	}
}

func TestFailingVariantIsReportedAndOthersComplete(t *testing.T) {
	if _, err := Parse("s.yaml", []byte("base: a.yaml\nparameters:\n  fail: [0, 1, 0, 0]\n  skew: [0.1, 0.95]\n")); err == nil {
		t.Fatal("repeated values accepted")
	}
	f := mustParse(t, "base: a.yaml\nparameters:\n  fail: [0, 1, 2]\n  skew: [0.1, 0.95]\n")
	dir := t.TempDir()
	s, err := Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 2})
	var fe *FailedError
	if !errors.As(err, &fe) || fe.ExitCode() != 1 || fe.Failed != 2 || fe.ChecksFailed != 2 {
		t.Fatalf("got %v, want 2 failed variants and 2 failed checks", err)
	}
	for _, row := range s.Rows {
		failing := row.Params["fail"] == 1
		if failing != (row.Status == StatusFailed) {
			t.Errorf("%s: status %s", row.Name, row.Status)
		}
		if failing && row.Error != "segment 2 of loop 1 crosses segment 5 in "+filepath.Join(row.Name, "case.yaml") {
			t.Errorf("%s: error %q (want it relative to the output folder)", row.Name, row.Error)
		}
		if !failing {
			if _, err := os.Stat(filepath.Join(dir, row.Name, "deck.json")); err != nil {
				t.Errorf("%s: %v", row.Name, err)
			}
		}
	}
	csv, _ := os.ReadFile(filepath.Join(dir, "summary.csv"))
	if !bytes.Contains(csv, []byte("failed")) || !bytes.Contains(csv, []byte("crosses segment 5")) {
		t.Errorf("summary.csv does not report the failure:\n%s", csv)
	}
}

// TestRepresentativeSize checks h and the ratio on the three grids of the
// worked example of Celik et al. 2008 (J. Fluids Eng. 130, 078001, table
// 1, from memory): N = 18000, 8000, 4500 cells give r21 = 1.5 and
// r32 = 1.333 for one domain area.
func TestRepresentativeSize(t *testing.T) {
	s := &Summary{Rows: []Row{
		{Index: 0, Family: "f", Level: 1, Status: StatusOK, Cells: 4500, Area: 1},
		{Index: 1, Family: "f", Level: 2, Status: StatusOK, Cells: 8000, Area: 1},
		{Index: 2, Family: "f", Level: 3, Status: StatusOK, Cells: 18000, Area: 1},
		{Index: 3, Family: "g", Level: 1, Status: StatusOK, Cells: 1000, Area: 1},
		{Index: 4, Family: "g", Level: 2, Status: StatusOK, Cells: 1440, Area: 1, Name: "close"},
	}}
	s.Finish()
	if math.Abs(s.Rows[0].H-math.Sqrt(1.0/4500)) > 1e-15 {
		t.Errorf("h = %v", s.Rows[0].H)
	}
	if math.Abs(s.Rows[1].Ratio-4.0/3) > 1e-12 || math.Abs(s.Rows[2].Ratio-1.5) > 1e-12 || s.Rows[0].Ratio != 0 {
		t.Errorf("ratios %v %v %v", s.Rows[0].Ratio, s.Rows[1].Ratio, s.Rows[2].Ratio)
	}
	// sqrt(1440/1000) = 1.2 < 1.3: one warning, for that pair only.
	if len(s.Warnings) != 1 || !strings.HasPrefix(s.Warnings[0], "close: the effective refinement ratio from level 1 is 1.200") {
		t.Errorf("warnings %q", s.Warnings)
	}
}

func TestRefinementFamilyRun(t *testing.T) {
	f := mustParse(t, "base: a.yaml\nparameters:\n  skew: [0.1]\nrefine: {levels: 3, ratio: 1.2}\n")
	s, err := Run(context.Background(), f, t.TempDir(), &fakeRunner{}, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	// The fake's cell count grows with the factor squared, so the
	// effective ratio is the factor ratio (up to the rounding of N).
	for _, row := range s.Rows[1:] {
		if math.Abs(row.Ratio-1.2) > 2e-3 {
			t.Errorf("level %d: ratio %v, want 1.2", row.Level, row.Ratio)
		}
	}
	if len(s.Warnings) != 2 {
		t.Errorf("warnings %q, want two (1.2 < 1.3)", s.Warnings)
	}
	// Level 1 is the case as written and shares the plain variant's id.
	if s.Rows[0].ID != ID(Canonical([]Value{{"skew", 0.1}}, 1)) {
		t.Error("level 1 id differs from the plain variant's")
	}
}

func TestWorkersDoNotChangeTheResult(t *testing.T) {
	f := mustParse(t, fakeSweep)
	var ref map[string][]byte
	var refCSV string
	for _, j := range []int{1, 2, 4, 16} {
		dir := t.TempDir()
		if _, err := Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: j}); err != nil {
			t.Fatal(err)
		}
		files := treeFiles(t, dir)
		csv, _ := os.ReadFile(filepath.Join(dir, "summary.csv"))
		if ref == nil {
			ref, refCSV = files, csvWithoutRun(t, csv)
			continue
		}
		if !reflect.DeepEqual(files, ref) || csvWithoutRun(t, csv) != refCSV {
			t.Errorf("-j %d gives other decks or another summary", j)
		}
	}
}

func TestWriteList(t *testing.T) {
	f := mustParse(t, "base: a.yaml\nparameters:\n  a: [1, 2, 3, 4, 5]\n")
	var b bytes.Buffer
	if err := WriteList(&b, f, Shard{2, 2}, false); err != nil {
		t.Fatal(err)
	}
	vs, _ := f.Variants()
	want := "2 of 5 variants (shard 2/2)\n" +
		"     1  " + vs[1].ID + "  a=2-" + vs[1].ID + "\n" +
		"     3  " + vs[3].ID + "  a=4-" + vs[3].ID + "\n"
	if b.String() != want {
		t.Errorf("got\n%s\nwant\n%s", b.String(), want)
	}
	b.Reset()
	if err := WriteList(&b, f, Shard{}, true); err != nil || !strings.Contains(b.String(), `"name": "a=5-`+vs[4].ID+`"`) {
		t.Errorf("JSON list: %v\n%s", err, b.String())
	}
}

// TestSummaryCSVReadsBack reads summary.csv with Python's csv module
// (/usr/bin/python3, RFC 4180 dialect "excel") and checks that every row
// has the header's fields, including an error text with a comma, quotes
// and a line break.
func TestSummaryCSVReadsBack(t *testing.T) {
	if _, err := exec.LookPath("/usr/bin/python3"); err != nil {
		needTool(t, "/usr/bin/python3 is not installed")
	}
	s := &Summary{Parameters: []string{"a"}, Total: 2, Plan: "p", Rows: []Row{
		{Index: 0, ID: "x", Name: "a=1-x", Params: map[string]float64{"a": 1}, Refine: 1, Status: StatusOK, Passed: true,
			Verdict: "pass", Cells: 10, Area: 2, Worst: map[string]float64{"skewness": 0.25}, YplusMax: map[string]float64{"wing": 4.5},
			Run: RunBuilt, Seconds: 0.5},
		{Index: 1, ID: "y", Name: "a=2-y", Params: map[string]float64{"a": 2}, Refine: 1, Status: StatusFailed,
			Error: "loop \"outer\", segment 3:\ncrosses segment 7, at x=0.5", Run: RunFailed},
	}}
	s.Finish()
	path := filepath.Join(t.TempDir(), "summary.csv")
	if err := os.WriteFile(path, s.CSV(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("/usr/bin/python3", "-c", `
import csv, json, sys
rows = list(csv.DictReader(open(sys.argv[1], newline="")))
print(json.dumps(rows))`, path).Output()
	if err != nil {
		t.Fatal(err)
	}
	var rows []map[string]string
	if err := json.Unmarshal(out, &rows); err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0]["worst_skewness"] != "0.25" || rows[0]["yplus_max_wing"] != "4.5" || rows[1]["yplus_max_wing"] != "" ||
		rows[0]["h"] != FormatValue(math.Sqrt(0.2)) ||
		rows[1]["error"] != s.Rows[1].Error || rows[1]["status"] != "failed" || rows[1]["a"] != "2" {
		t.Errorf("Python read back %v", rows)
	}
}

// TestMergeRefusesMixedBaseCases merges two shards built from different
// states of the base case: the second shard's own run refuses the shared
// folder, and merging the shards from separate folders is refused with
// both summaries named.
func TestMergeRefusesMixedBaseCases(t *testing.T) {
	f := mustParse(t, fakeSweep)
	shared, other := t.TempDir(), t.TempDir()
	if _, err := Run(context.Background(), f, shared, &fakeRunner{}, Options{Workers: 2, Shard: Shard{1, 2}}); err != nil {
		t.Fatal(err)
	}
	edited := &fakeRunner{edit: "the wall moved"}
	_, err := Run(context.Background(), f, shared, edited, Options{Workers: 2, Shard: Shard{2, 2}})
	if err == nil || !strings.Contains(err.Error(), "summary-shard-1-of-2.json: another shard's summary, of wedge.yaml as it was before an edit") {
		t.Fatalf("second shard of an edited base into the shared folder: %v", err)
	}
	if _, err := Run(context.Background(), f, other, edited, Options{Workers: 2, Shard: Shard{2, 2}}); err != nil {
		t.Fatal(err)
	}
	s, _, err := MergeDirs([]string{shared, other}, t.TempDir())
	one, two := filepath.Join(shared, "summary-shard-1-of-2.json"), filepath.Join(other, "summary-shard-2-of-2.json")
	if s != nil || err == nil || !strings.Contains(err.Error(), "built from different base cases") ||
		!strings.Contains(err.Error(), "wedge.yaml, base input hash "+short(edited.base.InputHash)+", cvdeck test: "+two) ||
		!strings.Contains(err.Error(), ": "+one) {
		t.Errorf("merging shards of two base cases: summary %v, %v", s != nil, err)
	}
}

// TestMergeReportsFailedAndNotRun merges shards in which a variant failed
// and others were not started: the merge returns exit code 1 and names
// them, as the sweep itself does.
func TestMergeReportsFailedAndNotRun(t *testing.T) {
	f := mustParse(t, "base: a.yaml\nparameters:\n  fail: [0, 1]\n  skew: [0.1, 0.2, 0.3]\n")
	dir := t.TempDir()
	Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 1, Shard: Shard{1, 2}})
	stop := make(chan struct{})
	close(stop)
	Run(context.Background(), f, dir, &fakeRunner{}, Options{Workers: 1, Shard: Shard{2, 2}, Stop: stop})
	s, _, err := MergeDirs([]string{dir}, dir)
	var me *MergeError
	if !errors.As(err, &me) || me.ExitCode() != 1 || s == nil || len(s.Rows) != 6 {
		t.Fatalf("merge: %v", err)
	}
	all, _ := f.Variants()
	shard := Assign(all, 2)
	var failed, notRun []string
	for i, v := range all {
		switch {
		case shard[i] == 2:
			notRun = append(notRun, v.Name)
		case v.ParamMap()["fail"] == 1:
			failed = append(failed, v.Name)
		}
	}
	if !reflect.DeepEqual(me.Failed, failed) || !reflect.DeepEqual(me.NotRun, notRun) ||
		!strings.Contains(err.Error(), fmt.Sprintf("%d of 6 variants failed: %s;", len(failed), strings.Join(failed, ", "))) ||
		!strings.Contains(err.Error(), fmt.Sprintf("%d of 6 variants were not run, so run their shards again: %s", len(notRun), strings.Join(notRun, ", "))) {
		t.Errorf("failed %v, not run %v: %v", me.Failed, me.NotRun, err)
	}
}

// TestSummaryNamesFailingChecks checks the columns of a deck that fails
// its checks (failed cells and the failing metrics) and the refinement
// warning in summary.csv.
func TestSummaryNamesFailingChecks(t *testing.T) {
	f := mustParse(t, "base: a.yaml\nparameters:\n  skew: [0.95]\nrefine: {levels: 2, ratio: 1.2}\n")
	s, err := Run(context.Background(), f, t.TempDir(), &fakeRunner{}, Options{Workers: 1})
	var fe *FailedError
	if !errors.As(err, &fe) || fe.ChecksFailed != 2 {
		t.Fatalf("%v", err)
	}
	lines, err := csv.NewReader(bytes.NewReader(s.CSV())).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range lines[0] {
		col[h] = i
	}
	for k, rec := range lines[1:] {
		if rec[col["failed_cells"]] != strconv.Itoa(s.Rows[k].Cells/10) || rec[col["failing"]] != "skewness" || rec[col["warned_cells"]] != "0" {
			t.Errorf("row %d: failed_cells %q, failing %q, warned_cells %q", k, rec[col["failed_cells"]], rec[col["failing"]], rec[col["warned_cells"]])
		}
	}
	if w := lines[2][col["warning"]]; !strings.HasPrefix(w, "the effective refinement ratio from level 1 is 1.200") {
		t.Errorf("level 2 warning %q", w)
	}
	if w := lines[1][col["warning"]]; w != "" {
		t.Errorf("level 1 warning %q", w)
	}
}
