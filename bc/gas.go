package bc

import (
	"fmt"
	"math"
)

// Gas is a calorically perfect ideal gas: p = ρ R T with a constant ratio of
// specific heats γ = cp/cv.
type Gas struct {
	// Gamma is the ratio of specific heats γ; it must exceed 1.
	Gamma float64
	// R is the specific gas constant in J/(kg K); it must be positive.
	R float64
	// Sutherland are the constants of the gas's viscosity law; the zero
	// value means none were given, and air's are used (see
	// ViscosityLaw), which the deck and `state` then say.
	Sutherland Sutherland
}

// Air is dry air: γ = 1.4 and R = 287.05287 J/(kg K), the specific gas
// constant of dry air in ISO 2533:1975 (Standard Atmosphere) and the ICAO
// standard atmosphere (from memory), with White's Sutherland constants.
var Air = Gas{Gamma: 1.4, R: 287.05287, Sutherland: AirSutherland}

// Where a calorically perfect ideal gas of γ = 1.4 stops describing air,
// at about atmospheric pressure, in K; and the largest γ of an ideal gas.
const (
	// airVibration: above about 800 K the vibration of air's nitrogen and
	// oxygen molecules is excited, so that cp grows and γ falls below
	// 1.4: 1.354 at 800 K against 1.400 at 300 K (Y. A. Çengel and M. A.
	// Boles, Thermodynamics: An Engineering Approach, table of the
	// ideal-gas specific heats of air; from memory). J. D. Anderson,
	// Modern Compressible Flow, also puts the onset near 800 K (from
	// memory).
	airVibration = 800.0
	// airDissociation: above about 2000 K oxygen begins to dissociate,
	// and nitrogen above about 4000 K (Anderson, Modern Compressible
	// Flow; from memory): air is then a reacting mixture whose R changes
	// as well as its γ.
	airDissociation = 2000.0
	// monatomicGamma is 5/3, the γ of a monatomic ideal gas and the
	// largest of any ideal gas: γ = 1 + 2/f for a molecule of f ≥ 3
	// degrees of freedom, the three of translation being always there
	// (common practice).
	monatomicGamma = 5.0 / 3
)

// isAir reports whether the gas is Air's γ and R.
func (g Gas) isAir() bool { return g.Gamma == Air.Gamma && g.R == Air.R }

// Notes returns a remark when the gas cannot be an ideal gas as given:
// a γ above 5/3, more than any ideal gas has; 1.67, 5/3 as it is often
// written, passes. Such a γ is allowed (a model gas of a numerical test
// may want it); the note says what it is.
func (g Gas) Notes() []string {
	if g.Gamma > max(monatomicGamma, 1.67) {
		return []string{fmt.Sprintf("gas model: gamma = %g is above 5/3, the value of a monatomic gas: an ideal gas has gamma = 1 + 2/f with f >= 3 degrees of freedom of its molecules (common practice), so no real gas has this one, and the state is that of a model gas", g.Gamma)}
	}
	return nil
}

// airModelTier is 0 below airVibration, 1 from it to airDissociation, 2
// above.
func airModelTier(t float64) int {
	switch {
	case t > airDissociation:
		return 2
	case t > airVibration:
		return 1
	}
	return 0
}

// airModelNote returns a note when the gas is air and the temperature t
// (K) of what (such as "the total temperature") is where air's constant γ
// = 1.4 stops holding, with the consequence, or "" when there is nothing
// to say.
func airModelNote(g Gas, what string, t float64, consequence string) string {
	if !g.isAir() {
		return ""
	}
	switch airModelTier(t) {
	case 2:
		return fmt.Sprintf("gas model: %s, %.4g K, is above about %g K, where air's oxygen begins to dissociate (its nitrogen above about 4000 K; Anderson, Modern Compressible Flow, from memory): air is then a reacting mixture, and neither gamma = 1.4 nor R = %g J/(kg K) holds; %s",
			what, t, airDissociation, Air.R, consequence)
	case 1:
		return fmt.Sprintf("gas model: %s, %.4g K, is above about %g K, where the vibration of air's molecules raises cp and gamma falls below 1.4 (1.354 at 800 K; Cengel and Boles, Thermodynamics, from memory); %s",
			what, t, airVibration, consequence)
	}
	return ""
}

// ViscosityLaw returns the gas's Sutherland constants, air's when none
// were given.
func (g Gas) ViscosityLaw() Sutherland {
	if g.Sutherland == (Sutherland{}) {
		return AirSutherland
	}
	return g.Sutherland
}

// BorrowsAirViscosity reports whether the gas is not air and was given no
// viscosity law of its own, so that its viscosity, and the Reynolds
// number and first-cell height that follow from it, are air's.
func (g Gas) BorrowsAirViscosity() bool {
	return g.Sutherland == (Sutherland{}) && (g.Gamma != Air.Gamma || g.R != Air.R)
}

// Validate reports a γ ≤ 1 or an R ≤ 0 (or either not finite), or
// Sutherland constants given but not all positive, as an error wrapping
// ErrInput; where is the case-file place, possibly empty.
func (g Gas) Validate(where string) error {
	if g.Sutherland != (Sutherland{}) {
		if err := g.Sutherland.validate(where); err != nil {
			return err
		}
	}
	if !(g.Gamma > 1) || math.IsInf(g.Gamma, 0) {
		return inputErr(where, "", "ratio of specific heats gamma = %g; it must be greater than 1 (air: 1.4)", g.Gamma)
	}
	if !(g.R > 0) || math.IsInf(g.R, 0) {
		return inputErr(where, "", "gas constant R = %g J/(kg K); it must be positive (air: 287.05287)", g.R)
	}
	return nil
}

// Cp is the specific heat at constant pressure, cp = γR/(γ−1), J/(kg K).
func (g Gas) Cp() float64 { return g.Gamma * g.R / (g.Gamma - 1) }

// SpeedOfSound is a = √(γ R T), m/s.
func (g Gas) SpeedOfSound(t float64) float64 { return math.Sqrt(g.Gamma * g.R * t) }

// Density is ρ = p/(R T), kg/m³.
func (g Gas) Density(p, t float64) float64 { return p / (g.R * t) }

// TemperatureRatio is the isentropic static-to-total temperature ratio
//
//	T/T0 = [1 + (γ−1)/2 M²]^−1
//
// (NACA Report 1135).
func (g Gas) TemperatureRatio(mach float64) float64 {
	return 1 / (1 + 0.5*(g.Gamma-1)*mach*mach)
}

// PressureRatio is the isentropic static-to-total pressure ratio
//
//	p/p0 = [1 + (γ−1)/2 M²]^(−γ/(γ−1))
//
// (NACA Report 1135).
func (g Gas) PressureRatio(mach float64) float64 {
	return math.Pow(g.TemperatureRatio(mach), g.Gamma/(g.Gamma-1))
}

// DensityRatio is the isentropic static-to-total density ratio
//
//	ρ/ρ0 = [1 + (γ−1)/2 M²]^(−1/(γ−1))
//
// (NACA Report 1135).
func (g Gas) DensityRatio(mach float64) float64 {
	return math.Pow(g.TemperatureRatio(mach), 1/(g.Gamma-1))
}

// AreaRatio is the isentropic ratio of the stream-tube area to its sonic
// (throat) area,
//
//	A/A* = (1/M) {[2/(γ+1)] [1 + (γ−1)/2 M²]}^((γ+1)/(2(γ−1)))
//
// (NACA Report 1135). It is +Inf at M = 0.
func (g Gas) AreaRatio(mach float64) float64 {
	gm := g.Gamma
	return math.Pow(2/(gm+1)*(1+0.5*(gm-1)*mach*mach), (gm+1)/(2*(gm-1))) / mach
}

// MachFromPressureRatio inverts PressureRatio: the Mach number at which the
// isentropic static-to-total pressure ratio is pr, 0 < pr ≤ 1, from
//
//	M = √{ 2/(γ−1) [pr^(−(γ−1)/γ) − 1] }.
func (g Gas) MachFromPressureRatio(pr float64) (float64, error) {
	if !(pr > 0 && pr <= 1) {
		return 0, fmt.Errorf("static-to-total pressure ratio %g is outside (0, 1]: %w", pr, ErrInput)
	}
	gm := g.Gamma
	return math.Sqrt(2 / (gm - 1) * (math.Pow(pr, -(gm-1)/gm) - 1)), nil
}

// MachFromAreaRatio inverts AreaRatio on the subsonic or the supersonic
// branch: the Mach number at which A/A* = ar, ar ≥ 1. It brackets the root
// (M in (0, 1] or [1, ∞)) and bisects, since A/A* is monotone on each branch.
func (g Gas) MachFromAreaRatio(ar float64, supersonic bool) (float64, error) {
	if !(ar >= 1) || math.IsInf(ar, 0) {
		return 0, fmt.Errorf("area ratio A/A* = %g; it must be at least 1: %w", ar, ErrInput)
	}
	lo, hi := 1e-12, 1.0
	if supersonic {
		lo, hi = 1, 2
		for g.AreaRatio(hi) < ar {
			hi *= 2
		}
	}
	for i := 0; i < 200 && hi-lo > 1e-15*hi; i++ {
		mid := 0.5 * (lo + hi)
		// A/A* falls with M below 1 and rises above it.
		if (g.AreaRatio(mid) > ar) != supersonic {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi), nil
}
