package bc

import (
	"errors"
	"math"
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
