package sweep

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"sort"
	"strconv"
	"strings"
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
// walked together; combinations that fail a constraint are dropped; each
// remaining combination gives Levels variants, coarse to fine, when the
// file has a refinement family.
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
			if prev, dup := seen[v.ID]; dup {
				return nil, &Error{File: f.Path, Msg: fmt.Sprintf("the variants at indexes %d and %d have the same parameter values (%s); remove the repeated value",
					prev, v.Index, strings.TrimSpace(strings.ReplaceAll(Canonical(c, factor), "\n", " ")))}
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
		for i := range f.Params[0].Values {
			c := make([]Value, len(f.Params))
			for j, p := range f.Params {
				c[j] = Value{p.Name, p.Values[i]}
			}
			all = append(all, c)
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
	kept := all[:0]
	for _, c := range all {
		vars := make(map[string]float64, len(c))
		for _, v := range c {
			vars[v.Name] = v.Value
		}
		ok := true
		for _, k := range f.Constraints {
			r, err := k.Expr.Eval(vars)
			if err != nil {
				return nil, &Error{File: f.Path, Line: k.Pos.Line, Col: k.Pos.Col,
					Msg: fmt.Sprintf("constraint cannot be evaluated for %s", describe(c)), Err: err}
			}
			if r == 0 {
				ok = false
				break
			}
		}
		if ok {
			kept = append(kept, c)
		}
	}
	if len(kept) == 0 {
		return nil, &Error{File: f.Path, Msg: "the constraints drop every combination; nothing is left to run"}
	}
	return kept, nil
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
