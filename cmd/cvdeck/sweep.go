package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"runtime"
	"sync"
	"syscall"

	"github.com/spf13/cobra"

	"cvdeck/deck"
	"cvdeck/deck/sweep"
)

// sweepFlags are the flags of `cvdeck sweep`.
type sweepFlags struct {
	out, shard  string
	jobs        int
	force, list bool
}

// newSweepCommand returns `cvdeck sweep` and its `merge` sub-command. They
// read the root's --quiet and --json. Errors about the sweep file or the
// flags wrap deck.ErrInput (exit code 2); a sweep in which a variant
// failed or failed its checks returns a *sweep.FailedError after writing
// the summary, and a merge with missing or conflicting variants a
// *sweep.MergeError: both have ExitCode() 1.
func newSweepCommand() *cobra.Command {
	var fl sweepFlags
	cmd := &cobra.Command{
		Use:   "sweep SWEEP.yaml -o DIR",
		Short: "Build the decks of a parameter sweep or a refinement family",
		Long: `sweep builds one deck per variant of a sweep file into DIR/<variant folder>,
on -j workers, and writes DIR/summary.csv and DIR/summary.json (with --shard
K/N: DIR/summary-shard-K-of-N.csv and .json). A variant whose folder already
holds an intact deck built from the same inputs is kept, so an interrupted
sweep continues where it stopped (DIR/summary-hashes.jsonl records the bytes
of each mesh.cgns as it is built, for a run killed before its summary). Before writing anything, sweep refuses a
DIR holding decks or summaries of another study (exit code 2), and decks it
would replace because the base case or cvdeck changed or their files were
changed since (--force rebuilds those). A failing variant does not stop the
others; the exit code is then 1. The first Ctrl-C (or SIGTERM) starts no more
variants and lets those being built finish; a second one stops them.

--shard K/N runs only the K-th of N balanced slices (K from 1, as a job
array's task id), so a scheduler can spread the sweep; 'cvdeck sweep merge'
joins the shard summaries.`,
		Example: `  cvdeck sweep samples/sweeps/nozzle-throat-exit.yaml -o out/nozzle -j 2
  cvdeck sweep nozzle-throat-exit.yaml --list --shard 3/8
  cvdeck sweep nozzle-throat-exit.yaml -o out --shard $SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT
  cvdeck sweep merge out`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runSweep(cmd, args[0], fl)
		},
	}
	f := cmd.Flags()
	f.StringVarP(&fl.out, "out", "o", "", "output folder (required)")
	f.IntVarP(&fl.jobs, "jobs", "j", runtime.NumCPU(), "variants built at once")
	f.StringVar(&fl.shard, "shard", "", "run only slice K of N (K/N, K from 1)")
	f.BoolVar(&fl.force, "force", false, "rebuild every deck of the run, also decks of an edited base case or with files changed since")
	f.BoolVar(&fl.list, "list", false, "list the variants (of the shard) and build nothing")
	cmd.AddCommand(newSweepMergeCommand())
	return cmd
}

// globalFlag reads one of the root's persistent boolean flags (--quiet,
// --json); false when the command runs without that root.
func globalFlag(cmd *cobra.Command, name string) bool {
	v, err := cmd.Flags().GetBool(name)
	return err == nil && v
}

func runSweep(cmd *cobra.Command, path string, fl sweepFlags) error {
	quiet, jsonOut := globalFlag(cmd, "quiet"), globalFlag(cmd, "json")
	if fl.out == "" && !fl.list {
		return fmt.Errorf("%w: sweep: give the output folder with -o DIR", deck.ErrInput)
	}
	if fl.jobs < 1 {
		return fmt.Errorf("%w: sweep: -j %d: the number of workers must be at least 1", deck.ErrInput, fl.jobs)
	}
	var shard sweep.Shard
	if fl.shard != "" {
		s, err := sweep.ParseShard(fl.shard)
		if err != nil {
			return fmt.Errorf("%w: sweep: --shard: %w", deck.ErrInput, err)
		}
		shard = s
	}
	f, err := sweep.ReadFile(path)
	if err != nil {
		return err
	}
	p := newPipeline(f, fl.jobs)
	if fl.list {
		// The same checks of the base case as a run makes, so that a list
		// that succeeds is one a run can build.
		if _, err := p.LoadBase(f); err != nil {
			return err
		}
		return sweep.WriteList(cmd.OutOrStdout(), f, shard, jsonOut)
	}
	stderr := cmd.ErrOrStderr()
	var bar *sweep.Bar
	if file, ok := stderr.(*os.File); ok && !quiet && sweep.IsTerminal(file) {
		bar = sweep.NewBar(stderr)
	}
	ctx, cancel := context.WithCancel(cmd.Context())
	defer cancel()
	stop := make(chan struct{})
	finished := make(chan struct{})
	defer close(finished)
	var mu sync.Mutex // the bar and the signal notes share stderr
	note := func(msg string) {
		if quiet {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		if bar != nil {
			fmt.Fprint(stderr, "\r\033[K")
		}
		fmt.Fprintln(stderr, msg)
	}
	watchSignals(stop, cancel, finished, note)
	opt := sweep.Options{Workers: fl.jobs, Shard: shard, Force: fl.force, Stop: stop}
	if bar != nil {
		opt.Progress = func(pr sweep.Progress) {
			mu.Lock()
			defer mu.Unlock()
			bar.Update(pr)
		}
	}
	s, err := sweep.Run(ctx, f, fl.out, p, opt)
	if bar != nil {
		bar.Finish()
	}
	if s == nil {
		return err
	}
	if perr := printSweep(cmd.OutOrStdout(), stderr, s, fl.out, shard, jsonOut, quiet); perr != nil {
		return perr
	}
	return err
}

// watchSignals handles SIGINT (a terminal's Ctrl-C) and SIGTERM during a
// sweep until finished is closed. The first one closes stop: no variant is
// started after it and the builds in progress finish (the child processes
// run in process groups of their own, so the terminal's signal does not
// reach them). The second one calls cancel, which kills the builds in
// progress. Either way the summary is written. A third signal meets Go's
// default handling and ends the process.
func watchSignals(stop chan<- struct{}, cancel func(), finished <-chan struct{}, note func(string)) {
	sigs := make(chan os.Signal, 2)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	go func() {
		defer signal.Stop(sigs)
		select {
		case sig := <-sigs:
			note(fmt.Sprintf("cvdeck: %s: starting no more variants and letting those being built finish; a second one stops them", signalName(sig)))
			close(stop)
		case <-finished:
			return
		}
		select {
		case sig := <-sigs:
			note(fmt.Sprintf("cvdeck: %s again: stopping the builds in progress; their folders keep their previous decks or none", signalName(sig)))
			cancel()
		case <-finished:
		}
	}()
}

// signalName says which signal arrived in plain words.
func signalName(sig os.Signal) string {
	if sig == syscall.SIGTERM {
		return "terminate signal (SIGTERM)"
	}
	return "interrupt (SIGINT, Ctrl-C)"
}

// printSweep writes a sweep's summary as JSON on stdout with --json, and
// its closing report on report unless quiet.
func printSweep(stdout, report io.Writer, s *sweep.Summary, out string, shard sweep.Shard, jsonOut, quiet bool) error {
	if jsonOut {
		js, err := s.JSON()
		if err != nil {
			return err
		}
		if _, err := stdout.Write(js); err != nil {
			return err
		}
	}
	if !quiet {
		reportSweep(report, s, out, shard)
	}
	return nil
}

// reportSweep prints the failures, the builds stopped half-way, the
// warnings and a closing line.
func reportSweep(w io.Writer, s *sweep.Summary, out string, shard sweep.Shard) {
	for _, r := range s.Rows {
		switch {
		case r.Status == sweep.StatusFailed:
			fmt.Fprintf(w, "%s failed: %s\n", r.Name, r.Error)
		case r.Run == sweep.RunInterrupted:
			fmt.Fprintf(w, "%s: %s\n", r.Name, r.Error)
		}
	}
	for _, m := range s.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	_, csv := sweep.SummaryFiles(shard)
	fmt.Fprintf(w, "%s; summary in %s\n", s.Tally(), filepath.Join(out, csv))
}

// newSweepMergeCommand returns `cvdeck sweep merge`.
func newSweepMergeCommand() *cobra.Command {
	var out string
	cmd := &cobra.Command{
		Use:   "merge DIR...",
		Short: "Merge the shard summaries of a sweep into one",
		Long: `merge reads the shard summaries (summary-shard-K-of-N.json) of each DIR, or
its summary.json when it has none, checks that they come from one sweep, and
writes summary.json and summary.csv of the whole sweep into -o (default: the
first DIR). Summaries of another sweep, or built from another base case or
by another cvdeck build, are refused (exit code 2). It names the variants
that no shard has (and the shards missing), variants that failed or were
not run and decks that failed their checks (exit code 1), and counts
variants found twice. The decks stay where the shards wrote them.`,
		Example: `  cvdeck sweep merge out
  cvdeck sweep merge host1/out host2/out -o out`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, dirs []string) error {
			dest := out
			if dest == "" {
				dest = dirs[0]
			}
			s, rep, err := sweep.MergeDirs(dirs, dest)
			if s == nil {
				return err
			}
			if globalFlag(cmd, "json") {
				js, jerr := s.JSON()
				if jerr != nil {
					return jerr
				}
				if _, werr := cmd.OutOrStdout().Write(js); werr != nil {
					return werr
				}
			}
			if !globalFlag(cmd, "quiet") {
				w := cmd.ErrOrStderr()
				if len(rep.Duplicates) > 0 {
					fmt.Fprintf(w, "%d variants were found in more than one summary with the same content; one of each is kept\n", len(rep.Duplicates))
				}
				for _, m := range s.Warnings {
					fmt.Fprintf(w, "warning: %s\n", m)
				}
				fmt.Fprintf(w, "merged %d of %d variants into %s\n", len(s.Rows), s.Total, filepath.Join(dest, "summary.csv"))
			}
			return err
		},
	}
	cmd.Flags().StringVarP(&out, "out", "o", "", "folder for the merged summary (default: the first DIR)")
	return cmd
}

// newPipeline returns the sweep's pipeline: each variant is built by a
// child cvdeck process (this program), GOMAXPROCS shared out among the
// workers, so that the workers really run at once (the CGNS library takes
// one call at a time within a process) and every variant starts from a
// fresh heap. Measured on the benchmark sweep, a child per variant is also
// no slower than building in this process with one worker.
func newPipeline(f *sweep.File, workers int) *sweep.Pipeline {
	p := sweep.NewPipeline(f)
	if exe, err := os.Executable(); err == nil {
		p.Exe, p.Threads = exe, max(1, runtime.NumCPU()/workers)
	}
	return p
}
