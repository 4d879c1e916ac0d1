package bc

import (
	"fmt"
	"math"
)

// State is a uniform flow state of an ideal gas: the reference (free-stream)
// state of a case, or the state a boundary condition imposes. Build one with
// StateFromMach, StateFromVelocity, StateFromAltitude or StateFromTotal, so
// that every field is consistent with the others.
type State struct {
	Gas Gas

	Mach             float64 // M = V/a
	Pressure         float64 // static pressure p, Pa
	Temperature      float64 // static temperature T, K
	Density          float64 // ρ = p/(R T), kg/m³
	SpeedOfSound     float64 // a = √(γ R T), m/s
	Velocity         float64 // V = M a, m/s
	TotalPressure    float64 // p0 = p [1 + (γ−1)/2 M²]^(γ/(γ−1)), Pa
	TotalTemperature float64 // T0 = T [1 + (γ−1)/2 M²], K
	DynamicPressure  float64 // q = ½ ρ V² = ½ γ p M², Pa
	Viscosity        float64 // μ(T) by the gas's Sutherland's law, Pa·s
	ReynoldsPerMetre float64 // ρ V / μ, 1/m
}

// positive checks that v is a finite number above zero.
func positive(name, unit string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s = %s; it must be a positive finite number: %w", name, withUnit(v, unit), ErrInput)
	}
	return nil
}

// nonNegative checks that v is a finite number at or above zero.
func nonNegative(name, unit string, v float64) error {
	if !(v >= 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s = %s; it must be a finite number not below zero: %w", name, withUnit(v, unit), ErrInput)
	}
	return nil
}

// withUnit formats v followed by its unit, if it has one.
func withUnit(v float64, unit string) string {
	if unit == "" {
		return fmt.Sprintf("%g", v)
	}
	return fmt.Sprintf("%g %s", v, unit)
}

// StateFromMach builds the state with Mach number mach, static pressure p
// (Pa) and static temperature t (K).
func StateFromMach(g Gas, mach, p, t float64) (State, error) {
	if err := g.Validate(""); err != nil {
		return State{}, err
	}
	if err := nonNegative("Mach number", "", mach); err != nil {
		return State{}, err
	}
	if err := positive("static pressure", "Pa", p); err != nil {
		return State{}, err
	}
	if err := positive("static temperature", "K", t); err != nil {
		return State{}, err
	}
	return complete(g, mach, p, t), nil
}

// StateFromVelocity builds the state with speed u (m/s), density rho
// (kg/m³) and static temperature t (K); the pressure is p = ρ R T.
func StateFromVelocity(g Gas, u, rho, t float64) (State, error) {
	if err := g.Validate(""); err != nil {
		return State{}, err
	}
	if err := nonNegative("speed", "m/s", u); err != nil {
		return State{}, err
	}
	if err := positive("density", "kg/m³", rho); err != nil {
		return State{}, err
	}
	if err := positive("static temperature", "K", t); err != nil {
		return State{}, err
	}
	return complete(g, u/g.SpeedOfSound(t), rho*g.R*t, t), nil
}

// StateFromAltitude builds the state with Mach number mach at altitude a in
// the U.S. Standard Atmosphere 1976: p and T come from the atmosphere, the
// density from p/(R T) with the gas's own R.
func StateFromAltitude(g Gas, a Altitude, mach float64) (State, error) {
	atm, err := StandardAtmosphere(a)
	if err != nil {
		return State{}, err
	}
	return StateFromMach(g, mach, atm.Pressure, atm.Temperature)
}

// StateFromTotal builds the state with Mach number mach reached by an
// isentropic expansion from total pressure p0 (Pa) and total temperature t0
// (K): p = p0 · (p/p0)(M), T = T0 · (T/T0)(M).
func StateFromTotal(g Gas, mach, p0, t0 float64) (State, error) {
	if err := g.Validate(""); err != nil {
		return State{}, err
	}
	if err := nonNegative("Mach number", "", mach); err != nil {
		return State{}, err
	}
	if err := positive("total pressure", "Pa", p0); err != nil {
		return State{}, err
	}
	if err := positive("total temperature", "K", t0); err != nil {
		return State{}, err
	}
	return complete(g, mach, p0*g.PressureRatio(mach), t0*g.TemperatureRatio(mach)), nil
}

// complete derives every field from validated M, p and T.
func complete(g Gas, mach, p, t float64) State {
	a := g.SpeedOfSound(t)
	rho := g.Density(p, t)
	v := mach * a
	mu := g.ViscosityLaw().Viscosity(t)
	return State{
		Gas:              g,
		Mach:             mach,
		Pressure:         p,
		Temperature:      t,
		Density:          rho,
		SpeedOfSound:     a,
		Velocity:         v,
		TotalPressure:    p / g.PressureRatio(mach),
		TotalTemperature: t / g.TemperatureRatio(mach),
		DynamicPressure:  0.5 * rho * v * v,
		Viscosity:        mu,
		ReynoldsPerMetre: rho * v / mu,
	}
}

// Reynolds is the Reynolds number ρ V L / μ over the reference length
// length (m).
func (s State) Reynolds(length float64) float64 { return s.ReynoldsPerMetre * length }

// PostNormalShock returns the state behind a stationary normal shock facing
// this state, which must be supersonic: p, T and M from the normal-shock
// relations, the total temperature unchanged.
func (s State) PostNormalShock() (State, error) {
	sh, err := s.Gas.NormalShock(s.Mach)
	if err != nil {
		return State{}, err
	}
	return complete(s.Gas, sh.M2, s.Pressure*sh.PressureRatio, s.Temperature*sh.TemperatureRatio), nil
}
