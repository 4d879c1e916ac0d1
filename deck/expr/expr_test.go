package expr

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestEvalArithmetic(t *testing.T) {
	vars := map[string]float64{"chord": 2, "t": 0.12, "alpha": 30}
	cases := []struct {
		src  string
		want float64
	}{
		{"1 + 2 * 3", 7},
		{"(1 + 2) * 3", 9},
		{"2^3^2", 512}, // right-associative, as in mathematics (common practice)
		{"-2^2", -4},   // unary minus binds looser than ^ (common practice)
		{"chord / 2", 1},
		{"t * chord", 0.24},
		{"sind(alpha)", 0.5},
		{"cos(pi)", -1},
		{"rad(180)", math.Pi},
		{"min(3, chord, 5)", 2},
		{"max(1, 2e1, 3)", 20},
		{"7 % 4", 3},
		{"chord > 1 and t < 0.2", 1},
		{"not (chord > 1) or t == 0.12", 1},
		{"if(chord > 3, 10, 20)", 20},
		{"atan2(1, 1) * 4", math.Pi},
		{"1.5e-3 * 1000", 1.5},
		{".5 + .25", 0.75},
	}
	for _, c := range cases {
		got, err := Eval(c.src, vars)
		if err != nil {
			t.Errorf("%s: %v", c.src, err)
			continue
		}
		if math.Abs(got-c.want) > 1e-15*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %v, want %v", c.src, got, c.want)
		}
	}
}

func TestErrorsSayWhere(t *testing.T) {
	vars := map[string]float64{"chord": 1}
	cases := []struct {
		src, want string
		col       int
	}{
		{"chrod * 2", `did you mean "chord"`, 1},
		{"1 / (chord - 1)", "division by zero", 3},
		{"2 * (chord + 1", `missing ")"`, 15},
		{"sqrt(-1)", "not defined", 1},
		{"foo(1)", "not a known function", 1},
		{"atan2(1)", "takes 2 argument", 1},
		{"1 + ", "ends where", 5},
		{"3 $ 4", "unexpected character", 3},
		{"", "empty", 1},
		{"sin", "is a function", 1},
		{"1 2", "after a complete expression", 3},
		{"10^400", "not a finite number", 1},
	}
	for _, c := range cases {
		_, err := Eval(c.src, vars)
		var e *Error
		if !errors.As(err, &e) {
			t.Errorf("%q: got %v, want an *Error", c.src, err)
			continue
		}
		if !strings.Contains(e.Error(), c.want) || e.Col != c.col {
			t.Errorf("%q: got %q (col %d), want %q at col %d", c.src, e.Error(), e.Col, c.want, c.col)
		}
	}
}

// TestNames: the parameters an expression uses, in order, without the
// constants pi and e (which no parameter may be named) or function names.
func TestNames(t *testing.T) {
	x, err := Parse("a * b + sin(a) + pi + c * e")
	if err != nil {
		t.Fatal(err)
	}
	got := strings.Join(x.Names(), ",")
	if got != "a,b,c" {
		t.Fatalf("names %s", got)
	}
}

func TestAndShortCircuits(t *testing.T) {
	// The guard keeps the division from being evaluated.
	v, err := Eval("w > 0 and h / w < 3", map[string]float64{"w": 0, "h": 1})
	if err != nil || v != 0 {
		t.Fatalf("got %v, %v", v, err)
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"1+2", "a*(b-c)^2", "min(1,2,3)", "not a or b and c", "if(a<b,1,2)", "((((", "1e", "-.5e-3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		x, err := Parse(s)
		if err != nil {
			return
		}
		_, _ = x.Eval(map[string]float64{"a": 1, "b": 2, "c": 0})
	})
}
