package sweep

import (
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"cvdeck/deck"
)

// baseParams is the base case's parameters section (deck.ParameterSection),
// read for constraints that use parameters the sweep does not vary: the
// base case's own and derived ones, evaluated per combination as the deck
// of that combination evaluates them, without meshing anything.
type baseParams struct {
	sec *deck.ParameterSection
}

// readBaseParams reads the parameters section of f's base case; a base
// that cannot be read is an error at the sweep file's base key.
func readBaseParams(f *File) (*baseParams, error) {
	if st, err := os.Stat(f.Base); err != nil {
		return nil, &Error{File: f.Path, Line: f.BasePos.Line, Col: f.BasePos.Col,
			Msg: fmt.Sprintf("cannot read the base case %s (base is taken from the sweep file's folder, %s)", f.Base, filepath.Dir(f.Path)), Err: err}
	} else if !st.Mode().IsRegular() {
		return nil, f.errAt(f.BasePos, "the base case %s is not a file", f.Base)
	}
	sec, err := deck.ReadParameters(f.Base)
	if err != nil {
		return nil, err
	}
	return &baseParams{sec}, nil
}

// has reports whether the base case defines the parameter name.
func (b *baseParams) has(name string) bool { return slices.Contains(b.sec.Names(), name) }

// names lists the base case's parameters, for messages.
func (b *baseParams) names() string {
	if len(b.sec.Names()) == 0 {
		return "none"
	}
	return strings.Join(b.sec.Names(), ", ")
}

// resolve returns every parameter's value with the swept ones set.
func (b *baseParams) resolve(swept map[string]float64) (map[string]float64, error) {
	return b.sec.Values(swept)
}
