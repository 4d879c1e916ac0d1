package bc

import (
	"encoding/json"
	"strings"
	"testing"

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
