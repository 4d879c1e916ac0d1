package cgns

import (
	"os"
	"os/exec"
	"strings"
	"testing"
)

// tool returns the path of a reference tool from Debian (cgns-convert,
// hdf5-tools). A missing tool skips the test on a developer machine and
// fails it under CI=true.
func tool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("reference tool %s is missing (install cgns-convert and hdf5-tools): %v", name, err)
		}
		t.Skipf("reference tool %s is missing: %v", name, err)
	}
	return p
}

// cgnscheck runs the CGNS library's checker (Debian cgns-convert) with
// every warning level on, fails the test on any error or warning and
// returns its report.
func cgnscheck(t *testing.T, path string) string {
	t.Helper()
	out, err := exec.Command(tool(t, "cgnscheck"), "-w3", path).CombinedOutput()
	text := string(out)
	if err != nil {
		t.Fatalf("cgnscheck %s: %v\n%s", path, err, text)
	}
	for _, line := range strings.Split(text, "\n") {
		if strings.Contains(line, "WARNING") || strings.Contains(line, "ERROR") || strings.Contains(line, "warnings (") || strings.Contains(line, "errors (") {
			t.Fatalf("cgnscheck %s reports problems:\n%s", path, text)
		}
	}
	if !strings.Contains(text, "checking complete") {
		t.Fatalf("cgnscheck %s did not complete:\n%s", path, text)
	}
	return text
}

// h5dump reads the whole file with the HDF5 library's own dump tool
// (Debian hdf5-tools) and returns its output.
func h5dump(t *testing.T, path string, args ...string) string {
	t.Helper()
	out, err := exec.Command(tool(t, "h5dump"), append(args, path)...).CombinedOutput()
	if err != nil {
		t.Fatalf("h5dump %s: %v\n%.2000s", path, err, out)
	}
	return string(out)
}
