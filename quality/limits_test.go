package quality

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

func TestProfiles(t *testing.T) {
	for _, name := range ProfileNames() {
		l, err := Profile(name)
		if err != nil {
			t.Fatal(err)
		}
		if l.Profile != name {
			t.Errorf("profile %q named %q", name, l.Profile)
		}
		// Each profile's thresholds must be ordered: warn before fail.
		for i := range metricDefs {
			d := &metricDefs[i]
			b := *d.bound(&l)
			if (d.lower && b.Warn < b.Fail) || (!d.lower && b.Warn > b.Fail) {
				t.Errorf("profile %s: %s warn %g after fail %g", name, d.name, b.Warn, b.Fail)
			}
		}
	}
	if _, err := Profile("nonesuch"); err == nil || !strings.Contains(err.Error(), "everyday") {
		t.Errorf("unknown profile: %v", err)
	}
}

// TestChangedLimits: a profile as it is has no changed limits; a patch's
// changes are named in report order, and a value set to the profile's own
// counts as unchanged.
func TestChangedLimits(t *testing.T) {
	for _, name := range ProfileNames() {
		l, err := Profile(name)
		if err != nil {
			t.Fatal(err)
		}
		if c := l.changed(); len(c) != 0 {
			t.Errorf("profile %s as it is: changed %v", name, c)
		}
	}
	base, _ := Profile(DefaultProfile)
	p, err := LoadPatch(writeFile(t, fmt.Sprintf("growth: {warn: 2, fail: 30}\nhanging_tolerance: 0.01\nmin_angle: {warn: %g, fail: %g}\naspect_ratio: {warn: 7}\n", base.MinAngle.Warn, base.MinAngle.Fail)))
	if err != nil {
		t.Fatal(err)
	}
	l, err := Resolve(p)
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(l.changed(), ","); got != "aspect_ratio,growth,hanging_tolerance" {
		t.Errorf("changed %s, want aspect_ratio,growth,hanging_tolerance", got)
	}
}

func writeFile(t *testing.T, text string) string {
	p := filepath.Join(t.TempDir(), "limits.yaml")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestPatchApplies(t *testing.T) {
	p, err := LoadPatch(writeFile(t, "profile: tight\nnon_orthogonality: {warn: 50, fail: 75}\nskewness:\n  fail: 0.9\nduplicate_tolerance: 1e-5\nworst_cells: 3\n"))
	if err != nil {
		t.Fatal(err)
	}
	l, err := Resolve(p)
	if err != nil {
		t.Fatal(err)
	}
	tight, _ := Profile("tight")
	if l.Profile != "tight" || l.NonOrthogonality != (Bound{50, 75}) || l.Skewness != (Bound{tight.Skewness.Warn, 0.9}) ||
		l.DuplicateTolerance != 1e-5 || l.WorstCells != 3 || l.Growth != tight.Growth {
		t.Errorf("resolved %+v", l)
	}
	// A later patch overrides an earlier one; no profile keeps the default.
	q, err := DecodePatch(node(t, "skewness: {fail: 0.7}"), "case.yaml")
	if err != nil {
		t.Fatal(err)
	}
	l, err = Resolve(q)
	if err != nil || l.Profile != DefaultProfile || l.Skewness.Fail != 0.7 {
		t.Errorf("resolve: %+v %v", l, err)
	}
}

func node(t *testing.T, text string) *yaml.Node {
	var n yaml.Node
	if err := yaml.Unmarshal([]byte(text), &n); err != nil {
		t.Fatal(err)
	}
	return &n
}

// Errors name the file, line and column of the key at fault.
func TestPatchErrors(t *testing.T) {
	cases := []struct{ text, want string }{
		{"growth: {warn: 2}\nskewnes: {fail: 1}\n", `case.yaml:2:1: unknown key "skewnes"`},
		{"growth:\n  warn: 2\n  fial: 3\n", `case.yaml:3:3: unknown key "fial" in growth`},
		{"growth: {warn: lots}\n", `case.yaml:1:16: "lots" is not a finite number`},
		{"profile: strictest\n", `case.yaml:1:10: no limit profile "strictest"`},
		{"min_angle: {warn: 1, fail: 5}\n", `case.yaml:1:1: min_angle warn 1 is below fail 5`},
		{"growth: {warn: 30}\n", `case.yaml:1:1: growth warn 30 is above fail 20`},
		{"duplicate_tolerance: 0\n", `case.yaml:1:1: duplicate_tolerance = 0`},
		{"worst_cells: 2.5\n", `case.yaml:1:1: worst_cells = 2.5`},
		{"- 1\n", `case.yaml:1:1: limits must be a mapping`},
		{"growth: {warn: 2}\ngrowth: {warn: 2}\n", `case.yaml:2:1: key "growth" given twice`},
	}
	for _, tc := range cases {
		p, err := DecodePatch(node(t, tc.text), "case.yaml")
		if err == nil {
			_, err = Resolve(p)
		}
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%q: error %v, want %q", tc.text, err, tc.want)
		}
	}
}

// TestLimitsWithinTheMetricsSpan: a threshold past the values a metric
// can take, on the side that grades, would grade every cell and is
// refused with its place; one past them on the other side only turns the
// grade off and is taken; every profile lies within the spans.
func TestLimitsWithinTheMetricsSpan(t *testing.T) {
	for _, name := range ProfileNames() {
		l, _ := Profile(name)
		if _, err := (Patch{}).Apply(l); err != nil {
			t.Errorf("profile %s: %v", name, err)
		}
		for i := range metricDefs {
			d := &metricDefs[i]
			lo, hi := d.span()
			b := *d.bound(&l)
			if !d.lower && (b.Warn < lo || b.Fail < lo) || d.lower && (b.Warn > hi || b.Fail > hi) {
				t.Errorf("profile %s: %s %+v lies past the metric's span [%g, %g]", name, d.name, b, lo, hi)
			}
		}
	}
	for text, want := range map[string]string{
		"skewness: {warn: -1, fail: 1}\n":             "skewness is never below 0, so every cell would warn",
		"scaled_jacobian: {warn: 1.5, fail: 0.1}\n":   "scaled_jacobian is never above 1, so every cell would warn",
		"growth: {warn: 0.5, fail: 0.9}\n":            "growth is never below 1",
		"non_orthogonality: {warn: 200, fail: 300}\n": "",
	} {
		p, err := LoadPatch(writeFile(t, text))
		if err != nil {
			t.Fatal(err)
		}
		_, err = Resolve(p)
		switch {
		case want == "" && err != nil:
			t.Errorf("%q: %v; a threshold no cell reaches turns the grade off", text, err)
		case want != "" && (err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), ":1:")):
			t.Errorf("%q: got %v, want an error at line 1 saying %q", text, err, want)
		}
	}
}
