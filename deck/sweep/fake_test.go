package sweep

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
)

// fakeRunner stands in for the pipeline. Its deck is a folder of three
// files: mesh.dat, recorded with its bytes' SHA-256, mesh.h5, recorded by
// size only (as deck.yaml records a CGNS file by content), and deck.json,
// the manifest. Their content depends only on the variant and the base
// case's state; the cell count grows with the square of the refinement
// factor, and a variant with fail=1 fails.
type fakeRunner struct {
	builds atomic.Int64
	// onBuild, if set, runs at the start of every build.
	onBuild func(v Variant)
	// edit stands for the base case's content: another edit gives other
	// input hashes, as editing the case file does.
	edit string
	// name is the base case's name, "wedge" when empty.
	name string
	// version is the cvdeck build, "test" when empty; the input hashes
	// cover it, as deck.Build is in the real ones.
	version string
	// build, if set, runs before the fake's own build (after onBuild);
	// its error is the build's.
	build func(ctx context.Context, v Variant) error
	// base is what LoadBase returned last; Run calls LoadBase before Prepare.
	base BaseCase
}

type fakeJob struct {
	r    *fakeRunner
	v    Variant
	base BaseCase
	hash string
}

// fakeDeck is the fake's manifest.
type fakeDeck struct {
	Case      string             `json:"case"`
	File      string             `json:"file"`
	Version   string             `json:"version"`
	Inputs    []InputFile        `json:"inputs"`
	Params    map[string]float64 `json:"params"`
	Canonical string             `json:"canonical"`
	Hash      string             `json:"hash"`
	Cells     int                `json:"cells"`
	Area      float64            `json:"area"`
	Skew      float64            `json:"skew"`
	Files     []FileRecord       `json:"files"`
}

func (r *fakeRunner) caseName() string {
	if r.name == "" {
		return "wedge"
	}
	return r.name
}

func (r *fakeRunner) LoadBase(f *File) (BaseCase, error) {
	sum := sha256.Sum256([]byte("case " + r.caseName() + " " + r.edit))
	in := InputFile{Path: filepath.Base(f.Base), SHA256: hex.EncodeToString(sum[:])}
	version := r.version
	if version == "" {
		version = "test"
	}
	r.base = BaseCase{File: in.Path, Name: r.caseName(), Version: version, Inputs: []InputFile{in},
		InputHash: ID("base\n" + version + "\n" + in.SHA256)}
	return r.base, nil
}

func (r *fakeRunner) Prepare(ctx context.Context, v Variant) (Job, error) {
	return &fakeJob{r: r, v: v, base: r.base, hash: ID("fake\n" + r.base.InputHash + "\n" + Canonical(v.Params, v.Refine))}, nil
}

func (r *fakeRunner) Existing(dir string) (Found, bool, error) {
	data, err := os.ReadFile(filepath.Join(dir, "deck.json"))
	if errors.Is(err, os.ErrNotExist) {
		return Found{}, false, nil
	}
	if err != nil {
		return Found{}, false, err
	}
	var d fakeDeck
	if err := json.Unmarshal(data, &d); err != nil {
		return Found{}, false, err
	}
	return d.found(), true, nil
}

func (d fakeDeck) found() Found {
	pass := d.Skew < 0.9
	o := Outcome{InputHash: d.Hash, Cells: d.Cells, Faces: 2 * d.Cells, Nodes: d.Cells + 1, Area: d.Area,
		Passed: pass, Verdict: map[bool]string{true: "pass", false: "fail"}[pass],
		Worst: map[string]float64{"skewness": d.Skew, "aspect_ratio": 1 + d.Skew}}
	if !pass {
		o.FailedCells, o.Failing = d.Cells/10, []string{"skewness"}
	}
	return Found{Outcome: o, Case: d.Case, File: d.File, Version: d.Version, Inputs: d.Inputs, Params: d.Params, Files: d.Files}
}

func (j *fakeJob) InputHash() string { return j.hash }

func (j *fakeJob) Build(ctx context.Context, dir string) (Found, error) {
	j.r.builds.Add(1)
	if j.r.onBuild != nil {
		j.r.onBuild(j.v)
	}
	if j.r.build != nil {
		if err := j.r.build(ctx, j.v); err != nil {
			return Found{}, err
		}
	}
	p := j.v.ParamMap()
	if p["fail"] == 1 {
		return Found{}, fmt.Errorf("segment 2 of loop 1 crosses segment 5 in %s", filepath.Join(dir, "case.yaml"))
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return Found{}, err
	}
	d := fakeDeck{
		Case: j.base.Name, File: j.base.File, Version: j.base.Version, Inputs: j.base.Inputs, Params: p,
		Canonical: Canonical(j.v.Params, j.v.Refine),
		Hash:      j.hash,
		Cells:     int(math.Round(400 * j.v.Refine * j.v.Refine)),
		Area:      2.5,
		Skew:      p["skew"],
	}
	for _, name := range []string{"mesh.dat", "mesh.h5"} {
		data := []byte(strings.Repeat(name+" "+d.Canonical+j.hash+"\n", 8))
		if err := writeAtomic(filepath.Join(dir, name), data); err != nil {
			return Found{}, err
		}
		rec := FileRecord{Path: name, Bytes: int64(len(data))}
		if name == "mesh.dat" {
			sum := sha256.Sum256(data)
			rec.SHA256 = hex.EncodeToString(sum[:])
		}
		d.Files = append(d.Files, rec)
	}
	data, err := json.MarshalIndent(d, "", " ")
	if err != nil {
		return Found{}, err
	}
	if err := writeAtomic(filepath.Join(dir, "deck.json"), data); err != nil {
		return Found{}, err
	}
	return d.found(), nil
}
