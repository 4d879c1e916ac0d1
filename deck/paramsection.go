package deck

import (
	"os"

	"gopkg.in/yaml.v3"

	"cvdeck/internal/yamlerr"
)

// ParameterSection is the parameters section of a case file, read without
// the rest of the case, so that its values can be evaluated for many sets
// of overrides at little cost: a sweep's constraints on derived
// parameters are evaluated so for every combination before anything is
// meshed. The values are those Load gives (the same evaluation,
// resolveParams).
type ParameterSection struct {
	d     *decoder
	sec   *value
	names []string
}

// ReadParameters reads the parameters section of the case file at path.
// A file that is not YAML, or a section that is not a mapping, is an
// error located in it; a file without the section has no parameters.
// Nothing is evaluated until Values, so that an expression that fails
// only for the values as written (a sweep sets others) is no error here.
func ReadParameters(path string) (*ParameterSection, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		line, col, msg := yamlerr.Describe(data, err)
		return nil, &InputError{File: path, Line: line, Col: col, Msg: "not valid YAML: " + msg, Err: err}
	}
	p := &ParameterSection{d: &decoder{file: path, scale: 1}}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) == 0 {
		return p, nil
	}
	top, err := value{p.d, doc.Content[0], ""}.object()
	if err != nil {
		return nil, err
	}
	if v, ok := top.get("parameters"); ok {
		o, err := v.object()
		if err != nil {
			return nil, err
		}
		p.sec, p.names = &v, o.keys
	}
	return p, nil
}

// Names returns the parameter names in their order of definition.
func (p *ParameterSection) Names() []string { return p.names }

// Values evaluates every parameter with the given ones set (as --set and
// a sweep set them), with Load's errors: a bad name or expression, a
// circle of definitions, an override naming no parameter, each located
// in the case file.
func (p *ParameterSection) Values(overrides map[string]float64) (map[string]float64, error) {
	vals, _, err := resolveParams(p.d, p.sec, overrides)
	return vals, err
}
