package sweep

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sync/atomic"
)

// fakeRunner stands in for the pipeline: its "deck" is one JSON file whose
// content depends only on the variant, its cell count grows with the
// square of the refinement factor, and a variant with fail=1 fails.
type fakeRunner struct {
	builds atomic.Int64
	// onBuild, if set, runs at the start of every build.
	onBuild func(v Variant)
}

type fakeJob struct {
	r    *fakeRunner
	v    Variant
	hash string
}

type fakeDeck struct {
	Canonical string  `json:"canonical"`
	Hash      string  `json:"hash"`
	Cells     int     `json:"cells"`
	Area      float64 `json:"area"`
	Skew      float64 `json:"skew"`
}

func (r *fakeRunner) Prepare(ctx context.Context, v Variant) (Job, error) {
	return &fakeJob{r: r, v: v, hash: ID("fake\n" + Canonical(v.Params, v.Refine))}, nil
}

func (r *fakeRunner) Existing(dir string) (Outcome, bool, error) {
	data, err := os.ReadFile(filepath.Join(dir, "deck.json"))
	if errors.Is(err, os.ErrNotExist) {
		return Outcome{}, false, nil
	}
	if err != nil {
		return Outcome{}, false, err
	}
	var d fakeDeck
	if err := json.Unmarshal(data, &d); err != nil {
		return Outcome{}, false, err
	}
	return d.outcome(), true, nil
}

func (d fakeDeck) outcome() Outcome {
	return Outcome{InputHash: d.Hash, Cells: d.Cells, Faces: 2 * d.Cells, Nodes: d.Cells + 1, Area: d.Area,
		Passed: d.Skew < 0.9, Verdict: map[bool]string{true: "pass", false: "fail"}[d.Skew < 0.9],
		Worst: map[string]float64{"skewness": d.Skew, "aspect_ratio": 1 + d.Skew}}
}

func (j *fakeJob) InputHash() string { return j.hash }

func (j *fakeJob) Build(ctx context.Context, dir string) (Outcome, error) {
	j.r.builds.Add(1)
	if j.r.onBuild != nil {
		j.r.onBuild(j.v)
	}
	p := j.v.ParamMap()
	if p["fail"] == 1 {
		return Outcome{}, fmt.Errorf("segment 2 of loop 1 crosses segment 5 in %s", filepath.Join(dir, "case.yaml"))
	}
	d := fakeDeck{
		Canonical: Canonical(j.v.Params, j.v.Refine),
		Hash:      j.hash,
		Cells:     int(math.Round(400 * j.v.Refine * j.v.Refine)),
		Area:      2.5,
		Skew:      p["skew"],
	}
	data, err := json.MarshalIndent(d, "", " ")
	if err != nil {
		return Outcome{}, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return Outcome{}, err
	}
	if err := writeAtomic(filepath.Join(dir, "deck.json"), data); err != nil {
		return Outcome{}, err
	}
	return d.outcome(), nil
}
