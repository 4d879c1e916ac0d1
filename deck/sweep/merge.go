package sweep

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strconv"
	"strings"
)

// MergeReport says what a merge found besides the rows.
type MergeReport struct {
	// Missing are the 0-based indexes of variants that no summary has.
	Missing []int
	// Duplicates are the ids of variants found in more than one summary
	// with the same content (apart from the run columns); one is kept.
	Duplicates []string
	// Conflicts are the ids of variants found more than once with
	// different content; the first one (in argument order) is kept.
	Conflicts []string
}

// MergeError is returned by Merge when variants are missing, conflict,
// failed, were not run or failed their checks; the merged summary is
// still returned. Its exit code is 1, as for a sweep with such variants.
type MergeError struct {
	Report MergeReport
	Total  int
	// Failed and NotRun are the folder names of the merged variants that
	// have no deck: failed, or not run (stopped before or during their
	// build); ChecksFailed counts the decks that failed their checks.
	Failed, NotRun []string
	ChecksFailed   int
}

func (e *MergeError) Error() string {
	var parts []string
	if n := len(e.Failed); n > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d variants failed (%s)", n, e.Total, strings.Join(first(e.Failed, 10), ", ")))
	}
	if n := len(e.NotRun); n > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d variants were not run (%s); run their shards again", n, e.Total, strings.Join(first(e.NotRun, 10), ", ")))
	}
	if e.ChecksFailed > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d decks failed their checks", e.ChecksFailed, e.Total))
	}
	if n := len(e.Report.Missing); n > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d variants are missing (summary indexes %s); run or merge the shards that hold them",
			n, e.Total, indexRanges(e.Report.Missing)))
	}
	if n := len(e.Report.Conflicts); n > 0 {
		parts = append(parts, fmt.Sprintf("%d variants differ between summaries (%s); the first summary given was kept",
			n, strings.Join(first(e.Report.Conflicts, 10), ", ")))
	}
	return strings.Join(parts, "; ")
}

// ExitCode is 1.
func (e *MergeError) ExitCode() int { return 1 }

func first(s []string, n int) []string {
	if len(s) > n {
		return append(s[:n:n], "...")
	}
	return s
}

// indexRanges writes indexes as ranges: "3, 5-9".
func indexRanges(idx []int) string {
	var parts []string
	for i := 0; i < len(idx); {
		j := i
		for j+1 < len(idx) && idx[j+1] == idx[j]+1 {
			j++
		}
		if i == j {
			parts = append(parts, strconv.Itoa(idx[i]))
		} else {
			parts = append(parts, fmt.Sprintf("%d-%d", idx[i], idx[j]))
		}
		i = j + 1
	}
	return strings.Join(first(parts, 20), ", ")
}

// sameContent compares two rows apart from the run columns and the file
// hashes, which differ between two builds of one deck.
func sameContent(a, b Row) bool {
	a.Run, a.Seconds, a.FileHashes = "", 0, nil
	b.Run, b.Seconds, b.FileHashes = "", 0, nil
	return reflect.DeepEqual(a, b)
}

// source names a summary in messages: its file, or its place in the list.
func (s *Summary) source(k int) string {
	if s.path != "" {
		return s.path
	}
	return fmt.Sprintf("summary %d", k+1)
}

// baseKey is what must agree between the shards of one sweep besides the
// plan: the base case file's name, its input hash and the cvdeck version.
func (s *Summary) baseKey() string {
	return s.Base + "\x00" + s.BaseHash + "\x00" + s.Version
}

// sameBase refuses summaries built from different base cases or by
// different cvdeck versions, naming each group of summaries that agree.
func sameBase(parts []*Summary) error {
	var keys []string
	groups := map[string][]string{}
	for k, p := range parts {
		key := p.baseKey()
		if groups[key] == nil {
			keys = append(keys, key)
		}
		groups[key] = append(groups[key], p.source(k))
	}
	if len(keys) == 1 {
		return nil
	}
	var b strings.Builder
	b.WriteString("merge: the summaries were built from different base cases, so their decks are not of one study:")
	for _, key := range keys {
		f := strings.SplitN(key, "\x00", 3)
		hash, version := short(f[1]), f[2]
		if hash == "" {
			hash = "not recorded"
		}
		if version == "" {
			version = "not recorded"
		}
		fmt.Fprintf(&b, "\n  %s (base input hash %s, cvdeck %s): %s", f[0], hash, version, strings.Join(first(groups[key], 10), ", "))
	}
	b.WriteString("\nrun the shards of the odd ones out again with the same base case and cvdeck (--force rebuilds their decks), then merge")
	return errors.New(b.String())
}

// Merge joins the summaries of the shards of one sweep into the summary of
// the whole sweep. Summaries of different sweeps (different plans) or
// built from different base cases (base file, base input hash or cvdeck
// version) are an error. Missing, conflicting, failed and not-run
// variants, and decks that failed their checks, give a *MergeError
// together with the merged summary; duplicates are only reported.
func Merge(parts []*Summary) (*Summary, MergeReport, error) {
	var rep MergeReport
	if len(parts) == 0 {
		return nil, rep, fmt.Errorf("merge: no summaries given")
	}
	if err := sameBase(parts); err != nil {
		return nil, rep, err
	}
	p0 := parts[0]
	out := &Summary{Sweep: p0.Sweep, Base: p0.Base, BaseHash: p0.BaseHash, Version: p0.Version,
		Parameters: p0.Parameters, Total: p0.Total, Plan: p0.Plan}
	byIndex := map[int]Row{}
	dup := map[string]bool{}
	conflict := map[string]bool{}
	for k, p := range parts {
		if p.Plan != p0.Plan || p.Total != p0.Total {
			return nil, rep, fmt.Errorf("merge: %s (shard %q, %d variants) is of another sweep than %s (shard %q, %d variants): their plans %s and %s differ",
				p.source(k), p.Shard, p.Total, p0.source(0), p0.Shard, p0.Total, p.Plan, p0.Plan)
		}
		for _, r := range p.Rows {
			if r.Index < 0 || r.Index >= out.Total {
				return nil, rep, fmt.Errorf("merge: summary %d has variant %s at index %d, outside the sweep's 0..%d", k+1, r.ID, r.Index, out.Total-1)
			}
			old, seen := byIndex[r.Index]
			switch {
			case !seen:
				byIndex[r.Index] = r
			case old.ID != r.ID:
				return nil, rep, fmt.Errorf("merge: summary %d has variant %s at index %d where another summary has %s, although their plans agree", k+1, r.ID, r.Index, old.ID)
			case sameContent(old, r):
				dup[r.ID] = true
			default:
				conflict[r.ID] = true
			}
		}
	}
	for i := 0; i < out.Total; i++ {
		r, ok := byIndex[i]
		if !ok {
			rep.Missing = append(rep.Missing, i)
			continue
		}
		out.Rows = append(out.Rows, r)
	}
	rep.Duplicates = sortedKeys(dup)
	rep.Conflicts = sortedKeys(conflict)
	out.Finish()
	me := &MergeError{Report: rep, Total: out.Total}
	for _, r := range out.Rows {
		switch {
		case r.Status == StatusFailed:
			me.Failed = append(me.Failed, r.Name)
		case r.Status == StatusNotRun:
			me.NotRun = append(me.NotRun, r.Name)
		case !r.Passed:
			me.ChecksFailed++
		}
	}
	if len(rep.Missing) > 0 || len(rep.Conflicts) > 0 || len(me.Failed) > 0 || len(me.NotRun) > 0 || me.ChecksFailed > 0 {
		return out, rep, me
	}
	return out, rep, nil
}

func sortedKeys(m map[string]bool) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// FindSummaries returns the summary files of an output folder: its shard
// summaries (summary-shard-K-of-N.json) in shard order, or, when it has
// none, its summary.json.
func FindSummaries(dir string) ([]string, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, fmt.Errorf("reading %s: %w", dir, err)
	}
	type shardFile struct {
		k, n int
		path string
	}
	var shards []shardFile
	whole := ""
	for _, e := range entries {
		name := e.Name()
		if e.IsDir() {
			continue
		}
		var k, n int
		if name != "summary.json" && isSummaryJSON(name) {
			fmt.Sscanf(name, "summary-shard-%d-of-%d.json", &k, &n)
			shards = append(shards, shardFile{k, n, filepath.Join(dir, name)})
		}
		if name == "summary.json" {
			whole = filepath.Join(dir, name)
		}
	}
	sort.Slice(shards, func(i, j int) bool {
		if shards[i].n != shards[j].n {
			return shards[i].n < shards[j].n
		}
		return shards[i].k < shards[j].k
	})
	var out []string
	for _, s := range shards {
		out = append(out, s.path)
	}
	if len(out) == 0 && whole != "" {
		out = append(out, whole)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s holds no sweep summary (summary.json or summary-shard-K-of-N.json)", dir)
	}
	return out, nil
}

// MergeDirs reads the summaries of the given output folders (see
// FindSummaries), merges them and writes summary.json and summary.csv into
// outDir, which it makes if need be. The decks stay where the shards wrote
// them. When the summary cannot be written, no summary is returned.
func MergeDirs(dirs []string, outDir string) (*Summary, MergeReport, error) {
	var parts []*Summary
	for _, d := range dirs {
		files, err := FindSummaries(d)
		if err != nil {
			return nil, MergeReport{}, err
		}
		for _, f := range files {
			s, err := ReadSummary(f)
			if err != nil {
				return nil, MergeReport{}, err
			}
			parts = append(parts, s)
		}
	}
	merged, rep, err := Merge(parts)
	if merged == nil {
		return nil, rep, err
	}
	if werr := os.MkdirAll(outDir, 0o755); werr != nil {
		return nil, rep, fmt.Errorf("merged summary: %w", werr)
	}
	if werr := merged.WriteFiles(outDir, Shard{}); werr != nil {
		return nil, rep, werr
	}
	return merged, rep, err
}
