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

// The degree functions at whole multiples of 90° give the exact values of
// elementary trigonometry (sin 0° = 0, sin 90° = 1, cos 90° = 0, ...),
// whatever the number of whole turns, as is common practice for functions
// of degrees; in particular the point at 360° of a closed outline is the
// point at 0°, so a closed spline through it is periodic.
func TestDegreesExactAtQuarterTurns(t *testing.T) {
	sinQ := [4]float64{0, 1, 0, -1} // sin(90°·k), k mod 4
	for k := -12; k <= 12; k++ {
		for _, turns := range []float64{0, 1e6} { // 1e6 whole turns: 3.6e8°, exact in float64
			x := 90*float64(k) + 360*turns
			s, c := sind(x), cosd(x)
			ws, wc := sinQ[(k%4+4)%4], sinQ[((k+1)%4+4)%4]
			if s != ws || c != wc || math.Signbit(s) != math.Signbit(ws) || math.Signbit(c) != math.Signbit(wc) {
				t.Errorf("sind(%g), cosd(%g) = %v, %v; want %v, %v exactly", x, x, s, c, ws, wc)
			}
			if k%2 == 0 {
				if v := tand(x); v != 0 || math.Signbit(v) {
					t.Errorf("tand(%g) = %v, want 0", x, v)
				}
			} else if v := tand(x); !math.IsNaN(v) {
				t.Errorf("tand(%g) = %v, want NaN (undefined)", x, v)
			}
		}
	}
	for _, src := range []string{"0.5 * sind(360)", "cosd(90)", "sind(180)", "sind(-180)", "cosd(-270)"} {
		if v, err := Eval(src, nil); err != nil || v != 0 {
			t.Errorf("%s = %v, %v; want exactly 0", src, v, err)
		}
	}
}

// Other angles: the exact values sin 30° = cos 60° = 1/2, tan 45° = 1 and
// tan 60° = √3 (elementary trigonometry) to an ulp or two, in every
// quadrant and after whole turns; and agreement with the radian functions
// of the standard library elsewhere.
func TestDegreesOtherAngles(t *testing.T) {
	ulps := func(got, want float64) float64 {
		return math.Abs(got-want) / (math.Nextafter(math.Abs(want), math.Inf(1)) - math.Abs(want))
	}
	cases := []struct {
		name      string
		got, want float64
		maxUlps   float64
	}{
		{"sind(30)", sind(30), 0.5, 1},
		{"sind(150)", sind(150), 0.5, 1},
		{"sind(-30)", sind(-30), -0.5, 1},
		{"sind(390)", sind(390), 0.5, 1},
		{"sind(-330)", sind(-330), 0.5, 1},
		{"cosd(60)", cosd(60), 0.5, 1},
		{"cosd(120)", cosd(120), -0.5, 1},
		{"cosd(300)", cosd(300), 0.5, 1},
		{"sind(3.6e8 + 210)", sind(3.6e8 + 210), -0.5, 1},
		{"tand(45)", tand(45), 1, 1},
		{"tand(135)", tand(135), -1, 2},
		{"tand(-45)", tand(-45), -1, 1},
		{"tand(60)", tand(60), math.Sqrt(3), 2},
		{"tand(240)", tand(240), math.Sqrt(3), 2},
	}
	for _, c := range cases {
		if u := ulps(c.got, c.want); u > c.maxUlps {
			t.Errorf("%s = %.17g, want %.17g to %g ulp (%g ulp off)", c.name, c.got, c.want, c.maxUlps, u)
		}
	}
	for x := -719.0; x <= 719; x += 7.3 {
		r := x * math.Pi / 180
		if math.Abs(sind(x)-math.Sin(r)) > 1e-14 || math.Abs(cosd(x)-math.Cos(r)) > 1e-14 {
			t.Errorf("at %g°: sind, cosd = %v, %v; math.Sin, Cos = %v, %v", x, sind(x), cosd(x), math.Sin(r), math.Cos(r))
		}
		if s, c := sind(x), cosd(x); math.Abs(s*s+c*c-1) > 4e-16 {
			t.Errorf("at %g°: sin² + cos² = %.17g", x, s*s+c*c)
		}
	}
}

// tand at an odd multiple of 90° is an evaluation error, as sqrt(-1) is,
// and the messages of functions with a domain say what would be valid.
func TestDomainErrorsSayWhatIsValid(t *testing.T) {
	cases := []struct{ src, want string }{
		{"2 * tand(90)", "tand(90) is not defined: the tangent is infinite at odd multiples of 90°"},
		{"tand(-270)", "tand(-270) is not defined"},
		{"sqrt(-1)", "sqrt(-1) is not defined: sqrt needs an argument ≥ 0"},
		{"acos(2)", "acos needs an argument from −1 to 1"},
		{"log(-1)", "log needs an argument > 0"},
	}
	for _, c := range cases {
		_, err := Eval(c.src, nil)
		var e *Error
		if !errors.As(err, &e) || !strings.Contains(e.Msg, c.want) {
			t.Errorf("%q: got %v, want an *Error containing %q", c.src, err, c.want)
		}
	}
	// A NaN argument is not the function's fault: no domain to blame.
	_, err := Eval("tand(10^400 - 10^400)", nil)
	if err == nil || strings.Contains(err.Error(), "odd multiples") {
		t.Errorf("tand of NaN: got %v, want an error without the domain note", err)
	}
}
