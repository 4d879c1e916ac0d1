package bc

import (
	"fmt"
	"math"
)

// AltitudeKind says how an altitude is measured.
type AltitudeKind uint8

const (
	// Geometric altitude z is the height above mean sea level as measured
	// with a tape.
	Geometric AltitudeKind = iota
	// Geopotential altitude H is the height in a uniform gravity field of
	// g0 that has the same potential; the standard atmosphere's layers are
	// defined in it.
	Geopotential
)

func (k AltitudeKind) String() string {
	if k == Geopotential {
		return "geopotential"
	}
	return "geometric"
}

// ParseAltitudeKind accepts "geometric" and "geopotential".
func ParseAltitudeKind(s string) (AltitudeKind, error) {
	switch s {
	case "geometric":
		return Geometric, nil
	case "geopotential":
		return Geopotential, nil
	}
	return 0, fmt.Errorf("altitude kind %q: use geometric or geopotential: %w", s, ErrInput)
}

// Altitude is a height above mean sea level in metres, with how it was
// measured.
type Altitude struct {
	Metres float64
	Kind   AltitudeKind
}

// EarthRadius is the effective Earth radius r0 = 6 356 766 m used by the
// U.S. Standard Atmosphere 1976 to relate geometric and geopotential
// altitude.
const EarthRadius = 6356766.0

// Geopotential returns the geopotential altitude H = r0 z / (r0 + z) for a
// geometric altitude z, or the altitude itself if it is geopotential
// (U.S. Standard Atmosphere 1976).
func (a Altitude) Geopotential() float64 {
	if a.Kind == Geopotential {
		return a.Metres
	}
	return EarthRadius * a.Metres / (EarthRadius + a.Metres)
}

// Geometric returns the geometric altitude z = r0 H / (r0 − H).
func (a Altitude) Geometric() float64 {
	if a.Kind == Geometric {
		return a.Metres
	}
	return EarthRadius * a.Metres / (EarthRadius - a.Metres)
}

// Constants of the U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562).
const (
	atmG0 = 9.80665 // standard gravity, m/s²
	// atmR is R*/M0 with R* = 8.31432 J/(mol K) and M0 = 28.9644 g/mol,
	// the air gas constant the standard uses for its densities.
	atmR  = 8314.32 / 28.9644
	atmT0 = 288.15   // sea-level temperature, K
	atmP0 = 101325.0 // sea-level pressure, Pa
)

// atmLayer is one layer of the standard atmosphere below 86 km geometric
// altitude: base geopotential altitude (m) and temperature lapse rate (K/m).
type atmLayer struct{ base, lapse float64 }

var atmLayers = [...]atmLayer{
	{0, -0.0065},
	{11000, 0},
	{20000, 0.0010},
	{32000, 0.0028},
	{47000, 0},
	{51000, -0.0028},
	{71000, -0.0020},
}

// AtmosphereTop and AtmosphereBottom bound the geopotential altitudes
// StandardAtmosphere accepts: 86 km geometric (84 852 m geopotential), the
// top of the standard's linear-temperature layers, and −5 km geometric
// (−5 004 m geopotential), the bottom of its tables.
const (
	AtmosphereTop    = EarthRadius * 86000 / (EarthRadius + 86000)
	AtmosphereBottom = EarthRadius * -5000 / (EarthRadius - 5000)
)

// Atmosphere is the static state of the standard atmosphere at an altitude.
type Atmosphere struct {
	// Temperature is the kinetic temperature T = T_M (M/M0), K: the
	// temperature of the gas, which its viscosity follows.
	Temperature float64
	// MolecularTemperature is the molecular-scale temperature T_M, K, in
	// which the standard defines its layers, pressure, density and speed
	// of sound. It equals Temperature up to 80 km geometric, where the
	// mean molar mass M of air is still its sea-level value M0.
	MolecularTemperature float64
	Pressure             float64 // Pa
	Density              float64 // ρ = p/(R T_M) with R = R*/M0, kg/m³
}

// atmMolarMassRatio is M/M0, the mean molar mass of air over its sea-level
// value, of the U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562, Table 8;
// from memory) from 80 km geometric altitude, where it is 1, to 86 km,
// every 0.5 km. Below 80 km M/M0 = 1. Molecular oxygen dissociates above
// 80 km (from memory); up to 86 km the standard accounts for it by this
// ratio alone.
var atmMolarMassRatio = [...]float64{
	1.000000, 0.999996, 0.999989, 0.999971, 0.999941, 0.999909, 0.999870,
	0.999829, 0.999786, 0.999741, 0.999694, 0.999641, 0.999579,
}

// molarMassRatio returns M/M0 at geometric altitude z (m) by linear
// interpolation in Table 8 (cvdeck's choice; the rows step by at most
// 6.2e-5, and their second differences are below 1e-5, so the
// interpolation error is below 2e-6 of T). It is 1 at and below 80 km.
func molarMassRatio(z float64) float64 {
	const z0, dz = 80000.0, 500.0
	if z <= z0 {
		return 1
	}
	u := (z - z0) / dz
	i := min(int(u), len(atmMolarMassRatio)-2)
	f := u - float64(i)
	return atmMolarMassRatio[i] + f*(atmMolarMassRatio[i+1]-atmMolarMassRatio[i])
}

// StandardAtmosphere returns the temperature, pressure and density of the
// U.S. Standard Atmosphere 1976 at altitude a, from −5 km to 86 km
// geometric. Within a layer of base H_b, T_b, p_b and lapse rate L, the
// molecular-scale temperature T_M and the pressure are
//
//	T_M = T_b + L (H − H_b)
//	p = p_b (T_b/T_M)^(g0/(R L))     for L ≠ 0
//	p = p_b exp(−g0 (H − H_b)/(R T_b))  for L = 0
//
// with the base values built up from the sea-level state, ρ = p/(R T_M)
// with R = R*/M0, and the kinetic temperature T = T_M (M/M0), M/M0 from
// the standard's Table 8 above 80 km geometric (U.S. Standard Atmosphere
// 1976, NOAA-S/T 76-1562). The standard defines the hydrostatic pressure,
// the density and the speed of sound a = √(γ R* T_M/M0) in T_M and M0,
// which is the same as in T and the local M; only T (and the viscosity,
// which the standard computes from T) differ from T_M, by 4.2e-4 at most.
func StandardAtmosphere(a Altitude) (Atmosphere, error) {
	if math.IsNaN(a.Metres) || math.IsInf(a.Metres, 0) {
		return Atmosphere{}, fmt.Errorf("altitude %g m is not a number: %w", a.Metres, ErrInput)
	}
	h := a.Geopotential()
	if h < AtmosphereBottom || h > AtmosphereTop {
		return Atmosphere{}, fmt.Errorf("%s altitude %g m (geopotential %.1f m) is outside the standard atmosphere's range, -5000 to 86000 m geometric (%.0f to %.0f m geopotential): %w",
			a.Kind, a.Metres, h, AtmosphereBottom, AtmosphereTop, ErrInput)
	}
	t, p := atmT0, atmP0
	for i, l := range atmLayers {
		top := AtmosphereTop
		if i+1 < len(atmLayers) {
			top = atmLayers[i+1].base
		}
		dh := min(h, top) - l.base
		if i == 0 || dh > 0 {
			t, p = atmStep(t, p, l.lapse, dh)
		}
		if h <= top {
			break
		}
	}
	return Atmosphere{Temperature: t * molarMassRatio(a.Geometric()), MolecularTemperature: t, Pressure: p, Density: p / (atmR * t)}, nil
}

// atmStep carries temperature and pressure through dh metres of
// geopotential altitude with lapse rate lapse.
func atmStep(t, p, lapse, dh float64) (float64, float64) {
	if lapse == 0 {
		return t, p * math.Exp(-atmG0*dh/(atmR*t))
	}
	t1 := t + lapse*dh
	return t1, p * math.Pow(t/t1, atmG0/(atmR*lapse))
}
