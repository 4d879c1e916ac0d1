package deck

import (
	"os/exec"
	"runtime/debug"
	"strings"
	"testing"
)

// The build id carries the commit the toolchain stamped into the binary
// (the "vcs.revision" and "vcs.modified" build settings the Go toolchain
// records, as `go version -m` prints them), so that two builds of one
// version give different input hashes.
func TestBuildID(t *testing.T) {
	rev := "3f2a9c1b7e4d5a6b7c8d9e0f1a2b3c4d5e6f7a8b"
	for _, tc := range []struct {
		settings []debug.BuildSetting
		want     string
	}{
		{nil, Version},
		{[]debug.BuildSetting{{Key: "vcs.revision", Value: rev}, {Key: "vcs.modified", Value: "false"}}, Version + "+3f2a9c1b7e4d"},
		{[]debug.BuildSetting{{Key: "vcs.revision", Value: rev}, {Key: "vcs.modified", Value: "true"}}, Version + "+3f2a9c1b7e4d-modified"},
	} {
		if got := buildID(&debug.BuildInfo{Settings: tc.settings}, true); got != tc.want {
			t.Errorf("settings %v: build %q, want %q", tc.settings, got, tc.want)
		}
	}
	if got := buildID(nil, false); got != Version {
		t.Errorf("no build information: %q, want %q", got, Version)
	}
}

// A binary built in this checkout says which commit it is, as `git
// rev-parse HEAD` names it. The build asks for the stamp (-buildvcs=true),
// since GOFLAGS may turn it off.
func TestBuildIDOfBinary(t *testing.T) {
	head, err := exec.Command("git", "rev-parse", "HEAD").Output()
	if err != nil {
		t.Skipf("not a git checkout: %v", err)
	}
	bin := t.TempDir() + "/cvdeck"
	if out, err := exec.Command("go", "build", "-buildvcs=true", "-o", bin, "../cmd/cvdeck").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	out, err := exec.Command(bin, "version").Output()
	if err != nil {
		t.Fatal(err)
	}
	if want := "cvdeck " + Version + "+" + string(head[:12]); !strings.HasPrefix(string(out), want) {
		t.Errorf("version printed %q, want it to start %q", out, want)
	}
}
