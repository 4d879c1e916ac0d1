package bc

import (
	"errors"
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
