package deck

import (
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"cvdeck/export/manifest"
)

// channelCase is a 2 m × 1 m channel, one structured block: an isothermal
// floor at 350 K, a symmetry top, an inflow from total pressure and
// temperature along +x and a back pressure. REFERENCE is replaced by the
// case's reference block (or nothing).
const channelCase = `name: chan
units: m
geometry:
  loops:
    - name: box
      start: [0, 0]
      segments:
        - {name: s, line: [2, 0], tag: bottom, spacing: {count: 21}}
        - {name: e, line: [2, 1], tag: outlet, spacing: {count: 11}}
        - {name: n, line: [0, 1], tag: top, spacing: {count: 21}}
        - {name: w, line: [0, 0], tag: inlet, spacing: {count: 11}}
mesh:
  structured:
    blocks:
      - {name: b, south: s, east: e, north: n, west: w}
REFERENCE
boundaries:
  bottom: {kind: wall-isothermal, temperature: 350}
  top: {kind: symmetry}
  inlet: {kind: inflow-total, total_pressure: 106443, total_temperature: 305.4, direction: [1, 0]}
  outlet: {kind: outflow-pressure, pressure: 100000}
`

// refTool is the path of a Debian reference tool; a missing one skips the
// test on a developer machine and fails it under CI=true.
func refTool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("reference tool %s is missing (install cgns-convert and hdf5-tools): %v", name, err)
		}
		t.Skipf("reference tool %s is missing: %v", name, err)
	}
	return p
}

// runCGNS runs the case text and returns the path of its mesh.cgns, which
// the CGNS library's checker (cgnscheck -w3, Debian cgns-convert) must
// pass without a warning. A failed mesh check still writes the deck, and
// the values in it are the same, so it does not stop the test.
func runCGNS(t *testing.T, name, text string) string {
	t.Helper()
	c, err := Parse(name+".yaml", []byte(text), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "deck")
	var failed *CheckFailure
	if _, err := Run(c, dir, RunOptions{Formats: []string{"cgns"}}); err != nil && !errors.As(err, &failed) {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "mesh.cgns")
	out, err := exec.Command(refTool(t, "cgnscheck"), "-w3", path).CombinedOutput()
	if err != nil || strings.Contains(string(out), "WARNING") || strings.Contains(string(out), "ERROR") || !strings.Contains(string(out), "checking complete") {
		t.Fatalf("cgnscheck %s: %v\n%s", path, err, out)
	}
	return path
}

// nodeData reads the data of the CGNS node at node with h5dump (Debian
// hdf5-tools; the CGNS/HDF5 mapping keeps a node's data in its dataset
// " data") at full precision, as numbers; ok is false when there is no
// such node.
func nodeData(t *testing.T, file, node string) (vals []float64, ok bool) {
	t.Helper()
	out, err := exec.Command(refTool(t, "h5dump"), "-m", "%.17g", "-d", node+"/ data", file).CombinedOutput()
	if err != nil {
		return nil, false
	}
	_, rest, found := strings.Cut(string(out), "DATA {")
	if !found {
		t.Fatalf("h5dump %s: no data in\n%s", node, out)
	}
	rest, _, _ = strings.Cut(rest, "}")
	for _, line := range strings.Split(rest, "\n") {
		_, nums, found := strings.Cut(line, "):")
		if !found {
			continue
		}
		for _, f := range strings.Split(nums, ",") {
			if f = strings.TrimSpace(f); f == "" {
				continue
			}
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				t.Fatalf("h5dump %s: %q: %v", node, f, err)
			}
			vals = append(vals, v)
		}
	}
	return vals, true
}

// nodeValue is the one double of a node's data.
func nodeValue(t *testing.T, file, node string) float64 {
	t.Helper()
	v, ok := nodeData(t, file, node)
	if !ok || len(v) != 1 {
		t.Fatalf("%s: data %v (found %v), want one value", node, v, ok)
	}
	return v[0]
}

// nodeText is a node's character data (stored as bytes).
func nodeText(t *testing.T, file, node string) string {
	t.Helper()
	v, ok := nodeData(t, file, node)
	if !ok {
		return ""
	}
	b := make([]byte, len(v))
	for i, x := range v {
		b[i] = byte(x)
	}
	return string(b)
}

// near reports whether got is want within a relative tolerance.
func near(got, want, rel float64) bool { return math.Abs(got-want) <= rel*math.Abs(want) }

// TestCGNSCarriesBoundaryValues: mesh.cgns holds each condition's values
// as the case file gives them, under the SIDS data-name identifiers, in
// the BCDataSet "Values" of the tag's BC (the channel's wall temperature
// 350 K, the inlet's total pressure 106443 Pa, total temperature 305.4 K
// and direction (1, 0), the back pressure 100000 Pa), read back with
// h5dump. The reference Reynolds number (M 0.3 at 100 kPa, 300 K over 1 m:
// about 7e6) is past transition, so the equations are NSTurbulent, with
// Sutherland's law and ConstantPrandtl 0.72 (air, common practice).
func TestCGNSCarriesBoundaryValues(t *testing.T) {
	path := runCGNS(t, "chan", strings.Replace(channelCase, "REFERENCE", "reference: {mach: 0.3, pressure: 100000, temperature: 300, length: 1, yplus: 1}", 1))
	bcs := "/chan/b/ZoneBC/"
	for _, c := range []struct {
		node string
		want float64
	}{
		{"bottom/Values/DirichletData/Temperature", 350},
		{"inlet/Values/DirichletData/PressureStagnation", 106443},
		{"inlet/Values/DirichletData/TemperatureStagnation", 305.4},
		{"inlet/Values/DirichletData/VelocityUnitVectorX", 1},
		{"inlet/Values/DirichletData/VelocityUnitVectorY", 0},
		{"outlet/Values/DirichletData/Pressure", 100000},
	} {
		if got := nodeValue(t, path, bcs+c.node); got != c.want {
			t.Errorf("%s = %v, want %v", c.node, got, c.want)
		}
	}
	// SIDS dimensional exponents (mass, length, time, temperature, angle).
	if e, _ := nodeData(t, path, bcs+"bottom/Values/DirichletData/Temperature/DimensionalExponents"); len(e) != 5 || e[3] != 1 || e[0]+e[1]+e[2]+e[4] != 0 {
		t.Errorf("wall temperature exponents %v, want 0 0 0 1 0", e)
	}
	if e, _ := nodeData(t, path, bcs+"outlet/Values/DirichletData/Pressure/DimensionalExponents"); len(e) != 5 || e[0] != 1 || e[1] != -1 || e[2] != -2 {
		t.Errorf("back pressure exponents %v, want 1 -1 -2 0 0", e)
	}
	if got := nodeText(t, path, bcs+"inlet/Values/DirichletData/VelocityUnitVectorX/DataClass"); got != "NondimensionalParameter" {
		t.Errorf("direction DataClass %q", got)
	}
	if got := nodeText(t, path, bcs+"inlet/Values"); got != "BCInflowSubsonic" {
		t.Errorf("inlet BCTypeSimple %q, want its BCType BCInflowSubsonic", got)
	}
	if _, ok := nodeData(t, path, bcs+"top/Values"); ok {
		t.Error("the symmetry plane has a data set; it imposes no value")
	}
	es := "/chan/FlowEquationSet/"
	for node, want := range map[string]string{
		"GoverningEquations": "NSTurbulent", "GasModel": "Ideal", "ViscosityModel": "SutherlandLaw",
		"ThermalConductivityModel": "ConstantPrandtl",
	} {
		if got := nodeText(t, path, es+node); got != want {
			t.Errorf("%s %q, want %q", node, got, want)
		}
	}
	if got := nodeValue(t, path, es+"ThermalConductivityModel/Prandtl"); got != 0.72 {
		t.Errorf("Prandtl %v, want 0.72", got)
	}
	// The per-cell metrics carry their units (SIDS DataClass,
	// DimensionalExponents; DimensionalUnits of its own for an array in
	// degrees, where the base's AngleUnits are Radian).
	q := "/chan/b/CellQuality/"
	if e, _ := nodeData(t, path, q+"face_length/DimensionalExponents"); len(e) != 5 || e[1] != 1 || e[0]+e[2]+e[3]+e[4] != 0 {
		t.Errorf("face_length exponents %v, want 0 1 0 0 0", e)
	}
	if e, _ := nodeData(t, path, q+"min_angle/DimensionalExponents"); len(e) != 5 || e[4] != 1 || e[0]+e[1]+e[2]+e[3] != 0 {
		t.Errorf("min_angle exponents %v, want 0 0 0 0 1", e)
	}
	if got := nodeText(t, path, q+"min_angle/DimensionalUnits"); !strings.Contains(got, "Degree") {
		t.Errorf("min_angle DimensionalUnits %q, want AngleUnits Degree", got)
	}
	if got := nodeText(t, path, q+"skewness/DataClass"); got != "NondimensionalParameter" {
		t.Errorf("skewness DataClass %q", got)
	}
}

// TestCGNSGoverningEquations: the no-slip channel is NSLaminar at a
// reference Reynolds number below transition (M 0.3 at 100 kPa, 300 K over
// 1 cm: Re about 7e4 < 5e5) and NSTurbulent above it (over 1 m: about 7e6);
// without a reference block it is NSLaminar and the file still has the flow
// equation set of the gas (air: γ 1.4, R 287.05287 J/(kg K), ISO 2533 from
// memory, and White's Sutherland constants μref 1.716e-5 Pa s, Tref
// 273.15 K, S 110.4 K) and no ReferenceState.
func TestCGNSGoverningEquations(t *testing.T) {
	for length, want := range map[string]string{"0.01": "NSLaminar", "1": "NSTurbulent"} {
		path := runCGNS(t, "chan", strings.Replace(channelCase, "REFERENCE", "reference: {mach: 0.3, pressure: 100000, temperature: 300, length: "+length+"}", 1))
		if got := nodeText(t, path, "/chan/FlowEquationSet/GoverningEquations"); got != want {
			t.Errorf("reference length %s m: %q, want %s", length, got, want)
		}
	}
	noref := runCGNS(t, "chan", strings.Replace(channelCase, "REFERENCE", "", 1))
	es := "/chan/FlowEquationSet/"
	if got := nodeText(t, noref, es+"GoverningEquations"); got != "NSLaminar" {
		t.Errorf("without a reference: %q, want NSLaminar", got)
	}
	for node, want := range map[string]float64{
		"GasModel/SpecificHeatRatio": 1.4, "GasModel/IdealGasConstant": 287.05287,
		"ViscosityModel/ViscosityMolecularReference": 1.716e-5, "ViscosityModel/TemperatureReference": 273.15,
		"ViscosityModel/SutherlandLawConstant": 110.4, "ThermalConductivityModel/Prandtl": 0.72,
	} {
		if got := nodeValue(t, noref, es+node); got != want {
			t.Errorf("without a reference: %s = %v, want %v", node, got, want)
		}
	}
	if _, ok := nodeData(t, noref, "/chan/ReferenceState/Mach"); ok {
		t.Error("without a reference the file has a ReferenceState")
	}
	if got := nodeValue(t, noref, "/chan/b/ZoneBC/bottom/Values/DirichletData/Temperature"); got != 350 {
		t.Errorf("without a reference the wall temperature is %v, want 350", got)
	}
}

// TestStatedRegime: reference.regime overrides the Reynolds-number rule
// both ways (turbulent at Re about 7e4, laminar at about 7e6), in the CGNS
// file and in deck.yaml, whose conditions.equations give the name and its
// basis; without it deck.yaml gives the Reynolds number behind the choice.
// A regime in a case without a no-slip wall is refused at its key.
func TestStatedRegime(t *testing.T) {
	for _, c := range []struct{ length, regime, want, basis string }{
		{"0.01", "turbulent", "NSTurbulent", "regime: turbulent in the case"},
		{"1", "laminar", "NSLaminar", "regime: laminar in the case"},
		// ρ = p/(R T) = 1.1613 kg/m³, V = 0.3 √(γ R T) = 104.2 m/s, μ by
		// Sutherland's law 1.8459e-5 Pa s, so Re over 1 m is 6.55e6 (worked
		// by hand with the constants above).
		{"1", "", "NSTurbulent", "reference Reynolds number 6.55e+06 at the reference length reaches 5e+05"},
	} {
		ref := "reference: {mach: 0.3, pressure: 100000, temperature: 300, length: " + c.length
		if c.regime != "" {
			ref += ", regime: " + c.regime
		}
		path := runCGNS(t, "chan", strings.Replace(channelCase, "REFERENCE", ref+"}", 1))
		if got := nodeText(t, path, "/chan/FlowEquationSet/GoverningEquations"); got != c.want {
			t.Errorf("length %s, regime %q: CGNS %q, want %s", c.length, c.regime, got, c.want)
		}
		man, err := manifest.Read(filepath.Dir(path))
		if err != nil {
			t.Fatal(err)
		}
		if eq := man.Conditions.Equations; eq == nil || eq.Name != c.want || !strings.HasPrefix(eq.Basis, c.basis) {
			t.Errorf("length %s, regime %q: deck.yaml equations %+v, want %s on %q", c.length, c.regime, eq, c.want, c.basis)
		}
	}
	inviscid := strings.ReplaceAll(strings.Replace(channelCase, "REFERENCE", "reference: {mach: 0.3, pressure: 100000, temperature: 300, regime: turbulent}", 1), "{kind: wall-isothermal, temperature: 350}", "{kind: wall-slip}")
	_, err := Parse("chan.yaml", []byte(inviscid), LoadOptions{})
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "regime turbulent applies to the boundary layers of no-slip walls") {
		t.Errorf("a regime without no-slip walls: got %v", err)
	}
}

// TestCGNSUnstructuredValues: an unstructured case (a cylinder in a box,
// quadrilateral layers on it sized by y+ 30) writes the velocity inflow's
// VelocityX, VelocityY and Temperature, the isothermal body's 400 K and the
// farfield's full free-stream state at the reference angle of 10°: M 0.2,
// p 100000 Pa, T 300 K, ρ = p/(R T), V = M √(γ R T) (ideal gas, air's
// γ 1.4 and R 287.05287 J/(kg K)). Its reference Reynolds number, past
// transition, makes it NSTurbulent.
func TestCGNSUnstructuredValues(t *testing.T) {
	text := `name: cyl
units: m
geometry:
  loops:
    - name: box
      start: [0, 0]
      segments:
        - {line: [2, 0], tag: lower, spacing: {count: 21}}
        - {line: [2, 1], tag: outlet, spacing: {count: 11}}
        - {line: [0, 1], tag: upper, spacing: {count: 21}}
        - {line: [0, 0], tag: inlet, spacing: {count: 11}}
    - name: body
      tag: body
      circle: {centre: [0.7, 0.5], radius: 0.15}
      spacing: {count: 32}
mesh:
  unstructured:
    layers:
      - {tags: [body], yplus: 30, growth: 1.3, count: 3}
reference: {mach: 0.2, pressure: 100000, temperature: 300, length: 0.3, angle: 10}
boundaries:
  body: {kind: wall-isothermal, temperature: 400}
  upper: {kind: farfield}
  lower: {kind: farfield}
  inlet: {kind: inflow-velocity, velocity: [68.45, 12.07], temperature: 300}
  outlet: {kind: outflow-pressure, pressure: 100000}
`
	path := runCGNS(t, "cyl", text)
	z := "/cyl/Mesh/ZoneBC/"
	gamma, r := 1.4, 287.05287
	v := 0.2 * math.Sqrt(gamma*r*300)
	alpha := 10 * math.Pi / 180
	for _, c := range []struct {
		node string
		want float64
	}{
		{"body/Values/DirichletData/Temperature", 400},
		{"inlet/Values/DirichletData/VelocityX", 68.45},
		{"inlet/Values/DirichletData/VelocityY", 12.07},
		{"inlet/Values/DirichletData/Temperature", 300},
		{"outlet/Values/DirichletData/Pressure", 100000},
		{"upper/Values/DirichletData/Mach", 0.2},
		{"upper/Values/DirichletData/Pressure", 100000},
		{"upper/Values/DirichletData/Temperature", 300},
		{"lower/Values/DirichletData/Density", 100000 / (r * 300)},
		{"lower/Values/DirichletData/VelocityX", v * math.Cos(alpha)},
		{"lower/Values/DirichletData/VelocityY", v * math.Sin(alpha)},
	} {
		if got := nodeValue(t, path, z+c.node); !near(got, c.want, 1e-12) {
			t.Errorf("%s = %.17g, want %.17g", c.node, got, c.want)
		}
	}
	if got := nodeText(t, path, "/cyl/FlowEquationSet/GoverningEquations"); got != "NSTurbulent" {
		t.Errorf("GoverningEquations %q, want NSTurbulent", got)
	}
}

// TestCGNSSupersonicInflow: an inviscid channel with a supersonic inflow
// and no reference block is Euler, and its inflow carries the full state:
// M 2, p 50000 Pa, T 250 K, ρ = p/(R T), V = M √(γ R T) along +x.
func TestCGNSSupersonicInflow(t *testing.T) {
	text := strings.NewReplacer(
		"REFERENCE\n", "",
		"{kind: wall-isothermal, temperature: 350}", "{kind: wall-slip}",
		"{kind: inflow-total, total_pressure: 106443, total_temperature: 305.4, direction: [1, 0]}", "{kind: inflow-supersonic, mach: 2, pressure: 50000, temperature: 250, direction: [1, 0]}",
		"{kind: outflow-pressure, pressure: 100000}", "{kind: outflow-supersonic}",
	).Replace(channelCase)
	path := runCGNS(t, "chan", text)
	gamma, r := 1.4, 287.05287
	d := "/chan/b/ZoneBC/inlet/Values/DirichletData/"
	for _, c := range []struct {
		node string
		want float64
	}{
		{"Mach", 2}, {"Pressure", 50000}, {"Temperature", 250}, {"Density", 50000 / (r * 250)},
		{"VelocityX", 2 * math.Sqrt(gamma*r*250)}, {"VelocityY", 0},
	} {
		if got := nodeValue(t, path, d+c.node); !near(got, c.want, 1e-12) {
			t.Errorf("%s = %.17g, want %.17g", c.node, got, c.want)
		}
	}
	if got := nodeText(t, path, "/chan/FlowEquationSet/GoverningEquations"); got != "Euler" {
		t.Errorf("GoverningEquations %q, want Euler", got)
	}
	if _, ok := nodeData(t, path, "/chan/FlowEquationSet/ViscosityModel"); ok {
		t.Error("an inviscid deck has a ViscosityModel")
	}
	if _, ok := nodeData(t, path, "/chan/b/ZoneBC/outlet/Values"); ok {
		t.Error("the supersonic outflow has a data set; it imposes no value")
	}
}
