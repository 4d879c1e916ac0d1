package bc

import (
	"fmt"
	"math"
)

// Sutherland holds the constants of Sutherland's law for one gas,
//
//	μ(T) = μ_ref (T/T_ref)^(3/2) (T_ref + S)/(T + S)
//
// (Sutherland 1893; in the form of F. M. White, Viscous Fluid Flow,
// McGraw-Hill, from memory).
type Sutherland struct {
	MuRef float64 // μ_ref, the viscosity at TRef, Pa·s
	TRef  float64 // T_ref, K
	S     float64 // Sutherland's constant S, K
}

// AirSutherland are White's constants for air: μ_ref = 1.716e-5 Pa·s at
// T_ref = 273.15 K, S = 110.4 K; White quotes the law as accurate to about
// 2 % from 170 K to 1900 K (from memory).
var AirSutherland = Sutherland{MuRef: 1.716e-5, TRef: 273.15, S: 110.4}

// The range of temperatures, K, over which White quotes Sutherland's law
// with air's constants as within about 2 % (see AirSutherland).
const (
	airSutherlandMin = 170.0
	airSutherlandMax = 1900.0
)

// sutherlandNote returns a note when the gas's viscosity is air's
// Sutherland law and the temperature t (K) of what (such as "the static
// temperature") is outside the law's range, with the consequence, or ""
// when there is nothing to say.
// ViscosityNote begins every note on the viscosity law (sutherlandNote), so
// that a caller with no viscous boundary, whose solver takes no viscosity,
// can leave those notes out.
const ViscosityNote = "viscosity: "

func sutherlandNote(g Gas, what string, t float64, consequence string) string {
	if g.ViscosityLaw() != AirSutherland || (t >= airSutherlandMin && t <= airSutherlandMax) {
		return ""
	}
	side := fmt.Sprintf("below %g K, the bottom", airSutherlandMin)
	if t > airSutherlandMax {
		side = fmt.Sprintf("above %g K, the top", airSutherlandMax)
	}
	return fmt.Sprintf(ViscosityNote+"%s, %.4g K, is %s of the range %g-%g K in which Sutherland's law with air's constants is within about 2 %% (White, Viscous Fluid Flow; from memory): %s",
		what, t, side, airSutherlandMin, airSutherlandMax, consequence)
}

// Viscosity is the dynamic viscosity μ(T) in Pa·s by the law above.
func (s Sutherland) Viscosity(t float64) float64 {
	return s.MuRef * math.Pow(t/s.TRef, 1.5) * (s.TRef + s.S) / (t + s.S)
}

// validate reports a constant that is not a positive finite number.
func (s Sutherland) validate(where string) error {
	for _, c := range []struct {
		name, unit string
		v          float64
	}{{"mu_ref", "Pa s", s.MuRef}, {"t_ref", "K", s.TRef}, {"s", "K", s.S}} {
		if !(c.v > 0) || math.IsInf(c.v, 0) {
			return inputErr(where, "", "Sutherland constant %s = %s; it must be a positive finite number (air: %s)", c.name, withUnit(c.v, c.unit), AirSutherland)
		}
	}
	return nil
}

// String gives the constants as "mu_ref 1.716e-05 Pa s, t_ref 273.15 K, s 110.4 K".
func (s Sutherland) String() string {
	return fmt.Sprintf("mu_ref %g Pa s, t_ref %g K, s %g K", s.MuRef, s.TRef, s.S)
}
