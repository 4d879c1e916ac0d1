package bc

import "math"

// Sutherland's law constants for air (F. M. White, Viscous Fluid Flow,
// McGraw-Hill): μ_ref = 1.716e-5 Pa·s at T_ref = 273.15 K, S = 110.4 K.
const (
	SutherlandMuRef = 1.716e-5 // Pa·s
	SutherlandTRef  = 273.15   // K
	SutherlandS     = 110.4    // K
)

// SutherlandViscosity is the dynamic viscosity of air by Sutherland's law,
//
//	μ(T) = μ_ref (T/T_ref)^(3/2) (T_ref + S)/(T + S),
//
// with White's constants above; White quotes it as accurate to about 2 %
// from 170 K to 1900 K (from memory).
func SutherlandViscosity(t float64) float64 {
	return SutherlandMuRef * math.Pow(t/SutherlandTRef, 1.5) * (SutherlandTRef + SutherlandS) / (t + SutherlandS)
}
