package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"cvdeck/bc"
)

// runStateCmd runs `cvdeck state` with args and returns its output.
func runStateCmd(t *testing.T, args ...string) (string, error) {
	t.Helper()
	cmd := newStateCommand()
	var out bytes.Buffer
	cmd.SetOut(&out)
	cmd.SetErr(&out)
	cmd.SetArgs(args)
	cmd.SilenceUsage = true
	cmd.SilenceErrors = true
	err := cmd.Execute()
	return out.String(), err
}

func TestStateJSONAtAltitude(t *testing.T) {
	out, err := runStateCmd(t, "--mach", "2", "--altitude", "11000", "--altitude-kind", "geopotential", "--length", "2", "--yplus", "1", "--json")
	if err != nil {
		t.Fatal(err)
	}
	var got map[string]float64
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	// U.S. Standard Atmosphere 1976, Table 4, 11 km geopotential (216.65 K,
	// 22 632 Pa, 0.36392 kg/m³), and NACA Report 1135 at M = 2 (p/p0 =
	// 0.12780, T/T0 = 0.55556); from memory, as quoted in the issue.
	for _, c := range []struct {
		key       string
		want, tol float64
	}{
		{"mach", 2, 0}, {"static_temperature", 216.65, 1e-9}, {"static_pressure", 22632.06, 5e-6},
		{"density", 0.36392, 5e-5}, {"total_pressure", 22632.06 / 0.12780, 5e-5}, {"total_temperature", 216.65 / 0.55556, 5e-5},
	} {
		if v, ok := got[c.key]; !ok || math.Abs(v-c.want) > c.tol*c.want {
			t.Errorf("%s = %v (present %v), want %g", c.key, v, ok, c.want)
		}
	}
	for _, k := range []string{"speed_of_sound", "velocity", "dynamic_pressure", "dynamic_viscosity", "reynolds_per_metre", "reynolds", "first_cell_height"} {
		if _, ok := got[k]; !ok {
			t.Errorf("no %q in %s", k, out)
		}
	}
	if math.Abs(got["reynolds"]-2*got["reynolds_per_metre"]) > 1e-9*got["reynolds"] {
		t.Errorf("reynolds %g, per metre %g", got["reynolds"], got["reynolds_per_metre"])
	}
}

func TestStateTableAndShock(t *testing.T) {
	out, err := runStateCmd(t, "--mach", "2", "--pressure", "10000", "--temperature", "220", "--normal-shock")
	if err != nil {
		t.Fatal(err)
	}
	// NACA Report 1135 normal shock at M = 2: p2/p1 = 4.5000, M2 = 0.57735.
	for _, want := range []string{"static_pressure", "10000", "Pa", "Behind a normal shock", "45000", "0.57735"} {
		if !strings.Contains(out, want) {
			t.Errorf("no %q in:\n%s", want, out)
		}
	}
}

func TestStateBadFlags(t *testing.T) {
	for _, args := range [][]string{
		{"--mach", "0.5"},
		{"--mach", "0.5", "--altitude", "1000", "--pressure", "1e5", "--temperature", "300"},
		{"--mach", "0.5", "--pressure", "-1e5", "--temperature", "300"},
		{"--mach", "0.5", "--altitude", "1000", "--altitude-kind", "sideways"},
		{"--mach", "0.5", "--altitude", "200000"},
		{"--mach", "0.5", "--altitude", "1000", "--gamma", "1.3"},
		{"--mach", "0.5", "--altitude", "1000", "--gamma", "0.9", "--gas-constant", "287"},
		{"--mach", "0.5", "--altitude", "1000", "--gas", "helium"},
		{"--mach", "0.5", "--altitude", "1000", "--yplus", "1"},
		{"--mach", "0.5", "--altitude", "1000", "--normal-shock"},
		{"--mach", "abc", "--altitude", "1000"},
		{"--velocity", "100", "--density", "1.2"},
	} {
		out, err := runStateCmd(t, args...)
		if !errors.Is(err, bc.ErrInput) {
			t.Errorf("%v: error %v does not wrap bc.ErrInput (output %q)", args, err, out)
		}
	}
}

// TestStateGasViscosity: a gas given by γ and R alone borrows air's
// Sutherland constants and the table says so; --sutherland gives the
// gas's own, so that at T = T_ref the viscosity is μ_ref (the law's form)
// and the Reynolds number follows from it; a malformed --sutherland is bad
// input.
func TestStateGasViscosity(t *testing.T) {
	out, err := runStateCmd(t, "--mach", "0.5", "--pressure", "1e5", "--temperature", "300", "--gamma", "1.67", "--gas-constant", "2077")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out, "no Sutherland constants of its own") {
		t.Errorf("no note on the borrowed viscosity:\n%s", out)
	}
	out, err = runStateCmd(t, "--mach", "0.5", "--pressure", "1e5", "--temperature", "300", "--gamma", "1.67", "--gas-constant", "2077", "--sutherland", "2e-5,300,80", "--json")
	if err != nil {
		t.Fatal(err)
	}
	var got map[string]float64
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	if math.Abs(got["dynamic_viscosity"]-2e-5) > 1e-18 || got["sutherland_s"] != 80 {
		t.Errorf("viscosity %g (want 2e-5 at T_ref), S %g", got["dynamic_viscosity"], got["sutherland_s"])
	}
	if want := got["density"] * got["velocity"] / 2e-5; math.Abs(got["reynolds_per_metre"]/want-1) > 1e-12 {
		t.Errorf("Reynolds per metre %g, want %g", got["reynolds_per_metre"], want)
	}
	for _, bad := range []string{"1e-5,300", "1e-5,0,80", "-1e-5,300,80"} {
		if _, err := runStateCmd(t, "--mach", "0.5", "--pressure", "1e5", "--temperature", "300", "--sutherland", bad); !errors.Is(err, bc.ErrInput) {
			t.Errorf("--sutherland %s: %v, want bad input", bad, err)
		}
	}
}

// TestStateHeaderGivesTheOtherAltitude: an altitude given as geopotential
// is shown with its geometric equivalent and the other way round, by
// z = r0 H / (r0 − H) with r0 = 6 356 766 m (U.S. Standard Atmosphere
// 1976, from memory): 20 000 m geopotential is 20 063.1 m geometric.
func TestStateHeaderGivesTheOtherAltitude(t *testing.T) {
	out, err := runStateCmd(t, "--mach", "0.8", "--altitude", "20000", "--altitude-kind", "geopotential")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out, "20000 m geopotential (20063.1 m geometric)") {
		t.Errorf("header: %s", strings.SplitN(out, "\n", 2)[0])
	}
	out, err = runStateCmd(t, "--mach", "0.8", "--altitude", "20063.1")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out, "20063.1 m geometric (20000.0 m geopotential)") {
		t.Errorf("header: %s", strings.SplitN(out, "\n", 2)[0])
	}
}

// TestStateNotes: the models' limits are named, and nothing is refused.
// At M 8 and 30 km the free stream's total temperature, 3126 K, and the
// 3032 K behind the normal shock (T2/T1 = 13.39 at M 8, NACA Report 1135;
// from memory) are past air's Sutherland range (170-1900 K, White; from
// memory) and oxygen's dissociation near 2000 K (Anderson; from memory);
// the adiabatic wall is at T (1 + 0.72^(1/3) · 0.2 · 64) (recovery factor
// Pr^(1/3), common practice). 0.5 K and gamma 3 are noted; sea-level air
// at M 0.8 over 2 m has nothing to note.
func TestStateNotes(t *testing.T) {
	out, err := runStateCmd(t, "--mach", "8", "--altitude", "30000", "--normal-shock", "--length", "1", "--yplus", "1", "--json")
	if err != nil {
		t.Fatal(err)
	}
	var got struct {
		T     float64            `json:"static_temperature"`
		Taw   float64            `json:"adiabatic_wall_temperature"`
		Post  map[string]float64 `json:"post_shock"`
		Notes []string           `json:"notes"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	if want := got.T * (1 + math.Cbrt(0.72)*0.2*64); math.Abs(got.Taw/want-1) > 1e-12 {
		t.Errorf("adiabatic wall %g K, want %g", got.Taw, want)
	}
	if tr := got.Post["static_temperature"] / got.T; math.Abs(tr/13.387-1) > 1e-4 {
		t.Errorf("T2/T1 = %g, NACA 1135 13.387", tr)
	}
	borrowed, err := runStateCmd(t, "--mach", "0.3", "--pressure", "1e5", "--temperature", "300", "--gamma", "1.3", "--gas-constant", "300", "--json")
	if err != nil || !strings.Contains(borrowed, `"notes":["dynamic_viscosity: this gas has no Sutherland constants of its own`) {
		t.Errorf("--json of a gas without Sutherland constants: %v\n%s", err, borrowed)
	}
	all := strings.Join(got.Notes, "\n")
	for _, want := range []string{"total temperature, 3126 K, is above 1900 K", "total temperature, 3126 K, is above about 2000 K",
		"behind the normal shock: viscosity: the static temperature, 3032 K", "behind the normal shock: gas model: the static temperature, 3032 K",
		"first-cell height: the adiabatic wall temperature"} {
		if !strings.Contains(all, want) {
			t.Errorf("no %q in the notes:\n%s", want, all)
		}
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--mach", "0.5", "--pressure", "1e5", "--temperature", "0.5"}, "static temperature, 0.5 K, is below 170 K"},
		{[]string{"--mach", "0.5", "--pressure", "1e5", "--temperature", "300", "--gamma", "3", "--gas-constant", "287"}, "gamma = 3 is above 5/3"},
		{[]string{"--mach", "0.3", "--altitude", "30000", "--length", "1", "--yplus", "1"}, "it would be laminar there"},
		{[]string{"--mach", "0.8", "--altitude", "0", "--length", "2", "--yplus", "1"}, ""},
		{[]string{"--mach", "0.3", "--pressure", "1e5", "--temperature", "300", "--gamma", "1.3", "--gas-constant", "300"}, "no Sutherland constants of its own"},
	} {
		out, err := runStateCmd(t, c.args...)
		if err != nil {
			t.Errorf("%v: %v", c.args, err)
			continue
		}
		if c.want == "" && strings.Contains(out, "Notes") || c.want != "" && !strings.Contains(out, "Notes\n\n  ") || !strings.Contains(out, c.want) {
			t.Errorf("%v: want the note %q:\n%s", c.args, c.want, out)
		}
	}
}
