package deck

import (
	"strings"
	"testing"

	"cvdeck/samples"
)

// Wall layers whose first height is set from a y+ carry the flat-plate
// estimate's remarks in the deck's notes, as `cvdeck state --yplus` and a
// reference y+ target do: the cylinder-channel sample's reference state
// (0.5 m/s past a 0.08 m cylinder in air) gives Re_x = 2.65e3 at the
// reference length, far below the 5e5 at which a flat plate's layer turns
// turbulent (common practice), so the turbulent estimate's height is
// flagged as laminar there, once.
func TestYplusHeightNotes(t *testing.T) {
	data, err := samples.Case("cylinder-channel")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(data), "first_height: 0.25, growth: 1.2, count: 10", "yplus: 1, growth: 1.2, count: 10", 1)
	if text == string(data) {
		t.Fatal("the sample's layer line has changed; update the test")
	}
	c, err := Parse("cylinder-channel.yaml", []byte(text), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(c, t.TempDir(), RunOptions{Formats: []string{"manifest"}})
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, note := range res.Notes {
		if strings.HasPrefix(note, "first-cell height: Re_x = 2.65e+03") && strings.Contains(note, "laminar there") {
			n++
		}
	}
	if n != 1 {
		t.Errorf("%d laminar notes, want 1: %q", n, res.Notes)
	}
}
