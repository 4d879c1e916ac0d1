package quality

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"

	"cvdeck/internal/yamlerr"
)

// Bound is the pair of thresholds of one metric. For a metric where larger
// is worse a value above Warn warns and above Fail fails; for one where
// smaller is worse (area, face length, minimum angle, scaled Jacobian) a
// value below Warn warns and below Fail fails.
type Bound struct {
	Warn float64 `json:"warn" yaml:"warn"`
	Fail float64 `json:"fail" yaml:"fail"`
}

// MarshalJSON writes the bound with thresholds that are not finite as
// null, like Number.
func (b Bound) MarshalJSON() ([]byte, error) {
	return json.Marshal(struct {
		Warn Number `json:"warn"`
		Fail Number `json:"fail"`
	}{Number(b.Warn), Number(b.Fail)})
}

// Limits are the thresholds that turn metrics into pass / warn / fail. Get
// one from Profile and adjust it with a Patch.
type Limits struct {
	// Profile is the name of the profile these limits started from.
	Profile string

	Area              Bound // m², lower; a non-positive area always fails
	FaceLength        Bound // m, signed, lower; a non-positive length always fails
	AspectRatio       Bound
	MinAngle          Bound // degrees, lower
	MaxAngle          Bound // degrees
	EquiangleSkewness Bound
	ScaledJacobian    Bound // lower, quadrilaterals only
	NonOrthogonality  Bound // degrees
	Skewness          Bound
	Growth            Bound
	Closure           Bound // also the bound of the watertight boundary sum
	FreeStream        Bound
	GradientError     Bound
	DualClosure       Bound

	// DuplicateTolerance: two nodes closer than DuplicateTolerance times
	// the shortest non-zero face length of the mesh are duplicates.
	DuplicateTolerance float64
	// HangingTolerance: a node within HangingTolerance × |face| of a
	// boundary face's line, and more than that fraction from its ends, hangs
	// on the face.
	HangingTolerance float64
	// WorstCells is how many of the worst cells the report lists per metric.
	WorstCells int
	// MaxProblems is how many defects the report lists per connectivity
	// check (all are counted).
	MaxProblems int
}

// profiles are the named limit sets. "everyday" suits meshes with
// boundary layers (high aspect ratios and needle cells are allowed; caps,
// folds and broken conservation are not); "tight" suits isotropic meshes
// for inviscid or scale-resolving runs; "tolerant" fails only cells that a
// solver cannot use at all. Every threshold is common practice for
// cell-centred finite-volume solvers, set by us; the reasoning, metric by
// metric (everyday values):
//
//   - area, face_length: a non-positive value is an inverted or collapsed
//     control volume and always fails; there is no size limit.
//   - aspect_ratio 1e3 / 1e5: wall-resolved boundary layers reach 1e3–1e4;
//     beyond 1e5 the cell's geometry is at the mercy of rounding.
//   - min_angle 1° / 0.001°: the needle corners of stretched boundary-layer
//     triangles are small but bounded; 0.001° is a collapsed corner.
//   - max_angle 160° / 179°: a cap (an angle near 180°) has a centroid far
//     from its faces and ruins gradients; this, not the minimum angle,
//     separates slivers from needles.
//   - equiangle_skewness 0.9 / 1: high values are usual for needles; above
//     1 a corner is reflex or the cell inverted.
//   - scaled_jacobian 0.2 / 0.001: a quadrilateral corner below sin 11.5°
//     is poor; at 0 the corner has collapsed.
//   - non_orthogonality 70° / 85°: above about 70° solvers need explicit
//     non-orthogonal correction; near 90° the face flux is ill-defined.
//   - skewness 0.5 / 1: at 0.5 the centroid line crosses the face at its
//     end; at 1 it misses the face by half its length.
//   - growth 3 / 20: area ratios between neighbours much above 1.2–1.5
//     cost accuracy; 20 is a jump no interpolation bridges.
//   - closure, free_stream, dual_closure 1e-12 / 1e-9: these are rounding
//     errors (about 1e-16) on any valid polygon; 1e-9 means faces that do
//     not close.
//   - gradient_error 0.5 / 100: see below.
//
// The Green–Gauss error of a cell-centred scheme grows like skewness times
// aspect ratio (an offset t·L of the crossing point on a face of length L
// of a cell of height h gives an error of order t·L/h), so boundary-layer
// triangles show large values that a solver copes with by using another
// gradient there; "everyday" and "tolerant" therefore fail only extreme
// values of it.
var profiles = map[string]Limits{
	"everyday": {
		Area: Bound{0, 0}, FaceLength: Bound{0, 0},
		AspectRatio: Bound{1e3, 1e5},
		MinAngle:    Bound{1, 1e-3}, MaxAngle: Bound{160, 179},
		EquiangleSkewness: Bound{0.9, 1}, ScaledJacobian: Bound{0.2, 1e-3},
		NonOrthogonality: Bound{70, 85}, Skewness: Bound{0.5, 1},
		Growth:  Bound{3, 20},
		Closure: Bound{1e-12, 1e-9}, FreeStream: Bound{1e-12, 1e-9},
		GradientError: Bound{0.5, 100}, DualClosure: Bound{1e-12, 1e-9},
		DuplicateTolerance: 1e-3, HangingTolerance: 1e-6, WorstCells: 5, MaxProblems: 20,
	},
	"tight": {
		Area: Bound{0, 0}, FaceLength: Bound{0, 0},
		AspectRatio: Bound{10, 100},
		MinAngle:    Bound{20, 5}, MaxAngle: Bound{120, 150},
		EquiangleSkewness: Bound{0.5, 0.8}, ScaledJacobian: Bound{0.5, 0.2},
		NonOrthogonality: Bound{45, 70}, Skewness: Bound{0.2, 0.5},
		Growth:  Bound{1.5, 3},
		Closure: Bound{1e-14, 1e-12}, FreeStream: Bound{1e-14, 1e-12},
		GradientError: Bound{0.1, 0.5}, DualClosure: Bound{1e-14, 1e-12},
		DuplicateTolerance: 1e-2, HangingTolerance: 1e-6, WorstCells: 10, MaxProblems: 50,
	},
	"tolerant": {
		Area: Bound{0, 0}, FaceLength: Bound{0, 0},
		AspectRatio: Bound{1e4, 1e7},
		MinAngle:    Bound{0.1, 1e-5}, MaxAngle: Bound{170, 179.9},
		EquiangleSkewness: Bound{0.98, 1}, ScaledJacobian: Bound{0.05, 0},
		NonOrthogonality: Bound{80, 89}, Skewness: Bound{1, 5},
		Growth:  Bound{10, 100},
		Closure: Bound{1e-10, 1e-6}, FreeStream: Bound{1e-10, 1e-6},
		GradientError: Bound{5, 1e4}, DualClosure: Bound{1e-10, 1e-6},
		DuplicateTolerance: 1e-4, HangingTolerance: 1e-6, WorstCells: 5, MaxProblems: 20,
	},
}

// DefaultProfile is the profile used when none is named.
const DefaultProfile = "everyday"

// ProfileNames returns the names of the limit profiles, sorted.
func ProfileNames() []string { return []string{"everyday", "tight", "tolerant"} }

// Profile returns the named limit profile.
func Profile(name string) (Limits, error) {
	l, ok := profiles[name]
	if !ok {
		return Limits{}, fmt.Errorf("quality: no limit profile %q; profiles are %s", name, strings.Join(ProfileNames(), ", "))
	}
	l.Profile = name
	return l, nil
}

// Patch is a set of changes to a Limits value, read from YAML by
// DecodePatch or LoadPatch and applied with Apply. The YAML form is a
// mapping whose keys are optional:
//
//	profile: tight              # the profile to start from (Resolve)
//	non_orthogonality: {warn: 60, fail: 80}
//	skewness: {fail: 0.8}       # either threshold alone
//	duplicate_tolerance: 1e-4
//	hanging_tolerance: 1e-6
//	worst_cells: 8
//	max_problems: 30
//
// Metric keys are the metric names of the report (MetricNames). Unknown
// keys are errors that give the file, line and column.
type Patch struct {
	// Profile names the profile to start from, "" to keep the base.
	Profile string
	entries []patchEntry
}

type patchEntry struct {
	key        string
	warn, fail *float64
	value      float64
	pos        string // "file:line:col" of the key
}

// scalarKeys are the non-metric keys of a patch.
var scalarKeys = []string{"duplicate_tolerance", "hanging_tolerance", "worst_cells", "max_problems"}

// LoadPatch reads a limits file (see Patch).
func LoadPatch(path string) (Patch, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return Patch{}, fmt.Errorf("quality: reading limits: %w", err)
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		line, col, msg := yamlerr.Describe(data, err)
		if line > 0 {
			return Patch{}, fmt.Errorf("%s:%d:%d: not valid YAML: %s", path, line, col, msg)
		}
		return Patch{}, fmt.Errorf("%s: not valid YAML: %s", path, msg)
	}
	if len(doc.Content) == 0 {
		return Patch{}, nil
	}
	return DecodePatch(doc.Content[0], path)
}

// DecodePatch reads a Patch from a YAML mapping node, such as the limits
// section of a case file; file names the source in error messages.
func DecodePatch(n *yaml.Node, file string) (Patch, error) {
	var p Patch
	at := func(n *yaml.Node) string { return fmt.Sprintf("%s:%d:%d", file, n.Line, n.Column) }
	if n.Kind == yaml.DocumentNode && len(n.Content) > 0 {
		n = n.Content[0]
	}
	if n.Kind != yaml.MappingNode {
		return p, fmt.Errorf("%s: limits must be a mapping of metric names to {warn, fail}", at(n))
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		key := k.Value
		if seen[key] {
			return p, fmt.Errorf("%s: key %q given twice", at(k), key)
		}
		seen[key] = true
		e := patchEntry{key: key, pos: at(k)}
		switch {
		case key == "profile":
			if _, ok := profiles[v.Value]; !ok || v.Kind != yaml.ScalarNode {
				return p, fmt.Errorf("%s: no limit profile %q; profiles are %s", at(v), v.Value, strings.Join(ProfileNames(), ", "))
			}
			p.Profile = v.Value
			continue
		case isScalarKey(key):
			x, err := number(v, at)
			if err != nil {
				return p, err
			}
			e.value = x
		case metricByName(key) != nil:
			if v.Kind != yaml.MappingNode {
				return p, fmt.Errorf("%s: %s must be a mapping {warn: ..., fail: ...}", at(v), key)
			}
			for j := 0; j+1 < len(v.Content); j += 2 {
				bk, bv := v.Content[j], v.Content[j+1]
				x, err := number(bv, at)
				if err != nil {
					return p, err
				}
				switch bk.Value {
				case "warn":
					e.warn = &x
				case "fail":
					e.fail = &x
				default:
					return p, fmt.Errorf("%s: unknown key %q in %s; valid keys are warn, fail", at(bk), bk.Value, key)
				}
			}
		default:
			return p, fmt.Errorf("%s: unknown key %q; valid keys are profile, %s, %s", at(k), key, strings.Join(MetricNames(), ", "), strings.Join(scalarKeys, ", "))
		}
		p.entries = append(p.entries, e)
	}
	return p, nil
}

func isScalarKey(k string) bool {
	for _, s := range scalarKeys {
		if s == k {
			return true
		}
	}
	return false
}

// number reads a finite float from a scalar node.
func number(v *yaml.Node, at func(*yaml.Node) string) (float64, error) {
	if v.Kind != yaml.ScalarNode {
		return 0, fmt.Errorf("%s: expected a number", at(v))
	}
	x, err := strconv.ParseFloat(v.Value, 64)
	if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, fmt.Errorf("%s: %q is not a finite number", at(v), v.Value)
	}
	return x, nil
}

// Apply returns base with the patch's changes made, in the order they were
// written, and checks the result: a warn threshold must not be worse than
// the fail threshold, tolerances must be positive and counts whole and
// non-negative. Errors give the position of the offending key. Apply does
// not change the profile; see Resolve.
func (p Patch) Apply(base Limits) (Limits, error) {
	l := base
	for _, e := range p.entries {
		if md := metricByName(e.key); md != nil {
			b := md.bound(&l)
			if e.warn != nil {
				b.Warn = *e.warn
			}
			if e.fail != nil {
				b.Fail = *e.fail
			}
			if (md.lower && b.Warn < b.Fail) || (!md.lower && b.Warn > b.Fail) {
				worse := "above"
				if md.lower {
					worse = "below"
				}
				return base, fmt.Errorf("%s: %s warn %g is %s fail %g; a warning must come before failure", e.pos, e.key, b.Warn, worse, b.Fail)
			}
			lo, hi := md.span()
			for _, t := range []struct {
				what string
				v    float64
			}{{"warn", b.Warn}, {"fail", b.Fail}} {
				switch {
				case !md.lower && t.v < lo:
					return base, fmt.Errorf("%s: %s %s %g: %s is never below %g, so every cell would %s", e.pos, e.key, t.what, t.v, e.key, lo, t.what)
				case md.lower && t.v > hi:
					return base, fmt.Errorf("%s: %s %s %g: %s is never above %g, so every cell would %s", e.pos, e.key, t.what, t.v, e.key, hi, t.what)
				}
			}
			continue
		}
		switch e.key {
		case "duplicate_tolerance", "hanging_tolerance":
			if !(e.value > 0) || e.value >= 0.5 {
				return base, fmt.Errorf("%s: %s = %g; it must lie in (0, 0.5)", e.pos, e.key, e.value)
			}
			if e.key == "duplicate_tolerance" {
				l.DuplicateTolerance = e.value
			} else {
				l.HangingTolerance = e.value
			}
		case "worst_cells", "max_problems":
			if e.value < 0 || e.value != math.Trunc(e.value) || e.value > 1e6 {
				return base, fmt.Errorf("%s: %s = %g; it must be a whole number from 0 to 1000000", e.pos, e.key, e.value)
			}
			if e.key == "worst_cells" {
				l.WorstCells = int(e.value)
			} else {
				l.MaxProblems = int(e.value)
			}
		}
	}
	return l, nil
}

// ReportPatch reads a report written as JSON (a deck's quality.json) and
// returns the patch that gives back the limits it was graded with: its
// profile, the warn and fail thresholds of every metric it lists and its
// duplicate and hanging tolerances. Checking a deck's mesh again with this
// patch reproduces the deck's verdict. Errors name the file and what is
// missing.
func ReportPatch(path string) (Patch, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return Patch{}, fmt.Errorf("quality: reading report: %w", err)
	}
	var doc struct {
		Profile string `json:"profile"`
		Metrics []struct {
			Name  string `json:"name"`
			Limit *struct {
				Warn, Fail *float64
			} `json:"limit"`
		} `json:"metrics"`
		DuplicateTolerance *float64 `json:"duplicate_tolerance"`
		HangingTolerance   *float64 `json:"hanging_tolerance"`
	}
	if err := json.Unmarshal(data, &doc); err != nil {
		return Patch{}, fmt.Errorf("quality: %s is not a cvdeck quality report: %w", path, err)
	}
	if _, ok := profiles[doc.Profile]; !ok {
		return Patch{}, fmt.Errorf("quality: %s: no limit profile %q; profiles are %s", path, doc.Profile, strings.Join(ProfileNames(), ", "))
	}
	p := Patch{Profile: doc.Profile}
	for i, m := range doc.Metrics {
		pos := fmt.Sprintf("%s: metrics[%d] (%s)", path, i, m.Name)
		if metricByName(m.Name) == nil {
			return Patch{}, fmt.Errorf("quality: %s: unknown metric; metrics are %s", pos, strings.Join(MetricNames(), ", "))
		}
		if m.Limit == nil || m.Limit.Warn == nil || m.Limit.Fail == nil {
			return Patch{}, fmt.Errorf("quality: %s: the limit needs finite warn and fail thresholds", pos)
		}
		p.entries = append(p.entries, patchEntry{key: m.Name, warn: m.Limit.Warn, fail: m.Limit.Fail, pos: pos})
	}
	for _, t := range []struct {
		key string
		v   *float64
	}{{"duplicate_tolerance", doc.DuplicateTolerance}, {"hanging_tolerance", doc.HangingTolerance}} {
		if t.v != nil {
			p.entries = append(p.entries, patchEntry{key: t.key, value: *t.v, pos: path + ": " + t.key})
		}
	}
	return p, nil
}

// Resolve builds the limits of a run: the profile named by the last patch
// that names one (else DefaultProfile), then every patch applied in order,
// for example the case file's limits and then a --limits file.
func Resolve(patches ...Patch) (Limits, error) {
	name := DefaultProfile
	for _, p := range patches {
		if p.Profile != "" {
			name = p.Profile
		}
	}
	l, err := Profile(name)
	if err != nil {
		return Limits{}, err
	}
	for _, p := range patches {
		if l, err = p.Apply(l); err != nil {
			return Limits{}, err
		}
	}
	return l, nil
}

// changed returns the names of the limits in l that differ from those of
// the profile l started from: metrics in report order, then
// duplicate_tolerance and hanging_tolerance. The report lists them beside
// the profile name, so that a verdict reached with a case's or a file's
// own limits never reads as one of the plain profile.
func (l Limits) changed() []string {
	base, err := Profile(l.Profile)
	if err != nil {
		return nil
	}
	var out []string
	for _, d := range metricDefs {
		if *d.bound(&l) != *d.bound(&base) {
			out = append(out, d.name)
		}
	}
	if l.DuplicateTolerance != base.DuplicateTolerance {
		out = append(out, "duplicate_tolerance")
	}
	if l.HangingTolerance != base.HangingTolerance {
		out = append(out, "hanging_tolerance")
	}
	return out
}

// errNoLimits is returned by Evaluate for a zero Limits value.
var errNoLimits = errors.New("quality: limits are empty; start from quality.Profile or quality.Resolve")
