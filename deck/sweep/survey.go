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
	"slices"
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
	// The bytes' hashes of files recorded by content only that this
	// sweep found after building or reusing a deck, by variant id, from
	// the summaries and the hash logs of the folder. Every one of them is
	// of a deck this sweep built, so a file that matches any of them with
	// the same input hash is one it built.
	records := map[string][]hashRecord{}
	for _, e := range ents {
		name := e.Name()
		if e.IsDir() || !isSummaryJSON(name) {
			continue
		}
		s, err := ReadSummary(filepath.Join(outDir, name))
		switch {
		case err != nil:
			hard = append(hard, fmt.Sprintf("%s: not a sweep summary cvdeck can read: %v", name, errors.Unwrap(err)))
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
					records[row.ID] = append(records[row.ID], hashRecord{ID: row.ID, InputHash: row.InputHash, Files: row.FileHashes})
				}
			}
		}
	}
	for _, e := range ents {
		if !e.IsDir() && isHashLog(e.Name()) {
			recs, err := readHashLog(filepath.Join(outDir, e.Name()))
			if err != nil {
				soft = append(soft, fmt.Sprintf("%s: this hash log cannot be read, so the decks it records cannot be verified: %v", e.Name(), err))
			}
			for _, rec := range recs {
				records[rec.ID] = append(records[rec.ID], rec)
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
				it.problem = fmt.Sprintf("%s: its deck cannot be read, and rebuilding would replace it: %v", it.name, err)
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
			it.problem = fmt.Sprintf("%s: %s; rebuilding would replace it", it.name, inputChange(d, base, v, job.InputHash()))
			return
		}
		known := map[string][]string{}
		for _, rec := range records[v.ID] {
			if rec.InputHash == d.InputHash {
				for path, sum := range rec.Files {
					known[path] = append(known[path], sum)
				}
			}
		}
		problem, hashes := verifyFiles(dir, d.Files, known, false)
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
// cvdeck build, or other inputs. The base input hash covers the build, so
// when the builds differ an edit of the case file cannot be told apart and
// is not blamed; but a summary that records the bare version, as cvdeck
// wrote them before it recorded its build, may be of this very build.
func baseChange(version, hash string, base BaseCase) string {
	if version != base.Version {
		msg := "written by " + otherBuild(version, base.Version)
		if strings.HasPrefix(base.Version, version+"+") {
			msg += ", or before an edit of the base case: a summary that records the bare version cannot tell"
		}
		return msg
	}
	return fmt.Sprintf("as it was before an edit: base input hash %s then, %s now", short(hash), short(base.InputHash))
}

// otherBuild says that a deck or summary made by cvdeck then is of another
// cvdeck build than this one, now: "another cvdeck build (0.1.0+3f2a9c1b7e4d
// vs this 0.1.0+8d0e5a7c6b21)".
func otherBuild(then, now string) string {
	return fmt.Sprintf("another cvdeck build (%s vs this %s)", orNotRecorded(then), now)
}

// inputChange says how a deck's inputs differ from those of variant v of
// the sweep of base, whose input hash is hash: the cvdeck build, the
// input files that changed, appeared or went, and the swept parameters
// whose values differ ("a deck built from other inputs than this sweep's:
// nozzle.yaml has changed since, ...").
func inputChange(d Found, base BaseCase, v Variant, hash string) string {
	build := ""
	if d.Version != base.Version {
		build = "a deck built by " + otherBuild(d.Version, base.Version)
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
			diffs = append(diffs, fmt.Sprintf("%s has changed since, SHA-256 %s then and %s now", in.Path, short(in.SHA256), short(sum)))
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
	switch {
	case build != "" && len(diffs) == 0:
		return build
	case build != "":
		return build + ", and from other inputs: " + strings.Join(diffs, "; ")
	case len(diffs) == 0:
		diffs = append(diffs, fmt.Sprintf("its input hash is %s, this variant's %s", short(d.InputHash), short(hash)))
	}
	return "a deck built from other inputs than this sweep's: " + strings.Join(diffs, "; ")
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
// manifest records one, its bytes' SHA-256. A file the manifest records by
// content only (CGNS: content_sha256 is a hash of the arrays the writer
// stored, which cannot be recomputed from the file) must have the bytes'
// SHA-256 that a summary or hash log recorded for it, one of known[path];
// a deck just built (built true) has nothing to match and is only hashed.
// A file of a found deck for which nothing is recorded cannot be told
// from one changed in place, so it is a problem, not a reuse: rebuilding
// it would lose whatever was written into it. It returns "" when
// everything agrees, otherwise the first difference, and the bytes'
// SHA-256 of the files recorded by content only, to be recorded in the
// summary.
func verifyFiles(dir string, files []FileRecord, known map[string][]string, built bool) (string, map[string]string) {
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
			return fmt.Sprintf("%s cannot be read: %v", f.Path, err), nil
		}
		if fi.Size() != f.Bytes {
			return fmt.Sprintf("%s has %d bytes where its deck.yaml records %d: it was changed after the sweep built it", f.Path, fi.Size(), f.Bytes), nil
		}
		sum, err := hashFile(path)
		if err != nil {
			return fmt.Sprintf("%s cannot be read: %v", f.Path, err), nil
		}
		if f.SHA256 != "" {
			if sum != f.SHA256 {
				return fmt.Sprintf("%s has the size but not the content its deck.yaml records, SHA-256 %s where it records %s: it was changed after the sweep built it", f.Path, short(sum), short(f.SHA256)), nil
			}
			continue
		}
		if hashes == nil {
			hashes = map[string]string{}
		}
		hashes[f.Path] = sum
		if built {
			continue
		}
		want := known[f.Path]
		if len(want) == 0 {
			return fmt.Sprintf("%s cannot be verified: its deck.yaml records only a hash of its content, which cannot be recomputed from the file, and no summary or hash log in the output folder records the SHA-256 of its bytes, so a change of the same size would go unseen", f.Path), nil
		}
		if !slices.Contains(want, sum) {
			return fmt.Sprintf("%s has the size but not the content the sweep recorded, SHA-256 %s where it recorded %s: it was changed after the sweep built it", f.Path, short(sum), short(want[len(want)-1])), nil
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
