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
	// Duplicates are the folder names of variants found in more than one
	// summary with the same content (apart from the run columns); one is
	// kept.
	Duplicates []string
	// Conflicts are the folder names of variants found more than once
	// with different content; the first one (in argument order) is kept.
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
	// build); ChecksFailed those of the decks that failed their checks.
	Failed, NotRun, ChecksFailed []string
	// MissingNames are the folder names of the missing variants, in sweep
	// order, when a shard summary lists the names of the whole sweep
	// (Summary.PlanNames); nil otherwise, and the indexes say which.
	MissingNames []string
	// AbsentShards are the shards ("K/N") of which no summary was given,
	// when every summary given is a shard of one split.
	AbsentShards []string
}

func (e *MergeError) Error() string {
	var parts []string
	if n := len(e.Failed); n > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d variants failed: %s", n, e.Total, nameList(e.Failed)))
	}
	if n := len(e.NotRun); n > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d variants were not run, so run their shards again: %s", n, e.Total, nameList(e.NotRun)))
	}
	if n := len(e.ChecksFailed); n > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d decks failed their checks: %s", n, e.Total, nameList(e.ChecksFailed)))
	}
	if n := len(e.Report.Missing); n > 0 {
		which := nameList(e.MissingNames)
		if e.MissingNames == nil {
			which = "summary indexes " + indexRanges(e.Report.Missing)
		}
		msg := fmt.Sprintf("%d of %d variants are missing: %s; ", n, e.Total, which)
		if len(e.AbsentShards) > 0 {
			msg += fmt.Sprintf("no summary of shard %s was given, so run or merge it", strings.Join(e.AbsentShards, ", "))
		} else {
			msg += "run or merge the shards that hold them"
		}
		parts = append(parts, msg)
	}
	if n := len(e.Report.Conflicts); n > 0 {
		parts = append(parts, fmt.Sprintf("%d variants differ between summaries, and the first summary given was kept: %s",
			n, nameList(e.Report.Conflicts)))
	}
	return strings.Join(parts, "; ")
}

// ExitCode is 1.
func (e *MergeError) ExitCode() int { return 1 }

// maxNames bounds the names a message lists before "and N more".
const maxNames = 10

// nameList joins names for a message: the first maxNames, then "and N
// more".
func nameList(names []string) string {
	if len(names) <= maxNames {
		return strings.Join(names, ", ")
	}
	return strings.Join(names[:maxNames], ", ") + fmt.Sprintf(" and %d more", len(names)-maxNames)
}

// indexRanges writes indexes as ranges: "3, 5-9", the first maxNames
// ranges, then "and N more".
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
	return nameList(parts)
}

// planNames returns the folder names of every variant of the sweep of
// parts, in sweep order, from the first summary that lists them for its
// plan (each name ends in its variant's id, and the ids in order give the
// plan), or nil when none does.
func planNames(parts []*Summary) []string {
	for _, p := range parts {
		if len(p.PlanNames) != p.Total {
			continue
		}
		var b strings.Builder
		for _, name := range p.PlanNames {
			b.WriteString(name[max(0, len(name)-IDLength):])
			b.WriteByte('\n')
		}
		if ID(b.String()) == p.Plan {
			return p.PlanNames
		}
	}
	return nil
}

// absentShards returns the shards of one split ("K/N") of which parts
// holds no summary, or nil when the summaries are not all shards of one
// split of the sweep.
func absentShards(parts []*Summary) []string {
	n := 0
	have := map[int]bool{}
	for _, p := range parts {
		sh, err := ParseShard(p.Shard)
		if p.Shard == "" || err != nil || (n != 0 && sh.N != n) {
			return nil
		}
		n = sh.N
		have[sh.K] = true
	}
	var out []string
	for k := 1; k <= n; k++ {
		if !have[k] {
			out = append(out, Shard{K: k, N: n}.String())
		}
	}
	return out
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
// different cvdeck builds, naming each group of summaries that agree. The
// base input hash covers the build, so when every group has its own build
// the message says the builds differ and does not blame an edit of the
// case file, which cannot be told apart.
func sameBase(parts []*Summary) error {
	var keys []string
	groups := map[string][]string{}
	versions := map[string]bool{}
	files := map[string]bool{}
	for k, p := range parts {
		key := p.baseKey()
		if groups[key] == nil {
			keys = append(keys, key)
			versions[p.Version] = true
			files[p.Base] = true
		}
		groups[key] = append(groups[key], p.source(k))
	}
	if len(keys) == 1 {
		return nil
	}
	var b strings.Builder
	builds := len(files) == 1 && len(versions) == len(keys)
	if builds {
		var vs []string
		for _, key := range keys {
			vs = append(vs, orNotRecorded(strings.SplitN(key, "\x00", 3)[2]))
		}
		fmt.Fprintf(&b, "merge: the summaries were written by another cvdeck build (%s), so their decks are not of one study:", strings.Join(vs, " vs "))
	} else {
		b.WriteString("merge: the summaries were built from different base cases, so their decks are not of one study:")
	}
	for _, key := range keys {
		f := strings.SplitN(key, "\x00", 3)
		fmt.Fprintf(&b, "\n  %s, base input hash %s, cvdeck %s: %s", f[0], orNotRecorded(short(f[1])), orNotRecorded(f[2]), nameList(groups[key]))
	}
	if builds {
		b.WriteString("\nrun the shards of the odd ones out again with one cvdeck build (--force rebuilds their decks), then merge")
	} else {
		b.WriteString("\nrun the shards of the odd ones out again with the same base case and cvdeck build (--force rebuilds their decks), then merge")
	}
	return errors.New(b.String())
}

// orNotRecorded is s, or "not recorded" when s is empty.
func orNotRecorded(s string) string {
	if s == "" {
		return "not recorded"
	}
	return s
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
				dup[old.Name] = true
			default:
				conflict[old.Name] = true
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
			me.ChecksFailed = append(me.ChecksFailed, r.Name)
		}
	}
	if len(rep.Missing) > 0 {
		if names := planNames(parts); names != nil {
			for _, i := range rep.Missing {
				me.MissingNames = append(me.MissingNames, names[i])
			}
		}
		me.AbsentShards = absentShards(parts)
	}
	if len(rep.Missing) > 0 || len(rep.Conflicts) > 0 || len(me.Failed) > 0 || len(me.NotRun) > 0 || len(me.ChecksFailed) > 0 {
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
