package sweep

import (
	"path/filepath"
	"strings"
	"testing"
)

// FuzzParse feeds arbitrary text to the sweep-file parser and the variant
// expansion: they must return variants or an error, never panic, and every
// folder name must stay inside the output folder.
func FuzzParse(f *testing.F) {
	f.Add([]byte(fakeSweep))
	f.Add([]byte("base: a.yaml\ncombine: zip\nparameters:\n  a: [1, 2]\n  b: {from: 0, to: 1, count: 2}\nname: \"../{a}\"\n"))
	f.Add([]byte("base: a.yaml\nparameters:\n  a: {from: 0, to: 1e300, step: 1e-300}\n"))
	f.Add([]byte("base: a.yaml\nrefine: {levels: 8, ratio: 4}\nconstraints: [\"1/0\"]\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		file, err := Parse("fuzz.yaml", data)
		if err != nil {
			return
		}
		vs, err := file.Variants()
		if err != nil {
			return
		}
		for _, v := range vs {
			if filepath.Dir(filepath.Join("/out", v.Name)) != "/out" || strings.HasPrefix(v.Name, ".") {
				t.Fatalf("folder %q leaves the output folder", v.Name)
			}
		}
	})
}
