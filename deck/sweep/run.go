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
	// Worst holds the worst value of each quality metric.
	Worst map[string]float64
	// YplusMax holds, for each no-slip wall tag of a case with a target
	// y+, the largest y+ its first cells give (deck.yaml's
	// yplus_estimate).
	YplusMax map[string]float64
}

// Runner builds variant decks; the real one wraps deck.Load and deck.Run,
// tests use a fake.
type Runner interface {
	// Prepare readies v's deck without writing anything (loading the case
	// with v's parameters and refinement) and returns the job that builds it.
	Prepare(ctx context.Context, v Variant) (Job, error)
	// Existing reads the deck in dir. It returns ok false, and no error,
	// when dir holds no complete deck.
	Existing(dir string) (out Outcome, ok bool, err error)
}

// Checker is a Runner that can check a sweep file against the base case
// before any variant runs, so that a misspelt parameter is one located
// error instead of a failure of every variant.
type Checker interface {
	Check(f *File) error
}

// Job is a prepared variant.
type Job interface {
	// InputHash is the hash of the deck's inputs, known before building.
	InputHash() string
	// Build writes the deck into dir (atomically: an interrupted build
	// leaves the old deck or none).
	Build(ctx context.Context, dir string) (Outcome, error)
}

// Options steer a sweep run.
type Options struct {
	// Workers is the number of variants built at once; 0 means the number
	// of cores.
	Workers int
	// Shard selects one slice of the variants; the zero value runs all.
	Shard Shard
	// Force rebuilds decks whose inputs have not changed.
	Force bool
	// Progress, if not nil, is called after each variant from a single
	// goroutine, in completion order.
	Progress func(Progress)
}

// Progress reports a sweep's advance.
type Progress struct {
	Done, Total, Failed int
	// Row is the variant just finished.
	Row Row
}

// FailedError reports a sweep in which some variants have no deck or a
// deck that failed its checks, or that was interrupted (Err is then the
// context's error). Its exit code is 1, as for a single case whose checks
// fail; the summary has been written.
type FailedError struct {
	Failed, NotRun, ChecksFailed, Total int
	Err                                 error
}

func (e *FailedError) Error() string {
	var parts []string
	if e.Err != nil {
		parts = append(parts, fmt.Sprintf("sweep interrupted (%v): %d of %d variants not run; run it again to continue", e.Err, e.NotRun, e.Total))
	}
	if e.Failed > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d variants failed", e.Failed, e.Total))
	}
	if e.ChecksFailed > 0 {
		parts = append(parts, fmt.Sprintf("%d of %d decks failed their checks", e.ChecksFailed, e.Total))
	}
	return strings.Join(parts, "; ") + " (see the summary)"
}

// Unwrap returns the context's error of an interrupted sweep.
func (e *FailedError) Unwrap() error { return e.Err }

// ExitCode is 1.
func (e *FailedError) ExitCode() int { return 1 }

// Run expands the sweep file, runs the variants of opt.Shard on
// opt.Workers workers into outDir/<variant name>, and writes the summary
// files into outDir (see SummaryFiles). Failing variants do not stop the
// others. A variant whose folder holds a deck with the same input hash is
// kept unless opt.Force. It returns the summary, and a *FailedError when
// any variant failed or failed its checks. When ctx is cancelled the
// summary is still written, with the variants not reached marked not run,
// and the *FailedError wraps ctx's error.
func Run(ctx context.Context, f *File, outDir string, r Runner, opt Options) (*Summary, error) {
	all, err := f.Variants()
	if err != nil {
		return nil, err
	}
	if c, ok := r.(Checker); ok {
		if err := c.Check(f); err != nil {
			return nil, err
		}
	}
	if err := os.MkdirAll(outDir, 0o755); err != nil {
		return nil, fmt.Errorf("creating the output folder: %w", err)
	}
	s := &Summary{
		Base:       filepath.Base(f.Base),
		Parameters: make([]string, len(f.Params)),
		Shard:      opt.Shard.String(),
		Total:      len(all),
		Plan:       planHash(all),
	}
	for i, p := range f.Params {
		s.Parameters[i] = p.Name
	}
	s.Rows = Execute(ctx, Select(all, opt.Shard), outDir, r, opt)
	s.Finish()
	if err := s.WriteFiles(outDir, opt.Shard); err != nil {
		return s, err
	}
	if failed, notRun, checks := s.Count(); failed+notRun+checks > 0 || ctx.Err() != nil {
		return s, &FailedError{Failed: failed, NotRun: notRun, ChecksFailed: checks, Total: len(s.Rows), Err: ctx.Err()}
	}
	return s, nil
}

// Execute runs the given variants and returns their rows in the given
// order, whatever order they finish in. After a cancel the workers finish
// the variants in hand and take no more; the others are marked not run.
func Execute(ctx context.Context, vs []Variant, outDir string, r Runner, opt Options) []Row {
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
			for ctx.Err() == nil {
				i := int(next.Add(1)) - 1
				if i >= len(vs) {
					return
				}
				rows[i] = runOne(ctx, vs[i], outDir, r, opt.Force)
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
		if rows[i].Status != StatusOK {
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
			rows[i].Error = "the sweep was interrupted before this variant"
		}
	}
	return rows
}

func newRow(v Variant) Row {
	return Row{Index: v.Index, ID: v.ID, Name: v.Name, Params: v.ParamMap(), Level: v.Level, Refine: v.Refine, Family: v.Family}
}

// runOne builds or reuses one variant's deck and never panics: a panic in
// the pipeline becomes that variant's error, so the sweep goes on.
func runOne(ctx context.Context, v Variant, outDir string, r Runner, force bool) (row Row) {
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
	job, err := r.Prepare(ctx, v)
	if err != nil {
		return fail(err)
	}
	if !force {
		old, ok, err := r.Existing(dir)
		if err == nil && ok && old.InputHash == job.InputHash() {
			row.fill(old)
			row.Run = RunReused
			return row
		}
	}
	out, err := job.Build(ctx, dir)
	if err != nil {
		return fail(err)
	}
	if out.InputHash != job.InputHash() {
		return fail(errors.New("internal error: the deck's input hash differs from the prepared one"))
	}
	row.fill(out)
	row.Run = RunBuilt
	return row
}

func (r *Row) fill(o Outcome) {
	r.Status = StatusOK
	r.InputHash = o.InputHash
	r.Cells, r.Faces, r.Nodes = o.Cells, o.Faces, o.Nodes
	r.Area = o.Area
	r.Passed = o.Passed
	r.Verdict = o.Verdict
	r.Worst = o.Worst
	r.YplusMax = o.YplusMax
}
