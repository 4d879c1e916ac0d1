package bc

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/paulmach/orb"
	"gopkg.in/yaml.v3"
)

// Entry is one named value with its SI unit ("1" for a dimensionless
// number), for tables and the deck manifest.
type Entry struct {
	Key   string
	Value float64
	Unit  string
}

// Entries is an ordered list of values. It marshals to YAML as a mapping
// whose every key holds {value: v, unit: u}, so units stand beside values
// in deck.yaml, and to JSON as one object of plain SI numbers.
type Entries []Entry

// MarshalYAML writes the entries as an ordered mapping of flow-style
// {value, unit} pairs.
func (es Entries) MarshalYAML() (any, error) {
	n := &yaml.Node{Kind: yaml.MappingNode}
	for _, e := range es {
		v := &yaml.Node{Kind: yaml.MappingNode, Style: yaml.FlowStyle, Content: []*yaml.Node{
			{Kind: yaml.ScalarNode, Value: "value"},
			{Kind: yaml.ScalarNode, Value: strconv.FormatFloat(e.Value, 'g', -1, 64)},
			{Kind: yaml.ScalarNode, Value: "unit"},
			{Kind: yaml.ScalarNode, Tag: "!!str", Value: e.Unit},
		}}
		n.Content = append(n.Content, &yaml.Node{Kind: yaml.ScalarNode, Value: e.Key}, v)
	}
	return n, nil
}

// UnmarshalYAML reads the mapping MarshalYAML writes, keeping its order, so
// that scripts and cvdeck itself can read a deck manifest back.
func (es *Entries) UnmarshalYAML(n *yaml.Node) error {
	if n.Kind != yaml.MappingNode {
		return fmt.Errorf("line %d: expected a mapping of names to {value, unit}", n.Line)
	}
	out := make(Entries, 0, len(n.Content)/2)
	for i := 0; i+1 < len(n.Content); i += 2 {
		var v struct {
			Value float64 `yaml:"value"`
			Unit  string  `yaml:"unit"`
		}
		if err := n.Content[i+1].Decode(&v); err != nil {
			return fmt.Errorf("%s: %w", n.Content[i].Value, err)
		}
		out = append(out, Entry{Key: n.Content[i].Value, Value: v.Value, Unit: v.Unit})
	}
	*es = out
	return nil
}

// MarshalJSON writes the entries as one JSON object, key to SI value, in
// order. A value that is not finite is an error, since JSON cannot hold it.
func (es Entries) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, e := range es {
		if i > 0 {
			b.WriteByte(',')
		}
		k, _ := json.Marshal(e.Key)
		v, err := json.Marshal(e.Value)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", e.Key, err)
		}
		b.Write(k)
		b.WriteByte(':')
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// Table formats the entries as an aligned text table of key, value (six
// significant digits) and unit.
func (es Entries) Table() string {
	var b strings.Builder
	w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	for _, e := range es {
		unit := e.Unit
		if unit == "1" {
			unit = ""
		}
		fmt.Fprintf(w, "%s\t%.6g\t%s\n", e.Key, e.Value, unit)
	}
	w.Flush()
	lines := strings.SplitAfter(b.String(), "\n")
	for i, l := range lines {
		lines[i] = strings.TrimRight(l, " \n")
	}
	return strings.Join(lines, "\n")
}

// Entries returns the gas constants: gamma, gas_constant and the
// Sutherland constants of its viscosity (air's when none were given).
func (g Gas) Entries() Entries {
	v := g.ViscosityLaw()
	return Entries{{"gamma", g.Gamma, "1"}, {"gas_constant", g.R, "J/(kg K)"},
		{"sutherland_mu_ref", v.MuRef, "Pa s"}, {"sutherland_t_ref", v.TRef, "K"}, {"sutherland_s", v.S, "K"}}
}

// Entries returns the state's values in a fixed order with snake_case keys
// and SI units: mach, static_pressure, static_temperature, density,
// speed_of_sound, velocity, total_pressure, total_temperature,
// dynamic_pressure, dynamic_viscosity, reynolds_per_metre.
func (s State) Entries() Entries {
	return Entries{
		{"mach", s.Mach, "1"},
		{"static_pressure", s.Pressure, "Pa"},
		{"static_temperature", s.Temperature, "K"},
		{"density", s.Density, "kg/m^3"},
		{"speed_of_sound", s.SpeedOfSound, "m/s"},
		{"velocity", s.Velocity, "m/s"},
		{"total_pressure", s.TotalPressure, "Pa"},
		{"total_temperature", s.TotalTemperature, "K"},
		{"dynamic_pressure", s.DynamicPressure, "Pa"},
		{"dynamic_viscosity", s.Viscosity, "Pa s"},
		{"reynolds_per_metre", s.ReynoldsPerMetre, "1/m"},
	}
}

// Record is the resolved boundary conditions and reference state as they go
// into deck.yaml, units beside every value.
type Record struct {
	Gas       Entries `yaml:"gas"`
	Reference Entries `yaml:"reference,omitempty"`
	// Equations are the governing equations the deck states, set by its
	// writer (Record leaves them nil).
	Equations  *EquationsRecord `yaml:"equations,omitempty"`
	Boundaries []BoundaryRecord `yaml:"boundaries"`
}

// EquationsRecord names the governing equations a deck states, by their
// CGNS GoverningEquationsType name (Euler, NSLaminar, NSTurbulent), and
// says on what basis they were chosen.
type EquationsRecord struct {
	Name  string `yaml:"name"`
	Basis string `yaml:"basis"`
}

// BoundaryRecord is one tag's resolved condition in the deck manifest.
type BoundaryRecord struct {
	Tag string `yaml:"tag"`
	// Kind is cvdeck's key for the kind, CGNSType the CGNS BCType name
	// (empty for periodic, a grid connectivity in CGNS).
	Kind      string  `yaml:"kind"`
	CGNSType  string  `yaml:"cgns_type,omitempty"`
	FirstFace int     `yaml:"first_face"`
	Faces     int     `yaml:"faces"`
	Partner   string  `yaml:"partner,omitempty"`
	Where     string  `yaml:"where,omitempty"`
	Values    Entries `yaml:"values,omitempty"`
	// Notes are the remarks on this tag's state against the reference
	// state (Assignment.Notes), without the case-file place, which is
	// Where.
	Notes []string `yaml:"notes,omitempty"`
}

// Record returns the assignment as it goes into deck.yaml: the gas, the
// reference state (if any) and one entry per tag in mesh tag order, with
// the condition's values, its flow direction or velocity, the Mach number
// it implies, for a periodic pair the number of paired faces and the
// largest mismatch, and the tag's notes.
//
// The reference state carries, after its speed, the free stream's
// direction: flow_angle α (degrees from +x) and the velocity components
// velocity_x = V cos α, velocity_y = V sin α. α is computed from the unit
// direction as atan2 and rounded to 15 significant digits, within which
// atan2(sin α, cos α) gives α back, so that an angle the case gives as 4
// reads 4, not 3.9999999999999996.
func (a *Assignment) Record() Record {
	rec := Record{Gas: a.Gas.Entries(), Boundaries: make([]BoundaryRecord, 0, len(a.Conditions))}
	if a.Reference != nil {
		dir := a.Direction
		if dir == (orb.Point{}) {
			dir = orb.Point{1, 0}
		}
		angle, _ := strconv.ParseFloat(strconv.FormatFloat(degrees(dir), 'g', 15, 64), 64)
		v := a.Reference.Velocity
		for _, e := range a.Reference.Entries() {
			rec.Reference = append(rec.Reference, e)
			if e.Key == "velocity" {
				// + 0 writes a negative zero as 0.
				rec.Reference = append(rec.Reference, Entry{"flow_angle", angle + 0, "deg"},
					Entry{"velocity_x", v * dir[0], "m/s"}, Entry{"velocity_y", v*dir[1] + 0, "m/s"})
			}
		}
	}
	for _, r := range a.Conditions {
		br := BoundaryRecord{Tag: r.Tag, Kind: r.Kind.String(), CGNSType: r.Kind.CGNSType(),
			FirstFace: r.First, Faces: r.Count, Partner: r.Partner, Where: r.Where}
		br.Values = append(br.Values, r.Values...)
		if r.Kind == InflowVelocity {
			br.Values = append(br.Values, Entry{"velocity_x", r.Velocity[0], "m/s"}, Entry{"velocity_y", r.Velocity[1], "m/s"})
		}
		if r.Direction != [2]float64{} {
			br.Values = append(br.Values, Entry{"direction_x", r.Direction[0], "1"}, Entry{"direction_y", r.Direction[1], "1"})
		}
		if _, given := r.Value(KeyMach); !given && r.Mach >= 0 {
			br.Values = append(br.Values, Entry{"mach", r.Mach, "1"})
		}
		if st := r.State; st != nil {
			// The full state the condition imposes (a farfield's is the
			// reference's, in the free stream's direction), as the CGNS
			// file's BCDataSet carries it.
			for _, e := range []Entry{{KeyPressure, st.Pressure, "Pa"}, {KeyTemperature, st.Temperature, "K"}} {
				if _, given := r.Value(e.Key); !given {
					br.Values = append(br.Values, e)
				}
			}
			br.Values = append(br.Values, Entry{"density", st.Density, "kg/m^3"},
				Entry{"velocity_x", st.Velocity * r.Direction[0], "m/s"}, Entry{"velocity_y", st.Velocity*r.Direction[1] + 0, "m/s"})
		}
		if r.Periodic >= 0 {
			pm := a.Periodic[r.Periodic]
			br.Values = append(br.Values, Entry{"paired_faces", float64(len(pm.Pairs)), "1"}, Entry{"max_mismatch", pm.MaxMismatch, "m"})
		}
		for _, n := range a.Notes {
			if n.Tag == r.Tag {
				br.Notes = append(br.Notes, n.Text)
			}
		}
		rec.Boundaries = append(rec.Boundaries, br)
	}
	return rec
}
