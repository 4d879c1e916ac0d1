package sweep

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"

	"cvdeck/deck"
)

// prior is what the survey found in a variant's folder.
type prior struct {
	// job is the variant prepared while surveying, or nil.
	job Job
	// reuse is the folder's deck when it is current and intact.
	reuse *Found
	// hashes are the bytes' SHA-256 of reuse's files recorded by content
	// only, by path.
	hashes map[string]string
}

// FolderError refuses an output folder that holds decks or summaries a
// run would replace although they are not this sweep's current work.
// Nothing has been written. Its exit code is 2.
type FolderError struct {
	Dir string
	// Problems say, one each, what is in the folder and why it would be
	// lost ("level1-...: a deck of case ...").
	Problems []string
	// Forceable is true when every problem is one that --force settles by
	// rebuilding the decks of this sweep; false when the folder holds
	// another study's work, which --force does not replace.
	Forceable bool
}

// maxProblems bounds the problems a FolderError lists.
const maxProblems = 8

func (e *FolderError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "output folder %s holds work that this sweep would replace or mix with its own, so nothing was written:", e.Dir)
	for _, p := range e.Problems[:min(len(e.Problems), maxProblems)] {
		b.WriteString("\n  " + p)
	}
	if n := len(e.Problems) - maxProblems; n > 0 {
		fmt.Fprintf(&b, "\n  and %d more", n)
	}
	if e.Forceable {
		b.WriteString("\ngive another output folder, or run again with --force to rebuild (the decks and the summary listed are then replaced)")
	} else {
		b.WriteString("\ngive another output folder (or move away what is listed): --force rebuilds this sweep's own decks but never replaces another study's")
	}
	return b.String()
}

// Unwrap makes the refusal an input error (deck.ErrInput).
func (e *FolderError) Unwrap() error { return deck.ErrInput }

// ExitCode is 2: nothing was written.
func (e *FolderError) ExitCode() int { return 2 }

// survey reads what outDir holds before the run writes anything, and
// returns for each variant of vs what its folder holds. It refuses the
// folder (a *FolderError) when the run would replace
//
//   - a summary of another sweep file (sweepName is this one's name) or of
//     another base case, or a deck of another base case (another case
//     file name or case name): another study, never replaced, not even
//     with opt.Force;
//   - a summary written from another state of the base case (another base
//     input hash: its files edited, or another cvdeck version), or a deck
//     in one of the run's variant folders built from other inputs than the
//     variant's, or whose files differ from what its manifest (and, for
//     files recorded by content only, the summary) records: refused unless
//     opt.Force, which rebuilds them.
//
// Decks of this sweep in folders outside the run (other shards' variants,
// variants dropped from the sweep file) are left alone and do not matter.
// The deck folders are read by opt.Workers goroutines: checking a deck's
// files reads them whole to hash them.
func survey(ctx context.Context, outDir, sweepName string, base BaseCase, vs []Variant, r Runner, opt Options) ([]prior, error) {
	priors := make([]prior, len(vs))
	ents, err := os.ReadDir(outDir)
	if errors.Is(err, fs.ErrNotExist) {
		return priors, nil
	}
	if err != nil {
		if fi, serr := os.Stat(outDir); serr == nil && !fi.IsDir() {
			return nil, fmt.Errorf("%w: output folder %s exists and is not a folder", deck.ErrInput, outDir)
		}
		return nil, fmt.Errorf("%w: output folder %s: %w", deck.ErrInput, outDir, err)
	}
	var hard, soft []string
	own, _ := SummaryFiles(opt.Shard)
	records := map[string]Row{} // rows with recorded file hashes, by variant id
	for _, e := range ents {
		name := e.Name()
		if e.IsDir() || !isSummaryJSON(name) {
			continue
		}
		s, err := ReadSummary(filepath.Join(outDir, name))
		switch {
		case err != nil:
			hard = append(hard, fmt.Sprintf("%s: not a sweep summary cvdeck can read (%v)", name, errors.Unwrap(err)))
		case s.Base != base.File:
			hard = append(hard, fmt.Sprintf("%s: the summary of a sweep of %s, not of this sweep's base case %s", name, s.Base, base.File))
		case s.Sweep != "" && s.Sweep != sweepName:
			hard = append(hard, fmt.Sprintf("%s: the summary of the sweep file %s, not of %s", name, s.Sweep, sweepName))
		case s.BaseHash != "" && s.BaseHash != base.InputHash && name == own:
			soft = append(soft, fmt.Sprintf("%s: the summary of a sweep of %s %s; this run would replace it", name, s.Base, baseChange(s.Version, s.BaseHash, base)))
		case s.BaseHash != "" && s.BaseHash != base.InputHash:
			soft = append(soft, fmt.Sprintf("%s: another shard's summary, of %s %s; the shards would mix two states of the base case, which merge refuses, so run that shard again too", name, s.Base, baseChange(s.Version, s.BaseHash, base)))
		default:
			for _, row := range s.Rows {
				if len(row.FileHashes) > 0 {
					records[row.ID] = row
				}
			}
		}
	}
	byName := make(map[string]int, len(vs))
	for i, v := range vs {
		byName[v.Name] = i
	}
	type item struct {
		name string
		idx  int // position in vs, -1 for a folder outside the run
		// problem is what would be lost, hard when --force does not settle it.
		problem string
		hard    bool
	}
	var items []*item
	for _, e := range ents {
		if !e.IsDir() || strings.HasPrefix(e.Name(), ".") { // dot folders: temporaries of interrupted writes
			continue
		}
		idx, ok := byName[e.Name()]
		if !ok {
			idx = -1
		}
		items = append(items, &item{name: e.Name(), idx: idx})
	}
	look := func(it *item) {
		dir := filepath.Join(outDir, it.name)
		d, ok, err := r.Existing(dir)
		if err != nil {
			if it.idx >= 0 {
				it.problem = fmt.Sprintf("%s: its deck cannot be read (%v); rebuilding would replace it", it.name, err)
			}
			return
		}
		if !ok {
			return
		}
		if d.File != base.File || d.Case != base.Name {
			it.problem = fmt.Sprintf("%s: a deck of case %q (%s), not of this sweep's base case %q (%s)", it.name, d.Case, d.File, base.Name, base.File)
			it.hard = true
			return
		}
		if it.idx < 0 || opt.Force {
			return
		}
		v := vs[it.idx]
		job, err := r.Prepare(ctx, v)
		if err != nil {
			return // the variant fails the same way in the run, before writing anything
		}
		priors[it.idx].job = job
		if d.InputHash != job.InputHash() {
			it.problem = fmt.Sprintf("%s: a deck built from other inputs than this sweep's (%s); rebuilding would replace it", it.name, inputChange(d, base, v, job.InputHash()))
			return
		}
		var known map[string]string
		if rec, ok := records[v.ID]; ok && rec.InputHash == d.InputHash {
			known = rec.FileHashes
		}
		problem, hashes := verifyFiles(dir, d.Files, known)
		if problem != "" {
			it.problem = fmt.Sprintf("%s: %s; rebuilding would replace it", it.name, problem)
			return
		}
		priors[it.idx].reuse, priors[it.idx].hashes = &d, hashes
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	next := make(chan *item)
	var wg sync.WaitGroup
	for range min(workers, max(len(items), 1)) {
		wg.Go(func() {
			for it := range next {
				look(it)
			}
		})
	}
	for _, it := range items {
		next <- it
	}
	close(next)
	wg.Wait()
	for _, it := range items {
		switch {
		case it.problem == "":
		case it.hard:
			hard = append(hard, it.problem)
		default:
			soft = append(soft, it.problem)
		}
	}
	if len(hard) > 0 || (len(soft) > 0 && !opt.Force) {
		return nil, &FolderError{Dir: outDir, Problems: append(hard, soft...), Forceable: len(hard) == 0}
	}
	return priors, nil
}

// isSummaryJSON reports whether name is the name of a summary's JSON file:
// summary.json or summary-shard-K-of-N.json.
func isSummaryJSON(name string) bool {
	if name == "summary.json" {
		return true
	}
	var k, n int
	_, err := fmt.Sscanf(name, "summary-shard-%d-of-%d.json", &k, &n)
	return err == nil && name == fmt.Sprintf("summary-shard-%d-of-%d.json", k, n)
}

// baseChange says how a summary's base case differs from base: another
// cvdeck version, or other inputs.
func baseChange(version, hash string, base BaseCase) string {
	if version != base.Version {
		return fmt.Sprintf("written by cvdeck %s (this is cvdeck %s)", version, base.Version)
	}
	return fmt.Sprintf("as it was before an edit (base input hash %s then, %s now)", short(hash), short(base.InputHash))
}

// inputChange says how a deck's inputs differ from those of variant v of
// the sweep of base, whose input hash is hash: the cvdeck version, the
// input files that changed, appeared or went, and the swept parameters
// whose values differ.
func inputChange(d Found, base BaseCase, v Variant, hash string) string {
	if d.Version != base.Version {
		return fmt.Sprintf("built by cvdeck %s, this is cvdeck %s", d.Version, base.Version)
	}
	var diffs []string
	now := map[string]string{}
	for _, in := range base.Inputs {
		now[in.Path] = in.SHA256
	}
	then := map[string]bool{}
	for _, in := range d.Inputs {
		then[in.Path] = true
		sum, ok := now[in.Path]
		switch {
		case !ok:
			diffs = append(diffs, in.Path+" is no longer read")
		case sum != in.SHA256:
			diffs = append(diffs, fmt.Sprintf("%s has changed since (SHA-256 %s then, %s now)", in.Path, short(in.SHA256), short(sum)))
		}
	}
	for _, in := range base.Inputs {
		if !then[in.Path] {
			diffs = append(diffs, in.Path+" is read now and was not then")
		}
	}
	for _, p := range v.Params {
		if got, ok := d.Params[p.Name]; ok && got != p.Value {
			diffs = append(diffs, fmt.Sprintf("%s is %s there and %s in this sweep", p.Name, FormatValue(got), FormatValue(p.Value)))
		}
	}
	if len(diffs) == 0 {
		diffs = append(diffs, fmt.Sprintf("input hash %s, this variant's is %s", short(d.InputHash), short(hash)))
	}
	return strings.Join(diffs, "; ")
}

// short is the first 12 hex digits of a hash, enough to tell two apart
// in a message.
func short(hash string) string {
	if len(hash) > 12 {
		return hash[:12]
	}
	return hash
}

// verifyFiles checks a deck's files against its manifest: every listed
// file is inside the deck folder and has its recorded size and, where the
// manifest records one, its bytes' SHA-256. A file the manifest records
// by content only (CGNS) is compared with known, the bytes' hashes a
// summary recorded after an earlier run, when there is one; without one
// only its size is checked. It returns "" when everything agrees,
// otherwise the first difference, and the bytes' SHA-256 of the files
// recorded by content only, to be recorded in the summary.
func verifyFiles(dir string, files []FileRecord, known map[string]string) (string, map[string]string) {
	var hashes map[string]string
	for _, f := range files {
		if !filepath.IsLocal(f.Path) {
			return fmt.Sprintf("its deck.yaml lists %q, which is not inside the deck folder", f.Path), nil
		}
		path := filepath.Join(dir, f.Path)
		fi, err := os.Stat(path)
		if errors.Is(err, fs.ErrNotExist) {
			return fmt.Sprintf("%s, which its deck.yaml lists, is missing", f.Path), nil
		}
		if err != nil {
			return fmt.Sprintf("%s cannot be read (%v)", f.Path, err), nil
		}
		if fi.Size() != f.Bytes {
			return fmt.Sprintf("%s has %d bytes where its deck.yaml records %d: it was changed after the sweep built it", f.Path, fi.Size(), f.Bytes), nil
		}
		sum, err := hashFile(path)
		if err != nil {
			return fmt.Sprintf("%s cannot be read (%v)", f.Path, err), nil
		}
		want, where := f.SHA256, "its deck.yaml records"
		if want == "" {
			want, where = known[f.Path], "the summary recorded"
			if hashes == nil {
				hashes = map[string]string{}
			}
			hashes[f.Path] = sum
		}
		if want != "" && sum != want {
			return fmt.Sprintf("%s has the size but not the content %s (SHA-256 %s, recorded %s): it was changed after the sweep built it", f.Path, where, short(sum), short(want)), nil
		}
	}
	return "", hashes
}

// hashFile returns the hex SHA-256 of a file's bytes, read in a stream.
func hashFile(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}
