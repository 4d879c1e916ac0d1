package sweep

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"cvdeck/deck/expr"
)

// Variant is one deck of a sweep: a combination of parameter values at one
// refinement level.
type Variant struct {
	// Index is the 0-based position in the sweep's variant order, which is
	// the order of the summary rows.
	Index int
	// ID is a short hash of the canonical parameter text (see Canonical),
	// the same however the sweep is run or sliced.
	ID string
	// Name is the variant's folder name inside the output folder: safe
	// characters only, ending in the ID so that it is unique.
	Name string
	// Params are the parameter values in the sweep file's order.
	Params []Value
	// Level is the 1-based refinement level, 0 outside a family.
	Level int
	// Refine is the refinement factor: 1 as written, 2 twice as fine in
	// each direction.
	Refine float64
	// Family is the ID of the combination without its level, shared by the
	// levels of one refinement family.
	Family string
}

// Value is one parameter's value in a variant.
type Value struct {
	Name  string
	Value float64
}

// ParamMap returns the parameter values as a map, for deck.LoadOptions.
func (v Variant) ParamMap() map[string]float64 {
	m := make(map[string]float64, len(v.Params))
	for _, p := range v.Params {
		m[p.Name] = p.Value
	}
	return m
}

// FormatValue is the text of a number in ids, names and summaries: the
// shortest text that reads back as the same float64.
func FormatValue(x float64) string {
	if x == 0 {
		return "0" // no negative zero
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// Canonical is the text a variant's ID hashes: one "name=value" line per
// parameter in sorted name order, then "refine=factor" when the factor is
// not 1, so that the as-written level of a family has the same ID as the
// plain variant (it is the same deck).
func Canonical(params []Value, refine float64) string {
	sorted := append([]Value(nil), params...)
	sort.Slice(sorted, func(i, j int) bool { return sorted[i].Name < sorted[j].Name })
	var b strings.Builder
	for _, p := range sorted {
		fmt.Fprintf(&b, "%s=%s\n", p.Name, FormatValue(p.Value))
	}
	if refine != 1 {
		fmt.Fprintf(&b, "refine=%s\n", FormatValue(refine))
	}
	return b.String()
}

// IDLength is the number of hex digits of a variant ID: 48 bits, so that
// two of 10 000 variants share an ID with a chance of about 2e-7 and two
// of a million with about 2e-3 (the birthday bound n^2 / 2^49); a shared
// ID is detected and reported, never merged silently.
const IDLength = 12

// ID returns the variant ID of a canonical text: its first IDLength hex
// digits of SHA-256.
func ID(canonical string) string {
	sum := sha256.Sum256([]byte(canonical))
	return hex.EncodeToString(sum[:])[:IDLength]
}

// Variants expands the sweep file into its variants, in order: with a
// product the first parameter varies slowest, with a zip the lists are
// walked together (a fixed parameter repeated beside them); combinations
// that fail a constraint are dropped; each remaining combination gives
// Levels variants, coarse to fine, when the file has a refinement family.
// A constraint that uses a parameter the sweep does not vary reads the
// base case's parameters section (see baseParams).
func (f *File) Variants() ([]Variant, error) {
	combos, err := f.combinations()
	if err != nil {
		return nil, err
	}
	levels := []int{0}
	if f.Refine != nil {
		levels = levels[:0]
		for l := 1; l <= f.Refine.Levels; l++ {
			levels = append(levels, l)
		}
	}
	out := make([]Variant, 0, len(combos)*len(levels))
	seen := map[string]int{}
	for _, c := range combos {
		family := ID(Canonical(c, 1))
		for _, l := range levels {
			factor := 1.0
			if l > 0 {
				factor = f.Refine.Factor(l)
			}
			v := Variant{Index: len(out), Params: c, Level: l, Refine: factor, Family: family}
			v.ID = ID(Canonical(c, factor))
			// Parse refuses repeated values with their place (checkRepeats);
			// this catches a File made in code, and two different
			// combinations whose ids collide, which must not share a folder.
			if prev, dup := seen[v.ID]; dup {
				what := "have the same parameter values (" + strings.TrimSpace(strings.ReplaceAll(Canonical(c, factor), "\n", " ")) + "); remove the repeated value"
				if Canonical(out[prev].Params, out[prev].Refine) != Canonical(c, factor) {
					what = "have different values but the same id " + v.ID + "; change one value slightly"
				}
				var at Pos
				if len(f.Params) > 0 {
					at = f.Params[0].Pos
				}
				return nil, f.errAt(at, "the variants at indexes %d and %d %s", prev, v.Index, what)
			}
			seen[v.ID] = v.Index
			v.Name = f.folderName(v)
			out = append(out, v)
		}
	}
	return out, nil
}

// combinations returns the parameter combinations that meet the
// constraints, in sweep order.
func (f *File) combinations() ([][]Value, error) {
	var all [][]Value
	switch {
	case len(f.Params) == 0:
		all = [][]Value{nil}
	case f.Zip:
		for i := range f.zipLength() {
			all = append(all, f.zipCombination(i))
		}
	default:
		idx := make([]int, len(f.Params))
		for {
			c := make([]Value, len(f.Params))
			for j, p := range f.Params {
				c[j] = Value{p.Name, p.Values[idx[j]]}
			}
			all = append(all, c)
			// Odometer step: the last parameter varies fastest.
			j := len(idx) - 1
			for j >= 0 {
				idx[j]++
				if idx[j] < len(f.Params[j].Values) {
					break
				}
				idx[j] = 0
				j--
			}
			if j < 0 {
				break
			}
		}
	}
	if len(f.Constraints) == 0 {
		return all, nil
	}
	base, err := f.constraintBase()
	if err != nil {
		return nil, err
	}
	dropped := make([]int, len(f.Constraints)) // combinations each constraint is the first to drop
	kept := all[:0]
	for _, c := range all {
		vars := make(map[string]float64, len(c))
		for _, v := range c {
			vars[v.Name] = v.Value
		}
		if base != nil {
			vars, err = base.resolve(vars)
			if err != nil {
				return nil, &Error{File: f.Path, Line: f.ConstraintsPos.Line, Col: f.ConstraintsPos.Col,
					Msg: fmt.Sprintf("the base case's parameters the constraints use cannot be evaluated for %s", describe(c)), Err: err}
			}
		}
		ok := true
		for i, k := range f.Constraints {
			r, err := k.Expr.Eval(vars)
			if err != nil {
				return nil, &Error{File: f.Path, Line: k.Pos.Line, Col: k.Pos.Col,
					Msg: fmt.Sprintf("constraint cannot be evaluated for %s", describe(c)), Err: err}
			}
			if r == 0 {
				ok = false
				dropped[i]++
				break
			}
		}
		if ok {
			kept = append(kept, c)
		}
	}
	if len(kept) == 0 {
		// Point at the one constraint that dropped them all, or at the
		// constraints key when several share the blame.
		at := f.ConstraintsPos
		var parts []string
		for i, k := range f.Constraints {
			if dropped[i] == len(all) {
				at = k.Pos
			}
			if dropped[i] > 0 {
				parts = append(parts, fmt.Sprintf("%q drops %d", k.Expr, dropped[i]))
			}
		}
		what := fmt.Sprintf("all %d combinations", len(all))
		if len(all) == 1 {
			what = "the one combination"
		}
		return nil, f.errAt(at, "the constraints drop %s; nothing is left to run (%s)", what, strings.Join(parts, ", "))
	}
	return kept, nil
}

// constraintBase returns the base case's parameters when a constraint uses
// a name the sweep does not vary (nil when none does), and refuses a name
// that is neither swept nor a parameter of the base case, at the
// constraint that uses it.
func (f *File) constraintBase() (*baseParams, error) {
	swept := map[string]bool{}
	for _, p := range f.Params {
		swept[p.Name] = true
	}
	var base *baseParams
	for _, c := range f.Constraints {
		for _, n := range c.Expr.Names() {
			if swept[n] {
				continue
			}
			if base == nil {
				b, err := readBaseParams(f)
				if err != nil {
					return nil, err
				}
				base = b
			}
			if !base.has(n) {
				hint := ""
				known := append([]string(nil), base.sec.Names()...)
				for _, p := range f.Params {
					known = append(known, p.Name)
				}
				if m := closestName(n, known); m != "" {
					hint = fmt.Sprintf("; did you mean %q?", m)
				}
				return nil, f.errAt(c.Pos, "constraint %q uses %q, which is neither swept nor a parameter of the base case %s%s (swept: %s; the base case's parameters: %s)",
					c.Expr, n, filepath.Base(f.Base), hint, strings.Join(f.paramNames(), ", "), base.names())
			}
		}
	}
	return base, nil
}

// closestName returns the name within two edits of s (case aside), or "".
func closestName(s string, names []string) string {
	best, bestD := "", 3
	for _, n := range names {
		if d := expr.EditDistance(strings.ToLower(s), strings.ToLower(n)); d < bestD || d == bestD && n < best {
			best, bestD = n, d
		}
	}
	return best
}

func describe(c []Value) string {
	s := make([]string, len(c))
	for i, v := range c {
		s[i] = v.Name + "=" + FormatValue(v.Value)
	}
	return strings.Join(s, " ")
}

// folderName builds the variant's folder name from the name pattern (or
// name=value pairs joined by "_"), the refinement level and the ID.
func (f *File) folderName(v Variant) string {
	var label string
	if f.NamePattern != "" {
		label = f.NamePattern
		for _, p := range v.Params {
			label = strings.ReplaceAll(label, "{"+p.Name+"}", FormatValue(p.Value))
		}
	} else {
		parts := make([]string, len(v.Params))
		for i, p := range v.Params {
			parts[i] = p.Name + "=" + FormatValue(p.Value)
		}
		label = strings.Join(parts, "_")
	}
	if v.Level > 0 {
		if label != "" {
			label += "_"
		}
		label += "level" + strconv.Itoa(v.Level)
	}
	return SafeName(label, v.ID)
}

// maxLabel bounds the readable part of a folder name, well inside the
// 255-byte limit of common file systems.
const maxLabel = 96

// SafeName makes a folder name from a label and an ID that cannot leave
// the output folder: only letters, digits and . _ = + - are kept (others,
// including path separators, become "_"), leading dots and dashes are
// dropped so the name is neither "." nor ".." nor hidden nor taken for a
// command option, the label is cut to 96 bytes,
// and "-ID" is appended, which also keeps names unique when two labels
// clean up to the same text.
func SafeName(label, id string) string {
	var b strings.Builder
	for _, r := range label {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9',
			r == '.', r == '_', r == '=', r == '+', r == '-':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	s := strings.TrimLeft(b.String(), ".-")
	if len(s) > maxLabel {
		s = s[:maxLabel]
	}
	if s == "" {
		return id
	}
	return s + "-" + id
}
