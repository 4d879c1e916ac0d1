package deck

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"cvdeck/mesh/unstructured"
	"cvdeck/samples"
)

// The tests of this file hold errors in a case file to the place they are
// reported at. The expected line and column are counted in the case text
// itself (placeOf), not taken from the YAML parser's nodes, and the
// expected words are the ones the brief for each error asks for.

// placeOf returns "line:column" (both from 1) of the n-th (from 1)
// occurrence of sub in text, counted in bytes; the texts are ASCII.
func placeOf(t *testing.T, text, sub string, n int) string {
	t.Helper()
	at := -1
	for k := 0; k < n; k++ {
		i := strings.Index(text[at+1:], sub)
		if i < 0 {
			t.Fatalf("the text has no occurrence %d of %q", n, sub)
		}
		at += 1 + i
	}
	return placeAt(text, at)
}

// placeAt returns "line:column" of the byte at index at of text.
func placeAt(text string, at int) string {
	line := 1 + strings.Count(text[:at], "\n")
	col := at - strings.LastIndex(text[:at], "\n")
	return fmt.Sprintf("%d:%d", line, col)
}

// edited returns a sample case's text with, for each pair of strings, the
// first replaced by the second.
func edited(t *testing.T, sample string, edits ...string) string {
	t.Helper()
	data, err := samples.Case(sample)
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	for k := 0; k+1 < len(edits); k += 2 {
		if !strings.Contains(text, edits[k]) {
			t.Fatalf("the sample %s has no %q", sample, edits[k])
		}
		text = strings.Replace(text, edits[k], edits[k+1], 1)
	}
	return text
}

// wantInputError fails unless err is an input error that starts with the
// file and place and contains every one of want, and contains none of
// never.
func wantInputError(t *testing.T, err error, file, place string, want, never []string) {
	t.Helper()
	if err == nil {
		t.Fatalf("no error; want one at %s:%s", file, place)
	}
	if !errors.Is(err, ErrInput) {
		t.Errorf("%v: not marked as bad input", err)
	}
	msg := err.Error()
	if !strings.HasPrefix(msg, file+":"+place+": ") {
		t.Errorf("%s\ndoes not start with %s:%s", msg, file, place)
	}
	for _, w := range want {
		if !strings.Contains(msg, w) {
			t.Errorf("%s\ndoes not say %q", msg, w)
		}
	}
	for _, w := range never {
		if strings.Contains(msg, w) {
			t.Errorf("%s\nsays %q", msg, w)
		}
	}
}

// TestUnstructuredTagsCheckedOnLoad: a near region or a layer request
// naming a tag the outline does not have is refused when the case is read,
// at that tag, with the outline's tags (those of the cylinder-channel
// sample as its file writes them) and the nearest as "did you mean"; not
// by the mesher, whose error sits at the section's first key and advises
// thinner layers.
func TestUnstructuredTagsCheckedOnLoad(t *testing.T) {
	const tags = "(the outline's tags: floor, outlet, ceiling, inlet, cylinder)"
	never := []string{"fewer or thinner", "min_angle", "unstructured: region"}
	text := edited(t, "cylinder-channel", "{box: {from: [xc - d, yc - d], to: [xc + 8 * d, yc + d]}, size: d / 10}", "{near: cylindr, distance: 50, size: 4}")
	_, err := Parse("c.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "c.yaml", placeOf(t, text, "cylindr,", 1), []string{"mesh.unstructured.regions[0].near:", `tagged "cylindr"`, `did you mean "cylinder"?`, tags}, never)

	text = edited(t, "cylinder-channel", "{tags: [cylinder]", "{tags: [floor, cylindr]")
	_, err = Parse("c.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "c.yaml", placeOf(t, text, "cylindr]", 1), []string{"mesh.unstructured.layers[0].tags[1]:", `tagged "cylindr"`, `did you mean "cylinder"?`, tags}, never)

	// A single tag need not be a list; a name far from every tag gets no
	// guess.
	text = edited(t, "cylinder-channel", "{tags: [cylinder]", "{tags: body")
	_, err = Parse("c.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "c.yaml", placeOf(t, text, "body, first", 1), []string{`tagged "body"`, tags}, []string{"did you mean"})
}

// TestUnstructuredBoundsOnLoad: the mesher's bounds on min_angle, the size
// growth and a layer request's growth and count are checked as the case is
// read, at their keys' values; the bounds themselves are those of the
// mesher's Options (mesh/unstructured/options.go), which the second half
// holds them to: just inside is not refused for them, just outside is.
func TestUnstructuredBoundsOnLoad(t *testing.T) {
	for _, c := range []struct {
		from, to, at, want string
	}{
		{"growth: 1.15", "growth: 0.9", "0.9", "mesh.unstructured.growth: the size growth ratio away from the boundary is from 1"},
		{"growth: 1.15", "growth: 10.5", "10.5", "to 10, got 10.5"},
		{"min_angle: 28", "min_angle: 40", "40", "mesh.unstructured.min_angle: the minimum angle is above 0 and at most 33"},
		{"growth: 1.2, count: 10", "growth: 3.5, count: 10", "3.5", "mesh.unstructured.layers[0].growth: the height ratio of consecutive layers is from 1"},
		{"count: 10}", "count: 201}", "201", "at most 200 layers in one request, got 201"},
		{"count: 10}", "thickness: 0.2}", "0.2", "the layers' thickness, 0.2, is less than their first height, 0.25"},
	} {
		text := edited(t, "cylinder-channel", c.from, c.to)
		_, err := Parse("c.yaml", []byte(text), LoadOptions{})
		at := strings.Index(text, c.to) + strings.Index(c.to, c.at)
		wantInputError(t, err, "c.yaml", placeAt(text, at), []string{c.want}, []string{"mesh.unstructured: "})
	}

	c := cylinderChannel(t)
	d, err := c.Geometry.shape.Discretise()
	if err != nil {
		t.Fatal(err)
	}
	layer := func(g float64, n int) []unstructured.Layers {
		return []unstructured.Layers{{Tags: []string{"cylinder"}, FirstHeight: 2.5e-4, Growth: g, Count: n}}
	}
	for _, o := range []struct {
		opt     unstructured.Options
		refused bool
	}{
		{unstructured.Options{Growth: unstructured.MaxGrowth}, false},
		{unstructured.Options{Growth: math.Nextafter(unstructured.MaxGrowth, 11)}, true},
		{unstructured.Options{MinAngle: unstructured.MaxMinAngle}, false},
		{unstructured.Options{MinAngle: math.Nextafter(unstructured.MaxMinAngle, 90)}, true},
		{unstructured.Options{Layers: layer(unstructured.MaxLayerGrowth, 1)}, false},
		{unstructured.Options{Layers: layer(math.Nextafter(unstructured.MaxLayerGrowth, 4), 1)}, true},
		{unstructured.Options{Layers: layer(1.2, unstructured.MaxLayerCount)}, false},
		{unstructured.Options{Layers: layer(1.2, unstructured.MaxLayerCount+1)}, true},
	} {
		// A limit of one cell stops the mesher soon after it has checked
		// its options.
		o.opt.MaxCells = 1
		_, err := unstructured.Mesh(d, o.opt)
		msg := fmt.Sprint(err)
		bound := strings.Contains(msg, "must be between") || strings.Contains(msg, "at most")
		if bound != o.refused {
			t.Errorf("%+v: mesher says %q; refused for its bounds %v, want %v", o.opt, msg, bound, o.refused)
		}
	}
}

// TestEitherKeyNotBoth: two keys that each set the same thing, both given,
// are refused at the key written second, "give one of a and b, not both",
// in a layer request (first_height and yplus; count and thickness) and a
// grown grid (first_height and first_yplus).
func TestEitherKeyNotBoth(t *testing.T) {
	for _, c := range []struct {
		sample, from, to, at, want string
	}{
		{"cylinder-channel", "first_height: 0.25,", "first_height: 0.25, yplus: 1,", "yplus", "mesh.unstructured.layers[0].yplus: give one of first_height and yplus, not both"},
		{"cylinder-channel", "first_height: 0.25,", "yplus: 1, first_height: 0.25,", "first_height", "mesh.unstructured.layers[0].first_height: give one of first_height and yplus, not both"},
		{"cylinder-channel", "count: 10}", "count: 10, thickness: 5}", "thickness", "layers[0].thickness: give one of count and thickness, not both"},
		{"naca-ogrid", "first_yplus: yplus\n", "first_yplus: yplus\n        first_height: 1e-5\n", "first_height", "grow[0].first_height: give one of first_height and first_yplus, not both"},
	} {
		text := edited(t, c.sample, c.from, c.to)
		_, err := Parse("c.yaml", []byte(text), LoadOptions{})
		// The key written second, within the edited text.
		at := strings.Index(text, c.to) + strings.Index(c.to, c.at+":")
		wantInputError(t, err, "c.yaml", placeAt(text, at), []string{c.want}, []string{"one of them"})
	}
}

// TestVelocityIsAVector: an inflow-velocity's velocity given as a number
// is refused as a vector [vx, vy] in m/s (README, the kind table).
func TestVelocityIsAVector(t *testing.T) {
	text := edited(t, "cylinder-channel", "velocity: [speed, 0]", "velocity: 100")
	_, err := Parse("c.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "c.yaml", placeOf(t, text, "100,", 1), []string{"boundaries.inlet.velocity: velocity is a vector [vx, vy] in m/s", `found "100"`}, []string{"expected a list"})
}

// TestVTSRefusedAtItsEntry: the vts format on an unstructured mesh is
// refused as the case is read, at the formats entry; given by --format
// (RunOptions.Formats) it is refused by Run, naming the flag.
func TestVTSRefusedAtItsEntry(t *testing.T) {
	text := edited(t, "cylinder-channel", "boundaries:", "outputs: {formats: [cgns, vts]}\nboundaries:")
	_, err := Parse("c.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "c.yaml", placeOf(t, text, "vts]", 1), []string{"outputs.formats[1]: the vts format writes the blocks of a structured mesh"}, nil)

	text = edited(t, "cylinder-channel", "boundaries:", "outputs: {formats: [cgns, vtx]}\nboundaries:")
	_, err = Parse("c.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "c.yaml", placeOf(t, text, "vtx]", 1), []string{`unknown output format "vtx"`}, []string{"bad input"})

	c := cylinderChannel(t)
	_, err = Run(c, t.TempDir()+"/deck", RunOptions{Formats: []string{"vts"}})
	if !errors.Is(err, ErrInput) || !strings.Contains(fmt.Sprint(err), "--format vts: the vts format") {
		t.Errorf("got %v, want the --format vts refusal", err)
	}
}

// boxCase is a small structured case whose tags come from a rectangle's
// sides: wall from the loop, outlet and inlet from two sides.
const boxCase = `name: box
units: mm
geometry:
  loops:
    - name: box
      tag: wall
      spacing: {count: 5}
      rectangle:
        from: [0, 0]
        to: [10, 5]
        bottom: {name: s}
        right: {name: e, tag: outlet}
        top: {name: n}
        left: {name: w, tag: inlet}
mesh:
  structured:
    blocks:
      - {south: s, east: e, north: n, west: w}
boundaries:
  wall: {kind: wall-slip}
  inlet: {kind: inflow-velocity, velocity: [10, 0], temperature: 300}
  outlet: {kind: outflow-pressure, pressure: 1e5}
`

// TestTagWithoutConditionAtItsTag: a tag left out of boundaries is
// reported where the case first gives it to a segment: the loop's tag for
// sides that take the loop's, the side's own tag otherwise; not at the
// boundaries section's first entry.
func TestTagWithoutConditionAtItsTag(t *testing.T) {
	for _, c := range []struct{ drop, at string }{
		{"  wall: {kind: wall-slip}\n", "wall\n"},
		{"  outlet: {kind: outflow-pressure, pressure: 1e5}\n", "outlet}"},
	} {
		text := strings.Replace(boxCase, c.drop, "", 1)
		cs, err := Parse("box.yaml", []byte(text), LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		_, err = Run(cs, t.TempDir()+"/deck", RunOptions{Formats: []string{"manifest"}})
		tag := strings.TrimRight(c.at, "}\n")
		wantInputError(t, err, "box.yaml", placeOf(t, text, c.at, 1), []string{fmt.Sprintf("boundary tag %q: has no boundary condition", tag), fmt.Sprintf("under boundaries, %s: {kind: ...}", tag)}, nil)
	}
}

// TestChecksAndParameterPlaces: an error in the checks section names the
// file once, at the key's value; a parameter named like a built-in
// constant is refused at its key, saying it is the constant (π).
func TestChecksAndParameterPlaces(t *testing.T) {
	text := boxCase + "checks: {profile: tigt}\n"
	_, err := Parse("box.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "box.yaml", placeOf(t, text, "tigt", 1), []string{`checks: no limit profile "tigt"`}, nil)
	if n := strings.Count(fmt.Sprint(err), "box.yaml"); n != 1 {
		t.Errorf("%v names the file %d times", err, n)
	}

	text = strings.Replace(boxCase, "units: mm\n", "units: mm\nparameters:\n  pi: 3\n", 1)
	_, err = Parse("box.yaml", []byte(text), LoadOptions{})
	wantInputError(t, err, "box.yaml", placeOf(t, text, "pi:", 1), []string{`parameters.pi: "pi" cannot name a parameter: it is a built-in constant of expressions, 3.14159`}, nil)
}
