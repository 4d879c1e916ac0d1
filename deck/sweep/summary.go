package sweep

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
)

// Status values of a summary row. They depend only on the sweep and the
// pipeline, never on how the sweep was run.
const (
	StatusOK     = "ok"      // the deck was written (its checks may still have failed: see Verdict)
	StatusFailed = "failed"  // no deck: Error says why
	StatusNotRun = "not run" // the sweep was stopped before this variant was built
)

// Run values of a summary row: what this run did. Like Seconds, they
// describe the run and are left out when two summaries are compared.
const (
	RunBuilt       = "built"
	RunReused      = "reused" // an existing deck with the same input hash was kept
	RunFailed      = "failed"
	RunInterrupted = "interrupted" // the build was stopped while in progress
	RunNotRun      = "not run"     // not started: the sweep was stopped first
)

// Row is one variant's line in the summary.
type Row struct {
	Index   int                `json:"index"` // 0-based sweep order
	ID      string             `json:"id"`
	Name    string             `json:"name"` // folder of the deck, inside the output folder
	Params  map[string]float64 `json:"params"`
	Level   int                `json:"level,omitempty"`
	Refine  float64            `json:"refine"`
	Family  string             `json:"family"`
	Status  string             `json:"status"`
	Passed  bool               `json:"passed"` // the deck's quality and boundary checks passed
	Verdict string             `json:"verdict,omitempty"`
	// FailedCells and WarnedCells count the cells past a fail or warn
	// limit; Failing names the metrics and connectivity checks that failed.
	FailedCells int      `json:"failed_cells,omitempty"`
	WarnedCells int      `json:"warned_cells,omitempty"`
	Failing     []string `json:"failing,omitempty"`
	Cells       int      `json:"cells,omitempty"`
	Faces       int      `json:"faces,omitempty"`
	Nodes       int      `json:"nodes,omitempty"`
	Area        float64  `json:"area,omitempty"`
	H           float64  `json:"h,omitempty"`     // representative cell size (A/N)^(1/2)
	Ratio       float64  `json:"ratio,omitempty"` // h of the next coarser level over h
	// Warning is the refinement-ratio warning of this level, if any.
	Warning   string             `json:"warning,omitempty"`
	Worst     map[string]float64 `json:"worst,omitempty"`
	YplusMax  map[string]float64 `json:"yplus_max,omitempty"` // by wall tag
	InputHash string             `json:"input_hash,omitempty"`
	Error     string             `json:"error,omitempty"`
	// FileHashes are the SHA-256 of the bytes of the deck's files that
	// deck.yaml records by content only (mesh.cgns: HDF5 stamps times into
	// it), as the sweep found them after building or reusing the deck, so
	// that a later run notices a change of the same size. Like the run
	// columns they differ between two builds of one deck.
	FileHashes map[string]string `json:"file_sha256,omitempty"`
	Run        string            `json:"run"`
	Seconds    float64           `json:"seconds"`
}

// Summary is the result of a sweep or of one shard of it.
type Summary struct {
	// Sweep is the sweep file's name, without its folder.
	Sweep string `json:"sweep,omitempty"`
	// Base is the base case file name (without its folder, so that runs
	// from different places compare equal).
	Base string `json:"base"`
	// BaseHash is the input hash of the base case as written (its files,
	// its own parameter values and the cvdeck version): shards with
	// different base hashes were built from different base cases.
	BaseHash string `json:"base_input_hash,omitempty"`
	// Version is the cvdeck build that wrote the summary (deck.Build, as
	// deck.yaml records it).
	Version string `json:"cvdeck_version,omitempty"`
	// Parameters are the swept parameter names in the sweep file's order.
	Parameters []string `json:"parameters"`
	// Shard is "K/N" for one slice, "" for the whole sweep or a merge.
	Shard string `json:"shard,omitempty"`
	// Total is the number of variants in the whole sweep.
	Total int `json:"total"`
	// Plan is a hash of the whole sweep's variant ids in order; summaries
	// with different plans are of different sweeps and cannot be merged.
	Plan string `json:"plan"`
	// PlanNames are the folder names of every variant of the whole sweep,
	// in sweep order, in a shard's summary only: a merge that lacks some
	// shard names the variants missing with them.
	PlanNames []string `json:"plan_names,omitempty"`
	// Rows are in sweep order.
	Rows []Row `json:"variants"`
	// Warnings are about refinement ratios below MinRatio (each also in
	// its row's Warning).
	Warnings []string `json:"warnings,omitempty"`

	// path is the file the summary was read from, for messages.
	path string
}

// MinRatio is the smallest advised effective refinement ratio between two
// levels of a family: "it is desirable that the grid refinement factor
// r = h_coarse / h_fine be greater than 1.3" (Celik et al. 2008, J. Fluids
// Eng. 130, 078001, step 2 of the procedure).
const MinRatio = 1.3

// planHash is the Plan of a sweep.
func planHash(vs []Variant) string {
	var b strings.Builder
	for _, v := range vs {
		b.WriteString(v.ID)
		b.WriteByte('\n')
	}
	return ID(b.String())
}

// Finish computes, from the rows present, the representative cell size of
// every deck, the effective refinement ratio between consecutive levels of
// each family and the warnings. For a 2D mesh of N cells covering area A,
// h = (A / N)^(1/2) (Celik et al. 2008, eq. 1), and the ratio between a
// coarser and a finer level is r = h_coarse / h_fine.
func (s *Summary) Finish() {
	sort.Slice(s.Rows, func(i, j int) bool { return s.Rows[i].Index < s.Rows[j].Index })
	byFamily := map[string]map[int]int{} // family -> level -> row position
	for i := range s.Rows {
		r := &s.Rows[i]
		r.H, r.Ratio, r.Warning = 0, 0, ""
		if r.Status == StatusOK && r.Cells > 0 && r.Area > 0 {
			r.H = math.Sqrt(r.Area / float64(r.Cells))
		}
		if r.Level > 0 {
			if byFamily[r.Family] == nil {
				byFamily[r.Family] = map[int]int{}
			}
			byFamily[r.Family][r.Level] = i
		}
	}
	s.Warnings = nil
	for i := range s.Rows {
		r := &s.Rows[i]
		if r.Level < 2 || r.H == 0 {
			continue
		}
		j, ok := byFamily[r.Family][r.Level-1]
		if !ok || s.Rows[j].H == 0 {
			continue
		}
		r.Ratio = s.Rows[j].H / r.H
		if r.Ratio < MinRatio {
			r.Warning = fmt.Sprintf("the effective refinement ratio from level %d is %.3f, below %.1f (Celik et al. 2008); the levels are too close for a grid-convergence estimate",
				r.Level-1, r.Ratio, MinRatio)
			s.Warnings = append(s.Warnings, r.Name+": "+r.Warning)
		}
	}
}

// Count counts the variants without a deck (failed or not run) and those
// whose deck failed its checks.
func (s *Summary) Count() (failed, notRun, checksFailed int) {
	for _, r := range s.Rows {
		switch {
		case r.Status == StatusFailed:
			failed++
		case r.Status == StatusNotRun:
			notRun++
		case !r.Passed:
			checksFailed++
		}
	}
	return failed, notRun, checksFailed
}

// SummaryFiles returns the base names of the summary files of a shard:
// summary.json and summary.csv for the whole sweep,
// summary-shard-K-of-N.json and .csv for a slice, so that the shards of a
// job array may share one output folder.
func SummaryFiles(s Shard) (jsonName, csvName string) {
	stem := "summary"
	if !s.Whole() {
		stem = fmt.Sprintf("summary-shard-%d-of-%d", s.K, s.N)
	}
	return stem + ".json", stem + ".csv"
}

// WriteFiles writes the summary's JSON and CSV files into dir, each
// through a temporary file and a rename.
func (s *Summary) WriteFiles(dir string, shard Shard) error {
	js, err := s.JSON()
	if err != nil {
		return err
	}
	jn, cn := SummaryFiles(shard)
	if err := writeAtomic(filepath.Join(dir, jn), js); err != nil {
		return err
	}
	return writeAtomic(filepath.Join(dir, cn), s.CSV())
}

// JSON returns the summary as indented JSON.
func (s *Summary) JSON() ([]byte, error) {
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("encoding the summary: %w", err)
	}
	return append(b, '\n'), nil
}

// metricNames returns the worst-metric names of all rows, sorted.
func (s *Summary) metricNames() []string {
	return s.keys(func(r *Row) map[string]float64 { return r.Worst })
}

// yplusTags returns the wall tags with a y+ estimate in any row, sorted.
func (s *Summary) yplusTags() []string {
	return s.keys(func(r *Row) map[string]float64 { return r.YplusMax })
}

// keys returns the keys of one map of every row, sorted.
func (s *Summary) keys(of func(*Row) map[string]float64) []string {
	seen := map[string]bool{}
	var out []string
	for i := range s.Rows {
		for k := range of(&s.Rows[i]) {
			if !seen[k] {
				seen[k] = true
				out = append(out, k)
			}
		}
	}
	sort.Strings(out)
	return out
}

// CSV returns the summary as CSV: one header line, then one line per
// variant in sweep order. The columns are index, id, name, one per
// parameter, level, refine, status, passed, verdict, failed_cells,
// warned_cells, failing (the failed metrics and checks, separated by
// spaces), cells, faces, nodes, area, h, ratio, warning (the refinement
// ratio's), one worst_<metric> per metric, one yplus_max_<tag> per wall
// tag with a y+ estimate, input_hash, error, and last the run columns run
// and seconds. Empty fields mean "not known" (or none).
func (s *Summary) CSV() []byte {
	metrics := s.metricNames()
	walls := s.yplusTags()
	head := []string{"index", "id", "name"}
	head = append(head, s.Parameters...)
	head = append(head, "level", "refine", "status", "passed", "verdict", "failed_cells", "warned_cells", "failing",
		"cells", "faces", "nodes", "area", "h", "ratio", "warning")
	for _, m := range metrics {
		head = append(head, "worst_"+m)
	}
	for _, t := range walls {
		head = append(head, "yplus_max_"+t)
	}
	head = append(head, "input_hash", "error", "run", "seconds")
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(head) // a bytes.Buffer does not fail
	for _, r := range s.Rows {
		rec := []string{strconv.Itoa(r.Index), r.ID, r.Name}
		for _, p := range s.Parameters {
			rec = append(rec, FormatValue(r.Params[p]))
		}
		cellCount := func(n int) string { // 0 is a count of a deck, unknown without one
			if r.Status != StatusOK {
				return ""
			}
			return strconv.Itoa(n)
		}
		rec = append(rec, optInt(r.Level), FormatValue(r.Refine), r.Status, strconv.FormatBool(r.Passed), r.Verdict,
			cellCount(r.FailedCells), cellCount(r.WarnedCells), strings.Join(r.Failing, " "),
			optInt(r.Cells), optInt(r.Faces), optInt(r.Nodes), optFloat(r.Area), optFloat(r.H), optFloat(r.Ratio), r.Warning)
		for _, m := range metrics {
			if v, ok := r.Worst[m]; ok {
				rec = append(rec, FormatValue(v))
			} else {
				rec = append(rec, "")
			}
		}
		for _, t := range walls {
			if v, ok := r.YplusMax[t]; ok {
				rec = append(rec, FormatValue(v))
			} else {
				rec = append(rec, "")
			}
		}
		rec = append(rec, r.InputHash, r.Error, r.Run, strconv.FormatFloat(r.Seconds, 'f', 3, 64))
		_ = w.Write(rec)
	}
	w.Flush()
	return buf.Bytes()
}

func optInt(n int) string {
	if n == 0 {
		return ""
	}
	return strconv.Itoa(n)
}

func optFloat(x float64) string {
	if x == 0 {
		return ""
	}
	return FormatValue(x)
}

// ReadSummary reads a summary JSON file.
func ReadSummary(path string) (*Summary, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("reading the summary: %w", err)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var s Summary
	if err := dec.Decode(&s); err != nil {
		return nil, fmt.Errorf("%s: not a cvdeck sweep summary: %w", path, err)
	}
	if s.Plan == "" || s.Total < 1 {
		return nil, fmt.Errorf("%s: not a cvdeck sweep summary (no plan or no variant count)", path)
	}
	s.path = path
	return &s, nil
}

// writeAtomic writes data to path through a temporary file in the same
// folder and a rename, so a reader sees the old file or the new one.
func writeAtomic(path string, data []byte) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	werr := tmp.Chmod(0o644)
	if werr == nil {
		_, werr = tmp.Write(data)
	}
	cerr := tmp.Close()
	if werr != nil || cerr != nil {
		os.Remove(tmp.Name())
		if werr == nil {
			werr = cerr
		}
		return fmt.Errorf("writing %s: %w", path, werr)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}
