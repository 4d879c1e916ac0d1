package deck

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
)

// A block whose south side runs along a floor and up a riser turns by 90°
// inside that side, at (1, 0), and there its edges go from 0.1 m (1 m in
// 10) to 0.01 m (0.2 m in 20), ten times shorter (elementary geometry):
// both are noted, placed; the other sides, straight and evenly spaced,
// are not.
func TestSideNotes(t *testing.T) {
	text := `name: notch
units: m
geometry:
  loops:
    - name: box
      start: [0, 0]
      segments:
        - {name: floor, line: [1, 0], tag: wall, spacing: {count: 11}}
        - {name: riser, line: [1, 0.2], tag: wall, spacing: {count: 21}}
        - {name: east, line: [1, 1], tag: outlet, spacing: {count: 9}}
        - {name: roof, line: [0, 1], tag: wall, spacing: {count: 31}}
        - {name: west, line: [0, 0], tag: inlet, spacing: {count: 9}}
mesh:
  structured:
    blocks:
      - {name: box, south: [floor, riser], east: east, north: roof, west: west}
`
	c, err := Parse("notch.yaml", []byte(text), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(c, filepath.Join(t.TempDir(), "deck"), RunOptions{Formats: []string{"manifest"}})
	var failed *CheckFailure
	if err != nil && !errors.As(err, &failed) {
		t.Fatal(err)
	}
	var sides []string
	for _, n := range res.Notes {
		if strings.Contains(n, " side") && strings.HasPrefix(n, `block "box" `) && !strings.Contains(n, "smoothed") {
			sides = append(sides, n)
		}
	}
	want := []string{
		`block "box" south side turns by 90° at (1, 0) m, inside the side`,
		`block "box" south side: neighbouring edges at (1, 0) m differ in length by 10 times (0.1 m against 0.01 m)`,
	}
	if len(sides) != len(want) {
		t.Fatalf("side notes %q, want %d", sides, len(want))
	}
	for i, w := range want {
		if !strings.HasPrefix(sides[i], w) {
			t.Errorf("note %q, want it to start %q", sides[i], w)
		}
	}
}
