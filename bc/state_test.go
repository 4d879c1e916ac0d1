package bc

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Sutherland's law with White's constants against White's table for air
// (F. M. White, Viscous Fluid Flow; μ(300 K) ≈ 1.846e-5 Pa·s as quoted in
// the issue) and at T_ref, where the law gives μ_ref by construction.
func TestSutherlandViscosity(t *testing.T) {
	if mu := AirSutherland.Viscosity(300); !near(mu, 1.846e-5, 3e-4) {
		t.Errorf("mu(300 K) = %.5g, White 1.846e-5", mu)
	}
	if mu := AirSutherland.Viscosity(273.15); !near(mu, 1.716e-5, 1e-12) {
		t.Errorf("mu(273.15 K) = %.6g, want mu_ref 1.716e-5", mu)
	}
}

// The free stream from each consistent pair gives the same state: sea level
// of the U.S. Standard Atmosphere 1976 at M = 0.8, by altitude, by p and T,
// by V, ρ and T, and by total conditions.
func TestStateConstructorsAgree(t *testing.T) {
	byAlt, err := StateFromAltitude(Air, Altitude{0, Geometric}, 0.8)
	if err != nil {
		t.Fatal(err)
	}
	// Sea level: a = 340.294 m/s (U.S. Standard Atmosphere 1976, Table I;
	// from memory), ρ = 1.2250 kg/m³.
	if !near(byAlt.SpeedOfSound, 340.294, 2e-5) || !near(byAlt.Density, 1.2250, 5e-5) {
		t.Errorf("sea level a = %.6g rho = %.6g", byAlt.SpeedOfSound, byAlt.Density)
	}
	byPT, _ := StateFromMach(Air, 0.8, 101325, 288.15)
	byV, err := StateFromVelocity(Air, byPT.Velocity, byPT.Density, 288.15)
	if err != nil {
		t.Fatal(err)
	}
	byTotal, err := StateFromTotal(Air, 0.8, byPT.TotalPressure, byPT.TotalTemperature)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []State{byPT, byV, byTotal} {
		a, b := byAlt.Entries(), s.Entries()
		for i := range a {
			if !near(b[i].Value, a[i].Value, 1e-9) {
				t.Errorf("%s: %g vs %g", a[i].Key, b[i].Value, a[i].Value)
			}
		}
	}
	// q = ½ γ p M² (a fact of the ideal gas).
	if !near(byPT.DynamicPressure, 0.5*1.4*101325*0.64, 1e-12) {
		t.Errorf("q = %g", byPT.DynamicPressure)
	}
	if re := byPT.Reynolds(2); !near(re, 2*byPT.Density*byPT.Velocity/byPT.Viscosity, 1e-12) {
		t.Errorf("Re = %g", re)
	}
}

func TestStateBadInput(t *testing.T) {
	for name, f := range map[string]func() (State, error){
		"negative pressure":   func() (State, error) { return StateFromMach(Air, 0.5, -100, 300) },
		"zero temperature":    func() (State, error) { return StateFromMach(Air, 0.5, 1e5, 0) },
		"negative Mach":       func() (State, error) { return StateFromMach(Air, -0.1, 1e5, 300) },
		"gamma 1":             func() (State, error) { return StateFromMach(Gas{Gamma: 1, R: 287}, 0.5, 1e5, 300) },
		"NaN density":         func() (State, error) { return StateFromVelocity(Air, 10, math.NaN(), 300) },
		"negative speed":      func() (State, error) { return StateFromVelocity(Air, -10, 1, 300) },
		"altitude too high":   func() (State, error) { return StateFromAltitude(Air, Altitude{100000, Geometric}, 2) },
		"zero total pressure": func() (State, error) { return StateFromTotal(Air, 0.5, 0, 300) },
	} {
		if _, err := f(); !errors.Is(err, ErrInput) {
			t.Errorf("%s: accepted (%v)", name, err)
		}
	}
}

// The state's notes, at the thresholds its doc names: air's Sutherland
// range 170-1900 K (White, Viscous Fluid Flow; from memory), air's
// vibration onset near 800 K and oxygen's dissociation near 2000 K
// (Anderson, Modern Compressible Flow; from memory), γ above the
// monatomic 5/3 (common practice). The temperatures are set just either
// side of each threshold; the total temperature is T (1 + 0.2 M²).
func TestStateNotes(t *testing.T) {
	for _, c := range []struct {
		name    string
		g       Gas
		mach, T float64
		wants   []string
	}{
		{"sea level", Air, 0.8, 288.15, nil},
		{"171 K", Air, 0, 171, nil},
		{"169 K", Air, 0, 169, []string{"static temperature, 169 K, is below 170 K"}},
		{"0.5 K", Air, 0.5, 0.5, []string{"static temperature, 0.5 K, is below 170 K"}},
		{"799 K", Air, 0, 799, nil},
		{"801 K", Air, 0, 801, []string{"static temperature, 801 K, is above about 800 K", "vibration"}},
		{"M 4 at 216.65 K", Air, 4, 216.65, []string{"total temperature, 909.9 K, is above about 800 K"}},
		{"M 8 at 226.5 K", Air, 8, 226.5, []string{"total temperature, 3126 K, is above 1900 K", "total temperature, 3126 K, is above about 2000 K", "dissociate"}},
		{"2001 K", Air, 0, 2001, []string{"static temperature, 2001 K, is above about 2000 K", "static temperature, 2001 K, is above 1900 K"}},
		{"1901 K", Air, 0, 1901, []string{"static temperature, 1901 K, is above 1900 K", "above about 800 K"}},
		{"gamma 3", Gas{Gamma: 3, R: 287}, 0.5, 300, []string{"gamma = 3 is above 5/3"}},
		{"gamma 5/3", Gas{Gamma: 5.0 / 3, R: 2077.1}, 0.5, 300, nil},
		{"gamma 1.67", Gas{Gamma: 1.67, R: 2077.1}, 0.5, 300, nil},
		{"gamma 1.68", Gas{Gamma: 1.68, R: 2077.1}, 0.5, 300, []string{"gamma = 1.68 is above 5/3"}},
		// Another gas with its own viscosity law: neither air's range nor
		// its γ apply.
		{"own law", Gas{Gamma: 1.3, R: 188.9, Sutherland: Sutherland{MuRef: 1.37e-5, TRef: 273, S: 222}}, 0, 2500, nil},
	} {
		s, err := StateFromMach(c.g, c.mach, 1e5, c.T)
		if err != nil {
			t.Fatal(err)
		}
		notes := s.Notes()
		// Each wanted phrase is in a note of its own, except that one
		// note may hold two phrases (a place and its cause).
		if n := len(notes); (len(c.wants) == 0) != (n == 0) || n > len(c.wants) {
			t.Errorf("%s: notes %q", c.name, notes)
		}
		all := strings.Join(notes, "\n")
		for _, want := range c.wants {
			if !strings.Contains(all, want) {
				t.Errorf("%s: no %q in %q", c.name, want, notes)
			}
		}
	}
}
