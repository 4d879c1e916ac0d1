package geometry

import (
	"errors"
	"math"
	"testing"
)

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// Vinokur 1983 (J. Comput. Phys. 50, 215–234): the stretching is built so
// the prescribed end spacings are met; the brief (and DESIGN.md) demand the
// first and last spacing exact to 1e-12 relative.
func TestVinokurTwoSidedEndSpacings(t *testing.T) {
	cases := []struct {
		n      int
		d0, d1 float64
		branch string
	}{
		{51, 1e-3, 5e-3, "sinh"},  // both ends finer than uniform (1/50)
		{101, 2e-3, 2e-3, "sinh"}, // symmetric
		{11, 0.15, 0.12, "sin"},   // both ends coarser than uniform (1/10)
		{21, 0.049, 0.051, "near uniform"},
		{41, 1e-3, 0.1, "mixed"},
		{4, 0.2, 0.3, "four nodes"},
		{61, 1e-7, 2e-3, "very fine start"}, // positions near 0 carry the small spacing exactly
	}
	for _, c := range cases {
		f, err := VinokurTwoSided(c.n, c.d0, c.d1)
		if err != nil {
			t.Fatalf("%s: %v", c.branch, err)
		}
		if len(f) != c.n || f[0] != 0 || f[c.n-1] != 1 {
			t.Fatalf("%s: bad ends %v", c.branch, f)
		}
		if e := relErr(f[1]-f[0], c.d0); e > 1e-12 {
			t.Errorf("%s: first spacing %.17g want %g (rel err %.2g)", c.branch, f[1], c.d0, e)
		}
		if e := relErr(f[c.n-1]-f[c.n-2], c.d1); e > 1e-12 {
			t.Errorf("%s: last spacing %.17g want %g (rel err %.2g)", c.branch, 1-f[c.n-2], c.d1, e)
		}
		for i := 1; i < c.n; i++ {
			if !(f[i] > f[i-1]) {
				t.Fatalf("%s: not increasing at %d", c.branch, i)
			}
		}
	}
}

// Vinokur 1983: the sinh branch clusters at both ends, so the edge lengths
// of a symmetric case fall then rise; the sin branch does the opposite.
func TestVinokurBranchShape(t *testing.T) {
	f, _ := VinokurTwoSided(21, 0.01, 0.01)
	mid := f[11] - f[10]
	if !(mid > f[1]) {
		t.Errorf("sinh branch: middle edge %g not larger than end edge %g", mid, f[1])
	}
	g, _ := VinokurTwoSided(21, 0.08, 0.08)
	if !(g[11]-g[10] < g[1]) {
		t.Errorf("sin branch: middle edge %g not smaller than end edge %g", g[11]-g[10], g[1])
	}
	// Symmetric input gives a symmetric distribution.
	for i := range f {
		if math.Abs(f[i]+f[20-i]-1) > 1e-14 {
			t.Fatalf("asymmetric at %d: %g + %g", i, f[i], f[20-i])
		}
	}
}

func TestVinokurOneSided(t *testing.T) {
	for _, c := range []struct {
		n  int
		d0 float64
	}{{31, 1e-4}, {31, 0.01}, {11, 0.3}, {11, 0.1000001}} {
		f, err := VinokurOneSided(c.n, c.d0)
		if err != nil {
			t.Fatal(err)
		}
		if e := relErr(f[1], c.d0); e > 1e-12 {
			t.Errorf("n=%d: first spacing %.17g want %g (rel %.2g)", c.n, f[1], c.d0, e)
		}
		if err := checkIncreasing(f); err != nil {
			t.Fatal(err)
		}
	}
}

func TestSpacingFractions(t *testing.T) {
	const L = 2.5
	// Growth by first spacing and ratio: first exact, ratio adjusted.
	s, err := Growth(0.01, 1.2, false)
	if err != nil {
		t.Fatal(err)
	}
	f, err := s.Fractions(L)
	if err != nil {
		t.Fatal(err)
	}
	if e := relErr(f[1]*L, 0.01); e > 1e-12 {
		t.Errorf("growth first spacing rel err %g", e)
	}
	r := (f[2] - f[1]) / f[1]
	for i := 2; i < len(f)-1; i++ {
		if e := relErr((f[i+1]-f[i])/(f[i]-f[i-1]), r); e > 1e-9 {
			t.Fatalf("growth ratio not constant at %d", i)
		}
	}
	if math.Abs(r-1.2) > 0.05 {
		t.Errorf("adjusted ratio %g too far from 1.2", r)
	}
	// From the end: the last edge is the first spacing.
	s, _ = GrowthCount(0.02, 30, true)
	f, err = s.Fractions(L)
	if err != nil {
		t.Fatal(err)
	}
	if len(f) != 30 || relErr((1-f[28])*L, 0.02) > 1e-12 {
		t.Errorf("growth from end: n=%d last spacing %g", len(f), (1-f[28])*L)
	}
	// Count and size.
	s, _ = Size(0.3)
	if n, _ := s.NodeCount(L); n != 9 { // round(2.5/0.3) = 8 edges
		t.Errorf("size law node count %d want 9", n)
	}
	s, _ = Clustered(0.001, 0.01, 40)
	f, _ = s.Reversed().Fractions(L)
	if relErr(f[1]*L, 0.01) > 1e-12 || relErr((1-f[38])*L, 0.001) > 1e-12 {
		t.Errorf("reversed two-sided: first %g last %g", f[1]*L, (1-f[38])*L)
	}
	s, _ = Cosine(5)
	f, _ = s.Fractions(L)
	if math.Abs(f[1]-(1-math.Sqrt2/2)/2) > 1e-15 || math.Abs(f[2]-0.5) > 1e-15 || f[1]+f[3] != 1 {
		t.Errorf("cosine fractions %v", f)
	}
}

func TestSpacingBadInput(t *testing.T) {
	bad := []func() error{
		func() error { _, err := Size(-0.1); return err },
		func() error { _, err := Size(math.NaN()); return err },
		func() error { _, err := Count(1); return err },
		func() error { _, err := Growth(0.1, 0, false); return err },
		func() error { _, err := Clustered(0.1, -1, 10); return err },
		func() error { s, _ := Clustered(0.6, 0.6, 10); _, err := s.Fractions(1); return err },
		func() error { s, _ := Growth(2, 1.1, false); _, err := s.Fractions(1); return err },
		func() error { _, err := Clustered(0.2, 0.3, 3); return err },
		func() error { s, _ := Size(1e-9); _, err := s.Fractions(1); return err },
	}
	for i, b := range bad {
		err := b()
		if !errors.Is(err, ErrSpacing) {
			t.Errorf("case %d: got %v, want ErrSpacing", i, err)
		} else {
			t.Log(err)
		}
	}
}
