package bc

import "testing"

// Edit distances worked by hand (the classic examples of the Levenshtein
// and optimal-string-alignment distances, common practice).
func TestEditDistance(t *testing.T) {
	for _, c := range []struct {
		a, b string
		d    int
	}{
		{"kitten", "sitting", 3}, {"", "abc", 3}, {"abc", "abc", 0},
		{"inelt", "inlet", 1}, {"ca", "abc", 3}, {"flaw", "lawn", 2},
	} {
		if d := editDistance(c.a, c.b); d != c.d {
			t.Errorf("d(%q, %q) = %d, want %d", c.a, c.b, d, c.d)
		}
	}
	if s := didYouMean("outlett", []string{"inlet", "outlet"}); s != ` (did you mean "outlet"?)` {
		t.Errorf("suggestion %q", s)
	}
	if s := didYouMean("zzz", []string{"inlet", "outlet"}); s != "" {
		t.Errorf("far suggestion %q", s)
	}
	if s := nearestName("zzz", []string{"inlet", "outlet"}); s != ` (nearest: "inlet")` {
		t.Errorf("nearest %q", s)
	}
}
