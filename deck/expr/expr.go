// Package expr is the small arithmetic language that any numeric field of a
// cvdeck case file may use to refer to named parameters.
//
// Grammar (lowest precedence first):
//
//	expr    = or
//	or      = and { "or" and }
//	and     = not { "and" not }
//	not     = "not" not | compare
//	compare = sum [ ("<" | "<=" | ">" | ">=" | "==" | "!=") sum ]
//	sum     = product { ("+" | "-") product }
//	product = unary { ("*" | "/" | "%") unary }
//	unary   = ("-" | "+") unary | power
//	power   = atom [ "^" unary ]            (right-associative: 2^3^2 = 2^9)
//	atom    = number | name | name "(" [ expr { "," expr } ] ")" | "(" expr ")"
//
// Numbers are decimal with an optional fraction and exponent (1, 0.5, 2e-3).
// Names start with a letter or underscore and may contain letters, digits and
// underscores. Comparisons and the logical words give 1 for true and 0 for
// false; any non-zero value counts as true. Constants: pi, e. Functions: sin,
// cos, tan (radians), sind, cosd, tand (degrees), asin, acos, atan, atan2,
// sqrt, exp, log (natural), log10, abs, floor, ceil, round, min, max (one or
// more arguments), rad (degrees to radians), deg (radians to degrees) and
// if(condition, then, else). The degree functions are exact at whole
// multiples of 90° (sind(180) is 0, not 1.2e-16), and tand at an odd
// multiple of 90° is an error, as sqrt(-1) is.
//
// Evaluation is strict: a name that is not defined, a division by zero, or a
// result that is not a finite number is an error that names the expression
// and the column where the trouble starts.
package expr

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Expr is a parsed expression.
type Expr struct {
	src  string
	root node
}

// Error is a parse or evaluation error; Col is the 1-based column in the
// expression text.
type Error struct {
	Src string
	Col int
	Msg string
}

func (e *Error) Error() string {
	return fmt.Sprintf("expression %q, column %d: %s", e.Src, e.Col, e.Msg)
}

// Parse parses an expression.
func Parse(src string) (*Expr, error) {
	p := &parser{src: src}
	p.next()
	n, err := p.or()
	if err != nil {
		return nil, err
	}
	if p.err != nil {
		return nil, p.err
	}
	if p.tok.kind != tokEOF {
		return nil, p.errf(p.tok.pos, "unexpected %q after a complete expression", p.tok.text)
	}
	return &Expr{src: src, root: n}, nil
}

// String returns the source text.
func (x *Expr) String() string { return x.src }

// Names returns the parameter names the expression refers to, in order of
// first appearance, without duplicates and without constants.
func (x *Expr) Names() []string {
	var out []string
	seen := map[string]bool{}
	var walk func(n node)
	walk = func(n node) {
		switch n := n.(type) {
		case *nameNode:
			if _, constant := constants[n.name]; !constant && !seen[n.name] {
				seen[n.name] = true
				out = append(out, n.name)
			}
		case *unaryNode:
			walk(n.x)
		case *binaryNode:
			walk(n.x)
			walk(n.y)
		case *callNode:
			for _, a := range n.args {
				walk(a)
			}
		}
	}
	walk(x.root)
	return out
}

// Eval evaluates the expression with the given parameter values.
func (x *Expr) Eval(vars map[string]float64) (float64, error) {
	v, err := x.root.eval(x.src, vars)
	if err != nil {
		return 0, err
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, &Error{Src: x.src, Col: 1, Msg: fmt.Sprintf("the result %v is not a finite number", v)}
	}
	return v, nil
}

// Eval parses and evaluates src in one step.
func Eval(src string, vars map[string]float64) (float64, error) {
	x, err := Parse(src)
	if err != nil {
		return 0, err
	}
	return x.Eval(vars)
}

var constants = map[string]float64{"pi": math.Pi, "e": math.E}

// IsReserved reports whether name is a constant or function name, which a
// parameter may not take.
func IsReserved(name string) bool {
	if _, ok := constants[name]; ok {
		return true
	}
	if _, ok := functions[name]; ok {
		return true
	}
	switch name {
	case "and", "or", "not", "if":
		return true
	}
	return false
}

// ValidName reports whether s is a valid parameter name.
func ValidName(s string) bool {
	if s == "" {
		return false
	}
	for i, r := range s {
		if !(r == '_' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || i > 0 && r >= '0' && r <= '9') {
			return false
		}
	}
	return true
}

// ---- syntax tree ----

type node interface {
	eval(src string, vars map[string]float64) (float64, error)
}

type numNode struct{ v float64 }

func (n *numNode) eval(string, map[string]float64) (float64, error) { return n.v, nil }

type nameNode struct {
	name string
	pos  int
}

func (n *nameNode) eval(src string, vars map[string]float64) (float64, error) {
	if v, ok := vars[n.name]; ok {
		return v, nil
	}
	if v, ok := constants[n.name]; ok {
		return v, nil
	}
	return 0, &Error{Src: src, Col: n.pos + 1, Msg: fmt.Sprintf("%q is not a defined parameter%s", n.name, suggest(n.name, vars))}
}

// suggest names the defined parameters, or the closest one, for an error.
func suggest(name string, vars map[string]float64) string {
	if len(vars) == 0 {
		return " (the case defines no parameters)"
	}
	best, bestD := "", 1<<30
	for k := range vars {
		d := EditDistance(strings.ToLower(name), strings.ToLower(k))
		if d < bestD || d == bestD && k < best {
			best, bestD = k, d
		}
	}
	if bestD <= 2 {
		return fmt.Sprintf("; did you mean %q?", best)
	}
	return ""
}

// EditDistance is the Levenshtein distance between a and b: the fewest
// single-byte insertions, deletions and substitutions that turn one into
// the other (Levenshtein 1966), used to suggest the name a typo meant.
func EditDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := 1
			if a[i-1] == b[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

type unaryNode struct {
	op  string
	x   node
	pos int
}

func (n *unaryNode) eval(src string, vars map[string]float64) (float64, error) {
	v, err := n.x.eval(src, vars)
	if err != nil {
		return 0, err
	}
	switch n.op {
	case "-":
		return -v, nil
	case "not":
		return truth(v == 0), nil
	}
	return v, nil
}

type binaryNode struct {
	op   string
	x, y node
	pos  int
}

func truth(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

func (n *binaryNode) eval(src string, vars map[string]float64) (float64, error) {
	a, err := n.x.eval(src, vars)
	if err != nil {
		return 0, err
	}
	// The logical words short-circuit, so if-like guards can protect a
	// division: "w > 0 and h / w < 3".
	switch n.op {
	case "and":
		if a == 0 {
			return 0, nil
		}
	case "or":
		if a != 0 {
			return 1, nil
		}
	}
	b, err := n.y.eval(src, vars)
	if err != nil {
		return 0, err
	}
	switch n.op {
	case "+":
		return a + b, nil
	case "-":
		return a - b, nil
	case "*":
		return a * b, nil
	case "/", "%":
		if b == 0 {
			return 0, &Error{Src: src, Col: n.pos + 1, Msg: "division by zero"}
		}
		if n.op == "/" {
			return a / b, nil
		}
		return math.Mod(a, b), nil
	case "^":
		return math.Pow(a, b), nil
	case "<":
		return truth(a < b), nil
	case "<=":
		return truth(a <= b), nil
	case ">":
		return truth(a > b), nil
	case ">=":
		return truth(a >= b), nil
	case "==":
		return truth(a == b), nil
	case "!=":
		return truth(a != b), nil
	case "and", "or":
		return truth(b != 0), nil
	}
	return 0, &Error{Src: src, Col: n.pos + 1, Msg: "unknown operator " + n.op}
}

type function struct {
	minArgs, maxArgs int // maxArgs < 0: any number
	f                func(a []float64) float64
	// domain says where the function is defined, for the message when it
	// returns NaN ("" when NaN can only come from a NaN argument).
	domain string
}

func f1(f func(float64) float64) function {
	return function{minArgs: 1, maxArgs: 1, f: func(a []float64) float64 { return f(a[0]) }}
}

// f1d is f1 with the function's domain, for its error message.
func f1d(f func(float64) float64, domain string) function {
	fn := f1(f)
	fn.domain = domain
	return fn
}

const degree = math.Pi / 180

// degreeQuadrant reduces x degrees to a quadrant q ∈ {−2, …, 2} and a
// remainder r ∈ [−45°, 45°] in radians, x ≡ 90q + r (mod 360), with no
// rounding before the conversion to radians: math.Mod is exact, and the
// subtractions of 360 and of 90q are exact by Sterbenz's lemma (the
// operands lie within a factor 2 of each other; Goldberg 1991, What every
// computer scientist should know about floating-point arithmetic, from
// memory). So a whole multiple of 90° gives r = 0 exactly, and the
// functions below are exact there, as is common practice for trigonometric
// functions of degrees. Angles within ±45° are left as they are (q = 0),
// so their values are those of the plain conversion.
func degreeQuadrant(x float64) (q int, r float64) {
	d := math.Mod(x, 360) // in (−360, 360), exact
	switch {
	case d > 180:
		d -= 360
	case d < -180:
		d += 360
	}
	if math.Abs(d) > 45 {
		q = int(math.Round(d / 90))
		d -= 90 * float64(q)
	}
	return q, d * degree
}

// sind is the sine of x degrees, exact at whole multiples of 90°.
func sind(x float64) float64 {
	q, r := degreeQuadrant(x)
	return quarterSin(q, r)
}

// cosd is the cosine of x degrees, exact at whole multiples of 90°:
// cos(q·90° + r) = sin((q+1)·90° + r).
func cosd(x float64) float64 {
	q, r := degreeQuadrant(x)
	return quarterSin(q+1, r)
}

// quarterSin is sin(q·90° + r), r in radians, from the sine or cosine
// of r by the quarter turn q (any whole number); −0 reads as 0.
func quarterSin(q int, r float64) float64 {
	var v float64
	switch (q%4 + 4) % 4 {
	case 0:
		v = math.Sin(r)
	case 1:
		v = math.Cos(r)
	case 2:
		v = -math.Sin(r)
	default:
		v = -math.Cos(r)
	}
	return v + 0
}

// tand is the tangent of x degrees, exact at whole multiples of 180°, and
// NaN (so an evaluation error) at odd multiples of 90°, where the tangent
// is infinite: a case that asks for it has made a mistake, and an error
// there is plainer than an infinite length further on.
func tand(x float64) float64 {
	q, r := degreeQuadrant(x)
	if q%2 == 0 {
		return math.Tan(r) + 0
	}
	if r == 0 {
		return math.NaN()
	}
	return -1 / math.Tan(r)
}

var functions = map[string]function{
	"sin":   f1(math.Sin),
	"cos":   f1(math.Cos),
	"tan":   f1(math.Tan),
	"sind":  f1(sind),
	"cosd":  f1(cosd),
	"tand":  f1d(tand, "the tangent is infinite at odd multiples of 90°"),
	"asin":  f1d(math.Asin, "asin needs an argument from −1 to 1"),
	"acos":  f1d(math.Acos, "acos needs an argument from −1 to 1"),
	"atan":  f1(math.Atan),
	"sqrt":  f1d(math.Sqrt, "sqrt needs an argument ≥ 0"),
	"exp":   f1(math.Exp),
	"log":   f1d(math.Log, "log needs an argument > 0"),
	"log10": f1d(math.Log10, "log10 needs an argument > 0"),
	"abs":   f1(math.Abs),
	"floor": f1(math.Floor),
	"ceil":  f1(math.Ceil),
	"round": f1(math.Round),
	"rad":   f1(func(x float64) float64 { return x * degree }),
	"deg":   f1(func(x float64) float64 { return x / degree }),
	"atan2": {minArgs: 2, maxArgs: 2, f: func(a []float64) float64 { return math.Atan2(a[0], a[1]) }},
	"min": {minArgs: 1, maxArgs: -1, f: func(a []float64) float64 {
		m := a[0]
		for _, v := range a[1:] {
			m = math.Min(m, v)
		}
		return m
	}},
	"max": {minArgs: 1, maxArgs: -1, f: func(a []float64) float64 {
		m := a[0]
		for _, v := range a[1:] {
			m = math.Max(m, v)
		}
		return m
	}},
}

type callNode struct {
	name string
	args []node
	pos  int
}

func (n *callNode) eval(src string, vars map[string]float64) (float64, error) {
	if n.name == "if" {
		c, err := n.args[0].eval(src, vars)
		if err != nil {
			return 0, err
		}
		if c != 0 {
			return n.args[1].eval(src, vars)
		}
		return n.args[2].eval(src, vars)
	}
	fn := functions[n.name]
	vals := make([]float64, len(n.args))
	for i, a := range n.args {
		v, err := a.eval(src, vars)
		if err != nil {
			return 0, err
		}
		vals[i] = v
	}
	v := fn.f(vals)
	if math.IsNaN(v) {
		msg := fmt.Sprintf("%s(%s) is not defined", n.name, joinNums(vals))
		if fn.domain != "" && allFinite(vals) {
			msg += ": " + fn.domain
		}
		return 0, &Error{Src: src, Col: n.pos + 1, Msg: msg}
	}
	return v, nil
}

// allFinite reports whether no value is NaN or infinite: only then can a
// NaN result be blamed on the function's domain.
func allFinite(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

func joinNums(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return strings.Join(s, ", ")
}
