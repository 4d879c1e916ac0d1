package cgns

import (
	"fmt"
	"math"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// readBack is what libraryReader's lines say of a file.
type readBack struct {
	equations string            // GoverningEquations, "none" without a FlowEquationSet
	models    map[string]string // model label → type
	params    map[string]arrayLine
	reference map[string]arrayLine // nil without a ReferenceState
	bcs       []bcLine
}

// arrayLine is one DataArray_t: its value, own DataClass ("-" for none)
// and DimensionalExponents (nil for none).
type arrayLine struct {
	value float64
	class string
	exp   []float64
}

// bcLine is one BC_t with its data sets.
type bcLine struct {
	zone, name, typ, family string
	sets                    []setLine
}

type setLine struct {
	name, typ          string
	dirichlet, neumann bool
	values             map[string]arrayLine
	order              []string
}

func parseArray(t *testing.T, f []string) arrayLine {
	t.Helper()
	v, err := strconv.ParseFloat(f[0], 64)
	if err != nil {
		t.Fatalf("value %q: %v", f[0], err)
	}
	a := arrayLine{value: v, class: f[1]}
	for _, e := range f[2:] {
		x, err := strconv.ParseFloat(e, 64)
		if err != nil {
			t.Fatalf("exponent %q: %v", e, err)
		}
		a.exp = append(a.exp, x)
	}
	return a
}

func parseReadBack(t *testing.T, lines []string) readBack {
	t.Helper()
	rb := readBack{models: map[string]string{}, params: map[string]arrayLine{}}
	for _, line := range lines {
		f := strings.Fields(line)
		switch {
		case f[0] == "dimension":
		case f[0] == "equations":
			rb.equations = f[1]
		case f[0] == "model":
			rb.models[f[1]] = f[2]
		case f[0] == "param":
			rb.params[f[1]+"/"+f[2]] = parseArray(t, f[3:])
		case f[0] == "reference" && f[1] == "none":
		case f[0] == "reference":
			if rb.reference == nil {
				rb.reference = map[string]arrayLine{}
			}
			rb.reference[f[2]] = parseArray(t, f[3:])
		case f[0] == "bc":
			rb.bcs = append(rb.bcs, bcLine{zone: f[1], name: f[2], typ: f[3], family: f[4]})
		case f[0] == "set":
			b := &rb.bcs[len(rb.bcs)-1]
			b.sets = append(b.sets, setLine{name: f[3], typ: f[4], dirichlet: f[5] == "1", neumann: f[6] == "1", values: map[string]arrayLine{}})
		case f[0] == "value":
			b := &rb.bcs[len(rb.bcs)-1]
			s := &b.sets[len(b.sets)-1]
			s.values[f[3]] = parseArray(t, f[4:])
			s.order = append(s.order, f[3])
		default:
			t.Fatalf("unexpected reader line %q", line)
		}
	}
	return rb
}

// cgnsnamesDims runs the CGNS library's cgnsnames (Debian cgns-convert),
// which lists the SIDS data-name identifiers with their dimensions
// ("M / LT^2": M mass, L length, T time, @ temperature, a angle), and
// returns the exponents (mass, length, time, temperature, angle) of the
// names asked for.
func cgnsnamesDims(t *testing.T, names []string) map[string][5]float64 {
	t.Helper()
	out, err := exec.Command(tool(t, "cgnsnames")).CombinedOutput()
	if err != nil {
		t.Fatalf("cgnsnames: %v\n%s", err, out)
	}
	want := map[string]bool{}
	for _, n := range names {
		want[n] = true
	}
	dims := map[string][5]float64{}
	for _, line := range strings.Split(string(out), "\n") {
		f := strings.Fields(line)
		if len(f) == 0 || !want[f[0]] {
			continue
		}
		var e [5]float64
		sign := 1.0
		for _, part := range f[1:] {
			if part == "/" {
				sign = -1
				continue
			}
			for i := 0; i < len(part); {
				k := strings.IndexByte("MLT@a", part[i])
				if k < 0 {
					t.Fatalf("cgnsnames %q: unknown dimension symbol %q", line, part[i])
				}
				i++
				p := 1.0
				if i < len(part) && part[i] == '^' {
					j := i + 1
					for j < len(part) && part[j] >= '0' && part[j] <= '9' {
						j++
					}
					p, _ = strconv.ParseFloat(part[i+1:j], 64)
					i = j
				}
				e[k] += sign * p
			}
		}
		dims[f[0]] = e
	}
	return dims
}

// TestBCDataNamesMatchCgnsnames: every name a BC value may take is a SIDS
// data-name identifier the CGNS library's cgnsnames lists, with the
// dimensions the writer gives it (none for a NondimensionalParameter).
func TestBCDataNamesMatchCgnsnames(t *testing.T) {
	names := BCDataNames()
	dims := cgnsnamesDims(t, names)
	for _, n := range names {
		d, ok := dims[n]
		if !ok {
			t.Errorf("%s is not among cgnsnames' data-name identifiers", n)
			continue
		}
		q, _ := bcDataName(n)
		if q.dimensionless != (d == [5]float64{}) || !q.dimensionless && q.exp != d {
			t.Errorf("%s: writer exponents %v (dimensionless %v), cgnsnames %v", n, q.exp, q.dimensionless, d)
		}
	}
}

// bcValuesDeck is testDeck with the values a solver needs on each tag: an
// isothermal wall at 350 K, a back pressure of 95 kPa and the far field at
// the deck's free stream (air at sea level, U.S. Standard Atmosphere 1976,
// from memory, Mach 0.5 at 2° incidence).
func bcValuesDeck(d *Deck) *Deck {
	d.BCs[0].BCType = "BCWallViscousIsothermal"
	f := d.Flow
	d.BCData = []BCData{
		{Tag: "wall", Values: []BCValue{{"Temperature", 350}}},
		{Tag: "outlet", Values: []BCValue{{"Pressure", 95000}}},
		{Tag: "farfield", Values: []BCValue{
			{"Mach", f.Mach}, {"Pressure", f.Pressure}, {"Temperature", f.Temperature},
			{"Density", f.Density}, {"VelocityX", f.Velocity[0]}, {"VelocityY", f.Velocity[1]},
		}},
	}
	return d
}

// TestBCDataReadBack writes decks with BC values, unstructured and
// structured (two blocks, whose tags are split over both zones, and a
// C-grid whose outlet is two BCs of one block), checks them with
// cgnscheck (no warning) and reads them back with the CGNS library's own
// calls: every BC_t of a tag with values has one BCDataSet_t of its
// BCType with DirichletData only, holding exactly the values given, in
// order, each with the DataClass or DimensionalExponents cgnsnames gives
// its name; BCs of tags without values have no data set.
func TestBCDataReadBack(t *testing.T) {
	read := libraryReader(t)
	dims := cgnsnamesDims(t, BCDataNames())
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		deck *Deck
	}{
		{"quad", testDeck(quadMesh(t, 8, 4))},
		{"mixed", testDeck(mixedMesh(t, 8, 5))},
		{"twoblock", testDeck(splitRectangle(t, 8, 4, true))},
		{"cgrid", testDeck(cgridMesh(t, 6, 3, 2))},
	} {
		t.Run(c.name, func(t *testing.T) {
			d := bcValuesDeck(c.deck)
			d.BCData = d.BCData[:2] // the farfield keeps none here, to see a BC without data
			path := filepath.Join(dir, c.name+".cgns")
			if _, err := Write(path, d); err != nil {
				t.Fatal(err)
			}
			cgnscheck(t, path)
			rb := parseReadBack(t, read(path))
			given := map[string][]BCValue{}
			for _, bd := range d.BCData {
				given[bd.Tag] = bd.Values
			}
			perTag := map[string]int{}
			for _, b := range rb.bcs {
				perTag[b.family]++
				vals, ok := given[b.family]
				if !ok {
					if len(b.sets) != 0 {
						t.Errorf("%s/%s (%s) has %d data sets; it was given no values", b.zone, b.name, b.family, len(b.sets))
					}
					continue
				}
				if len(b.sets) != 1 {
					t.Errorf("%s/%s has %d data sets, want 1", b.zone, b.name, len(b.sets))
					continue
				}
				s := b.sets[0]
				if s.name != "Values" || s.typ != b.typ || !s.dirichlet || s.neumann {
					t.Errorf("%s/%s data set %+v; want Values, BCTypeSimple %s, Dirichlet only", b.zone, b.name, s, b.typ)
				}
				if len(s.order) != len(vals) {
					t.Errorf("%s/%s holds %v, want %d values", b.zone, b.name, s.order, len(vals))
				}
				for i, v := range vals {
					got, ok := s.values[v.Name]
					if !ok || i >= len(s.order) || s.order[i] != v.Name {
						t.Errorf("%s/%s: value %d is %v, want %s", b.zone, b.name, i, s.order, v.Name)
						continue
					}
					if got.value != v.Value {
						t.Errorf("%s/%s %s = %.17g, want %.17g", b.zone, b.name, v.Name, got.value, v.Value)
					}
					checkClass(t, b.name+"/"+v.Name, got, dims[v.Name])
				}
			}
			for _, tag := range []string{"wall", "outlet"} {
				if perTag[tag] == 0 {
					t.Errorf("no BC of tag %s read back", tag)
				}
			}
			if c.name == "cgrid" && perTag["outlet"] != 2 {
				t.Errorf("the C-grid's outlet has %d BCs, want its 2 runs, each with the values", perTag["outlet"])
			}
		})
	}
}

// checkClass compares an array's DataClass and exponents with cgnsnames'
// dimensions: dimensionless values are NondimensionalParameter with no
// exponents, dimensional ones inherit the base's class and carry their
// exponents.
func checkClass(t *testing.T, what string, a arrayLine, want [5]float64) {
	t.Helper()
	if want == ([5]float64{}) {
		if a.class != "NondimensionalParameter" || a.exp != nil {
			t.Errorf("%s: DataClass %s, exponents %v; want NondimensionalParameter", what, a.class, a.exp)
		}
		return
	}
	if a.class != "-" || fmt.Sprint(a.exp) != fmt.Sprint(want[:]) {
		t.Errorf("%s: DataClass %s, exponents %v; want the base's class and %v", what, a.class, a.exp, want)
	}
}

// TestBCDataFullState: a far field with the free stream's full state and
// an inflow with total pressure, total temperature and a direction read
// back with the library as given; the direction's two unit-vector
// components are NondimensionalParameter.
func TestBCDataFullState(t *testing.T) {
	read := libraryReader(t)
	d := bcValuesDeck(testDeck(quadMesh(t, 8, 4)))
	d.BCs[1].BCType = "BCInflowSubsonic"
	// Total state of the free stream (NACA Report 1135 isentropic
	// relations at M = 0.5, γ = 1.4: p/p0 = 0.8430, T/T0 = 0.9524).
	d.BCData[1].Values = []BCValue{
		{"PressureStagnation", 101325 / 0.8430}, {"TemperatureStagnation", 288.15 / 0.9524},
		{"VelocityUnitVectorX", math.Cos(2 * math.Pi / 180)}, {"VelocityUnitVectorY", math.Sin(2 * math.Pi / 180)},
	}
	path := filepath.Join(t.TempDir(), "state.cgns")
	if _, err := Write(path, d); err != nil {
		t.Fatal(err)
	}
	cgnscheck(t, path)
	rb := parseReadBack(t, read(path))
	dims := cgnsnamesDims(t, BCDataNames())
	seen := 0
	for _, b := range rb.bcs {
		for _, bd := range d.BCData {
			if bd.Tag != b.family {
				continue
			}
			seen++
			for _, v := range bd.Values {
				got := b.sets[0].values[v.Name]
				if got.value != v.Value {
					t.Errorf("%s %s = %.17g, want %.17g", b.name, v.Name, got.value, v.Value)
				}
				checkClass(t, b.name+"/"+v.Name, got, dims[v.Name])
			}
		}
	}
	if seen != 3 {
		t.Errorf("%d BCs with values read back, want 3", seen)
	}
}

// TestFlowEquationSet reads back the equation set the library sees for
// each kind of flow: Euler with the gas alone; NSLaminar and NSTurbulent
// with Sutherland's law and a constant Prandtl number; and, with no free
// stream, the equation set without a ReferenceState. Every file passes
// cgnscheck.
func TestFlowEquationSet(t *testing.T) {
	read := libraryReader(t)
	dir := t.TempDir()
	for _, c := range []struct {
		name      string
		edit      func(f *FlowState)
		equations string
		models    []string
		reference bool
	}{
		{"euler", func(f *FlowState) { f.Viscous, f.Sutherland, f.Prandtl = false, nil, 0 }, "Euler", []string{"GasModel Ideal"}, true},
		{"laminar", func(f *FlowState) {}, "NSLaminar", []string{"GasModel Ideal", "ViscosityModel SutherlandLaw", "ThermalConductivityModel ConstantPrandtl"}, true},
		{"turbulent", func(f *FlowState) { f.Turbulent = true }, "NSTurbulent", []string{"GasModel Ideal", "ViscosityModel SutherlandLaw", "ThermalConductivityModel ConstantPrandtl"}, true},
		{"constant-viscosity", func(f *FlowState) { f.Sutherland = nil }, "NSLaminar", []string{"GasModel Ideal", "ViscosityModel Constant", "ThermalConductivityModel ConstantPrandtl"}, true},
		{"no-reference", func(f *FlowState) {
			*f = FlowState{EquationsOnly: true, Gamma: f.Gamma, GasConstant: f.GasConstant, Viscous: true, Sutherland: f.Sutherland, Prandtl: f.Prandtl}
		}, "NSLaminar", []string{"GasModel Ideal", "ViscosityModel SutherlandLaw", "ThermalConductivityModel ConstantPrandtl"}, false},
		{"no-reference-inviscid", func(f *FlowState) {
			*f = FlowState{EquationsOnly: true, Gamma: f.Gamma, GasConstant: f.GasConstant}
		}, "Euler", []string{"GasModel Ideal"}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			d := testDeck(quadMesh(t, 4, 2))
			c.edit(d.Flow)
			path := filepath.Join(dir, c.name+".cgns")
			if _, err := Write(path, d); err != nil {
				t.Fatal(err)
			}
			cgnscheck(t, path)
			rb := parseReadBack(t, read(path))
			if rb.equations != c.equations {
				t.Errorf("GoverningEquations %s, want %s", rb.equations, c.equations)
			}
			var models []string
			for _, m := range []string{"GasModel", "ViscosityModel", "ThermalConductivityModel", "TurbulenceClosure", "TurbulenceModel"} {
				if typ, ok := rb.models[m]; ok {
					models = append(models, m+" "+typ)
				}
			}
			if fmt.Sprint(models) != fmt.Sprint(c.models) {
				t.Errorf("models %v, want %v", models, c.models)
			}
			if g := rb.params["GasModel/SpecificHeatRatio"]; g.value != 1.4 || g.class != "NondimensionalParameter" {
				t.Errorf("SpecificHeatRatio %+v, want 1.4, NondimensionalParameter", g)
			}
			if _, ok := rb.models["ThermalConductivityModel"]; ok {
				// 0.72: air's Prandtl number (common practice).
				if p := rb.params["ThermalConductivityModel/Prandtl"]; p.value != 0.72 || p.class != "NondimensionalParameter" {
					t.Errorf("Prandtl %+v, want 0.72, NondimensionalParameter", p)
				}
			}
			if (rb.reference != nil) != c.reference {
				t.Errorf("ReferenceState read back: %v, want %v", rb.reference != nil, c.reference)
			}
		})
	}
}
