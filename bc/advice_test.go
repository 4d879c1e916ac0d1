package bc

import (
	"errors"
	"math"
	"testing"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

// A worked example derived step by step from Schlichting's correlation as
// stated in FirstCellHeight's doc (derived here, not taken from a book):
// sea-level air of the U.S. Standard Atmosphere 1976 (p = 101 325 Pa,
// T = 288.15 K) at V = 50 m/s, x = 1 m, y+ = 1.
//
//	ρ   = 101325 / (287.05287 · 288.15)                = 1.22500 kg/m³
//	μ   = 1.716e-5 (288.15/273.15)^1.5 · 383.55/398.55 = 1.78930e-5 Pa·s
//	Re_x = 1.225 · 50 · 1 / 1.78930e-5                 = 3.42313e6
//	C_f = [2 log10(3.42313e6) − 0.65]^−2.3 = [12.4188]^−2.3 = 3.04518e-3
//	τ_w = ½ · 3.04518e-3 · 1.225 · 50²                 = 4.66293 Pa
//	u_τ = √(4.66293 / 1.225)                           = 1.95102 m/s
//	y   = 1 · 1.78930e-5 / (1.225 · 1.95102)           = 7.48661e-6 m
func TestFirstCellHeightWorkedExample(t *testing.T) {
	s, err := StateFromVelocity(Air, 50, 101325/(287.05287*288.15), 288.15)
	if err != nil {
		t.Fatal(err)
	}
	w, err := FirstCellHeight(s, 1, 1)
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-5
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"mu", s.Viscosity, 1.78930e-5},
		{"Re_x", w.ReynoldsX, 3.42313e6},
		{"C_f", w.SkinFriction, 3.04518e-3},
		{"tau_w", w.WallShear, 4.66293},
		{"u_tau", w.FrictionVelocity, 1.95102},
		{"y", w.Height, 7.48661e-6},
	} {
		if !near(c.got, c.want, tol) {
			t.Errorf("%s = %.6g, worked example %.6g", c.name, c.got, c.want)
		}
	}
	// The 1/7-power law C_f = 0.026 Re_x^(−1/7) (F. M. White, Fluid
	// Mechanics; from memory) agrees within a few per cent at this Re_x.
	if cf := 0.026 * math.Pow(w.ReynoldsX, -1.0/7); !near(w.SkinFriction, cf, 0.05) {
		t.Errorf("C_f %g vs power law %g", w.SkinFriction, cf)
	}
	// y scales linearly with y+ (a fact of the formula).
	w30, _ := FirstCellHeight(s, 1, 30)
	if !near(w30.Height, 30*w.Height, 1e-12) {
		t.Errorf("y(30) = %g, 30 y(1) = %g", w30.Height, 30*w.Height)
	}
	still, _ := StateFromMach(Air, 0, 1e5, 300)
	for name, err := range map[string]error{
		"negative y+": second(FirstCellHeight(s, 1, -1)),
		"zero length": second(FirstCellHeight(s, 0, 1)),
		"still air":   second(FirstCellHeight(still, 1, 1)),
	} {
		if !errors.Is(err, ErrInput) {
			t.Errorf("%s accepted: %v", name, err)
		}
	}
}

func second[T any](_ T, err error) error { return err }

// On a uniform grid of square cells h × h, every interior cell has two faces
// with |u·n| = |u| and two with 0 for a flow along x, so the spectral-radius
// form gives Δt = CFL h² / (2(|u| + c)h + 2 c h) = CFL h / (2(|u| + 2c))
// (derived from the formula in MaxTimeStep's doc).
func TestMaxTimeStepUniformGrid(t *testing.T) {
	m := channel(t, 8, 4, 2, 1, 0, [4]string{"s", "e", "n", "w"})
	h := 0.25
	ts, err := MaxTimeStep(m, orb.Point{100, 0}, 340, 0.8)
	if err != nil {
		t.Fatal(err)
	}
	if want := 0.8 * h / (2 * (100 + 2*340)); !near(ts.Dt, want, 1e-12) {
		t.Errorf("dt = %g, want %g", ts.Dt, want)
	}
	// All cells tie; the first is reported.
	if ts.Cell != 0 {
		t.Errorf("limiting cell %d", ts.Cell)
	}
	// A finer column of cells limits the step: stretch the grid's last
	// column of nodes so the cells beside the east side are thinnest.
	for i := range m.Nodes {
		if m.Nodes[i][0] > 1.99 {
			m.Nodes[i][0] = 1.76
		}
	}
	m.Geo = mesh.ComputeGeometry(m)
	ts, err = MaxTimeStep(m, orb.Point{100, 0}, 340, 0.8)
	if err != nil {
		t.Fatal(err)
	}
	if c := m.Geo.CellCentroid[ts.Cell]; c[0] < 1.7 {
		t.Errorf("limiting cell %d at %v, want one in the thin east column", ts.Cell, c)
	}
	if _, err := MaxTimeStep(m, orb.Point{100, 0}, 340, 0); !errors.Is(err, ErrInput) {
		t.Errorf("CFL 0 accepted: %v", err)
	}
}
