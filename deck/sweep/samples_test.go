package sweep

import "testing"

// TestSampleSweeps checks the sample sweep files: the throat and exit-ratio
// sweep has the 24 variants its comment promises, the family 3 levels, the
// wall-resolution study 3 targets.
func TestSampleSweeps(t *testing.T) {
	for _, c := range []struct {
		file string
		n    int
	}{{"../../samples/sweeps/nozzle-throat-exit.yaml", 24}, {"../../samples/sweeps/nozzle-refine.yaml", 3}, {"../../samples/sweeps/naca-yplus.yaml", 3}} {
		f, err := ReadFile(c.file)
		if err != nil {
			t.Fatal(err)
		}
		vs, err := f.Variants()
		if err != nil {
			t.Fatal(err)
		}
		if len(vs) != c.n {
			t.Errorf("%s: %d variants, want %d", c.file, len(vs), c.n)
		}
	}
}
