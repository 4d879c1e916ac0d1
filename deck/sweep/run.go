package sweep

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"time"
)

// Outcome is what building (or finding) one variant's deck gives.
type Outcome struct {
	// InputHash is the hash of everything that determines the deck.
	InputHash           string
	Cells, Faces, Nodes int
	// Area is the total mesh area in square metres.
	Area float64
	// Passed is true when the deck's quality and boundary checks passed.
	Passed bool
	// Verdict is the deck's short verdict text.
	Verdict string
	// FailedCells and WarnedCells count the cells past a fail or a warn
	// limit of any metric.
	FailedCells, WarnedCells int
	// Failing names the metrics with failed cells and the connectivity
	// checks that did not pass, in the report's order.
	Failing []string
	// Worst holds the worst value of each quality metric.
	Worst map[string]float64
	// YplusMax holds, for each no-slip wall tag of a case with a target
	// y+, the largest y+ its first cells give (deck.yaml's
	// yplus_estimate).
	YplusMax map[string]float64
}

// BaseCase identifies the base case of a sweep as loaded before any
// variant: a deck or a summary that records another case was made by
// another study, one that records other inputs or another cvdeck version
// by an earlier state of this one.
type BaseCase struct {
	// File is the case file's name without its folder.
	File string
	// Name is the case's name.
	Name string
	// InputHash is the input hash of the case as written (its files, its
	// own parameter values and the cvdeck version).
	InputHash string
	// Version is the cvdeck build (deck.Build: the version with the
	// commit it was built from), as deck.yaml records it: the input hash
	// covers it, so decks of two builds are never taken for each other.
	Version string
	// Inputs are the files the case reads, the case file first.
	Inputs []InputFile
}

// InputFile is a file a case reads, as a deck's manifest lists it.
type InputFile struct {
	Path   string `yaml:"path"`
	SHA256 string `yaml:"sha256"`
}

// FileRecord is one file of a deck as its manifest lists it.
type FileRecord struct {
	Path  string `yaml:"path"`
	Bytes int64  `yaml:"bytes"`
	// SHA256 is the hash of the file's bytes, empty for a file the
	// manifest records by content only (CGNS, content_sha256, since HDF5
	// stamps times into the file); a sweep records the bytes' hash of
	// those itself, in the summary (Row.FileHashes).
	SHA256 string `yaml:"sha256"`
}

// Found is a deck found in a variant's folder: its outcome and what it
// records about where it came from and what it holds.
type Found struct {
	Outcome
	// Case is the case's name, File its case file's name, Version the
	// cvdeck build that built the deck.
	Case, File, Version string
	// Inputs are the files the case read; Params its resolved parameters.
	Inputs []InputFile
	Params map[string]float64
	// Files are the deck's files.
	Files []FileRecord
}

// Runner builds variant decks; the real one wraps deck.Load and deck.Run
// (or a child cvdeck process), tests use a fake.
type Runner interface {
	// LoadBase loads the sweep's base case as written and checks that it
	// defines every swept parameter, so that a misspelt name is one
	// located error before anything is written rather than a failure of
	// every variant.
	LoadBase(f *File) (BaseCase, error)
	// Prepare readies v's deck without writing anything (loading the case
	// with v's parameters and refinement) and returns the job that builds it.
	Prepare(ctx context.Context, v Variant) (Job, error)
	// Existing reads the manifest and quality report of the deck in dir.
	// It returns ok false, and no error, when dir holds no deck.yaml.
	Existing(dir string) (d Found, ok bool, err error)
}

// Job is a prepared variant.
type Job interface {
	// InputHash is the hash of the deck's inputs, known before building.
	InputHash() string
	// Build writes the deck into dir (atomically: an interrupted build
	// leaves the old deck or none) and reads it back as Existing does.
	// When ctx is cancelled a build in progress is stopped and the error
	// wraps ctx's error.
	Build(ctx context.Context, dir string) (Found, error)
}

// Options steer a sweep run.
type Options struct {
	// Workers is the number of variants built at once; 0 means the number
	// of cores.
	Workers int
	// Shard selects one slice of the variants; the zero value runs all.
	Shard Shard
	// Force rebuilds every deck of the run, also those whose inputs have
	// not changed and those whose folder holds a deck this sweep would
	// otherwise refuse to replace (built from an edited base case or
	// another cvdeck version, or with files changed since).
	Force bool
	// Stop, when closed, ends the run gently: no variant is started after
	// it, the builds in progress finish. Cancelling Run's context instead
	// stops those builds too.
	Stop <-chan struct{}
	// Progress, if not nil, is called after each variant from a single
	// goroutine, in completion order.
	Progress func(Progress)
}

// stopped reports whether the run must start no more variants.
func (o Options) stopped(ctx context.Context) bool {
	if ctx.Err() != nil {
		return true
	}
	select {
	case <-o.Stop:
		return true
	default:
		return false
	}
}

// Progress reports a sweep's advance.
type Progress struct {
	Done, Total, Failed int
	// Row is the variant just finished.
	Row Row
}

// FailedError reports a sweep in which some variants have no deck, a deck
// that failed its checks, or were not built because the sweep was stopped.
// Its exit code is 1, as for a single case whose checks fail; the summary
// has been written.
type FailedError struct {
	Failed, ChecksFailed, Total int
	// FailedNames and ChecksFailedNames are the folder names of the
	// variants that failed and of the decks that failed their checks, in
	// sweep order.
	FailedNames, ChecksFailedNames []string
	// Interrupted counts the builds stopped while in progress, NotRun the
	// variants never started.
	Interrupted, NotRun int
	// Stopped is true when the sweep was stopped before its end.
	Stopped bool
}

func (e *FailedError) Error() string {
	var parts []string
	if e.Stopped {
		msg := fmt.Sprintf("the sweep was stopped before its end: %d of %d variants not started", e.NotRun, e.Total)
		if e.Interrupted > 0 {
			msg += fmt.Sprintf(", %d stopped while being built", e.Interrupted)
		}
		parts = append(parts, msg+"; run the same command again to build the rest")
	}
	if e.Failed > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d variants failed: %s", e.Failed, e.Total, nameList(e.FailedNames)))
	}
	if e.ChecksFailed > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d decks failed their checks: %s", e.ChecksFailed, e.Total, nameList(e.ChecksFailedNames)))
	}
	return strings.Join(parts, "; ") + " (see the summary)"
}

// ExitCode is 1.
func (e *FailedError) ExitCode() int { return 1 }

// Run expands the sweep file, runs the variants of opt.Shard on
// opt.Workers workers into outDir/<variant name>, and writes the summary
// files into outDir (see SummaryFiles). Before anything is written it
// surveys outDir (see survey) and refuses, with a *FolderError, a folder
// whose decks or summaries the run would replace without their being
// this sweep's own current work. Failing variants do not stop the others.
// A variant whose folder holds an intact deck with the same input hash is
// kept unless opt.Force. It returns the summary, and a *FailedError when
// any variant failed, failed its checks or was not built because the run
// was stopped (opt.Stop closed or ctx cancelled); the summary is written
// in every case.
func Run(ctx context.Context, f *File, outDir string, r Runner, opt Options) (*Summary, error) {
	// The base case first: constraints may use its parameters, and a case
	// that does not load is better reported by deck.Load than by the
	// constraints' reading of its parameters section.
	base, err := r.LoadBase(f)
	if err != nil {
		return nil, err
	}
	all, err := f.Variants()
	if err != nil {
		return nil, err
	}
	vs := Select(all, opt.Shard)
	priors, err := survey(ctx, outDir, filepath.Base(f.Path), base, vs, r, opt)
	if err != nil {
		return nil, err
	}
	if err := os.MkdirAll(outDir, 0o755); err != nil {
		return nil, fmt.Errorf("creating the output folder: %w", err)
	}
	s := &Summary{
		Sweep:      filepath.Base(f.Path),
		Base:       filepath.Base(f.Base),
		BaseHash:   base.InputHash,
		Version:    base.Version,
		Parameters: make([]string, len(f.Params)),
		Shard:      opt.Shard.String(),
		Total:      len(all),
		Plan:       planHash(all),
	}
	for i, p := range f.Params {
		s.Parameters[i] = p.Name
	}
	if !opt.Shard.Whole() {
		for _, v := range all {
			s.PlanNames = append(s.PlanNames, v.Name)
		}
	}
	log := &hashLog{path: filepath.Join(outDir, HashLogName(opt.Shard))}
	s.Rows = execute(ctx, vs, priors, outDir, r, log, opt)
	log.close()
	s.Finish()
	if err := s.WriteFiles(outDir, opt.Shard); err != nil {
		return s, err
	}
	failed, notRun, checks := s.Count()
	stopped := opt.stopped(ctx) && notRun > 0
	if failed+notRun+checks > 0 {
		e := &FailedError{Failed: failed, ChecksFailed: checks, Total: len(s.Rows), Stopped: stopped}
		for _, row := range s.Rows {
			switch row.Run {
			case RunInterrupted:
				e.Interrupted++
			case RunNotRun:
				e.NotRun++
			}
			switch {
			case row.Status == StatusFailed:
				e.FailedNames = append(e.FailedNames, row.Name)
			case row.Status == StatusOK && !row.Passed:
				e.ChecksFailedNames = append(e.ChecksFailedNames, row.Name)
			}
		}
		return s, e
	}
	return s, nil
}

// execute runs the given variants and returns their rows in the given
// order, whatever order they finish in. priors holds, by position in vs,
// what the survey found in their folders. Once the run is stopped the
// workers finish the variants in hand and take no more; the others are
// marked not run.
func execute(ctx context.Context, vs []Variant, priors []prior, outDir string, r Runner, log *hashLog, opt Options) []Row {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	workers = min(workers, max(len(vs), 1))
	rows := make([]Row, len(vs))
	finished := make([]bool, len(vs))
	done := make(chan int)
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for !opt.stopped(ctx) {
				i := int(next.Add(1)) - 1
				if i >= len(vs) {
					return
				}
				rows[i] = runOne(ctx, vs[i], priors[i], outDir, r, log, opt)
				finished[i] = true
				done <- i
			}
		}()
	}
	go func() {
		wg.Wait()
		close(done)
	}()
	progress := Progress{Total: len(vs)}
	for i := range done {
		progress.Done++
		if rows[i].Status == StatusFailed {
			progress.Failed++
		}
		if opt.Progress != nil {
			progress.Row = rows[i]
			opt.Progress(progress)
		}
	}
	for i, ok := range finished {
		if !ok {
			rows[i] = newRow(vs[i])
			rows[i].Status, rows[i].Run = StatusNotRun, RunNotRun
			rows[i].Error = "not started: the sweep was stopped before this variant"
		}
	}
	return rows
}

func newRow(v Variant) Row {
	return Row{Index: v.Index, ID: v.ID, Name: v.Name, Params: v.ParamMap(), Level: v.Level, Refine: v.Refine, Family: v.Family}
}

// runOne builds or reuses one variant's deck and never panics: a panic in
// the pipeline becomes that variant's error, so the sweep goes on. A build
// stopped by the run's cancellation gives a row that says so, not a
// failure: the folder keeps its previous deck or none. A deck built is
// recorded in log as soon as its files are hashed.
func runOne(ctx context.Context, v Variant, pr prior, outDir string, r Runner, log *hashLog, opt Options) (row Row) {
	start := time.Now()
	row = newRow(v)
	dir := filepath.Join(outDir, v.Name)
	fail := func(err error) Row {
		row.Status, row.Run = StatusFailed, RunFailed
		// The error text must not depend on where the sweep was run.
		row.Error = strings.ReplaceAll(err.Error(), outDir+string(filepath.Separator), "")
		return row
	}
	defer func() {
		if p := recover(); p != nil {
			row = fail(fmt.Errorf("internal error while building the deck: %v", p))
		}
		row.Seconds = math.Round(time.Since(start).Seconds()*1000) / 1000
	}()
	if pr.reuse != nil && !opt.Force {
		row.fill(pr.reuse.Outcome)
		row.FileHashes = pr.hashes
		row.Run = RunReused
		return row
	}
	job := pr.job
	if job == nil {
		var err error
		if job, err = r.Prepare(ctx, v); err != nil {
			return fail(err)
		}
	}
	d, err := job.Build(ctx, dir)
	if err != nil {
		if errors.Is(err, errStopped) || (ctx.Err() != nil && errors.Is(err, ctx.Err())) {
			row.Status, row.Run = StatusNotRun, RunInterrupted
			row.Error = "stopped while being built: the sweep was stopped a second time; the folder keeps its previous deck or none"
			return row
		}
		if opt.stopped(ctx) && errors.Is(err, errSignalled) {
			row.Status, row.Run = StatusNotRun, RunInterrupted
			row.Error = "stopped while being built: " + err.Error() + " while the sweep was stopping; the folder keeps its previous deck or none"
			return row
		}
		return fail(err)
	}
	if d.InputHash != job.InputHash() {
		return fail(errors.New("internal error: the deck's input hash differs from the prepared one"))
	}
	problem, hashes := verifyFiles(dir, d.Files, nil, true)
	if problem != "" {
		return fail(fmt.Errorf("internal error: the deck just built does not match its manifest: %s", problem))
	}
	log.add(hashRecord{ID: v.ID, InputHash: d.InputHash, Files: hashes})
	row.fill(d.Outcome)
	row.FileHashes = hashes
	row.Run = RunBuilt
	return row
}

// errStopped is wrapped by a build that the run's cancellation stopped.
var errStopped = errors.New("the build was stopped")

// errSignalled is wrapped by a build whose child process was ended by a
// signal that did not come from this run (from a scheduler's job
// cancellation, say, or the kernel's out-of-memory killer).
var errSignalled = errors.New("ended by a signal")

func (r *Row) fill(o Outcome) {
	r.Status = StatusOK
	r.InputHash = o.InputHash
	r.Cells, r.Faces, r.Nodes = o.Cells, o.Faces, o.Nodes
	r.Area = o.Area
	r.Passed = o.Passed
	r.Verdict = o.Verdict
	r.FailedCells, r.WarnedCells, r.Failing = o.FailedCells, o.WarnedCells, o.Failing
	r.Worst = o.Worst
	r.YplusMax = o.YplusMax
}
