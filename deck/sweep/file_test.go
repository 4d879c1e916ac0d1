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
		{"base: a.yaml\ncombine: zip\nparameters:\n  a: [1, 2]\n  b: [1, 2, 3]\n", "so they need one length (a single value is fixed for the whole sweep), but b has 3 values and a has 2", 5, 3},
		{"base: a.yaml\ncombine: zip\nparameters:\n  a: [1, 2]\n  f: [7]\n  b: [1, 2, 3]\n", "but b has 3 values and a has 2", 6, 3},
		{"base: a.yaml\nparameters:\n  a: {from: 0, to: 1, step: -0.1}\n", "does not lead from 0 to 1", 3, 29},
		{"base: a.yaml\nparameters:\n  a: [1, x]\n", `value 2 of a is "x", which uses the name "x": a sweep value is a number or an expression of numbers, constants and functions`, 3, 10},
		{"base: a.yaml\nparameters:\n  a: [1, \"2 *\"]\n", "value 2 of a is not a number", 3, 10},
		{"base: a.yaml\nparameters:\n  h: {from: 20, to: 30, step: 3}\n", "does not end on 30 from 20 (the last value would be 29)", 3, 31},
		{"base: a.yaml\nparameters:\n  h: {from: 1, to: 0, step: -0.3}\n", "the last value would be 0.1), the ends are included, so give a step that divides 1,", 3, 29},
		{"base: a.yaml\nparameters:\n  sin: [1]\n", "not a valid parameter name", 3, 3},
		{"base: a.yaml\nrefine: {levels: 3, ratio: 1}\n", "refine ratio is 1; it must be above 1 and at most 4", 2, 28},
		// One range for the levels, the case file's own (2 to 8), in one message.
		{"base: a.yaml\nrefine: {levels: 0, ratio: 2}\n", `refine levels is "0"; it must be a whole number from 2 to 8`, 2, 18},
		{"base: a.yaml\nrefine: {levels: 40, ratio: 2}\n", `refine levels is "40"; it must be a whole number from 2 to 8`, 2, 18},
		{"base: a.yaml\nparameters:\n  t: [1, 2]\nname: \"t{u}\"\n", "name pattern \"t{u}\" uses {u}, which is not a swept parameter (swept: t)", 4, 7},
		{"base: a.yaml\nparameters:\n  a: [1, 2, 1.0]\n", "value 3 of a (1) repeats value 1", 3, 13},
		{"base: a.yaml\nparameters:\n  a: {from: 2, to: 2, count: 3}\n", "count 3 for a repeats one value", 3, 30},
		{"base: a.yaml\ncombine: zip\nparameters:\n  a: [1, 2, 1]\n  b: [5, 6, 5]\n  c: 9\n", "combination 3 of the zip (a=1 b=5 c=9) repeats combination 1", 4, 13},
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

// TestRepeatedValueIsAnError: a zip repeats a combination only where every
// list repeats at the same element, so a: [1, 2, 1] beside b: [5, 6, 7]
// is three decks; a File made in code, which Parse did not check, still
// meets the backstop in Variants.
func TestRepeatedValueIsAnError(t *testing.T) {
	f := mustParse(t, "base: a.yaml\ncombine: zip\nparameters:\n  a: [1, 2, 1]\n  b: [5, 6, 7]\n")
	if vs, err := f.Variants(); err != nil || len(vs) != 3 {
		t.Errorf("zip with a value repeated in one list: %d variants, %v; want 3", len(vs), err)
	}
	g := &File{Path: "s.yaml", Params: []Param{{Name: "a", Values: []float64{1, 2, 1}, Pos: Pos{3, 3}}}}
	_, err := g.Variants()
	if err == nil || err.Error() != "s.yaml:3:3: the variants at indexes 0 and 2 have the same parameter values (a=1); remove the repeated value" {
		t.Errorf("got %v", err)
	}
}

// TestConstraintsDroppingEverything: the error points at the constraint
// that dropped every combination, or at the constraints key when several
// share them, and counts what each dropped (by hand: a > 5 is false for
// 1 and 2; in the second file a < 2 drops 2, and a > 1 drops 1).
func TestConstraintsDroppingEverything(t *testing.T) {
	f := mustParse(t, "base: a.yaml\nparameters:\n  a: [1, 2]\nconstraints: [a > 5]\n")
	_, err := f.Variants()
	if err == nil || err.Error() != `/cases/sweep.yaml:4:15: the constraints drop all 2 combinations; nothing is left to run ("a > 5" drops 2)` {
		t.Errorf("got %v", err)
	}
	f = mustParse(t, "base: a.yaml\nparameters:\n  a: [1, 2]\nconstraints:\n  - a < 2\n  - a > 1\n")
	_, err = f.Variants()
	if err == nil || err.Error() != `/cases/sweep.yaml:4:1: the constraints drop all 2 combinations; nothing is left to run ("a < 2" drops 1, "a > 1" drops 1)` {
		t.Errorf("got %v", err)
	}
	f = mustParse(t, "base: a.yaml\nparameters:\n  a: 1\nconstraints: [a > 5]\n")
	if _, err = f.Variants(); err == nil || !strings.Contains(err.Error(), "drop the one combination") {
		t.Errorf("got %v", err)
	}
}

// TestZipFixesSingleValues: the README says a single number fixes a
// parameter for the whole sweep; under a zip it is repeated beside the
// lists, and so is a one-element list (as under a product, where the two
// are the same). The expected combinations are written out by hand.
func TestZipFixesSingleValues(t *testing.T) {
	f := mustParse(t, `
base: nozzle.yaml
combine: zip
parameters:
  throat_h: [20, 25, 30]
  exit_ratio: 1.4
  cells_y: [24]
  cells_x: {from: 60, to: 90, count: 3}
`)
	vs, err := f.Variants()
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, v := range vs {
		got = append(got, describe(v.Params))
	}
	want := []string{
		"throat_h=20 exit_ratio=1.4 cells_y=24 cells_x=60",
		"throat_h=25 exit_ratio=1.4 cells_y=24 cells_x=75",
		"throat_h=30 exit_ratio=1.4 cells_y=24 cells_x=90",
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("zip gave %v, want %v", got, want)
	}
	// Only fixed values: one combination.
	f = mustParse(t, "base: a.yaml\ncombine: zip\nparameters:\n  a: 1\n  b: [2]\n")
	if vs, err := f.Variants(); err != nil || len(vs) != 1 || describe(vs[0].Params) != "a=1 b=2" {
		t.Errorf("zip of fixed values: %v, %v", vs, err)
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
