package sweep

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"cvdeck/deck"
)

// sampleBase is the nozzle case of the sample sweeps, whose parameters
// include exit_h: exit_ratio * throat_h (derived) and inlet_h: 60 (fixed).
func sampleBase(t *testing.T) string {
	t.Helper()
	p, err := filepath.Abs("../../samples/sweeps/nozzle.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestConstraintsUseBaseParameters: a constraint may use the base case's
// derived and fixed parameters, evaluated per combination. Kept by hand
// (exit_h = exit_ratio * throat_h < 35, throat_h < inlet_h / 2 = 30):
// 20*1.2 = 24 and 20*1.6 = 32 kept, 25*1.2 = 30 kept, 25*1.6 = 40 dropped,
// 30 dropped by the second constraint. deck.Load, which meshes nothing,
// is the outside check that the values are those a deck gets.
func TestConstraintsUseBaseParameters(t *testing.T) {
	base := sampleBase(t)
	f := mustParse(t, "base: "+base+"\nparameters:\n  throat_h: [20, 25, 30]\n  exit_ratio: [1.2, 1.6]\nconstraints:\n  - exit_h < 35\n  - throat_h < inlet_h / 2\n")
	vs, err := f.Variants()
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, v := range vs {
		got = append(got, describe(v.Params))
	}
	want := []string{"throat_h=20 exit_ratio=1.2", "throat_h=20 exit_ratio=1.6", "throat_h=25 exit_ratio=1.2"}
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("kept %v, want %v", got, want)
	}
	// Every combination, kept or not, against the deck's own evaluation.
	b, err := readBaseParams(f)
	if err != nil {
		t.Fatal(err)
	}
	for _, th := range f.Params[0].Values {
		for _, r := range f.Params[1].Values {
			sw := map[string]float64{"throat_h": th, "exit_ratio": r}
			mine, err := b.resolve(sw)
			if err != nil {
				t.Fatal(err)
			}
			c, err := deck.Load(base, deck.LoadOptions{Params: sw})
			if err != nil {
				t.Fatal(err)
			}
			if mine["exit_h"] != c.Params["exit_h"] || mine["inlet_h"] != c.Params["inlet_h"] {
				t.Errorf("throat_h=%v exit_ratio=%v: exit_h %v inlet_h %v, deck.Load gives %v %v", th, r, mine["exit_h"], mine["inlet_h"], c.Params["exit_h"], c.Params["inlet_h"])
			}
		}
	}
}

// TestConstraintNameErrors: a name neither swept nor in the base case is
// refused at the constraint, with the nearest name and both lists; a base
// case that is missing is refused at the base key.
func TestConstraintNameErrors(t *testing.T) {
	base := sampleBase(t)
	f := mustParse(t, "base: "+base+"\nparameters:\n  throat_h: [20, 25]\nconstraints:\n  - throatx < 30\n")
	_, err := f.Variants()
	want := `/cases/sweep.yaml:5:5: constraint "throatx < 30" uses "throatx", which is neither swept nor a parameter of the base case nozzle.yaml; did you mean "throat_x"? (swept: throat_h; the base case's parameters: length, throat_x, inlet_h, throat_h, exit_ratio, exit_h, cells_x, cells_y)`
	if err == nil || err.Error() != want {
		t.Errorf("got  %v\nwant %s", err, want)
	}
	f = mustParse(t, "parameters:\n  a: [1, 2]\nconstraints: [\"a < b\"]\nbase: nowhere.yaml\n")
	_, err = f.Variants()
	var e *Error
	if !errors.As(err, &e) || e.Line != 4 || e.Col != 7 || !strings.Contains(err.Error(), "cannot read the base case /cases/nowhere.yaml") || !errors.Is(err, deck.ErrInput) {
		t.Errorf("missing base: %v", err)
	}
}

// TestBaseParameterEvaluation: definitions follow the swept values (b is
// 2a, so a = 3 gives 6 > 5 and is kept), a circle among the base case's
// definitions is refused there, and a value that cannot be evaluated for
// a combination (sqrt of -1) names the combination.
func TestBaseParameterEvaluation(t *testing.T) {
	dir := t.TempDir()
	base := filepath.Join(dir, "case.yaml")
	write := func(text string) {
		if err := os.WriteFile(base, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	sweep := "base: " + base + "\nparameters:\n  a: [1, 3]\nconstraints: [b > 5]\n"
	write("name: x\nparameters:\n  a: 1\n  b: 2 * a\n")
	vs, err := mustParse(t, sweep).Variants()
	if err != nil || len(vs) != 1 || vs[0].Params[0].Value != 3 {
		t.Errorf("kept %v, %v; want a=3 only", vs, err)
	}
	write("name: x\nparameters:\n  a: 1\n  b: c + 1\n  c: b + 1\n")
	if _, err := mustParse(t, sweep).Variants(); err == nil || !strings.Contains(err.Error(), base+":4:6: parameters.b: parameters refer to each other in a circle: b → c → b") {
		t.Errorf("circle: %v", err)
	}
	write("name: x\nparameters:\n  a: 1\n  b: sqrt(a - 2)\n")
	if _, err := mustParse(t, sweep).Variants(); err == nil || !strings.Contains(err.Error(), "cannot be evaluated for a=1") || !strings.Contains(err.Error(), base+":4:6: parameters.b: expression") {
		t.Errorf("sqrt(-1): %v", err)
	}
}

// TestLoadBaseSaysWhere: a base case that does not load is an error at the
// sweep file's base key.
func TestLoadBaseSaysWhere(t *testing.T) {
	f := mustParse(t, "parameters:\n  a: [1, 2]\nbase: nowhere.yaml\n")
	_, err := NewPipeline(f).LoadBase(f)
	var e *Error
	if !errors.As(err, &e) || e.Line != 3 || e.Col != 7 || !strings.HasPrefix(err.Error(), "/cases/sweep.yaml:3:7: the base case as written does not load") {
		t.Errorf("got %v", err)
	}
}
