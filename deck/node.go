package deck

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
	"gopkg.in/yaml.v3"

	"cvdeck/deck/expr"
)

// ErrInput marks errors in the user's input (case file, sketch, flags): the
// command line maps them to exit code 2.
var ErrInput = errors.New("bad input")

// InputError is an error located in an input file.
type InputError struct {
	File      string
	Line, Col int
	Path      string // the key path, e.g. geometry.loops[0].segments[2].tag
	Msg       string
	Err       error // an underlying cause, if any
}

func (e *InputError) Error() string {
	loc := e.File
	if e.Line > 0 {
		loc = fmt.Sprintf("%s:%d:%d", e.File, e.Line, e.Col)
	}
	if e.Path != "" {
		return fmt.Sprintf("%s: %s: %s", loc, e.Path, e.Msg)
	}
	return fmt.Sprintf("%s: %s", loc, e.Msg)
}

// Unwrap lets errors.Is find ErrInput and the cause.
func (e *InputError) Unwrap() []error {
	if e.Err != nil {
		return []error{ErrInput, e.Err}
	}
	return []error{ErrInput}
}

// decoder reads a case file's YAML nodes with located, strict errors and
// evaluates numeric expressions against the case parameters.
type decoder struct {
	file   string
	params map[string]float64
	scale  float64 // metres per case length unit
}

// value is a YAML node with its key path.
type value struct {
	d    *decoder
	n    *yaml.Node
	path string
}

func (v value) errf(format string, a ...any) error {
	return &InputError{File: v.d.file, Line: v.n.Line, Col: v.n.Column, Path: v.path, Msg: fmt.Sprintf(format, a...)}
}

// wrap turns an error from a lower package into a located input error.
func (v value) wrap(err error) error {
	return &InputError{File: v.d.file, Line: v.n.Line, Col: v.n.Column, Path: v.path, Msg: err.Error(), Err: err}
}

func kindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		if n.Tag == "!!null" {
			return "nothing"
		}
		return fmt.Sprintf("%q", n.Value)
	case yaml.AliasNode:
		return "an alias"
	}
	return "a document"
}

// object is a YAML mapping whose keys are checked against the ones a
// caller asks for.
type object struct {
	value
	keys  []string
	vals  map[string]*yaml.Node
	asked map[string]bool
}

func (v value) object() (*object, error) {
	n := v.n
	if n.Kind == yaml.AliasNode {
		n = n.Alias
	}
	if n.Kind != yaml.MappingNode {
		return nil, v.errf("expected a mapping of keys to values, found %s", kindName(n))
	}
	o := &object{value: value{v.d, n, v.path}, vals: map[string]*yaml.Node{}, asked: map[string]bool{}}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k := n.Content[i]
		if k.Kind != yaml.ScalarNode {
			return nil, value{v.d, k, v.path}.errf("keys must be plain names")
		}
		if _, dup := o.vals[k.Value]; dup {
			return nil, value{v.d, k, v.join(k.Value)}.errf("key %q is given twice", k.Value)
		}
		o.keys = append(o.keys, k.Value)
		o.vals[k.Value] = n.Content[i+1]
	}
	return o, nil
}

func (v value) join(key string) string {
	if v.path == "" {
		return key
	}
	return v.path + "." + key
}

// has reports whether key is present (and marks it as known).
func (o *object) has(key string) bool {
	o.asked[key] = true
	_, ok := o.vals[key]
	return ok
}

// get returns the value of key, if present.
func (o *object) get(key string) (value, bool) {
	o.asked[key] = true
	n, ok := o.vals[key]
	if !ok {
		return value{}, false
	}
	return value{o.d, n, o.join(key)}, true
}

// keyAt returns the key node of key, which the object must have, as a
// value: errors about the key itself (a name it may not take, a key that
// contradicts another) point at the key rather than at its value.
func (o *object) keyAt(key string) value {
	o.asked[key] = true
	for i, k := range o.keys {
		if k == key {
			return value{o.d, o.n.Content[2*i], o.join(key)}
		}
	}
	return value{o.d, o.n, o.join(key)}
}

// either reads a choice between two keys that say one thing two ways
// (first_height or yplus, count or thickness): it returns the key given,
// with its value, or "" when neither is. Both given is an error at the key
// written second, "give one of a and b, not both", followed by why (what
// each of them sets), so that the message points at a key to remove rather
// than reading as if neither were there.
func (o *object) either(a, b, why string) (string, value, error) {
	va, hasA := o.get(a)
	vb, hasB := o.get(b)
	switch {
	case hasA && hasB:
		second := b
		if slices.Index(o.keys, a) > slices.Index(o.keys, b) {
			second = a
		}
		return "", value{}, o.keyAt(second).errf("give one of %s and %s, not both: %s", a, b, why)
	case hasA:
		return a, va, nil
	case hasB:
		return b, vb, nil
	}
	return "", value{}, nil
}

// need returns the value of a required key.
func (o *object) need(key string) (value, error) {
	v, ok := o.get(key)
	if !ok {
		return v, o.errf("the key %q is required here", key)
	}
	return v, nil
}

// known marks keys as accepted without reading them (read elsewhere).
func (o *object) known(keys ...string) {
	for _, k := range keys {
		o.asked[k] = true
	}
}

// done fails on the first key nobody asked for, naming the valid keys and
// the closest one, so that typos never pass silently.
func (o *object) done() error {
	for i, k := range o.keys {
		if o.asked[k] {
			continue
		}
		var valid []string
		for a := range o.asked {
			valid = append(valid, a)
		}
		sort.Strings(valid)
		hint := ""
		if s := closest(k, valid); s != "" {
			hint = fmt.Sprintf("; did you mean %q?", s)
		}
		kn := o.n.Content[2*i]
		return value{o.d, kn, o.join(k)}.errf("unknown key %q%s (valid here: %s)", k, hint, strings.Join(valid, ", "))
	}
	return nil
}

// closest returns the candidate within edit distance 2 of s, if any.
func closest(s string, candidates []string) string {
	best, bestD := "", 3
	for _, c := range candidates {
		if d := expr.EditDistance(s, c); d < bestD {
			best, bestD = c, d
		}
	}
	return best
}

func (v value) list() ([]value, error) {
	n := v.n
	if n.Kind == yaml.AliasNode {
		n = n.Alias
	}
	if n.Kind != yaml.SequenceNode {
		return nil, v.errf("expected a list, found %s", kindName(n))
	}
	out := make([]value, len(n.Content))
	for i, c := range n.Content {
		out[i] = value{v.d, c, fmt.Sprintf("%s[%d]", v.path, i)}
	}
	return out, nil
}

func (v value) scalar() (string, error) {
	n := v.n
	if n.Kind == yaml.AliasNode {
		n = n.Alias
	}
	if n.Kind != yaml.ScalarNode || n.Tag == "!!null" {
		return "", v.errf("expected a single value, found %s", kindName(n))
	}
	return n.Value, nil
}

func (v value) str() (string, error) {
	s, err := v.scalar()
	if err != nil {
		return "", err
	}
	if s == "" {
		return "", v.errf("the value is empty")
	}
	return s, nil
}

// number evaluates a numeric field: a YAML number or an expression over the
// case parameters.
func (v value) number() (float64, error) {
	s, err := v.scalar()
	if err != nil {
		return 0, err
	}
	if v.n.Tag == "!!int" || v.n.Tag == "!!float" {
		if f, err := strconv.ParseFloat(strings.ReplaceAll(s, "_", ""), 64); err == nil && !math.IsInf(f, 0) && !math.IsNaN(f) {
			return f, nil
		}
	}
	if v.n.Tag == "!!bool" {
		return 0, v.errf("expected a number or an expression, found %q", s)
	}
	x, err := expr.Parse(s)
	if err != nil {
		return 0, v.wrap(err)
	}
	f, err := x.Eval(v.d.params)
	if err != nil {
		return 0, v.wrap(err)
	}
	return f, nil
}

// length evaluates a numeric field in case length units and returns metres.
func (v value) length() (float64, error) {
	f, err := v.number()
	return f * v.d.scale, err
}

// positive evaluates a number that must be > 0.
func (v value) positive() (float64, error) {
	f, err := v.number()
	if err == nil && !(f > 0) {
		err = v.errf("must be greater than zero, got %g", f)
	}
	return f, err
}

// positiveLength evaluates a length (metres) that must be > 0.
func (v value) positiveLength() (float64, error) {
	f, err := v.positive()
	return f * v.d.scale, err
}

// count evaluates a whole number ≥ lo.
func (v value) count(lo int) (int, error) {
	f, err := v.number()
	if err != nil {
		return 0, err
	}
	switch {
	case f != math.Trunc(f):
		return 0, v.errf("must be a whole number, at least %d; got %g, which is not a whole number", lo, f)
	case f < float64(lo) || f > 1e9:
		return 0, v.errf("must be a whole number from %d to 1e9; got %g", lo, f)
	}
	return int(f), nil
}

func (v value) boolean() (bool, error) {
	s, err := v.scalar()
	if err != nil {
		return false, err
	}
	switch s {
	case "true", "yes", "on":
		return true, nil
	case "false", "no", "off":
		return false, nil
	}
	return false, v.errf("expected true or false, found %q", s)
}

// point reads [x, y] in case length units and returns metres.
func (v value) point() (orb.Point, error) {
	items, err := v.list()
	if err != nil {
		return orb.Point{}, err
	}
	if len(items) != 2 {
		return orb.Point{}, v.errf("a point is written [x, y]; found %d values", len(items))
	}
	x, err := items[0].length()
	if err != nil {
		return orb.Point{}, err
	}
	y, err := items[1].length()
	if err != nil {
		return orb.Point{}, err
	}
	return orb.Point{x, y}, nil
}

// points reads a list of [x, y] points.
func (v value) points(minCount int) ([]orb.Point, error) {
	items, err := v.list()
	if err != nil {
		return nil, err
	}
	if len(items) < minCount {
		return nil, v.errf("needs at least %d points, found %d", minCount, len(items))
	}
	out := make([]orb.Point, len(items))
	for i, it := range items {
		if out[i], err = it.point(); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// oneOf reads a string that must be one of the choices.
func (v value) oneOf(choices ...string) (string, error) {
	s, err := v.str()
	if err != nil {
		return "", err
	}
	for _, c := range choices {
		if s == c {
			return s, nil
		}
	}
	hint := ""
	if c := closest(s, choices); c != "" {
		hint = fmt.Sprintf("; did you mean %q?", c)
	}
	return "", v.errf("%q is not one of %s%s", s, strings.Join(choices, ", "), hint)
}

// strings reads a list of names.
func (v value) strings() ([]string, error) {
	if v.n.Kind == yaml.ScalarNode {
		s, err := v.str()
		return []string{s}, err
	}
	items, err := v.list()
	if err != nil {
		return nil, err
	}
	out := make([]string, len(items))
	for i, it := range items {
		if out[i], err = it.str(); err != nil {
			return nil, err
		}
	}
	return out, nil
}
