package sweep

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"
	"syscall"

	"gopkg.in/yaml.v3"

	"cvdeck/deck"
	"cvdeck/export/manifest"
	"cvdeck/quality"
)

// Pipeline is the Runner of the real cvdeck pipeline: deck.Load of the
// base case with the variant's parameters and refinement factor, then
// deck.Run into the variant's folder.
type Pipeline struct {
	// Base is the base case file.
	Base string
	// Options are passed to every deck.Run.
	Options deck.RunOptions
	// Exe, when set, is the cvdeck program: each variant is then built by
	// a child process, "Exe mesh BASE -o DIR --one-deck --set name=value
	// ... --refine F", instead of in this process, with GOMAXPROCS set to
	// Threads. Parallel workers need it to scale: the CGNS library keeps
	// global state, so within one process its writes take turns, while
	// separate processes write at the same time. Options must then be
	// zero (the child takes the case file's own).
	Exe string
	// Threads is the GOMAXPROCS of each child process (0: the Go default).
	Threads int

	// spare holds the quality evaluators of finished in-process builds,
	// one taken per build so that each worker checks its variants in
	// memory it has used before rather than in fresh pages.
	spareMu sync.Mutex
	spare   []*quality.Evaluator
}

// evaluator takes a spare quality evaluator, or a new one.
func (p *Pipeline) evaluator() *quality.Evaluator {
	p.spareMu.Lock()
	defer p.spareMu.Unlock()
	if n := len(p.spare); n > 0 {
		e := p.spare[n-1]
		p.spare = p.spare[:n-1]
		return e
	}
	return new(quality.Evaluator)
}

// release gives e back for the next build.
func (p *Pipeline) release(e *quality.Evaluator) {
	p.spareMu.Lock()
	defer p.spareMu.Unlock()
	p.spare = append(p.spare, e)
}

// NewPipeline returns the pipeline runner of a sweep file.
func NewPipeline(f *File) *Pipeline {
	return &Pipeline{Base: f.Base}
}

// LoadBase loads the base case as written and verifies that it defines every
// swept parameter. A base case that does not load is an error at the sweep
// file's base key, carrying the case's own error.
func (p *Pipeline) LoadBase(f *File) (BaseCase, error) {
	c, err := deck.Load(p.Base, deck.LoadOptions{})
	if err != nil {
		return BaseCase{}, &Error{File: f.Path, Line: f.BasePos.Line, Col: f.BasePos.Col, Msg: fmt.Sprintf("the base case as written does not load (it is %s: base is taken from the sweep file's folder, %s)", p.Base, filepath.Dir(f.Path)), Err: err}
	}
	defined := map[string]bool{}
	for _, n := range c.ParamOrder {
		defined[n] = true
	}
	for _, pr := range f.Params {
		if !defined[pr.Name] {
			names := strings.Join(c.ParamOrder, ", ")
			if names == "" {
				names = "none"
			}
			return BaseCase{}, &Error{File: f.Path, Line: pr.Pos.Line, Col: pr.Pos.Col,
				Msg: fmt.Sprintf("the base case %s defines no parameter %q (its parameters: %s)", filepath.Base(p.Base), pr.Name, names)}
		}
	}
	b := BaseCase{File: filepath.Base(p.Base), Name: c.Name, InputHash: c.InputHash, Version: deck.Build}
	for _, in := range c.Inputs {
		b.Inputs = append(b.Inputs, InputFile{Path: in.Path, SHA256: in.SHA256})
	}
	return b, nil
}

type pipelineJob struct {
	p *Pipeline
	c *deck.Case
	v Variant
}

// buildInChild builds the deck with the cvdeck program in a child process.
// Exit code 0 (checks pass) and 1 (deck written, a check failed) both
// leave a deck; any other outcome is an error carrying the child's
// message. The parameter values and the refinement factor are written in
// Go's shortest round-trip form, so the child loads exactly the case this
// process loaded (the same input hash). The child runs in a process group
// of its own, so that a terminal's Ctrl-C, which goes to the foreground
// group, reaches the sweep alone and the sweep decides what becomes of the
// builds in progress; cancelling ctx kills the child (see startChild).
func (j *pipelineJob) buildInChild(ctx context.Context, dir string) error {
	args := []string{"mesh", j.p.Base, "-o", dir, "--quiet", "--one-deck"}
	params := j.v.ParamMap()
	names := make([]string, 0, len(params))
	for n := range params {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		args = append(args, "--set", n+"="+strconv.FormatFloat(params[n], 'g', -1, 64))
	}
	if r := j.v.Refine; r != 0 && r != 1 {
		args = append(args, "--refine", strconv.FormatFloat(r, 'g', -1, 64))
	}
	cmd := exec.CommandContext(ctx, j.p.Exe, args...)
	cmd.Env = os.Environ()
	if j.p.Threads > 0 {
		cmd.Env = append(cmd.Env, "GOMAXPROCS="+strconv.Itoa(j.p.Threads))
	}
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	err := runChild(cmd)
	if ctx.Err() != nil {
		return fmt.Errorf("%w: %w", errStopped, ctx.Err())
	}
	var exit *exec.ExitError
	if errors.As(err, &exit) {
		if ws, ok := exit.Sys().(syscall.WaitStatus); ok && ws.Signaled() {
			return fmt.Errorf("the build (a child cvdeck mesh) was %w (%v) from outside the sweep", errSignalled, ws.Signal())
		}
		if exit.ExitCode() == 1 {
			return nil
		}
	}
	if err != nil {
		msg := strings.TrimSpace(strings.TrimPrefix(stderr.String(), "cvdeck: "))
		if msg == "" {
			msg = err.Error()
		}
		return errors.New(msg)
	}
	return nil
}

// Prepare loads the base case with v's parameters and refinement.
func (p *Pipeline) Prepare(ctx context.Context, v Variant) (Job, error) {
	c, err := deck.Load(p.Base, deck.LoadOptions{Params: v.ParamMap(), Refine: v.Refine})
	if err != nil {
		return nil, err
	}
	return &pipelineJob{p: p, c: c, v: v}, nil
}

func (j *pipelineJob) InputHash() string { return j.c.InputHash }

// Build runs the pipeline. A deck that was written but failed its checks
// is an outcome with Passed false, not an error. The outcome is read back
// from the deck's files, exactly as Existing reads it, so that a built and
// a reused deck give the same summary row. A build in this process (no
// Exe) is not stopped by ctx once started.
func (j *pipelineJob) Build(ctx context.Context, dir string) (Found, error) {
	if err := ctx.Err(); err != nil {
		return Found{}, fmt.Errorf("%w: %w", errStopped, err)
	}
	if j.p.Exe != "" {
		if err := j.buildInChild(ctx, dir); err != nil {
			return Found{}, err
		}
	} else {
		opts := j.p.Options
		opts.Evaluator = j.p.evaluator()
		_, err := deck.Run(j.c, dir, opts)
		j.p.release(opts.Evaluator)
		var checks *deck.CheckFailure
		if err != nil && !errors.As(err, &checks) {
			return Found{}, err
		}
	}
	d, ok, err := readDeck(dir)
	if err != nil {
		return Found{}, err
	}
	if !ok {
		return Found{}, fmt.Errorf("the pipeline wrote no %s into %s", manifest.FileName, filepath.Base(dir))
	}
	return d, nil
}

// Existing reads the manifest and quality report of the deck in dir; the
// sweep checks its files against the manifest (verifyFiles).
func (p *Pipeline) Existing(dir string) (Found, bool, error) {
	return readDeck(dir)
}

// manifestFile is the part of a deck's deck.yaml that the summary uses
// (the keys of export/manifest.Manifest).
type manifestFile struct {
	Version string `yaml:"cvdeck_version"`
	Case    struct {
		Name string `yaml:"name"`
		File string `yaml:"file"`
	} `yaml:"case"`
	InputHash  string      `yaml:"input_hash"`
	Inputs     []InputFile `yaml:"inputs"`
	Parameters []struct {
		Name  string  `yaml:"name"`
		Value float64 `yaml:"value"`
	} `yaml:"parameters"`
	Mesh struct {
		Nodes int `yaml:"nodes"`
		Cells int `yaml:"cells"`
		Faces int `yaml:"faces"`
		Area  struct {
			Value float64 `yaml:"value"`
		} `yaml:"area"`
	} `yaml:"mesh"`
	Tags []struct {
		Tag   string `yaml:"tag"`
		Yplus *struct {
			Max float64 `yaml:"max"`
		} `yaml:"yplus_estimate"`
	} `yaml:"boundary_tags"`
	Checks struct {
		Verdict     string `yaml:"verdict"`
		FailedCells int    `yaml:"failed_cells"`
		WarnedCells int    `yaml:"warned_cells"`
		Metrics     []struct {
			Name   string `yaml:"name"`
			Failed int    `yaml:"cells_failed"`
		} `yaml:"metrics"`
	} `yaml:"checks"`
	Files []FileRecord `yaml:"files"`
}

// qualityFile is the part of a deck's quality.json that the summary uses.
type qualityFile struct {
	Metrics []struct {
		Name  string   `json:"name"`
		Worse string   `json:"worse"`
		Min   *float64 `json:"min"`
		Max   *float64 `json:"max"`
	} `json:"metrics"`
	Connectivity []struct {
		Name   string `json:"name"`
		Status string `json:"status"`
	} `json:"connectivity"`
}

// readDeck reads a deck: counts, area, verdict, failed cells and the
// metrics that failed, where it came from and its files from deck.yaml;
// each metric's worst value (its maximum, or its minimum for a metric that
// gets worse as it falls) and the connectivity checks that failed from
// quality.json. ok is false when dir has no deck.yaml.
func readDeck(dir string) (Found, bool, error) {
	path := filepath.Join(dir, manifest.FileName)
	mdata, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return Found{}, false, nil
	}
	if err != nil {
		return Found{}, false, err
	}
	var m manifestFile
	if err := yaml.Unmarshal(mdata, &m); err != nil {
		return Found{}, false, fmt.Errorf("%s: %w", path, err)
	}
	d := Found{
		Outcome: Outcome{
			InputHash:   m.InputHash,
			Cells:       m.Mesh.Cells,
			Faces:       m.Mesh.Faces,
			Nodes:       m.Mesh.Nodes,
			Area:        m.Mesh.Area.Value,
			Verdict:     m.Checks.Verdict,
			Passed:      m.Checks.Verdict != "fail", // pass, warn or fail
			FailedCells: m.Checks.FailedCells,
			WarnedCells: m.Checks.WarnedCells,
		},
		Case: m.Case.Name, File: filepath.Base(m.Case.File), Version: m.Version,
		Inputs: m.Inputs, Files: m.Files,
	}
	out := &d.Outcome
	for _, mt := range m.Checks.Metrics {
		if mt.Failed > 0 {
			out.Failing = append(out.Failing, mt.Name)
		}
	}
	for _, p := range m.Parameters {
		if d.Params == nil {
			d.Params = map[string]float64{}
		}
		d.Params[p.Name] = p.Value
	}
	for _, tag := range m.Tags {
		if tag.Yplus != nil {
			if out.YplusMax == nil {
				out.YplusMax = map[string]float64{}
			}
			out.YplusMax[tag.Tag] = tag.Yplus.Max
		}
	}
	data, err := os.ReadFile(filepath.Join(dir, "quality.json"))
	if err != nil {
		return Found{}, false, fmt.Errorf("reading the deck's quality report: %w", err)
	}
	var q qualityFile
	if err := json.NewDecoder(bytes.NewReader(data)).Decode(&q); err != nil {
		return Found{}, false, fmt.Errorf("%s: %w", filepath.Join(dir, "quality.json"), err)
	}
	for _, mt := range q.Metrics {
		v := mt.Max
		if mt.Worse == "lower" {
			v = mt.Min
		}
		if v == nil {
			continue // no finite value: the metric did not apply
		}
		if out.Worst == nil {
			out.Worst = map[string]float64{}
		}
		out.Worst[mt.Name] = *v
	}
	for _, c := range q.Connectivity {
		if c.Status == "fail" {
			out.Failing = append(out.Failing, c.Name)
		}
	}
	return d, true, nil
}
