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
	Temperature      float64 // static (kinetic) temperature T, K
	Density          float64 // ρ = p/(R T), kg/m³ (see molarMass)
	SpeedOfSound     float64 // a = √(γ R T), m/s (see molarMass)
	Velocity         float64 // V = M a, m/s
	TotalPressure    float64 // p0 = p [1 + (γ−1)/2 M²]^(γ/(γ−1)), Pa
	TotalTemperature float64 // T0 = T [1 + (γ−1)/2 M²], K
	DynamicPressure  float64 // q = ½ ρ V² = ½ γ p M², Pa
	Viscosity        float64 // μ(T) by the gas's Sutherland's law, Pa·s
	ReynoldsPerMetre float64 // ρ V / μ, 1/m

	// molarMass is M/M0, the gas's molar mass over the one its R is
	// for; 0 stands for 1. Only the standard atmosphere above 80 km
	// (StateFromAltitude) has M/M0 < 1: there the gas constant is
	// R M0/M, so that ρ = p/(R T_M) and a = √(γ R T_M) with the
	// molecular-scale temperature T_M = T M0/M.
	molarMass float64
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
// the U.S. Standard Atmosphere 1976: p and the kinetic temperature T come
// from the atmosphere, the density from p/(R T_M) and the speed of sound
// from √(γ R T_M) with the gas's own R and the molecular-scale temperature
// T_M, as the standard defines them; the viscosity from T. Up to 80 km
// T_M = T.
func StateFromAltitude(g Gas, a Altitude, mach float64) (State, error) {
	atm, err := StandardAtmosphere(a)
	if err != nil {
		return State{}, err
	}
	s, err := StateFromMach(g, mach, atm.Pressure, atm.MolecularTemperature)
	if err != nil {
		return State{}, err
	}
	if atm.Temperature == atm.MolecularTemperature {
		return s, nil
	}
	return completeMolar(g, mach, atm.Pressure, atm.MolecularTemperature, atm.Temperature/atm.MolecularTemperature), nil
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
func complete(g Gas, mach, p, t float64) State { return completeMolar(g, mach, p, t, 1) }

// completeMolar derives every field from validated M, p, the
// molecular-scale temperature tm = T M0/M and the molar-mass ratio
// ratio = M/M0: T = tm ratio, ρ = p/(R tm), a = √(γ R tm), μ = μ(T).
func completeMolar(g Gas, mach, p, tm, ratio float64) State {
	a := g.SpeedOfSound(tm)
	rho := g.Density(p, tm)
	v := mach * a
	t := tm * ratio
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
		molarMass:        ratio,
	}
}

// molarRatio is M/M0 (see State.molarMass).
func (s State) molarRatio() float64 {
	if s.molarMass == 0 {
		return 1
	}
	return s.molarMass
}

// Reynolds is the Reynolds number ρ V L / μ over the reference length
// length (m).
func (s State) Reynolds(length float64) float64 { return s.ReynoldsPerMetre * length }

// PostNormalShock returns the state behind a stationary normal shock facing
// this state, which must be supersonic: p, T and M from the normal-shock
// relations, the total temperature and the gas's composition unchanged.
func (s State) PostNormalShock() (State, error) {
	sh, err := s.Gas.NormalShock(s.Mach)
	if err != nil {
		return State{}, err
	}
	r := s.molarRatio()
	return completeMolar(s.Gas, sh.M2, s.Pressure*sh.PressureRatio, s.Temperature/r*sh.TemperatureRatio, r), nil
}

// Notes returns remarks, in a fixed order, on where the state leaves the
// range of the models behind it; none of them stops a run:
//
//   - a γ above 5/3, which no ideal gas has (Gas.Notes);
//   - for a gas with air's Sutherland constants, a static temperature
//     outside 170–1900 K, where the law is within about 2 % (White), or a
//     total temperature above it, which a solver meets at stagnation
//     points and nearly at adiabatic walls;
//   - for air, a static or total temperature above about 800 K, where the
//     vibration of its molecules lowers γ below 1.4, or above about
//     2000 K, where oxygen dissociates (see airVibration and
//     airDissociation). The total temperature is named only when it goes
//     further than the static one.
func (s State) Notes() []string {
	var out []string
	add := func(n string) {
		if n != "" {
			out = append(out, n)
		}
	}
	out = append(out, s.Gas.Notes()...)
	t, t0 := s.Temperature, s.TotalTemperature
	add(sutherlandNote(s.Gas, "the static temperature", t, "the viscosity, and the Reynolds number from it, are extrapolated"))
	if t0 > airSutherlandMax && t <= airSutherlandMax {
		add(sutherlandNote(s.Gas, "the total temperature", t0, "a solver's viscosity is extrapolated where the flow comes to rest, at stagnation points, and nearly so at adiabatic walls"))
	}
	const perfect = "the constant-gamma relations are approximate here"
	add(airModelNote(s.Gas, "the static temperature", t, perfect))
	if airModelTier(t0) > airModelTier(t) {
		add(airModelNote(s.Gas, "the total temperature", t0, "a calorically perfect gas overstates the temperature where the flow is brought to rest or through a strong shock, and the total and post-shock states are approximate"))
	}
	return out
}
