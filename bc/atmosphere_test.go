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

// Above 80 km the standard's kinetic temperature is T = T_M (M/M0), with
// M/M0 from its Table 8 (U.S. Standard Atmosphere 1976, from memory:
// 0.999870 at 83 km, 0.999579 at 86 km); T_M is the linear layer's from
// 71 km geopotential (−2 K/km, Table 4). Table I at 86 km gives T =
// 186.87 K, T_M = 186.946 K, p = 0.37338 Pa, ρ = 6.958e-6 kg/m³ and
// a = 274.10 m/s (from memory): pressure, density and the speed of sound
// follow T_M and M0, as the standard defines them, and the viscosity
// follows T. At 80 km and below T = T_M.
func TestStandardAtmosphereKineticTemperature(t *testing.T) {
	for _, c := range []struct {
		z, ratio float64
	}{{79000, 1}, {80000, 1}, {83000, 0.999870}, {86000, 0.999579}} {
		a, err := StandardAtmosphere(Altitude{c.z, Geometric})
		if err != nil {
			t.Fatal(err)
		}
		h := Altitude{c.z, Geometric}.Geopotential()
		tm := 214.65 - 0.002*(h-71000)
		if !near(a.MolecularTemperature, tm, 1e-12) || !near(a.Temperature, tm*c.ratio, 1e-9) {
			t.Errorf("%g m: T %.6f K, T_M %.6f K; want T_M %.6f K, T %.6f K (M/M0 %g)", c.z, a.Temperature, a.MolecularTemperature, tm, tm*c.ratio, c.ratio)
		}
	}
	a, err := StandardAtmosphere(Altitude{86000, Geometric})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"T", a.Temperature, 186.87, 3e-5}, {"T_M", a.MolecularTemperature, 186.946, 3e-6},
		{"p", a.Pressure, 0.37338, 1.4e-5}, {"rho", a.Density, 6.958e-6, 8e-5},
	} {
		if !near(c.got, c.want, c.tol) {
			t.Errorf("86 km %s = %.6g, Table I %g", c.name, c.got, c.want)
		}
	}
	s, err := StateFromAltitude(Air, Altitude{86000, Geometric}, 2)
	if err != nil {
		t.Fatal(err)
	}
	if !near(s.Temperature, a.Temperature, 1e-15) || !near(s.SpeedOfSound, 274.10, 2e-5) ||
		!near(s.Density, s.Pressure/(Air.R*a.MolecularTemperature), 1e-15) || !near(s.Viscosity, AirSutherland.Viscosity(a.Temperature), 1e-15) {
		t.Errorf("86 km state: T %.6g K, a %.6g m/s (Table I 274.10), rho %.6g, mu %.6g", s.Temperature, s.SpeedOfSound, s.Density, s.Viscosity)
	}
	// T0/T = 1 + 0.2 M² holds for the kinetic temperature, and a normal
	// shock keeps the composition: behind it ρ = p/(R T_M) still.
	if !near(s.TotalTemperature, 1.8*s.Temperature, 1e-15) {
		t.Errorf("T0 %g, T %g", s.TotalTemperature, s.Temperature)
	}
	post, err := s.PostNormalShock()
	if err != nil {
		t.Fatal(err)
	}
	if want := post.Pressure * 0.999579 / (Air.R * post.Temperature); !near(post.Density, want, 1e-12) || !near(post.Temperature, 1.6875*s.Temperature, 6e-5) {
		t.Errorf("behind the shock at 86 km: rho %g (want %g), T %g (NACA 1135: 1.6875 T1)", post.Density, want, post.Temperature)
	}
}
