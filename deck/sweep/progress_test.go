package sweep

import (
	"bytes"
	"os"
	"strings"
	"testing"
	"time"
)

func TestBarLine(t *testing.T) {
	var buf bytes.Buffer
	b := NewBar(&buf)
	t0 := b.start
	b.now = func() time.Time { return t0.Add(30 * time.Second) }
	b.Update(Progress{Done: 6, Total: 24, Failed: 1, Row: Row{Name: "a-1", Status: StatusFailed, Error: "boom"}})
	out := buf.String()
	if !strings.Contains(out, "a-1 failed: boom\n") {
		t.Errorf("no failure line in %q", out)
	}
	want := "sweep [#######-----------------------] 6/24, 1 failed, 0:30, about 1:30 left"
	if !strings.HasSuffix(out, want) {
		t.Errorf("bar %q, want it to end with %q", out, want)
	}
	if clock(3725*time.Second) != "1:02:05" {
		t.Error(clock(3725 * time.Second))
	}
}

func TestNotATerminal(t *testing.T) {
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	defer w.Close()
	if IsTerminal(w) {
		t.Error("a pipe counts as a terminal")
	}
	null, err := os.OpenFile(os.DevNull, os.O_WRONLY, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer null.Close()
	if IsTerminal(null) {
		t.Error("the null device counts as a terminal")
	}
	f, err := os.CreateTemp(t.TempDir(), "x")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if IsTerminal(f) {
		t.Error("a file counts as a terminal")
	}
}
