package deck

import (
	"fmt"
	"sort"
	"strings"

	"cvdeck/deck/expr"
)

// param is one entry of the case file's parameters section.
type param struct {
	name string
	src  string // expression text, or the number as written
	x    *expr.Expr
	at   value
}

// resolveParams evaluates the parameters section. A parameter may refer to
// any other parameter (in any order); cycles are errors naming the chain.
// Overrides (from --set or a sweep) replace a parameter's definition; an
// override naming no parameter is an error listing the defined ones.
func resolveParams(d *decoder, sec *value, overrides map[string]float64) (map[string]float64, []string, error) {
	var defs []param
	byName := map[string]int{}
	if sec != nil {
		o, err := sec.object()
		if err != nil {
			return nil, nil, err
		}
		for _, k := range o.keys {
			v, _ := o.get(k)
			// A bad name is the key's fault, so the error points at it.
			switch {
			case !expr.ValidName(k):
				return nil, nil, o.keyAt(k).errf("%q cannot name a parameter: use letters, digits and underscores, starting with a letter", k)
			case expr.IsReserved(k):
				what := "a function name or a word (and, or, not, if) of expressions"
				if x, err := expr.Parse(k); err == nil {
					if f, err := x.Eval(nil); err == nil {
						what = fmt.Sprintf("a built-in constant of expressions, %.6g", f)
					}
				}
				return nil, nil, o.keyAt(k).errf("%q cannot name a parameter: it is %s; choose another name", k, what)
			}
			s, err := v.scalar()
			if err != nil {
				return nil, nil, err
			}
			x, err := expr.Parse(s)
			if err != nil {
				return nil, nil, v.wrap(err)
			}
			byName[k] = len(defs)
			defs = append(defs, param{name: k, src: s, x: x, at: v})
		}
	}
	var over []string
	for k := range overrides {
		over = append(over, k)
	}
	sort.Strings(over)
	for _, k := range over {
		if _, ok := byName[k]; !ok {
			names := make([]string, 0, len(defs))
			for _, p := range defs {
				names = append(names, p.name)
			}
			hint := ""
			if c := closest(k, names); c != "" {
				hint = fmt.Sprintf("; did you mean %q?", c)
			}
			return nil, nil, &InputError{File: d.file, Msg: fmt.Sprintf("cannot set parameter %q: the case defines no such parameter%s (defined: %s)", k, hint, strings.Join(names, ", "))}
		}
	}

	vals := map[string]float64{}
	state := map[string]int{} // 0 new, 1 in progress, 2 done
	var stack []string
	var eval func(i int) error
	eval = func(i int) error {
		p := defs[i]
		switch state[p.name] {
		case 2:
			return nil
		case 1:
			at := 0
			for j, s := range stack {
				if s == p.name {
					at = j
				}
			}
			cycle := append(append([]string{}, stack[at:]...), p.name)
			return p.at.errf("parameters refer to each other in a circle: %s", strings.Join(cycle, " → "))
		}
		if v, ok := overrides[p.name]; ok {
			vals[p.name] = v
			state[p.name] = 2
			return nil
		}
		state[p.name] = 1
		stack = append(stack, p.name)
		for _, n := range p.x.Names() {
			if j, ok := byName[n]; ok {
				if err := eval(j); err != nil {
					return err
				}
			}
		}
		stack = stack[:len(stack)-1]
		v, err := p.x.Eval(vals)
		if err != nil {
			return p.at.wrap(err)
		}
		vals[p.name] = v
		state[p.name] = 2
		return nil
	}
	order := make([]string, len(defs))
	for i := range defs {
		if err := eval(i); err != nil {
			return nil, nil, err
		}
		order[i] = defs[i].name
	}
	return vals, order, nil
}

// ParseAssignments turns name=value strings (from --set) into overrides.
// Values may be expressions of constants, e.g. thickness=0.12 or
// angle=2*3.
func ParseAssignments(list []string) (map[string]float64, error) {
	out := map[string]float64{}
	for _, a := range list {
		name, val, ok := strings.Cut(a, "=")
		name = strings.TrimSpace(name)
		if !ok || !expr.ValidName(name) {
			return nil, fmt.Errorf("%w: --set %q: write name=value, e.g. --set thickness=0.12", ErrInput, a)
		}
		x, err := expr.Parse(strings.TrimSpace(val))
		if err != nil {
			return nil, fmt.Errorf("%w: --set %s: %w", ErrInput, name, err)
		}
		if names := x.Names(); len(names) > 0 {
			return nil, fmt.Errorf("%w: --set %s=%s: a --set value is a number or an expression of numbers, constants and functions; it cannot use %q (set each parameter to a value; the case file's own expressions follow them)", ErrInput, name, x, names[0])
		}
		v, err := x.Eval(nil)
		if err != nil {
			return nil, fmt.Errorf("%w: --set %s: %w", ErrInput, name, err)
		}
		if _, dup := out[name]; dup {
			return nil, fmt.Errorf("%w: --set %s is given twice", ErrInput, name)
		}
		out[name] = v
	}
	return out, nil
}
