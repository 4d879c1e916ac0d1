package bc

import (
	"errors"
	"math"
	"testing"
)

// near reports whether got is within rel (relative) of want.
func near(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}

// The 5-significant-figure values of NACA Report 1135 (Ames Research Staff,
// "Equations, tables, and charts for compressible flow", 1953), Table I
// (isentropic flow, γ = 1.4); from memory, checked against the M = 2 row
// quoted in the issue. The table is rounded to its last digit, so the
// tolerance is half a unit in the fifth figure, relative.
func TestIsentropicNACA1135(t *testing.T) {
	for _, c := range []struct {
		m, p, T, rho, area float64
	}{
		{0.5, 0.84302, 0.95238, 0.88517, 1.3398},
		{1, 0.52828, 0.83333, 0.63394, 1.0000},
		{2, 0.12780, 0.55556, 0.23005, 1.6875},
		{3, 0.027224, 0.35714, 0.076226, 4.2346},
	} {
		const tol = 6e-5
		if got := Air.PressureRatio(c.m); !near(got, c.p, tol) {
			t.Errorf("M=%g p/p0 = %.6g, NACA 1135 %.5g", c.m, got, c.p)
		}
		if got := Air.TemperatureRatio(c.m); !near(got, c.T, tol) {
			t.Errorf("M=%g T/T0 = %.6g, NACA 1135 %.5g", c.m, got, c.T)
		}
		if got := Air.DensityRatio(c.m); !near(got, c.rho, tol) {
			t.Errorf("M=%g rho/rho0 = %.6g, NACA 1135 %.5g", c.m, got, c.rho)
		}
		if got := Air.AreaRatio(c.m); !near(got, c.area, tol) {
			t.Errorf("M=%g A/A* = %.6g, NACA 1135 %.5g", c.m, got, c.area)
		}
		// The inverses return the Mach number of the row.
		if m, err := Air.MachFromPressureRatio(c.p); err != nil || !near(m, c.m, 2e-4) {
			t.Errorf("MachFromPressureRatio(%g) = %g, %v; want %g", c.p, m, err, c.m)
		}
		if m, err := Air.MachFromAreaRatio(c.area, c.m >= 1); err != nil || !near(m, c.m, 2e-4) {
			t.Errorf("MachFromAreaRatio(%g) = %g, %v; want %g", c.area, m, err, c.m)
		}
	}
	if _, err := Air.MachFromPressureRatio(1.2); !errors.Is(err, ErrInput) {
		t.Errorf("p/p0 = 1.2 accepted: %v", err)
	}
	if _, err := Air.MachFromAreaRatio(0.5, true); !errors.Is(err, ErrInput) {
		t.Errorf("A/A* = 0.5 accepted: %v", err)
	}
}

// NACA Report 1135, Table II (normal shock, γ = 1.4); from memory, the M = 2
// row as quoted in the issue. Tolerance half a unit in the fifth figure.
func TestNormalShockNACA1135(t *testing.T) {
	for _, c := range []struct {
		m1, m2, p, rho, T, p0 float64
	}{
		{1.5, 0.70109, 2.4583, 1.8621, 1.3202, 0.92979},
		{2, 0.57735, 4.5000, 2.6667, 1.6875, 0.72087},
		{3, 0.47519, 10.333, 3.8571, 2.6790, 0.32834},
	} {
		s, err := Air.NormalShock(c.m1)
		if err != nil {
			t.Fatal(err)
		}
		const tol = 6e-5
		for _, q := range []struct {
			name      string
			got, want float64
		}{
			{"M2", s.M2, c.m2}, {"p2/p1", s.PressureRatio, c.p}, {"rho2/rho1", s.DensityRatio, c.rho},
			{"T2/T1", s.TemperatureRatio, c.T}, {"p02/p01", s.TotalPressureRatio, c.p0},
		} {
			if !near(q.got, q.want, tol) {
				t.Errorf("M1=%g %s = %.6g, NACA 1135 %.5g", c.m1, q.name, q.got, q.want)
			}
		}
	}
	// At M1 = 1 the shock is a Mach wave: no jump (a fact of the relations).
	s, _ := Air.NormalShock(1)
	if !near(s.M2, 1, 1e-12) || !near(s.TotalPressureRatio, 1, 1e-12) {
		t.Errorf("M1=1: %+v", s)
	}
	if _, err := Air.NormalShock(0.8); !errors.Is(err, ErrInput) {
		t.Errorf("subsonic shock accepted: %v", err)
	}
}

func TestPostNormalShockState(t *testing.T) {
	s, err := StateFromMach(Air, 2, 10000, 220)
	if err != nil {
		t.Fatal(err)
	}
	p, err := s.PostNormalShock()
	if err != nil {
		t.Fatal(err)
	}
	// NACA Report 1135 Table II at M1 = 2 (from memory, as above).
	if !near(p.Mach, 0.57735, 6e-5) || !near(p.Pressure, 45000, 6e-5) || !near(p.Temperature, 220*1.6875, 6e-5) {
		t.Errorf("post-shock %+v", p)
	}
	// Total temperature is kept, total pressure drops by p02/p01.
	if !near(p.TotalTemperature, s.TotalTemperature, 1e-12) || !near(p.TotalPressure/s.TotalPressure, 0.72087, 6e-5) {
		t.Errorf("totals %g/%g, %g/%g", p.TotalTemperature, s.TotalTemperature, p.TotalPressure, s.TotalPressure)
	}
	sub, _ := StateFromMach(Air, 0.5, 1e5, 300)
	if _, err := sub.PostNormalShock(); !errors.Is(err, ErrInput) {
		t.Errorf("shock on a subsonic state accepted: %v", err)
	}
}

func TestGasValidate(t *testing.T) {
	for _, g := range []Gas{{Gamma: 1, R: 287}, {Gamma: 0.9, R: 287}, {Gamma: 1.4}, {Gamma: 1.4, R: -1}, {Gamma: math.NaN(), R: 287}, {Gamma: 1.4, R: 287, Sutherland: Sutherland{MuRef: 1e-5, TRef: 0, S: 110}}} {
		err := g.Validate("case.yaml:3:1")
		if !errors.Is(err, ErrInput) {
			t.Errorf("%+v accepted", g)
			continue
		}
		if e := err.Error(); e[:14] != "case.yaml:3:1:" {
			t.Errorf("error does not say where: %s", e)
		}
	}
	if err := Air.Validate(""); err != nil {
		t.Error(err)
	}
}

// TestGasViscosityLaw: a gas's own Sutherland constants give its
// viscosity (μ = μ_ref at T_ref, by the law's form) and so its Reynolds
// number; a gas other than air without constants borrows air's, and says
// so.
func TestGasViscosityLaw(t *testing.T) {
	own := Gas{Gamma: 1.3, R: 290, Sutherland: Sutherland{MuRef: 3e-5, TRef: 300, S: 150}}
	st, err := StateFromMach(own, 0.5, 1e5, 300)
	if err != nil {
		t.Fatal(err)
	}
	if !near(st.Viscosity, 3e-5, 1e-15) {
		t.Errorf("viscosity at T_ref %g, want μ_ref 3e-5", st.Viscosity)
	}
	if want := st.Density * st.Velocity / 3e-5; !near(st.ReynoldsPerMetre, want, 1e-12) {
		t.Errorf("Reynolds per metre %g, want %g", st.ReynoldsPerMetre, want)
	}
	// (T/T_ref)^1.5 (T_ref+S)/(T+S) at T = 2 T_ref, S = T_ref/2: 2^1.5 · 1.5/2.5.
	if got, want := own.Sutherland.Viscosity(600), 3e-5*math.Pow(2, 1.5)*450/750; !near(got, want, 1e-14) {
		t.Errorf("μ(600 K) %g, want %g", got, want)
	}
	borrowed := Gas{Gamma: 1.3, R: 290}
	if !borrowed.BorrowsAirViscosity() || own.BorrowsAirViscosity() || Air.BorrowsAirViscosity() || (Gas{Gamma: 1.4, R: 287.05287}).BorrowsAirViscosity() {
		t.Error("BorrowsAirViscosity is wrong for one of the gases")
	}
	if borrowed.ViscosityLaw() != AirSutherland {
		t.Errorf("a gas without constants uses %v, want air's", borrowed.ViscosityLaw())
	}
}
