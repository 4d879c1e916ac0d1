package sweep

import (
	"errors"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func mustParse(t *testing.T, text string) *File {
	t.Helper()
	f, err := Parse("/cases/sweep.yaml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	return f
}

func TestParseListsRangesAndRefine(t *testing.T) {
	f := mustParse(t, `
base: wedge.yaml
parameters:
  thickness: [0.08, 0.1, "0.3 / 2"]
  angle: {from: 0, to: 0.3, step: 0.1}
  chord: {from: 1, to: 2, count: 5}
constraints:
  - thickness * 10 + angle < 1.5
refine: {levels: 3, ratio: 2}
`)
	if f.Base != filepath.Join("/cases", "wedge.yaml") {
		t.Errorf("base %q, want it resolved against the sweep file's folder", f.Base)
	}
	want := [][]float64{{0.08, 0.1, 0.15}, {0, 0.1, 0.2, 0.3}, {1, 1.25, 1.5, 1.75, 2}}
	for i, p := range f.Params {
		if !reflect.DeepEqual(p.Values, want[i]) {
			t.Errorf("%s = %v, want %v", p.Name, p.Values, want[i])
		}
	}
	if f.Refine == nil || f.Refine.Levels != 3 || f.Refine.Factor(3) != 4 {
		t.Errorf("refine = %+v, want 3 levels with factors 1, 2, 4", f.Refine)
	}
	vs, err := f.Variants()
	if err != nil {
		t.Fatal(err)
	}
	// Count the kept combinations by hand: thickness*10 + angle < 1.5.
	kept := 0
	for _, th := range want[0] {
		for _, a := range want[1] {
			if th*10+a < 1.5 {
				kept += len(want[2])
			}
		}
	}
	if len(vs) != kept*3 {
		t.Fatalf("%d variants, want %d combinations x 3 levels", len(vs), kept)
	}
	// Product order: the first parameter varies slowest, levels fastest.
	if vs[0].Params[2].Value != 1 || vs[1].Level != 2 || vs[3].Params[2].Value != 1.25 {
		t.Errorf("unexpected order: %+v %+v %+v", vs[0], vs[1], vs[3])
	}
	for i, v := range vs {
		if v.Index != i {
			t.Errorf("variant %d has index %d", i, v.Index)
		}
	}
}

func TestZip(t *testing.T) {
	f := mustParse(t, `
base: nozzle.yaml
combine: zip
parameters:
  throat: [0.1, 0.2, 0.3]
  exit: {from: 2, to: 3, count: 3}
`)
	vs, err := f.Variants()
	if err != nil {
		t.Fatal(err)
	}
	got := make([]string, len(vs))
	for i, v := range vs {
		got[i] = describe(v.Params)
	}
	want := []string{"throat=0.1 exit=2", "throat=0.2 exit=2.5", "throat=0.3 exit=3"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("zip gave %v, want %v", got, want)
	}
}

func TestParseErrorsSayWhere(t *testing.T) {
	cases := []struct {
		text, want string
		line, col  int
	}{
		{"base: a.yaml\nparameter:\n  t: [1]\n", `unknown key "parameter"`, 2, 1},
		{"base: a.yaml\nparameters:\n  t: {from: 0, to: 1, stp: 0.1}\n", `unknown key "stp" in the range of t`, 3, 23},
		{"base: a.yaml\nrefine: {levels: 3, ratio: 2, base: 1}\n", `unknown key "base" in refine`, 2, 31},
		{"base: a.yaml\ncombine: zip\nparameters:\n  a: [1, 2]\n  b: [1, 2, 3]\n", "lists of one length", 5, 3},
		{"base: a.yaml\nparameters:\n  a: [1, 2]\nconstraints: [\"a < b\"]\n", `uses "b", which is not a swept parameter`, 4, 15},
		{"base: a.yaml\nparameters:\n  a: {from: 0, to: 1, step: -0.1}\n", "does not lead from 0 to 1", 3, 29},
		{"base: a.yaml\nparameters:\n  a: [1, x]\n", "value 2 of a is not a number", 3, 10},
		{"base: a.yaml\nparameters:\n  h: {from: 20, to: 30, step: 3}\n", "does not end on 30 from 20 (the last value would be 29)", 3, 31},
		{"base: a.yaml\nparameters:\n  h: {from: 1, to: 0, step: -0.3}\n", "the last value would be 0.1), the ends are included, so give a step that divides 1,", 3, 29},
		{"base: a.yaml\nparameters:\n  sin: [1]\n", "not a valid parameter name", 3, 3},
		{"base: a.yaml\nrefine: {levels: 3, ratio: 1}\n", "must be above 1", 2, 28},
		{"parameters:\n  a: [1]\n", "names no base case", 1, 1},
		{"base: a.yaml\nparameters:\n  a: {from: -1e308, to: 1e308, count: 3}\n", "wider than a float64", 3, 6},
		{"base: a.yaml\nparameters:\n  a: [1, 2]\n  a: [3]\n", `"a" appears twice`, 4, 3},
	}
	for _, c := range cases {
		_, err := Parse("s.yaml", []byte(c.text))
		var e *Error
		if !errors.As(err, &e) {
			t.Errorf("%q: error %v, want a *sweep.Error", c.text, err)
			continue
		}
		if !strings.Contains(err.Error(), c.want) || e.Line != c.line || e.Col != c.col {
			t.Errorf("%q:\n got %v (line %d col %d)\nwant %q at %d:%d", c.text, err, e.Line, e.Col, c.want, c.line, c.col)
		}
		if !strings.HasPrefix(err.Error(), "s.yaml:") {
			t.Errorf("error %q does not start with the file name", err)
		}
	}
}

func TestRepeatedValueIsAnError(t *testing.T) {
	f := mustParse(t, "base: a.yaml\nparameters:\n  a: [1, 2, 1.0]\n")
	_, err := f.Variants()
	if err == nil || !strings.Contains(err.Error(), "the variants at indexes 0 and 2 have the same parameter values (a=1)") {
		t.Errorf("got %v", err)
	}
}

func TestConstraintsDroppingEverything(t *testing.T) {
	f := mustParse(t, "base: a.yaml\nparameters:\n  a: [1, 2]\nconstraints: [a > 5]\n")
	if _, err := f.Variants(); err == nil || !strings.Contains(err.Error(), "drop every combination") {
		t.Errorf("got %v", err)
	}
}

func TestSizeLimitBeforeAllocation(t *testing.T) {
	_, err := Parse("s.yaml", []byte("base: a.yaml\nparameters:\n  a: {from: 0, to: 1, count: 1000}\n  b: {from: 0, to: 1, count: 1000}\n  c: [1, 2]\n"))
	if err == nil || !strings.Contains(err.Error(), "2000000 variants, more than the limit") {
		t.Errorf("got %v", err)
	}
}

// TestIDs checks the id against SHA-256 of the canonical text computed
// outside Go: printf 'angle=2.5\nthickness=0.1\n' | sha256sum (GNU
// coreutils) gives ad4ee58c3af3...; with refinement factor 2 and angle -2.5,
// printf 'angle=-2.5\nthickness=0.1\nrefine=2\n' | sha256sum gives
// c7283d6b15e6....
func TestIDs(t *testing.T) {
	p := []Value{{"thickness", 0.1}, {"angle", 2.5}}
	if got := ID(Canonical(p, 1)); got != "ad4ee58c3af3" {
		t.Errorf("id %s, want ad4ee58c3af3", got)
	}
	p[1].Value = -2.5
	if got := ID(Canonical(p, 2)); got != "c7283d6b15e6" {
		t.Errorf("id %s, want c7283d6b15e6", got)
	}
	// Shortest round-trip text: 0.1+0.2 is not 0.3 in float64 and must
	// not share its id.
	x, y := 0.1, 0.2
	if ID(Canonical([]Value{{"a", x + y}}, 1)) == ID(Canonical([]Value{{"a", 0.3}}, 1)) {
		t.Error("0.30000000000000004 and 0.3 share an id")
	}
	if FormatValue(-0.0) != "0" || FormatValue(1e-7) != "1e-07" || FormatValue(0.25) != "0.25" {
		t.Error("FormatValue")
	}
}

func TestSafeNames(t *testing.T) {
	cases := []struct{ label, want string }{
		{"t=0.1_a=2", "t=0.1_a=2-abc"},
		{"../x", "_x-abc"},
		{"..", "abc"},
		{"/etc/passwd", "_etc_passwd-abc"},
		{`C:\win`, "C__win-abc"},
		{"-rf", "rf-abc"},
		{"a b\x00c", "a_b_c-abc"},
		{".hidden", "hidden-abc"},
		{"", "abc"},
		{strings.Repeat("x", 300), strings.Repeat("x", maxLabel) + "-abc"},
	}
	for _, c := range cases {
		got := SafeName(c.label, "abc")
		if got != c.want {
			t.Errorf("SafeName(%q) = %q, want %q", c.label, got, c.want)
		}
		out := filepath.Join("/out", got)
		if filepath.Dir(out) != "/out" {
			t.Errorf("SafeName(%q) = %q leaves the output folder", c.label, got)
		}
	}
}

func TestNamePatternCannotEscape(t *testing.T) {
	for _, pat := range []string{"../../{t}", "/abs/{t}", "{t}/../..", ".."} {
		f := mustParse(t, "base: a.yaml\nname: \""+pat+"\"\nparameters:\n  t: [-1, 2]\n")
		vs, err := f.Variants()
		if err != nil {
			t.Fatal(err)
		}
		for _, v := range vs {
			if strings.ContainsAny(v.Name, `/\`) || strings.HasPrefix(v.Name, ".") || !strings.HasSuffix(v.Name, v.ID) {
				t.Errorf("pattern %q gave folder %q", pat, v.Name)
			}
		}
	}
	if _, err := Parse("s.yaml", []byte("base: a.yaml\nname: \"t{th\"\nparameters:\n  t: [1]\n")); err == nil {
		t.Error("an unclosed brace was accepted")
	}
	if _, err := Parse("s.yaml", []byte("base: a.yaml\nname: \"t{u}\"\nparameters:\n  t: [1]\n")); err == nil || !strings.Contains(err.Error(), "{u}") {
		t.Errorf("an unknown name in the pattern: %v", err)
	}
}
