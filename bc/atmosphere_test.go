package bc

import (
	"errors"
	"testing"
)

// U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), Table 4, the defining
// values at the layer bases by geopotential altitude (from memory; the
// 11 km row as quoted in the issue), and Table I by geometric altitude
// (from memory). Tolerance: the tables' five significant figures, rounded.
func TestStandardAtmosphere1976(t *testing.T) {
	for _, c := range []struct {
		alt       Altitude
		T, p, rho float64
		source    string
	}{
		{Altitude{0, Geopotential}, 288.15, 101325, 1.2250, "Table 4"},
		{Altitude{11000, Geopotential}, 216.65, 22632.06, 0.36392, "Table 4"},
		{Altitude{20000, Geopotential}, 216.65, 5474.889, 0.088035, "Table 4"},
		{Altitude{32000, Geopotential}, 228.65, 868.0187, 0.013225, "Table 4"},
		{Altitude{47000, Geopotential}, 270.65, 110.9063, 0.0014275, "Table 4"},
		{Altitude{51000, Geopotential}, 270.65, 66.93887, 0.00086160, "Table 4"},
		{Altitude{71000, Geopotential}, 214.65, 3.956420, 0.000064211, "Table 4"},
		{Altitude{11000, Geometric}, 216.774, 22700, 0.36480, "Table I"},
		{Altitude{20000, Geometric}, 216.65, 5529.3, 0.088910, "Table I"},
	} {
		a, err := StandardAtmosphere(c.alt)
		if err != nil {
			t.Fatal(err)
		}
		const tol = 6e-5
		if !near(a.Temperature, c.T, tol) || !near(a.Pressure, c.p, tol) || !near(a.Density, c.rho, tol) {
			t.Errorf("%s %g m: T %.6g p %.7g rho %.6g; US 1976 %s: %g %g %g",
				c.alt.Kind, c.alt.Metres, a.Temperature, a.Pressure, a.Density, c.source, c.T, c.p, c.rho)
		}
	}
}

// Geometric and geopotential altitude convert into each other through
// r0 = 6 356 766 m (U.S. Standard Atmosphere 1976): 11 km geopotential is
// 11 019.1 m geometric (from memory, the 11 km layer base of Table I).
func TestAltitudeConversion(t *testing.T) {
	z := Altitude{11000, Geopotential}.Geometric()
	if !near(z, 11019.1, 1e-5) {
		t.Errorf("11 km geopotential = %g m geometric, want 11019.1", z)
	}
	if h := (Altitude{z, Geometric}).Geopotential(); !near(h, 11000, 1e-12) {
		t.Errorf("round trip %g", h)
	}
}

func TestStandardAtmosphereRange(t *testing.T) {
	for _, a := range []Altitude{{90000, Geometric}, {85000, Geopotential}, {-6000, Geometric}} {
		if _, err := StandardAtmosphere(a); !errors.Is(err, ErrInput) {
			t.Errorf("%+v accepted: %v", a, err)
		}
	}
	// The ends of the range are accepted.
	for _, a := range []Altitude{{86000, Geometric}, {-5000, Geometric}, {84852, Geopotential}} {
		if _, err := StandardAtmosphere(a); err != nil {
			t.Error(err)
		}
	}
	// Below sea level the lapse rate carries on (Table I gives
	// 320.676 K at -5 km; from memory).
	if a, _ := StandardAtmosphere(Altitude{-5000, Geometric}); !near(a.Temperature, 320.676, 2e-5) {
		t.Errorf("-5 km: %g K", a.Temperature)
	}
}
