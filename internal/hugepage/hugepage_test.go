package hugepage

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"unsafe"
)

// vmFlags returns the VmFlags line of the mapping holding address a, from
// the kernel's /proc/self/smaps (proc(5): "hg" marks memory advised with
// MADV_HUGEPAGE).
func vmFlags(t *testing.T, a uintptr) string {
	f, err := os.Open("/proc/self/smaps")
	if err != nil {
		t.Skipf("no /proc/self/smaps: %v", err)
	}
	defer f.Close()
	in := false
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		var lo, hi uintptr
		if n, _ := fmt.Sscanf(line, "%x-%x ", &lo, &hi); n == 2 {
			in = lo <= a && a < hi
			continue
		}
		if in && strings.HasPrefix(line, "VmFlags:") {
			return line
		}
	}
	t.Fatalf("address %#x is in no mapping of /proc/self/smaps", a)
	return ""
}

// A large slice's mapping is advised for huge pages (the kernel shows "hg"
// for it), and its contents start zero as make's do.
func TestMakeAdvises(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("madvise(MADV_HUGEPAGE) is asked for on Linux only")
	}
	big := Make[float64](4 * MinBytes / 8)
	mid := uintptr(unsafe.Pointer(&big[len(big)/2]))
	if flags := vmFlags(t, mid); !strings.Contains(flags, " hg") {
		t.Errorf("middle of a %d MiB slice: %s; want the hg flag", 4*MinBytes>>20, flags)
	}
	for i, x := range big {
		if x != 0 {
			t.Fatalf("element %d is %v, not zero", i, x)
		}
	}
	runtime.KeepAlive(big)
}

// ReadFile gives the bytes os.ReadFile gives, for files large and empty,
// and its error for a missing one.
func TestReadFile(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []int{0, 1, MinBytes + 12345} {
		want := make([]byte, n)
		for i := range want {
			want[i] = byte(i*31 + i/977)
		}
		path := filepath.Join(dir, fmt.Sprint(n))
		if err := os.WriteFile(path, want, 0o644); err != nil {
			t.Fatal(err)
		}
		got, err := ReadFile(path)
		if err != nil || !bytes.Equal(got, want) {
			t.Fatalf("%d bytes: read %d, error %v", n, len(got), err)
		}
	}
	if _, err := ReadFile(filepath.Join(dir, "missing")); !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("missing file: error %v", err)
	}
}

// Grow keeps the contents, gives the room asked for, and keeps the array
// when it already has the room (as slices.Grow does).
func TestGrow(t *testing.T) {
	s := []int32{1, 2, 3}
	g := Grow(s, MinBytes/4)
	if len(g) != 3 || cap(g) < 3+MinBytes/4 || g[0] != 1 || g[2] != 3 {
		t.Fatalf("len %d cap %d contents %v", len(g), cap(g), g[:3])
	}
	if h := Grow(g, 10); &h[0] != &g[0] {
		t.Fatal("Grow made a new array though the slice had room")
	}
}
