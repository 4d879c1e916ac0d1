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

// farfieldSquare is the square case (10 mm, in mm) with every side one
// farfield tag under a free stream at 4° incidence.
const farfieldSquare = square + `reference: {mach: 0.5, pressure: 101325, temperature: 288.15, angle: 4}
boundaries:
  wall: {kind: farfield}
`

// h5Value reads one double of a CGNS node's data with h5dump (Debian
// hdf5-tools) at full precision. A missing h5dump skips the test on a
// developer machine and fails it under CI=true.
func h5Value(t *testing.T, file, node string) float64 {
	t.Helper()
	h5, err := exec.LookPath("h5dump")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("reference tool h5dump is missing (install hdf5-tools): %v", err)
		}
		t.Skipf("reference tool h5dump is missing: %v", err)
	}
	out, err := exec.Command(h5, "-m", "%.17g", "-d", node+"/ data", file).CombinedOutput()
	if err != nil {
		t.Fatalf("h5dump %s: %v\n%s", node, err, out)
	}
	_, rest, ok := strings.Cut(string(out), "(0): ")
	if !ok {
		t.Fatalf("h5dump %s: no value in\n%s", node, out)
	}
	v, err := strconv.ParseFloat(strings.Fields(rest)[0], 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// reference returns the value of key in the manifest's reference record.
func referenceValue(t *testing.T, man *manifest.Manifest, key string) float64 {
	t.Helper()
	for _, e := range man.Conditions.Reference {
		if e.Key == key {
			return e.Value
		}
	}
	t.Fatalf("deck.yaml's reference has no %s", key)
	return 0
}

// TestFarfieldTakesTheReferenceAngle: the farfield's direction in deck.yaml
// is the reference angle's, (cos 4°, sin 4°), and deck.yaml's reference
// carries the angle and the velocity components, which are those of the
// ReferenceState in mesh.cgns as h5dump reads them. A farfield direction
// at right angles to the free stream is an input error naming both angles
// and both places, and writes nothing.
func TestFarfieldTakesTheReferenceAngle(t *testing.T) {
	c, err := Parse("square.yaml", []byte(farfieldSquare), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "deck")
	if _, err := Run(c, dir, RunOptions{Formats: []string{"cgns", "manifest"}}); err != nil {
		t.Fatal(err)
	}
	man, err := manifest.Read(dir)
	if err != nil {
		t.Fatal(err)
	}
	alpha := 4 * math.Pi / 180
	v := referenceValue(t, man, "velocity")
	if got := referenceValue(t, man, "flow_angle"); got != 4 {
		t.Errorf("flow_angle %v, want 4", got)
	}
	vx, vy := referenceValue(t, man, "velocity_x"), referenceValue(t, man, "velocity_y")
	if math.Abs(vx-v*math.Cos(alpha)) > 1e-12*v || math.Abs(vy-v*math.Sin(alpha)) > 1e-12*v {
		t.Errorf("velocity (%g, %g), want V (cos 4°, sin 4°) = (%g, %g) m/s", vx, vy, v*math.Cos(alpha), v*math.Sin(alpha))
	}
	far := man.Conditions.Boundaries[0]
	var dx, dy float64
	for _, e := range far.Values {
		switch e.Key {
		case "direction_x":
			dx = e.Value
		case "direction_y":
			dy = e.Value
		}
	}
	if math.Abs(dx-math.Cos(alpha)) > 1e-15 || math.Abs(dy-math.Sin(alpha)) > 1e-15 {
		t.Errorf("farfield direction (%g, %g), want (cos 4°, sin 4°)", dx, dy)
	}
	cg := filepath.Join(dir, "mesh.cgns")
	if hx, hy := h5Value(t, cg, "/square/ReferenceState/VelocityX"), h5Value(t, cg, "/square/ReferenceState/VelocityY"); hx != vx || hy != vy {
		t.Errorf("mesh.cgns ReferenceState velocity (%v, %v), deck.yaml (%v, %v)", hx, hy, vx, vy)
	}

	bad := strings.Replace(farfieldSquare, "{kind: farfield}", "{kind: farfield, direction: [0, 1]}", 1)
	if c, err = Parse("square.yaml", []byte(bad), LoadOptions{}); err != nil {
		t.Fatal(err)
	}
	dir = filepath.Join(t.TempDir(), "deck")
	_, err = Run(c, dir, RunOptions{})
	// The direction is at line 23, column 37; the angle at line 21,
	// column 70 of the case text.
	for _, want := range []string{`square.yaml:23:37: boundary tag "wall"`, "(0, 1) is at 90° from +x", "reference flow angle is 4° (given at square.yaml:21:70)"} {
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("error %v lacks %q", err, want)
		}
	}
	if !errors.Is(err, ErrInput) {
		t.Errorf("error %v is no input error", err)
	}
	if _, statErr := os.Stat(dir); !os.IsNotExist(statErr) {
		t.Error("a deck was written for a farfield against the free stream")
	}
}

// TestConditionNotesReachTheResult: an inflow whose total pressure is
// 5 % below the reference total pressure gets a note, which Run returns
// with its case-file place and deck.yaml keeps with the tag.
func TestConditionNotesReachTheResult(t *testing.T) {
	duct := strings.NewReplacer(
		"{name: e, line: [side, side], tag: wall,", "{name: e, line: [side, side], tag: outlet,",
		"{name: w, line: [0, 0], tag: wall,", "{name: w, line: [0, 0], tag: inlet,",
	).Replace(square)
	// M 0.3 at 101325 Pa: p0 = 101325 (1 + 0.2 · 0.09)^3.5 = 107853 Pa
	// (isentropic, γ = 1.4); the inlet gives 102460 Pa, 95 % of it.
	text := duct + `reference: {mach: 0.3, pressure: 101325, temperature: 288.15}
boundaries:
  wall: {kind: wall-slip}
  inlet: {kind: inflow-total, total_pressure: 102460, total_temperature: 293.337, direction: [1, 0]}
  outlet: {kind: outflow-pressure, pressure: 101325}
`
	c, err := Parse("duct.yaml", []byte(text), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "deck")
	res, err := Run(c, dir, RunOptions{Formats: []string{"manifest"}})
	if err != nil {
		t.Fatal(err)
	}
	var found string
	for _, n := range res.Notes {
		if strings.Contains(n, `boundary tag "inlet"`) {
			found = n
		}
	}
	for _, want := range []string{"duct.yaml:24:10:", "total pressure 102460 Pa differs by -5 % from the reference total pressure 107853 Pa", "reference Mach number is 0.3"} {
		if !strings.Contains(found, want) {
			t.Errorf("notes %q lack %q", res.Notes, want)
		}
	}
	man, err := manifest.Read(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range man.Conditions.Boundaries {
		if want := b.Tag == "inlet"; (len(b.Notes) == 1) != want || want && !strings.Contains(found, b.Notes[0]) {
			t.Errorf("deck.yaml notes of %s: %q", b.Tag, b.Notes)
		}
	}
}

// TestPeriodicPairDeclaredOnBothSides: both tags of the pair may declare it
// with opposite translations, one pairing in the deck; translations that
// are not opposite are refused saying so.
func TestPeriodicPairDeclaredOnBothSides(t *testing.T) {
	both := periodicSquare + "boundaries:\n  wall: {kind: wall-slip}\n  upper: {kind: periodic, partner: lower, translation: [0, -side]}\n  lower: {kind: periodic, partner: upper, translation: [0, side]}\n"
	c, err := Parse("square.yaml", []byte(both), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "deck")
	if _, err := Run(c, dir, RunOptions{Formats: []string{"manifest"}}); err != nil {
		t.Fatal(err)
	}
	man, err := manifest.Read(dir)
	if err != nil {
		t.Fatal(err)
	}
	places := map[string]string{}
	for _, b := range man.Conditions.Boundaries {
		places[b.Tag] = b.Partner + " " + b.Where
	}
	if places["upper"] != "lower square.yaml:23:10" || places["lower"] != "upper square.yaml:24:10" {
		t.Errorf("pair recorded as %v", places)
	}

	bad := strings.Replace(both, "translation: [0, side]", "translation: [0, -side]", 1)
	if c, err = Parse("square.yaml", []byte(bad), LoadOptions{}); err != nil {
		t.Fatal(err)
	}
	_, err = Run(c, filepath.Join(t.TempDir(), "deck"), RunOptions{})
	if err == nil || !errors.Is(err, ErrInput) || strings.Contains(err.Error(), "two conditions") ||
		!strings.Contains(err.Error(), "translations are not opposite: (0, -0.01) m here, (0, -0.01) m there") ||
		!strings.Contains(err.Error(), "one side is enough") {
		t.Errorf("got %v", err)
	}
}
