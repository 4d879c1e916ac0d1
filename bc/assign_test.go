package bc

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

func scalar(key string, x float64, where string) Value {
	return Value{Key: key, Number: []float64{x}, Where: where}
}

func vector(key string, x, y float64, where string) Value {
	return Value{Key: key, Number: []float64{x, y}, Where: where}
}

// seaLevel is the reference state of the test cases: M = 0.3 at sea level
// of the standard atmosphere.
func seaLevel(t *testing.T) *State {
	s, err := StateFromAltitude(Air, Altitude{0, Geometric}, 0.3)
	if err != nil {
		t.Fatal(err)
	}
	return &s
}

// ductConditions is a valid set for the channel with sides wall, outlet,
// top, inlet.
func ductConditions(ref *State) []Condition {
	return []Condition{
		{Tag: "inlet", Kind: InflowTotal, Where: "case.yaml:10:5", Values: []Value{
			scalar(KeyTotalPressure, ref.TotalPressure, "case.yaml:11:7"),
			scalar(KeyTotalTemperature, ref.TotalTemperature, "case.yaml:12:7"),
			vector(KeyDirection, 2, 0, "case.yaml:13:7"),
		}},
		{Tag: "outlet", Kind: OutflowPressure, Where: "case.yaml:14:5", Values: []Value{scalar(KeyPressure, 101325, "case.yaml:15:7")}},
		{Tag: "wall", Kind: WallIsothermal, Where: "case.yaml:16:5", Values: []Value{scalar(KeyTemperature, 300, "case.yaml:17:7")}},
		{Tag: "top", Kind: Symmetry, Where: "case.yaml:18:5"},
	}
}

var ductTags = [4]string{"wall", "outlet", "top", "inlet"}

func TestAssignValidDuct(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	a, err := Assign(m, Setup{Reference: ref, Conditions: ductConditions(ref)})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{"wall": "BCWallViscousIsothermal", "outlet": "BCOutflowSubsonic", "top": "BCSymmetryPlane", "inlet": "BCInflowSubsonic"}
	for ti, r := range a.Conditions {
		if r.Tag != m.Tags[ti] || r.Kind.CGNSType() != want[r.Tag] {
			t.Errorf("tag %d: %s %s %s", ti, r.Tag, r.Kind, r.Kind.CGNSType())
		}
		lo, hi, _ := m.TagRange(r.Tag)
		if r.First != lo || r.Count != hi-lo {
			t.Errorf("%s faces %d+%d, mesh %d..%d", r.Tag, r.First, r.Count, lo, hi)
		}
	}
	in := a.Conditions[3]
	// The inlet's total pressure over the reference static pressure gives
	// back the reference Mach number; the direction is normalised.
	if !near(in.Mach, 0.3, 1e-9) || in.Direction[0] != 1 || in.Direction[1] != 0 {
		t.Errorf("inlet M %g direction %v", in.Mach, in.Direction)
	}
	if v, ok := a.Conditions[0].Value(KeyTemperature); !ok || v != 300 {
		t.Errorf("wall temperature %g %v", v, ok)
	}
}

// errorList unpacks a joined error into its *Error parts.
func errorList(t *testing.T, err error) []*Error {
	t.Helper()
	if err == nil {
		t.Fatal("no error")
	}
	if !errors.Is(err, ErrInput) {
		t.Errorf("error does not wrap ErrInput: %v", err)
	}
	var out []*Error
	var walk func(error)
	walk = func(e error) {
		if j, ok := e.(interface{ Unwrap() []error }); ok {
			for _, x := range j.Unwrap() {
				walk(x)
			}
			return
		}
		var be *Error
		if !errors.As(e, &be) {
			t.Errorf("error is not a *bc.Error: %v", e)
			return
		}
		out = append(out, be)
	}
	walk(err)
	return out
}

// expectOne checks that err holds an error on tag at where whose message
// contains every fragment.
func expectOne(t *testing.T, err error, tag, where string, fragments ...string) {
	t.Helper()
	for _, e := range errorList(t, err) {
		if e.Tag != tag || e.Where != where {
			continue
		}
		msg := e.Error()
		ok := true
		for _, f := range fragments {
			ok = ok && strings.Contains(msg, f)
		}
		if ok {
			return
		}
	}
	t.Errorf("no error on tag %q at %q with %q in:\n%v", tag, where, fragments, err)
}

func TestAssignUntaggedBoundary(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, [4]string{"wall", "outlet", "", "inlet"})
	ref := seaLevel(t)
	conds := ductConditions(ref)[:3]
	_, err := Assign(m, Setup{Reference: ref, Conditions: conds})
	expectOne(t, err, "", "", "6 boundary faces carry no boundary tag")
}

func TestAssignTagTypo(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	conds := ductConditions(ref)
	conds[0].Tag = "inelt"
	_, err := Assign(m, Setup{Reference: ref, Conditions: conds})
	expectOne(t, err, "inelt", "case.yaml:10:5", `did you mean "inlet"`)
	// The tag left without a condition is reported too: errors are
	// collected, not just the first.
	expectOne(t, err, "inlet", "", "has no boundary condition")
}

func TestAssignNegativePressure(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	conds := ductConditions(ref)
	conds[1].Values[0].Number[0] = -5
	_, err := Assign(m, Setup{Reference: ref, Conditions: conds})
	expectOne(t, err, "outlet", "case.yaml:14:5", "pressure = -5 Pa is not physical", "> 0")
}

func TestAssignSupersonicOutflowWithBackPressure(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	conds := ductConditions(ref)
	conds[1].Kind = OutflowSupersonic
	_, err := Assign(m, Setup{Reference: ref, Conditions: conds})
	expectOne(t, err, "outlet", "case.yaml:15:7", "supersonic outflow takes no back pressure", "outflow-pressure")
}

func TestAssignPeriodic(t *testing.T) {
	ref := seaLevel(t)
	periodic := func() []Condition {
		c := ductConditions(ref)
		c[2] = Condition{Tag: "wall", Kind: Periodic, Partner: "top", Where: "case.yaml:16:5",
			Values: []Value{vector(KeyTranslation, 0, 1, "case.yaml:17:7")}}
		return c[:3]
	}
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	a, err := Assign(m, Setup{Reference: ref, Conditions: periodic()})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Periodic) != 1 || len(a.Periodic[0].Pairs) != 6 {
		t.Fatalf("pairing %+v", a.Periodic)
	}
	for _, p := range a.Periodic[0].Pairs {
		fa, fb := m.Geo.FaceMid[p[0]], m.Geo.FaceMid[p[1]]
		if math.Abs(fa[0]-fb[0]) > 1e-12 || math.Abs(fb[1]-fa[1]-1) > 1e-12 {
			t.Errorf("faces %d at %v and %d at %v do not pair", p[0], fa, p[1], fb)
		}
	}
	if top := a.Conditions[2]; top.Kind != Periodic || top.Partner != "wall" || top.Periodic != 0 {
		t.Errorf("partner tag %+v", top)
	}

	// Shear the north row by a third of a cell: no face matches.
	sheared := channel(t, 6, 3, 3, 1, 1.0/3, ductTags)
	_, err = Assign(sheared, Setup{Reference: ref, Conditions: periodic()})
	expectOne(t, err, "wall", "case.yaml:16:5", `6 of 6 faces of tag "wall" have no matching face in "top"`, "nearest face")

	// A wrong translation fails the same way.
	c := periodic()
	c[2].Values[0].Number[1] = 1.1
	_, err = Assign(m, Setup{Reference: ref, Conditions: c})
	expectOne(t, err, "wall", "case.yaml:16:5", "have no matching face")

	// Differing face counts fail before matching.
	m2 := channel(t, 6, 3, 3, 1, 0, [4]string{"wall", "outlet", "top", "inlet"})
	c = periodic()
	c[2].Partner = "inlet"
	c[0].Tag = "top"
	c[0].Kind = Symmetry
	c[0].Values = nil
	_, err = Assign(m2, Setup{Reference: ref, Conditions: c})
	expectOne(t, err, "wall", "case.yaml:16:5", "6 faces", "has 3")
}

func TestAssignCollectsEveryError(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	conds := []Condition{
		// Duplicate of the wall.
		{Tag: "wall", Kind: WallAdiabatic, Where: "a:1:1"},
		{Tag: "wall", Kind: WallSlip, Where: "a:2:1"},
		// Supersonic velocity on a subsonic inflow.
		{Tag: "inlet", Kind: InflowVelocity, Where: "a:3:1", Values: []Value{
			vector(KeyVelocity, 700, 0, "a:4:1"), scalar(KeyTemperature, 288.15, "a:5:1")}},
		// Subsonic Mach on a supersonic inflow, pointing out of the domain.
		{Tag: "outlet", Kind: InflowSupersonic, Where: "a:6:1", Values: []Value{
			scalar(KeyMach, 0.5, ""), scalar(KeyPressure, 1e5, ""), scalar(KeyTemperature, 300, ""), vector(KeyDirection, 1, 0, "")}},
		// A static pressure where a total was meant, and a missing key.
		{Tag: "top", Kind: InflowTotal, Where: "a:7:1", Values: []Value{
			scalar(KeyPressure, 1e5, "a:8:1"), scalar(KeyTotalTemperature, 300, "a:9:1"), vector(KeyDirection, 0, -1, "a:10:1")}},
	}
	_, err := Assign(m, Setup{Reference: ref, Conditions: conds})
	expectOne(t, err, "wall", "a:2:1", "two conditions", "wall-adiabatic at a:1:1")
	expectOne(t, err, "inlet", "a:3:1", "M = 2.057", "inflow-supersonic")
	expectOne(t, err, "outlet", "a:6:1", "M = 0.5", "needs M > 1")
	expectOne(t, err, "outlet", "a:6:1", "does not enter the domain on 3 of 3 faces")
	expectOne(t, err, "top", "a:8:1", `does not take "pressure"`, `did you mean "total_pressure"`)
	expectOne(t, err, "top", "a:7:1", `needs "total_pressure"`)
}

func TestAssignFarfieldAndGas(t *testing.T) {
	m := channel(t, 4, 2, 2, 1, 0, [4]string{"far", "", "", ""})
	// A one-tag mesh with three untagged sides would fail; tag them all far.
	m = channel(t, 4, 2, 2, 1, 0, [4]string{"far", "far2", "far3", "far4"})
	conds := []Condition{{Tag: "far", Kind: Farfield, Where: "f:1:1"}, {Tag: "far2", Kind: Farfield}, {Tag: "far3", Kind: Farfield}, {Tag: "far4", Kind: Farfield}}
	_, err := Assign(m, Setup{Conditions: conds})
	expectOne(t, err, "far", "f:1:1", "needs the reference")
	_, err = Assign(m, Setup{Gas: Gas{Gamma: 1, R: 287}, GasWhere: "g:2:3", Reference: seaLevel(t), Conditions: conds})
	expectOne(t, err, "", "g:2:3", "gamma = 1")
	a, err := Assign(m, Setup{Reference: seaLevel(t), Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	if r := a.Conditions[0]; r.State == nil || r.Mach != 0.3 || r.Kind.CGNSType() != "BCFarfield" {
		t.Errorf("farfield %+v", r)
	}
}

func TestParseKind(t *testing.T) {
	for _, k := range Kinds() {
		if got, err := ParseKind(k.String()); err != nil || got != k {
			t.Errorf("%s: %v %v", k, got, err)
		}
	}
	_, err := ParseKind("wall-adiabtic")
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), `did you mean "wall-adiabatic"`) {
		t.Errorf("typo: %v", err)
	}
}

// Two separate unit squares, the second 2 m above the first, each with its
// south side tagged: moving "low" by (0, 2) lands every face on "high", but
// both have the domain above them, so they cannot be periodic partners.
func TestAssignPeriodicSameSide(t *testing.T) {
	in := mesh.Input{
		Nodes:     []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0, 2}, {1, 2}, {1, 3}, {0, 3}},
		CellStart: []int32{0, 4, 8},
		CellNodes: []int32{0, 1, 2, 3, 4, 5, 6, 7},
		Tags:      []string{"low", "high", "rest"},
		Edges: []mesh.TaggedEdge{{A: 0, B: 1, Tag: 0}, {A: 4, B: 5, Tag: 1},
			{A: 1, B: 2, Tag: 2}, {A: 2, B: 3, Tag: 2}, {A: 3, B: 0, Tag: 2}, {A: 5, B: 6, Tag: 2}, {A: 6, B: 7, Tag: 2}, {A: 7, B: 4, Tag: 2}},
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	conds := []Condition{
		{Tag: "low", Kind: Periodic, Partner: "high", Where: "p:1:1", Values: []Value{vector(KeyTranslation, 0, 2, "")}},
		{Tag: "rest", Kind: WallSlip},
	}
	_, err = Assign(m, Setup{Conditions: conds})
	expectOne(t, err, "low", "p:1:1", "face opposite ways")
}

// A periodic condition with a bad value claims both its tags: the partner is
// not also reported as having no condition.
func TestAssignPeriodicBadValueClaimsPartner(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	c := ductConditions(ref)[:2]
	c = append(c, Condition{Tag: "wall", Kind: Periodic, Partner: "top", Where: "q:1:1",
		Values: []Value{vector(KeyTranslation, 0, 1, "q:2:1"), scalar(KeyTolerance, -1, "q:3:1")}})
	_, err := Assign(m, Setup{Reference: ref, Conditions: c})
	expectOne(t, err, "wall", "q:1:1", "tolerance = -1 m is not physical")
	if errs := errorList(t, err); len(errs) != 1 {
		t.Errorf("want one error, got %d:\n%v", len(errs), err)
	}
}

// farfieldSquare is a 2 × 2 square of four cells whose four sides are one
// farfield each, the far boundary of an external-flow case.
func farfieldSquare(t *testing.T) (*mesh.Mesh, []Condition) {
	m := channel(t, 2, 2, 1, 1, 0, [4]string{"far", "far2", "far3", "far4"})
	conds := []Condition{{Tag: "far", Kind: Farfield, Where: "f:1:1"}, {Tag: "far2", Kind: Farfield}, {Tag: "far3", Kind: Farfield}, {Tag: "far4", Kind: Farfield}}
	return m, conds
}

// A farfield imposes the free stream, so it takes the reference flow
// direction (cos α, sin α) (closed form); a given direction within
// FarfieldAngleTolerance stands for it, and one further off is an input
// error naming both angles and both places.
func TestAssignFarfieldDirection(t *testing.T) {
	m, conds := farfieldSquare(t)
	ref := seaLevel(t)
	alpha := 4 * math.Pi / 180
	dir := orb.Point{math.Cos(alpha), math.Sin(alpha)}

	a, err := Assign(m, Setup{Reference: ref, Direction: dir, DirectionWhere: "r:5:10", Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range a.Conditions {
		if r.Direction != dir {
			t.Errorf("%s: direction %v, want (cos 4°, sin 4°) = %v", r.Tag, r.Direction, dir)
		}
	}
	// The zero direction is +x, as for α = 0.
	a, err = Assign(m, Setup{Reference: ref, Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	if a.Direction != (orb.Point{1, 0}) || a.Conditions[0].Direction != (orb.Point{1, 0}) {
		t.Errorf("default direction %v, farfield %v; want (1, 0)", a.Direction, a.Conditions[0].Direction)
	}

	// [0.9976, 0.0698] is 4.0023° (atan2), within 0.1° of 4°: accepted,
	// and the farfield takes the reference direction itself.
	c := append([]Condition{}, conds...)
	c[0].Values = []Value{vector(KeyDirection, 0.9976, 0.0698, "f:1:30")}
	a, err = Assign(m, Setup{Reference: ref, Direction: dir, DirectionWhere: "r:5:10", Conditions: c})
	if err != nil {
		t.Fatal(err)
	}
	if a.Conditions[0].Direction != dir {
		t.Errorf("farfield direction %v, want the reference's %v", a.Conditions[0].Direction, dir)
	}
	// [1, 0.0715] is 4.0897°, still within 0.1°; [1, 0.0717] is 4.1011°
	// (atan2), just outside it.
	c[0].Values = []Value{vector(KeyDirection, 1, 0.0715, "f:1:30")}
	if _, err = Assign(m, Setup{Reference: ref, Direction: dir, Conditions: c}); err != nil {
		t.Errorf("4.0897° against 4°: %v", err)
	}
	c[0].Values = []Value{vector(KeyDirection, 1, 0.0717, "f:1:30")}
	_, err = Assign(m, Setup{Reference: ref, Direction: dir, DirectionWhere: "r:5:10", Conditions: c})
	expectOne(t, err, "far", "f:1:30", "4.101° from +x", "reference flow angle is 4°", "given at r:5:10", "within 0.1°")
	// A direction at right angles, with no angle given: the reference
	// flow angle is the default 0.
	c[0].Values = []Value{vector(KeyDirection, 0, 1, "f:1:30")}
	_, err = Assign(m, Setup{Reference: ref, Conditions: c})
	expectOne(t, err, "far", "f:1:30", "(0, 1) is at 90° from +x", "reference flow angle is 0°", "gives no flow angle")

	// A reference direction that is no unit vector is refused.
	_, err = Assign(m, Setup{Reference: ref, Direction: orb.Point{math.NaN(), 0}, DirectionWhere: "r:5:10", Conditions: conds})
	expectOne(t, err, "", "r:5:10", "not a unit vector")
	_, err = Assign(m, Setup{Reference: ref, Direction: orb.Point{3 * dir[0], 3 * dir[1]}, DirectionWhere: "r:5:10", Conditions: conds})
	expectOne(t, err, "", "r:5:10", "not a unit vector (length 3)")
}

// isentropicMach is the Mach number of total over static pressure ratio
// p0/p, M = sqrt(2/(γ−1) ((p0/p)^((γ−1)/γ) − 1)) (NACA Report 1135),
// written out here apart from Gas.MachFromPressureRatio.
func isentropicMach(gamma, p0OverP float64) float64 {
	return math.Sqrt(2 / (gamma - 1) * (math.Pow(p0OverP, (gamma-1)/gamma) - 1))
}

// notesOn returns the texts of the notes on tag.
func notesOn(a *Assignment, tag string) []string {
	var out []string
	for _, n := range a.Notes {
		if n.Tag == tag {
			out = append(out, n.Text)
		}
	}
	return out
}

// An inflow-total whose total state differs from the reference's by more
// than StateNoteFraction is noted, with both values and the Mach numbers;
// one within it is not. The run goes on: notes are no errors.
func TestAssignNotesInflowTotalAgainstReference(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	a, err := Assign(m, Setup{Reference: ref, Conditions: ductConditions(ref)})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Notes) != 0 {
		t.Errorf("a duct fed with the reference total state has notes: %v", a.Notes)
	}

	conds := ductConditions(ref)
	conds[0].Values[0].Number[0] = 0.99 * ref.TotalPressure     // 1 %: no note
	conds[0].Values[1].Number[0] = 1.015 * ref.TotalTemperature // 1.5 %: no note
	if a, err = Assign(m, Setup{Reference: ref, Conditions: conds}); err != nil || len(a.Notes) != 0 {
		t.Errorf("within 2 %%: notes %v, error %v", a.Notes, err)
	}

	conds[0].Values[0].Number[0] = 0.95 * ref.TotalPressure
	conds[0].Values[1].Number[0] = 1.5 * ref.TotalTemperature
	a, err = Assign(m, Setup{Reference: ref, Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	got := notesOn(a, "inlet")
	if len(got) != 1 || a.Notes[0].Where != "case.yaml:10:5" {
		t.Fatalf("notes %+v", a.Notes)
	}
	// The reference: M 0.3 at sea level of the standard atmosphere, p =
	// 101325 Pa, T = 288.15 K, so p0 = p (1 + 0.2 · 0.3²)^3.5 = 107853 Pa
	// and T0 = T (1 + 0.2 · 0.3²) = 293.337 K (isentropic, γ = 1.4).
	mach := isentropicMach(1.4, 0.95*ref.TotalPressure/101325)
	for _, want := range []string{
		fmt.Sprintf("total pressure %.6g Pa", 0.95*ref.TotalPressure), "-5 %", "reference total pressure 107853 Pa",
		fmt.Sprintf("total temperature %.6g K", 1.5*ref.TotalTemperature), "+50 %", "reference total temperature 293.337 K",
		"static pressure 101325 Pa", fmt.Sprintf("M = %.4g", mach), "reference Mach number is 0.3",
	} {
		if !strings.Contains(got[0], want) {
			t.Errorf("note lacks %q:\n%s", want, got[0])
		}
	}
	// By hand: 0.95 · 1.064430 = 1.011209, ^(2/7) = 1.003190, M = √(5 ·
	// 0.003190) = 0.1263.
	if !near(mach, 0.1263, 1e-3) {
		t.Errorf("M from 95 %% of the total pressure is %g; by hand 0.1263", mach)
	}
}

// A pressure or temperature far from the reference state's, as a unit
// slip gives, is noted at its tag: a back pressure of 1.01325 "Pa" (one
// atmosphere in bar) is 1e-5 of the reference 101325 Pa, a wall at 27 "K"
// (27 °C) 0.094 of 288.15 K; 90 kPa and a 500 K wall are not noted.
func TestAssignNotesUnitSlips(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	ref := seaLevel(t)
	conds := ductConditions(ref)
	conds[1].Values[0].Number[0] = 1.01325
	conds[2].Values[0].Number[0] = 27
	a, err := Assign(m, Setup{Reference: ref, Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(notesOn(a, "outlet"), "\n"); !strings.Contains(got, "its pressure 1.01325 Pa is 1e-05 times the reference static pressure 101325 Pa: check its unit") {
		t.Errorf("outlet notes %q", got)
	}
	if got := strings.Join(notesOn(a, "wall"), "\n"); !strings.Contains(got, "its temperature 27 K is 0.0937 times the reference static temperature 288.15 K") {
		t.Errorf("wall notes %q", got)
	}
	conds[1].Values[0].Number[0] = 90000
	conds[2].Values[0].Number[0] = 500
	if a, err = Assign(m, Setup{Reference: ref, Conditions: conds}); err != nil || len(a.Notes) != 0 {
		t.Errorf("plausible values: notes %v, error %v", a.Notes, err)
	}
}

// A subsonic kind under a supersonic reference state, and a supersonic
// inflow under a subsonic one, are noted, with the reference Mach number.
func TestAssignNotesRegimeAgainstReference(t *testing.T) {
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	// M = 2 at 101325 Pa, 288.15 K; the inlet fed at M 0.3's total
	// pressure, p0/p = (1 + 0.2 · 0.3²)^3.5 (isentropic, γ = 1.4, NACA
	// Report 1135), is subsonic.
	sup, err := StateFromMach(Air, 2, 101325, 288.15)
	if err != nil {
		t.Fatal(err)
	}
	sub := seaLevel(t)
	conds := ductConditions(sub)
	conds[0].Values[0].Number[0] = 101325 * math.Pow(1+0.2*0.09, 3.5)
	conds[0].Values[1].Number[0] = sup.TotalTemperature
	a, err := Assign(m, Setup{Reference: &sup, Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	for _, tag := range []string{"inlet", "outlet"} {
		got := strings.Join(notesOn(a, tag), "\n")
		if !strings.Contains(got, "for subsonic flow at the boundary, but the reference Mach number is 2 (supersonic)") {
			t.Errorf("%s: notes %q", tag, got)
		}
	}
	if got := strings.Join(notesOn(a, "outlet"), ""); !strings.Contains(got, "use outflow-supersonic") {
		t.Errorf("outlet note %q does not name the supersonic outflow", got)
	}
	if got := strings.Join(notesOn(a, "inlet"), "\n"); !strings.Contains(got, "M = 0.3,") {
		t.Errorf("inlet notes %q lack its own Mach number", got)
	}

	conds = ductConditions(sub)
	conds[0] = Condition{Tag: "inlet", Kind: InflowSupersonic, Where: "s:1:1", Values: []Value{
		scalar(KeyMach, 2, ""), scalar(KeyPressure, 1e5, ""), scalar(KeyTemperature, 300, ""), vector(KeyDirection, 1, 0, "")}}
	a, err = Assign(m, Setup{Reference: sub, Conditions: conds})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Notes) != 1 || a.Notes[0].Tag != "inlet" || !strings.Contains(a.Notes[0].Text, "supersonic inflow, but the reference Mach number is 0.3 (subsonic)") {
		t.Errorf("notes %+v", a.Notes)
	}
	if s := a.Notes[0].String(); !strings.HasPrefix(s, `s:1:1: boundary tag "inlet": `) {
		t.Errorf("note string %q", s)
	}
}

// A periodic pair may be declared from both sides: the same pair with
// opposite translations is one pairing, each tag keeping its own place;
// declarations that disagree are refused with what disagrees, never as a
// tag with two conditions.
func TestAssignPeriodicDeclaredTwice(t *testing.T) {
	ref := seaLevel(t)
	pair := func(up, down float64) []Condition {
		c := ductConditions(ref)[:2]
		return append(c,
			Condition{Tag: "wall", Kind: Periodic, Partner: "top", Where: "p:1:1", Values: []Value{vector(KeyTranslation, 0, up, "p:1:40")}},
			Condition{Tag: "top", Kind: Periodic, Partner: "wall", Where: "p:2:1", Values: []Value{vector(KeyTranslation, 0, down, "p:2:40")}})
	}
	m := channel(t, 6, 3, 3, 1, 0, ductTags)
	a, err := Assign(m, Setup{Reference: ref, Conditions: pair(1, -1)})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Periodic) != 1 || len(a.Periodic[0].Pairs) != 6 {
		t.Fatalf("pairings %+v", a.Periodic)
	}
	if w, top := a.Conditions[0], a.Conditions[2]; w.Where != "p:1:1" || top.Where != "p:2:1" || top.Partner != "wall" || w.Partner != "top" {
		t.Errorf("wall %+v\ntop %+v", w, top)
	}

	// The default tolerance is 1e-6 times the shortest face, 0.5 m:
	// 5e-7 m. Translations 1e-7 m from opposite agree; 0.1 m do not.
	if _, err := Assign(m, Setup{Reference: ref, Conditions: pair(1, -1-1e-7)}); err != nil {
		t.Errorf("1e-7 m off opposite, within 5e-7 m: %v", err)
	}
	_, err = Assign(m, Setup{Reference: ref, Conditions: pair(1, -1.1)})
	expectOne(t, err, "top", "p:2:40", `declares the periodic pair with "wall" that "wall" declares too (at p:1:1)`,
		"not opposite: (0, -1.1) m here, (0, 1) m there", "0.1 m apart", "one side is enough")
	for _, e := range errorList(t, err) {
		if strings.Contains(e.Msg, "two conditions") {
			t.Errorf("a mutual declaration is reported as two conditions: %v", e)
		}
	}
	if n := len(errorList(t, err)); n != 1 {
		t.Errorf("want one error, got %d:\n%v", n, err)
	}

	// Tolerances given on both sides must agree.
	c := pair(1, -1)
	c[2].Values = append(c[2].Values, scalar(KeyTolerance, 1e-3, "p:1:60"))
	c[3].Values = append(c[3].Values, scalar(KeyTolerance, 2e-3, "p:2:60"))
	_, err = Assign(m, Setup{Reference: ref, Conditions: c})
	expectOne(t, err, "top", "p:2:60", "tolerances disagree: 0.002 m here, 0.001 m there", "one side is enough")

	// A tolerance on the second side only applies to the pairing: the
	// north row sheared by 1e-4 of a cell (5e-5 m) fails the default
	// tolerance (5e-7 m) and passes 1e-4 m.
	sheared := channel(t, 6, 3, 3, 1, 1e-4, ductTags)
	if _, err := Assign(sheared, Setup{Reference: ref, Conditions: pair(1, -1)}); err == nil {
		t.Fatal("a shear of 5e-5 m passes the default tolerance")
	}
	c = pair(1, -1)
	c[3].Values = append(c[3].Values, scalar(KeyTolerance, 1e-4, "p:2:60"))
	a, err = Assign(sheared, Setup{Reference: ref, Conditions: c})
	if err != nil {
		t.Fatal(err)
	}
	if mm := a.Periodic[0].MaxMismatch; !near(mm, 5e-5, 1e-9) {
		t.Errorf("largest mismatch %g m, want the shear 5e-5 m", mm)
	}
	// A bad value on the second side is reported there, once.
	c = pair(1, -1)
	c[3].Values = append(c[3].Values, scalar(KeyTolerance, -1, "p:2:60"))
	_, err = Assign(m, Setup{Reference: ref, Conditions: c})
	expectOne(t, err, "top", "p:2:1", "tolerance = -1 m is not physical")
	if n := len(errorList(t, err)); n != 1 {
		t.Errorf("want one error, got %d:\n%v", n, err)
	}
}
