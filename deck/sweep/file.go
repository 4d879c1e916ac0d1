// Package sweep runs many variants of one cvdeck case: parameter sweeps and
// refinement families, on several workers, resumable, and sliced into
// shards that any batch scheduler can spread over machines.
//
// A sweep file names a base case and the parameters to vary:
//
//	base: wedge.yaml            # the case file, relative to this file
//	combine: product            # product (default) or zip
//	parameters:
//	  thickness: [0.08, 0.10, 0.12]          # an explicit list
//	  angle: {from: 0, to: 10, step: 2.5}    # a range with a step (ends included)
//	  chord: {from: 1, to: 2, count: 5}      # a range with a count (ends included)
//	  cells_x: 120                           # one value: fixed for the whole sweep
//	constraints:                             # combinations for which any is false are dropped
//	  - thickness * 100 + angle <= 20
//	  - span / chord < 4                     # also the base case's other parameters, derived ones included
//	refine: {levels: 3, ratio: 2}            # a coarse-to-fine family for each combination
//	name: "t{thickness}_a{angle}"            # optional folder-name pattern
//
// A single value, a bare number or a one-element list, fixes a parameter
// for the whole sweep under either combine: a zip walks the lists of more
// than one value together and repeats the fixed values beside them.
//
// Unknown keys are errors that say the file, line and column.
package sweep

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"

	"cvdeck/deck"
	"cvdeck/deck/expr"
	"cvdeck/internal/yamlerr"
)

// MaxVariants is the largest sweep accepted; a sweep file whose product
// would exceed it is refused before anything is allocated.
const MaxVariants = 1_000_000

// File is a parsed sweep file.
type File struct {
	// Path is the sweep file as it was given.
	Path string
	// Base is the base case path, resolved against the sweep file's folder.
	Base string
	// BasePos is where the sweep file names the base case, for the errors
	// about it (a missing file); zero for a File made in code.
	BasePos Pos
	// Zip is true when the parameter lists are combined element by element
	// instead of as a full product.
	Zip bool
	// Params are the swept parameters in file order; with a product the
	// first one varies slowest.
	Params []Param
	// Constraints drop the combinations for which any of them is false (0).
	Constraints []Constraint
	// ConstraintsPos is the place of the constraints key, for the errors
	// about the constraints as a whole.
	ConstraintsPos Pos
	// Refine is the refinement family made of every combination, or nil.
	Refine *Refine
	// NamePattern is the folder-name pattern, "" for the default
	// name=value list; {name} stands for a parameter's value.
	NamePattern string
	// NamePos is the place of the name pattern.
	NamePos Pos
}

// Param is one swept parameter and its values. A parameter with one value
// is fixed for the whole sweep, under a zip too.
type Param struct {
	Name   string
	Values []float64
	// Pos is the place of the parameter's name.
	Pos Pos
	// ValuePos is the place of each value, so that an error about one
	// value (a repeat) points at it: a list's items, or the range mapping
	// for every value of a range. It may be nil (a Param made in code).
	ValuePos []Pos
}

// valuePos returns the place of value i, or of the parameter when the
// values have no places of their own.
func (p Param) valuePos(i int) Pos {
	if i < len(p.ValuePos) {
		return p.ValuePos[i]
	}
	return p.Pos
}

// Constraint is a condition a combination must meet.
type Constraint struct {
	Expr *expr.Expr
	Pos  Pos
}

// Refine describes a refinement family: Levels decks, level 1 as written
// and each next level Ratio times finer in each direction.
type Refine struct {
	Levels int
	Ratio  float64
}

// Factor returns the refinement factor of the 1-based level: Ratio^(level-1).
func (r *Refine) Factor(level int) float64 {
	return math.Pow(r.Ratio, float64(level-1))
}

// Pos is a place in the sweep file.
type Pos struct {
	Line, Col int
}

// Error is a problem with a sweep file or a sweep's input; it says where.
type Error struct {
	File      string
	Line, Col int // 0 when the error is about the file as a whole
	Msg       string
	Err       error // the cause, if any
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d:%d", e.Line, e.Col)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	if e.Err != nil {
		b.WriteString(": ")
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap lets errors.Is find deck.ErrInput (bad input: exit code 2) and
// the cause.
func (e *Error) Unwrap() []error {
	if e.Err != nil {
		return []error{deck.ErrInput, e.Err}
	}
	return []error{deck.ErrInput}
}

// ExitCode is 2: bad input or usage, as in cvdeck's exit-code convention.
func (e *Error) ExitCode() int { return 2 }

// ReadFile reads and parses a sweep file.
func ReadFile(path string) (*File, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, &Error{File: path, Msg: "cannot read the sweep file", Err: err}
	}
	return Parse(path, data)
}

// Parse parses the text of a sweep file; path names it in errors and
// anchors the base case path.
func Parse(path string, data []byte) (*File, error) {
	p := &fileParser{path: path}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		line, col, msg := yamlerr.Describe(data, err)
		return nil, &Error{File: path, Line: line, Col: col, Msg: "not valid YAML: " + msg}
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) == 0 {
		return nil, &Error{File: path, Msg: "the sweep file is empty; it needs at least a base case (base: case.yaml)"}
	}
	f, err := p.file(doc.Content[0])
	if err != nil {
		return nil, err
	}
	return f, nil
}

type fileParser struct {
	path string
}

func (p *fileParser) errf(n *yaml.Node, format string, a ...any) error {
	return &Error{File: p.path, Line: n.Line, Col: n.Column, Msg: fmt.Sprintf(format, a...)}
}

// mapping walks a mapping node, calling fn for each key in order, and
// refuses keys that are not in allowed or that appear twice.
func (p *fileParser) mapping(n *yaml.Node, what string, allowed []string, fn func(key string, k, v *yaml.Node) error) error {
	if n.Kind != yaml.MappingNode {
		return p.errf(n, "%s must be a mapping of keys to values", what)
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if allowed != nil && !contains(allowed, k.Value) {
			return p.errf(k, "unknown key %q in %s; valid keys are %s", k.Value, what, strings.Join(allowed, ", "))
		}
		if seen[k.Value] {
			return p.errf(k, "key %q appears twice in %s", k.Value, what)
		}
		seen[k.Value] = true
		if err := fn(k.Value, k, v); err != nil {
			return err
		}
	}
	return nil
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func (p *fileParser) file(root *yaml.Node) (*File, error) {
	f := &File{Path: p.path}
	var baseNode *yaml.Node
	err := p.mapping(root, "the sweep file", []string{"base", "combine", "parameters", "constraints", "refine", "name"}, func(key string, k, v *yaml.Node) error {
		switch key {
		case "base":
			s, err := p.str(v, "base")
			if err != nil {
				return err
			}
			if s == "" {
				return p.errf(v, "base must name the case file, e.g. base: case.yaml")
			}
			baseNode = v
			f.BasePos = Pos{v.Line, v.Column}
			f.Base = s
			if !filepath.IsAbs(s) {
				f.Base = filepath.Join(filepath.Dir(p.path), s)
			}
		case "combine":
			s, err := p.str(v, "combine")
			if err != nil {
				return err
			}
			switch s {
			case "product":
			case "zip":
				f.Zip = true
			default:
				return p.errf(v, "combine is %q; valid values are product (every combination) and zip (element by element)", s)
			}
		case "parameters":
			return p.mapping(v, "parameters", nil, func(name string, k, v *yaml.Node) error {
				if !expr.ValidName(name) || expr.IsReserved(name) {
					return p.errf(k, "%q is not a valid parameter name (a letter or _ then letters, digits or _, and not a constant or function name)", name)
				}
				vals, at, err := p.values(name, v)
				if err != nil {
					return err
				}
				f.Params = append(f.Params, Param{Name: name, Values: vals, Pos: Pos{k.Line, k.Column}, ValuePos: at})
				return nil
			})
		case "constraints":
			if v.Kind != yaml.SequenceNode {
				return p.errf(v, "constraints must be a list of expressions, e.g. [\"thickness < 0.2\"]")
			}
			f.ConstraintsPos = Pos{k.Line, k.Column}
			for _, c := range v.Content {
				s, err := p.str(c, "a constraint")
				if err != nil {
					return err
				}
				x, err := expr.Parse(s)
				if err != nil {
					return &Error{File: p.path, Line: c.Line, Col: c.Column, Msg: "bad constraint", Err: err}
				}
				f.Constraints = append(f.Constraints, Constraint{Expr: x, Pos: Pos{c.Line, c.Column}})
			}
		case "refine":
			r, err := p.refine(v)
			if err != nil {
				return err
			}
			f.Refine = r
		case "name":
			s, err := p.str(v, "name")
			if err != nil {
				return err
			}
			f.NamePattern = s
			f.NamePos = Pos{v.Line, v.Column}
			if err := checkPattern(s); err != nil {
				return p.errf(v, "name pattern %q: %v", s, err)
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if baseNode == nil {
		return nil, p.errf(root, "the sweep file names no base case; add base: case.yaml")
	}
	if err := f.check(root, p); err != nil {
		return nil, err
	}
	return f, nil
}

// check verifies what needs the whole file: names in the name pattern,
// zip lengths, repeated values and the size limit. Constraint names that
// are not swept are left to Variants, which looks them up among the base
// case's parameters.
func (f *File) check(root *yaml.Node, p *fileParser) error {
	names := map[string]bool{}
	for _, pr := range f.Params {
		names[pr.Name] = true
	}
	for _, n := range patternNames(f.NamePattern) {
		if !names[n] {
			return f.errAt(f.NamePos, "name pattern %q uses {%s}, which is not a swept parameter (swept: %s)", f.NamePattern, n, strings.Join(f.paramNames(), ", "))
		}
	}
	if f.Zip {
		var first *Param
		for i := range f.Params {
			pr := &f.Params[i]
			if len(pr.Values) == 1 {
				continue // fixed: repeated beside every element
			}
			if first == nil {
				first = pr
				continue
			}
			if len(pr.Values) != len(first.Values) {
				return f.errAt(pr.Pos, "combine: zip walks the lists together, so they need one length (a single value is fixed for the whole sweep), but %s has %d values and %s has %d",
					pr.Name, len(pr.Values), first.Name, len(first.Values))
			}
		}
	}
	if err := f.checkRepeats(); err != nil {
		return err
	}
	n := 1.0
	if !f.Zip {
		for _, pr := range f.Params {
			n *= float64(len(pr.Values))
		}
	} else {
		n = float64(f.zipLength())
	}
	if f.Refine != nil {
		n *= float64(f.Refine.Levels)
	}
	if n > MaxVariants {
		return &Error{File: p.path, Msg: fmt.Sprintf("the sweep would make %.0f variants, more than the limit of %d", n, MaxVariants)}
	}
	return nil
}

// zipLength is the number of combinations of a zip: the length of its
// lists of more than one value, 1 when every parameter is fixed.
func (f *File) zipLength() int {
	n := 1
	for _, p := range f.Params {
		n = max(n, len(p.Values))
	}
	return n
}

// checkRepeats refuses a value given twice, which would make the same deck
// twice: in a product a repeat within one parameter's list, in a zip a
// combination equal to an earlier one. Values are compared by their text
// in ids (FormatValue), so 1 and 1.0 repeat each other.
func (f *File) checkRepeats() error {
	if !f.Zip {
		for _, p := range f.Params {
			seen := make(map[string]int, len(p.Values))
			for i, v := range p.Values {
				t := FormatValue(v)
				if j, dup := seen[t]; dup {
					return f.errAt(p.valuePos(i), "value %d of %s (%s) repeats value %d; each value makes its own decks, so give it once", i+1, p.Name, t, j+1)
				}
				seen[t] = i
			}
		}
		return nil
	}
	// The error points at the repeating element of the first list of
	// more than one value (a zip of fixed values only has one combination).
	var lead *Param
	for i := range f.Params {
		if len(f.Params[i].Values) > 1 {
			lead = &f.Params[i]
			break
		}
	}
	if lead == nil {
		return nil
	}
	seen := map[string]int{}
	for i := range lead.Values {
		c := f.zipCombination(i)
		t := Canonical(c, 1)
		if j, dup := seen[t]; dup {
			return f.errAt(lead.valuePos(i), "combination %d of the zip (%s) repeats combination %d; each combination makes its own decks, so give it once", i+1, describe(c), j+1)
		}
		seen[t] = i
	}
	return nil
}

// zipCombination returns element i of a zip: the i-th value of each list,
// and the value of each fixed parameter.
func (f *File) zipCombination(i int) []Value {
	c := make([]Value, len(f.Params))
	for j, p := range f.Params {
		v := p.Values[0]
		if len(p.Values) > 1 {
			v = p.Values[i]
		}
		c[j] = Value{p.Name, v}
	}
	return c
}

// errAt is an error about the sweep file at pos (no place when pos is zero).
func (f *File) errAt(pos Pos, format string, a ...any) *Error {
	return &Error{File: f.Path, Line: pos.Line, Col: pos.Col, Msg: fmt.Sprintf(format, a...)}
}

func (f *File) paramNames() []string {
	out := make([]string, len(f.Params))
	for i, p := range f.Params {
		out[i] = p.Name
	}
	if len(out) == 0 {
		return []string{"none"}
	}
	return out
}

func (p *fileParser) str(n *yaml.Node, what string) (string, error) {
	if n.Kind != yaml.ScalarNode {
		return "", p.errf(n, "%s must be a single value, not a list or mapping", what)
	}
	return n.Value, nil
}

// number reads a scalar as a number: a decimal literal or a constant
// expression such as "pi / 8". The sweep file is read before the base
// case, so a value cannot use parameters (as a --set value cannot); an
// expression naming one is refused with that reason rather than with the
// expression package's "not a defined parameter".
func (p *fileParser) number(n *yaml.Node, what string) (float64, error) {
	if n.Kind != yaml.ScalarNode {
		return 0, p.errf(n, "%s must be a number, not a list or mapping", what)
	}
	if v, err := strconv.ParseFloat(n.Value, 64); err == nil {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, p.errf(n, "%s is %q; it must be a finite number", what, n.Value)
		}
		return v, nil
	}
	if x, err := expr.Parse(n.Value); err == nil {
		if names := x.Names(); len(names) > 0 {
			return 0, p.errf(n, "%s is %q, which uses the name %q: a sweep value is a number or an expression of numbers, constants and functions (such as 0.3 / 2 or pi / 8), and it cannot use parameters, the base case's included", what, n.Value, names[0])
		}
	}
	v, err := expr.Eval(n.Value, nil)
	if err != nil {
		return 0, &Error{File: p.path, Line: n.Line, Col: n.Column, Msg: fmt.Sprintf("%s is not a number", what), Err: err}
	}
	return v, nil
}

// values reads a parameter's values, a list, a range mapping or a single
// number, and the place of each value.
func (p *fileParser) values(name string, n *yaml.Node) ([]float64, []Pos, error) {
	switch n.Kind {
	case yaml.SequenceNode:
		if len(n.Content) == 0 {
			return nil, nil, p.errf(n, "parameter %s has an empty list of values", name)
		}
		out := make([]float64, len(n.Content))
		at := make([]Pos, len(n.Content))
		for i, c := range n.Content {
			v, err := p.number(c, fmt.Sprintf("value %d of %s", i+1, name))
			if err != nil {
				return nil, nil, err
			}
			out[i], at[i] = v, Pos{c.Line, c.Column}
		}
		return out, at, nil
	case yaml.MappingNode:
		out, err := p.rangeValues(name, n)
		if err != nil {
			return nil, nil, err
		}
		at := make([]Pos, len(out))
		for i := range at {
			at[i] = Pos{n.Line, n.Column}
		}
		return out, at, nil
	case yaml.ScalarNode:
		v, err := p.number(n, name)
		if err != nil {
			return nil, nil, err
		}
		return []float64{v}, []Pos{{n.Line, n.Column}}, nil
	}
	return nil, nil, p.errf(n, "parameter %s needs a list of values or a range {from, to, step} or {from, to, count}", name)
}

func (p *fileParser) rangeValues(name string, n *yaml.Node) ([]float64, error) {
	var from, to, step float64
	var count int
	var has = map[string]*yaml.Node{}
	err := p.mapping(n, "the range of "+name, []string{"from", "to", "step", "count"}, func(key string, k, v *yaml.Node) error {
		has[key] = v
		if key == "count" {
			c, err := strconv.Atoi(v.Value)
			if err != nil || v.Kind != yaml.ScalarNode || c < 1 {
				return p.errf(v, "count of %s is %q; it must be a whole number of at least 1", name, v.Value)
			}
			count = c
			return nil
		}
		x, err := p.number(v, key+" of "+name)
		if err != nil {
			return err
		}
		switch key {
		case "from":
			from = x
		case "to":
			to = x
		case "step":
			step = x
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if has["from"] == nil || has["to"] == nil {
		return nil, p.errf(n, "the range of %s needs from and to", name)
	}
	if math.IsInf(to-from, 0) {
		return nil, p.errf(n, "the range of %s from %v to %v is wider than a float64 can hold", name, from, to)
	}
	switch {
	case has["step"] != nil && has["count"] != nil:
		return nil, p.errf(n, "the range of %s has both step and count; give one", name)
	case has["step"] != nil:
		if step == 0 || (to-from)*step < 0 {
			return nil, p.errf(has["step"], "step %v of %s does not lead from %v to %v", step, name, from, to)
		}
		// The tolerance lets a range end on its "to" value despite the
		// rounding of (to - from) / step, e.g. 0 to 0.3 by 0.1.
		k := math.Floor((to-from)/step + 1e-9)
		if last := from + k*step; math.Abs(last-to) > 1e-9*math.Max(math.Abs(step), math.Max(math.Abs(from), math.Abs(to))) {
			return nil, p.errf(has["step"], "step %v of %s does not end on %v from %v (the last value would be %v), the ends are included, so give a step that divides %v, or {from, to, count}", step, name, to, from, tidy(last), tidy(math.Abs(to-from)))
		}
		if k+1 > MaxVariants {
			return nil, p.errf(has["step"], "the range of %s would have %.0f values, more than the limit of %d", name, k+1, MaxVariants)
		}
		out := make([]float64, int(k)+1)
		for i := range out {
			out[i] = tidy(from + float64(i)*step)
		}
		return out, nil
	case has["count"] != nil:
		if count > MaxVariants {
			return nil, p.errf(has["count"], "count %d of %s is more than the limit of %d", count, name, MaxVariants)
		}
		if count == 1 {
			if from != to {
				return nil, p.errf(has["count"], "count 1 for %s gives one value, but from %v and to %v differ; use count 2 or more", name, from, to)
			}
			return []float64{from}, nil
		}
		if from == to {
			return nil, p.errf(has["count"], "count %d for %s repeats one value, from and to are both %v; use count 1 or a single number to fix it", count, name, from)
		}
		out := make([]float64, count)
		for i := range out {
			t := float64(i) / float64(count-1)
			out[i] = tidy(from + t*(to-from))
		}
		out[count-1] = to
		return out, nil
	}
	return nil, p.errf(n, "the range of %s needs a step or a count", name)
}

// tidy rounds a computed range value to 12 significant digits, so that
// 0 + 3 * 0.1 is 0.3 and not 0.30000000000000004, which would otherwise
// show in ids, folder names and summaries.
func tidy(v float64) float64 {
	t, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
	if err != nil {
		return v
	}
	if t == 0 {
		return 0 // no negative zero
	}
	return t
}

func (p *fileParser) refine(n *yaml.Node) (*Refine, error) {
	r := &Refine{}
	var hasLevels, hasRatio bool
	err := p.mapping(n, "refine", []string{"levels", "ratio"}, func(key string, k, v *yaml.Node) error {
		switch key {
		case "levels":
			c, err := strconv.Atoi(v.Value)
			if err != nil || v.Kind != yaml.ScalarNode || c < 2 || c > deck.MaxFamilyLevels {
				return p.errf(v, "refine levels is %q; it must be a whole number from 2 to %d", v.Value, deck.MaxFamilyLevels)
			}
			r.Levels, hasLevels = c, true
		case "ratio":
			x, err := p.number(v, "refine ratio")
			if err != nil {
				return err
			}
			if x <= 1 || x > 4 {
				return p.errf(v, "refine ratio is %v; it must be above 1 and at most 4 (1.3 or more is advised, Celik et al. 2008)", x)
			}
			r.Ratio, hasRatio = x, true
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if !hasLevels || !hasRatio {
		return nil, p.errf(n, "refine needs levels and ratio, e.g. refine: {levels: 3, ratio: 2}")
	}
	return r, nil
}

// errPattern is returned for a malformed name pattern.
var errPattern = errors.New("braces must enclose a parameter name, as in t{thickness}")

func checkPattern(s string) error {
	depth := 0
	for _, r := range s {
		switch r {
		case '{':
			depth++
		case '}':
			depth--
		}
		if depth < 0 || depth > 1 {
			return errPattern
		}
	}
	if depth != 0 {
		return errPattern
	}
	for _, n := range patternNames(s) {
		if !expr.ValidName(n) {
			return errPattern
		}
	}
	return nil
}

// patternNames returns the names in braces in a name pattern.
func patternNames(s string) []string {
	var out []string
	for {
		i := strings.IndexByte(s, '{')
		if i < 0 {
			return out
		}
		j := strings.IndexByte(s[i:], '}')
		if j < 0 {
			return out
		}
		out = append(out, s[i+1:i+j])
		s = s[i+j+1:]
	}
}
