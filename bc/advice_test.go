package bc

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"os/exec"
	"strings"
	"testing"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

// A worked example derived step by step from Schlichting's correlation as
// stated in FirstCellHeight's doc, in its low-Mach limit (derived here, not
// taken from a book): sea-level air of the U.S. Standard Atmosphere 1976
// (p = 101 325 Pa, T = 288.15 K) at V = 0.05 m/s (M = 1.5e-4), x = 1000 m,
// y+ = 1, with free-stream properties, as the reference-temperature
// estimate becomes when M → 0 (T_aw/T_e − 1 and T*/T_e − 1 are below 1e-8
// here).
//
//	ρ   = 101325 / (287.05287 · 288.15)                = 1.22500 kg/m³
//	μ   = 1.716e-5 (288.15/273.15)^1.5 · 383.55/398.55 = 1.78930e-5 Pa·s
//	Re_x = 1.225 · 0.05 · 1000 / 1.78930e-5            = 3.42313e6
//	C_f = [2 log10(3.42313e6) − 0.65]^−2.3 = [12.4188]^−2.3 = 3.04518e-3
//	τ_w = ½ · 3.04518e-3 · 1.225 · 0.05²               = 4.66293e-6 Pa
//	u_τ = √(4.66293e-6 / 1.225)                        = 1.95102e-3 m/s
//	y   = 1 · 1.78930e-5 / (1.225 · 1.95102e-3)        = 7.48661e-3 m
func TestFirstCellHeightWorkedExample(t *testing.T) {
	s, err := StateFromVelocity(Air, 0.05, 101325/(287.05287*288.15), 288.15)
	if err != nil {
		t.Fatal(err)
	}
	w, err := FirstCellHeight(s, 1000, 1)
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
		{"tau_w", w.WallShear, 4.66293e-6},
		{"u_tau", w.FrictionVelocity, 1.95102e-3},
		{"y", w.Height, 7.48661e-3},
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
	w30, _ := FirstCellHeight(s, 1000, 30)
	if !near(w30.Height, 30*w.Height, 1e-12) {
		t.Errorf("y(30) = %g, 30 y(1) = %g", w30.Height, 30*w.Height)
	}
	// Re_x = 3.4e6 lies between transition and the correlation's top.
	if len(w.Notes) != 0 {
		t.Errorf("notes %q for a turbulent station within the correlation's range", w.Notes)
	}
	still, _ := StateFromMach(Air, 0, 1e5, 300)
	for name, err := range map[string]error{
		"negative y+": second(FirstCellHeight(s, 1, -1)),
		"zero length": second(FirstCellHeight(s, 0, 1)),
		"still air":   second(FirstCellHeight(still, 1, 1)),
		"Re_x of 2":   second(FirstCellHeight(s, 1e-3, 1)),
	} {
		if !errors.Is(err, ErrInput) {
			t.Errorf("%s accepted: %v", name, err)
		}
	}
}

// incompressibleHeight is the flat-plate estimate with free-stream
// properties throughout (Schlichting's correlation at the free stream's
// Re_x, u_τ = V √(C_f/2), y = y+ ν/u_τ), written out here as the limit
// FirstCellHeight must reach as M → 0.
func incompressibleHeight(s State, x, yplus float64) float64 {
	cf := math.Pow(2*math.Log10(s.ReynoldsPerMetre*x)-0.65, -2.3)
	return yplus * s.Viscosity / (s.Density * s.Velocity * math.Sqrt(cf/2))
}

// As M → 0 the compressible estimate tends to the incompressible one, and
// the gap closes as M² (T_aw/T_e − 1 and T*/T_e − 1 are both in M_e², by
// their formulas): at a fixed Re_x of 1e7, halving M from 0.02 to 0.01
// quarters the gap (to 1 %, the next term being of order M⁴), and at
// M = 1e-4 the two agree to 1e-8.
func TestFirstCellHeightLowMachLimit(t *testing.T) {
	gap := func(mach float64) float64 {
		s, err := StateFromMach(Air, mach, 101325, 288.15)
		if err != nil {
			t.Fatal(err)
		}
		x := 1e7 / s.ReynoldsPerMetre
		w, err := FirstCellHeight(s, x, 1)
		if err != nil {
			t.Fatal(err)
		}
		return w.Height/incompressibleHeight(s, x, 1) - 1
	}
	if g := gap(1e-4); math.Abs(g) > 1e-8 {
		t.Errorf("M = 1e-4: compressible over incompressible height − 1 = %g, want below 1e-8", g)
	}
	g1, g2 := gap(0.01), gap(0.02)
	if !(g1 > 0) || !near(g2/g1, 4, 0.01) {
		t.Errorf("gap %g at M 0.01 and %g at M 0.02: ratio %g, want 4 (M²)", g1, g2, g2/g1)
	}
}

// python is the Debian interpreter, for the independent worked cases.
const python = "/usr/bin/python3"

// yplusScript computes the reference-temperature first-cell height on its
// own, from p, T, V, x, y+ and the gas constants, with the formulas of
// Eckert 1955 and Schlichting as cited in FirstCellHeight's doc and
// Sutherland's law with White's constants for air (from memory), written
// again in Python without reading cvdeck's code, and prints one JSON list.
const yplusScript = `
import json, math, sys
GAMMA, R, PR = 1.4, 287.05287, 0.72
def mu(T):
    return 1.716e-5 * (T / 273.15) ** 1.5 * (273.15 + 110.4) / (T + 110.4)
out = []
for p, T, V, x, yp in json.loads(sys.argv[1]):
    a = math.sqrt(GAMMA * R * T)
    M = V / a
    Taw = T * (1 + PR ** (1 / 3) * (GAMMA - 1) / 2 * M * M)
    Ts = T * (1 + 0.032 * M * M + 0.58 * (Taw / T - 1))
    rs = p / (R * Ts)
    Res = rs * V * x / mu(Ts)
    cfs = (2 * math.log10(Res) - 0.65) ** -2.3
    tau = 0.5 * cfs * rs * V * V
    rw = p / (R * Taw)
    ut = math.sqrt(tau / rw)
    out.append({"y": yp * mu(Taw) / (rw * ut), "cf": tau / (0.5 * p / (R * T) * V * V),
                "taw": Taw, "ts": Ts, "res": Res})
print(json.dumps(out))
`

// The estimate against the same method computed independently by
// yplusScript: the U.S. Standard Atmosphere 1976 at 30 km geometric from
// M 0.3 to 8 (L = 1 m, y+ = 1, the tester's cases), and sea level at
// M 0.5, x = 0.5 m, y+ = 30. Both compute in double precision; the
// tolerance 1e-10 allows for the order of the operations.
func TestFirstCellHeightAgainstPython(t *testing.T) {
	if _, err := os.Stat(python); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is missing: %v", python, err)
		}
		t.Skipf("%s is missing: %v", python, err)
	}
	type station struct {
		s        State
		x, yplus float64
	}
	var cases []station
	for _, m := range []float64{0.3, 0.8, 2, 5, 8} {
		s, err := StateFromAltitude(Air, Altitude{30000, Geometric}, m)
		if err != nil {
			t.Fatal(err)
		}
		cases = append(cases, station{s, 1, 1})
	}
	sea, _ := StateFromAltitude(Air, Altitude{}, 0.5)
	cases = append(cases, station{sea, 0.5, 30})
	var in [][5]float64
	for _, c := range cases {
		in = append(in, [5]float64{c.s.Pressure, c.s.Temperature, c.s.Velocity, c.x, c.yplus})
	}
	arg, _ := json.Marshal(in)
	out, err := exec.Command(python, "-c", yplusScript, string(arg)).Output()
	if err != nil {
		t.Fatalf("%s: %v", python, err)
	}
	var want []struct{ Y, Cf, Taw, Ts, Res float64 }
	if err := json.Unmarshal(out, &want); err != nil || len(want) != len(cases) {
		t.Fatalf("python output %s: %v", out, err)
	}
	for i, c := range cases {
		w, err := FirstCellHeight(c.s, c.x, c.yplus)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []struct {
			name      string
			got, want float64
		}{
			{"y", w.Height, want[i].Y}, {"C_f", w.SkinFriction, want[i].Cf}, {"T_aw", w.WallTemperature, want[i].Taw},
			{"T*", w.ReferenceTemperature, want[i].Ts}, {"Re*_x", w.ReferenceReynoldsX, want[i].Res},
		} {
			if !near(q.got, q.want, 1e-10) {
				t.Errorf("M %.3g x %g: %s = %.12g, python %.12g", c.s.Mach, c.x, q.name, q.got, q.want)
			}
		}
	}
}

// The notes name the stretched cases: a laminar station (Re_x below 5e5,
// common practice), Re*_x past Schlichting's 1e9, a gas other than air
// from M 0.3, a wall hotter than the 1900 K top of air's Sutherland range
// (at M 8 and 30 km, T_aw = T_e (1 + 0.72^(1/3) · 0.2 · 64) = 2825 K);
// sea level at M 0.5, x = 1 m (Re_x = 1.2e7) has none.
func TestFirstCellHeightNotes(t *testing.T) {
	sea, _ := StateFromAltitude(Air, Altitude{}, 0.5)
	high, _ := StateFromAltitude(Air, Altitude{30000, Geometric}, 8)
	helium, _ := StateFromMach(Gas{Gamma: 5.0 / 3, R: 2077.1}, 2, 1e5, 300)
	for _, c := range []struct {
		name  string
		s     State
		x     float64
		wants []string
	}{
		{"sea level", sea, 1, nil},
		{"laminar", sea, 0.01, []string{"below about 500000", "laminar"}},
		{"long plate", sea, 1000, []string{"above 1e+09", "extrapolated"}},
		{"helium", helium, 1, []string{"fitted for air", "gamma 1.667"}},
		{"Mach 8", high, 1, []string{"adiabatic wall temperature, 2825 K", "above 1900 K"}},
	} {
		w, err := FirstCellHeight(c.s, c.x, 1)
		if err != nil {
			t.Fatal(err)
		}
		all := strings.Join(w.Notes, "\n")
		if (len(c.wants) == 0) != (len(w.Notes) == 0) {
			t.Errorf("%s: notes %q", c.name, w.Notes)
		}
		for _, want := range c.wants {
			if !strings.Contains(all, want) {
				t.Errorf("%s: no %q in the notes %q", c.name, want, w.Notes)
			}
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
