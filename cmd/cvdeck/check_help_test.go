package main

import (
	"regexp"
	"strings"
	"testing"
)

// TestCheckHelpNamesEveryFormat: the check command's one-line help, as
// "cvdeck --help" lists it, names every extension that check reads, as
// the reader's own refusal of another extension lists them.
func TestCheckHelpNamesEveryFormat(t *testing.T) {
	code, _, errs := cvdeck(t, "check", "mesh.stl")
	if code != 2 {
		t.Fatalf("check mesh.stl: exit %d, want 2: %s", code, errs)
	}
	// "cvdeck checks .vtu, ... and .cgns meshes, not ".stl"".
	i, j := strings.Index(errs, "cvdeck checks"), strings.Index(errs, " meshes, not")
	if i < 0 || j < i {
		t.Fatalf("check mesh.stl: %q does not list the extensions check reads", errs)
	}
	exts := regexp.MustCompile(`\.[a-z]+\b`).FindAllString(errs[i:j], -1)
	if len(exts) < 6 {
		t.Fatalf("the refusal %q names %d extensions; want those check reads", errs, len(exts))
	}
	_, out, _ := cvdeck(t, "--help")
	var line string
	for _, l := range strings.Split(out, "\n") {
		if f := strings.Fields(l); len(f) > 0 && f[0] == "check" {
			line = l
		}
	}
	for _, e := range exts {
		if !strings.Contains(line, e+",") && !strings.Contains(line, e+" ") && !strings.Contains(line, e+")") {
			t.Errorf("the check command's help %q does not name %s", line, e)
		}
	}
}
