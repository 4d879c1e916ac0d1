package geometry

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// A chain whose second line starts away from where the first ends: the
// error is a *ChainError with the gap of a 3-4-5 right triangle (5,
// elementary geometry), printed to 4 digits; once named by the caller it
// names both segments instead of their indices.
func TestChainJoinError(t *testing.T) {
	c2, _ := Count(3)
	first, _ := NewLine(0, 0, 1, 0, Attr{Spacing: c2})
	second, _ := NewLine(4, 4, 4, 6, Attr{Spacing: c2})
	_, err := DiscretiseChain([]Segment{first, second})
	var ce *ChainError
	if !errors.As(err, &ce) || !errors.Is(err, ErrNotContinuous) {
		t.Fatalf("got %v, want a *ChainError wrapping ErrNotContinuous", err)
	}
	if ce.Index != 1 || ce.Gap != 5 || math.Abs(ce.Size-math.Sqrt(52)) > 1e-15*ce.Size {
		t.Errorf("index %d gap %v size %v; want 1, 5 and the diagonal √(4² + 6²) = 7.211", ce.Index, ce.Gap, ce.Size)
	}
	for _, want := range []string{"chain segment 1 (line) starts at (4, 4)", "segment 0 (line) before it ends at (1, 0)", "gap 5 exceeds", "(1e-09 × the chain's size 7.211)"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("%q lacks %q", err, want)
		}
	}
	named := NameChain(err, []string{"floor", "outlet"})
	for _, want := range []string{`chain segment "outlet" (line) starts at (4, 4)`, `segment "floor" (line) before it ends at (1, 0)`} {
		if !strings.Contains(named.Error(), want) {
			t.Errorf("%q lacks %q", named, want)
		}
	}
	if !errors.Is(named, ErrNotContinuous) || !strings.Contains(err.Error(), "segment 1 (line)") {
		t.Errorf("naming changed the kind or the original: %v / %v", named, err)
	}
	if other := errors.New("other"); NameChain(other, []string{"a"}) != other {
		t.Error("NameChain changed an error that is not a chain error")
	}
}

// A gap far smaller than the coordinates prints with enough digits to
// show two different points.
func TestChainJoinErrorDigits(t *testing.T) {
	c2, _ := Count(2)
	first, _ := NewLine(0, 0, 1, 0, Attr{Spacing: c2})
	second, _ := NewLine(1, 1e-7, 2, 0, Attr{Spacing: c2})
	_, err := DiscretiseChain([]Segment{first, second})
	if err == nil || !strings.Contains(err.Error(), "starts at (1, 1e-07)") || !strings.Contains(err.Error(), "gap 1e-07") {
		t.Errorf("got %v", err)
	}
	third, _ := NewLine(1+3e-8, 0, 2, 0, Attr{Spacing: c2})
	_, err = DiscretiseChain([]Segment{first, third})
	if err == nil || !strings.Contains(err.Error(), "starts at (1.00000003, 0)") || !strings.Contains(err.Error(), "ends at (1, 0)") {
		t.Errorf("got %v", err)
	}
}

// A segment whose spacing law cannot be met names the segment too.
func TestChainSpacingError(t *testing.T) {
	c2, _ := Count(2)
	g, err := Growth(5, 1.2, false) // first edge 5 on a line of length 1
	if err != nil {
		t.Fatal(err)
	}
	first, _ := NewLine(0, 0, 1, 0, Attr{Spacing: c2})
	second, _ := NewLine(1, 0, 2, 0, Attr{Spacing: g})
	_, err = DiscretiseChain([]Segment{first, second})
	var ce *ChainError
	if !errors.As(err, &ce) || ce.Index != 1 || errors.Is(err, ErrNotContinuous) {
		t.Fatalf("got %v, want a *ChainError at segment 1 for its spacing", err)
	}
	if got := NameChain(err, []string{"a", "roof"}).Error(); !strings.HasPrefix(got, `chain segment "roof" (line): `) {
		t.Errorf("named: %q", got)
	}
}
