package bc

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"gopkg.in/yaml.v3"
)

func TestRecordYAML(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	a, err := Assign(m, Setup{Reference: ref, Conditions: ductConditions(ref)})
	if err != nil {
		t.Fatal(err)
	}
	out, err := yaml.Marshal(a.Record())
	if err != nil {
		t.Fatal(err)
	}
	s := string(out)
	for _, want := range []string{
		"gamma: {value: 1.4, unit: \"1\"}",
		"static_pressure: {value: 101325, unit: Pa}",
		"- tag: wall", "kind: wall-isothermal", "cgns_type: BCWallViscousIsothermal",
		"temperature: {value: 300, unit: K}",
		"kind: inflow-total",
		"direction_x: {value: 1, unit: \"1\"}",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("deck record lacks %q:\n%s", want, s)
		}
	}
	// Read back, the values and units survive.
	var back struct {
		Reference map[string]struct {
			Value float64
			Unit  string
		}
	}
	if err := yaml.Unmarshal(out, &back); err != nil {
		t.Fatal(err)
	}
	if q := back.Reference["total_pressure"]; q.Unit != "Pa" || !near(q.Value, ref.TotalPressure, 1e-15) {
		t.Errorf("total_pressure read back as %+v", q)
	}
	// Same input, same bytes.
	again, _ := yaml.Marshal(a.Record())
	if string(again) != s {
		t.Error("record is not deterministic")
	}
}

func TestEntriesJSON(t *testing.T) {
	s, _ := StateFromMach(Air, 2, 5474.889, 216.65)
	out, err := json.Marshal(s.Entries())
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(out), `{"mach":2,"static_pressure":5474.889,"static_temperature":216.65,"density":`) {
		t.Errorf("json %s", out)
	}
	var back map[string]float64
	if err := json.Unmarshal(out, &back); err != nil || len(back) != 11 {
		t.Errorf("json read back: %v %v", back, err)
	}
	tb := s.Entries().Table()
	lines := strings.Split(strings.TrimSpace(tb), "\n")
	if len(lines) != 11 || strings.Join(strings.Fields(lines[1]), " ") != "static_pressure 5474.89 Pa" ||
		strings.Join(strings.Fields(lines[0]), " ") != "mach 2" {
		t.Errorf("table:\n%s", tb)
	}
}

// The reference record carries the free stream's direction: flow_angle α
// in degrees and velocity_x, velocity_y = V (cos α, sin α) (closed form),
// the angle reading back as the case gives it, and each tag's notes.
func TestRecordReferenceDirectionAndNotes(t *testing.T) {
	m := channel(t, 2, 2, 1, 1, 0, [4]string{"far", "far2", "far3", "far4"})
	ref := seaLevel(t)
	conds := []Condition{{Tag: "far", Kind: Farfield}, {Tag: "far2", Kind: Farfield}, {Tag: "far3", Kind: Farfield},
		{Tag: "far4", Kind: InflowSupersonic, Where: "c:4:1", Values: []Value{scalar(KeyMach, 2, ""), scalar(KeyPressure, 1e5, ""), scalar(KeyTemperature, 300, ""), vector(KeyDirection, 1, 0, "")}}}
	entry := func(es Entries, key string) (Entry, bool) {
		for _, e := range es {
			if e.Key == key {
				return e, true
			}
		}
		return Entry{}, false
	}
	// Every angle of a twentieth of a degree reads back as given.
	for i := -3599; i <= 3600; i++ {
		deg := float64(i) / 20
		alpha := deg * math.Pi / 180
		a, err := Assign(m, Setup{Reference: ref, Direction: orb.Point{math.Cos(alpha), math.Sin(alpha)}, Conditions: conds})
		if err != nil {
			t.Fatal(err)
		}
		rec := a.Record()
		got, _ := entry(rec.Reference, "flow_angle")
		vx, _ := entry(rec.Reference, "velocity_x")
		vy, _ := entry(rec.Reference, "velocity_y")
		if got.Value != deg || got.Unit != "deg" {
			t.Fatalf("flow_angle %v for %g°", got, deg)
		}
		if math.Abs(vx.Value-ref.Velocity*math.Cos(alpha)) > 1e-13*ref.Velocity || math.Abs(vy.Value-ref.Velocity*math.Sin(alpha)) > 1e-13*ref.Velocity || vx.Unit != "m/s" {
			t.Fatalf("%g°: velocity (%v, %v), want V (cos α, sin α) = (%g, %g) m/s", deg, vx, vy, ref.Velocity*math.Cos(alpha), ref.Velocity*math.Sin(alpha))
		}
	}
	// In order, after the speed.
	a, err := Assign(m, Setup{Reference: ref, Direction: orb.Point{math.Cos(0.1), math.Sin(0.1)}, Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	rec := a.Record()
	var keys []string
	for _, e := range rec.Reference[4:9] {
		keys = append(keys, e.Key)
	}
	if strings.Join(keys, " ") != "speed_of_sound velocity flow_angle velocity_x velocity_y" {
		t.Errorf("reference keys %v", keys)
	}
	// A farfield records the full state it imposes, the reference's (as
	// the CGNS BCDataSet does); the supersonic inflow its given values and
	// the density and velocity they give: ρ = p/(R T), V = M √(γ R T)
	// (ideal gas).
	for _, b := range rec.Boundaries {
		want := map[string]float64{}
		switch b.Tag {
		case "far":
			vx, _ := entry(rec.Reference, "velocity_x")
			vy, _ := entry(rec.Reference, "velocity_y")
			want = map[string]float64{"pressure": ref.Pressure, "temperature": ref.Temperature, "density": ref.Density, "velocity_x": vx.Value, "velocity_y": vy.Value}
		case "far4":
			want = map[string]float64{"pressure": 1e5, "temperature": 300, "density": 1e5 / (Air.R * 300), "velocity_x": 2 * math.Sqrt(Air.Gamma*Air.R*300), "velocity_y": 0}
		}
		for key, w := range want {
			if e, ok := entry(b.Values, key); !ok || math.Abs(e.Value-w) > 1e-12*max(1, math.Abs(w)) {
				t.Errorf("%s: %s = %v (recorded %v), want %.17g", b.Tag, key, e.Value, ok, w)
			}
		}
	}
	// The inflow-supersonic under the subsonic reference has its note in
	// its record, the farfields none.
	for _, b := range rec.Boundaries {
		if want := b.Tag == "far4"; (len(b.Notes) == 1) != want || want && !strings.Contains(b.Notes[0], "reference Mach number is 0.3 (subsonic)") {
			t.Errorf("%s: notes %q", b.Tag, b.Notes)
		}
	}
	out, err := yaml.Marshal(rec)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(out), "flow_angle: {value: 5.72957795130823, unit: deg}") || !strings.Contains(string(out), "      notes:\n        - inflow-supersonic is a condition") {
		t.Errorf("record YAML:\n%s", out)
	}
}
