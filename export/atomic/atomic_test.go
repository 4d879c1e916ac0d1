package atomic

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// The interrupt tests re-run this test binary as a child process that
// writes a large deck (or file) and reports each written chunk on stdout;
// the parent kills it with SIGKILL at a chosen chunk and then inspects what
// is left on disk. SIGKILL cannot be caught, so nothing in the child gets a
// chance to tidy up: what remains is what a crash or a power cut after the
// page cache reached the disk would leave.
const (
	childEnv   = "CVDECK_ATOMIC_CHILD" // "dir:PATH" or "file:PATH"
	chunkSize  = 1 << 20
	chunkCount = 48
)

// chunk returns the deterministic content of chunk k of the big file.
func chunk(k int) []byte {
	b := bytes.Repeat([]byte{byte('a' + k%26)}, chunkSize)
	copy(b, fmt.Sprintf("chunk %d\n", k))
	return b
}

// writeBig writes the big file, reporting every chunk on stdout.
func writeBig(w io.Writer) error {
	for k := 0; k < chunkCount; k++ {
		if _, err := w.Write(chunk(k)); err != nil {
			return err
		}
		if bw, ok := w.(*bufio.Writer); ok {
			if err := bw.Flush(); err != nil {
				return err
			}
		}
		fmt.Printf("chunk %d\n", k)
	}
	return nil
}

// TestChildWriter is the child process body; it does nothing in a normal
// test run.
func TestChildWriter(t *testing.T) {
	spec := os.Getenv(childEnv)
	if spec == "" {
		t.Skip("runs only as the child of the interrupt tests")
	}
	mode, path, _ := strings.Cut(spec, ":")
	var err error
	switch mode {
	case "dir":
		err = ReplaceDir(path, func(tmp string) error {
			if err := os.WriteFile(filepath.Join(tmp, "small.txt"), []byte("new deck\n"), 0o644); err != nil {
				return err
			}
			if err := WriteFile(filepath.Join(tmp, "big.bin"), writeBig); err != nil {
				return err
			}
			fmt.Println("built")
			return nil
		})
	case "file":
		err = WriteFile(path, writeBig)
	}
	if err != nil {
		fmt.Println("error:", err)
		os.Exit(3)
	}
	fmt.Println("done")
}

// runChild starts the child and kills it when it prints the line killAt
// ("" lets it finish). It returns whether the child was killed.
func runChild(t *testing.T, spec, killAt string) bool {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestChildWriter$", "-test.count=1")
	cmd.Env = append(os.Environ(), childEnv+"="+spec)
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	sc := bufio.NewScanner(out)
	killed := false
	var lines []string
	for sc.Scan() {
		line := sc.Text()
		lines = append(lines, line)
		if killAt != "" && line == killAt {
			if err := cmd.Process.Kill(); err != nil {
				t.Fatal(err)
			}
			killed = true
			break
		}
	}
	io.Copy(io.Discard, out)
	werr := cmd.Wait()
	if killAt != "" && !killed {
		t.Fatalf("child finished before %q: %v\n%s", killAt, werr, strings.Join(lines, "\n"))
	}
	if killAt == "" && werr != nil {
		t.Fatalf("child failed: %v\n%s", werr, strings.Join(lines, "\n"))
	}
	return killed
}

// snapshot maps every file under dir (relative path) to its content, or
// returns nil if dir does not exist.
func snapshot(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	if _, err := os.Stat(dir); os.IsNotExist(err) {
		return nil
	}
	s := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(p)
		rel, _ := filepath.Rel(dir, p)
		s[rel] = b
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func sameFiles(a, b map[string][]byte) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if w, ok := b[k]; !ok || !bytes.Equal(v, w) {
			return false
		}
	}
	return true
}

func names(s map[string][]byte) string {
	var n []string
	for k, v := range s {
		n = append(n, k+"("+strconv.Itoa(len(v))+")")
	}
	sort.Strings(n)
	return strings.Join(n, " ")
}

func TestReplaceDirInterrupted(t *testing.T) {
	if testing.Short() {
		t.Skip("writes 48 MiB per child run")
	}
	root := t.TempDir()
	deck := filepath.Join(root, "deck")
	prev := map[string][]byte{"mesh.vtu": []byte("previous mesh\n"), "sub/deck.yaml": []byte("previous: true\n")}
	if err := ReplaceDir(deck, func(tmp string) error {
		for name, b := range prev {
			if err := os.MkdirAll(filepath.Dir(filepath.Join(tmp, name)), 0o755); err != nil {
				return err
			}
			if err := os.WriteFile(filepath.Join(tmp, name), b, 0o644); err != nil {
				return err
			}
		}
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	if got := snapshot(t, deck); !sameFiles(got, prev) {
		t.Fatalf("first deck not in place: %s", names(got))
	}
	// The new deck as a completed run leaves it.
	want := map[string][]byte{"small.txt": []byte("new deck\n")}
	var big []byte
	for k := 0; k < chunkCount; k++ {
		big = append(big, chunk(k)...)
	}
	want["big.bin"] = big
	// Kill at the first chunk, midway, at the last chunk and after the
	// build (during sync and swap). The kill lands a moment after the
	// child prints the line, and a child that is quick by then may have
	// finished its swap: the whole new deck is as good an outcome as the
	// previous one or none; half of one is not.
	for _, at := range []string{"chunk 0", "chunk 23", fmt.Sprintf("chunk %d", chunkCount-1), "built"} {
		runChild(t, "dir:"+deck, at)
		got := snapshot(t, deck)
		if got != nil && !sameFiles(got, prev) && !sameFiles(got, want) {
			t.Fatalf("killed at %q: deck is neither the previous one, nor the whole new one, nor absent: %s", at, names(got))
		}
		if got == nil || sameFiles(got, want) {
			// Interrupted between the two renames, the previous deck
			// gone from its name (the contract allows this), or the
			// swap done before the kill landed. Put the previous deck
			// back for the next round.
			t.Logf("killed at %q: deck %s", at, names(got))
			if err := ReplaceDir(deck, func(tmp string) error {
				for name, b := range prev {
					os.MkdirAll(filepath.Dir(filepath.Join(tmp, name)), 0o755)
					if err := os.WriteFile(filepath.Join(tmp, name), b, 0o644); err != nil {
						return err
					}
				}
				return nil
			}); err != nil {
				t.Fatal(err)
			}
		}
	}
	// A run that completes replaces the deck as a whole and removes the
	// temporaries left by the killed runs.
	runChild(t, "dir:"+deck, "")
	got := snapshot(t, deck)
	if !sameFiles(got, want) {
		t.Fatalf("completed run left %s", names(got))
	}
	ents, _ := os.ReadDir(root)
	if len(ents) != 1 {
		var n []string
		for _, e := range ents {
			n = append(n, e.Name())
		}
		t.Fatalf("temporaries left beside the deck: %v", n)
	}
}

func TestWriteFileInterrupted(t *testing.T) {
	if testing.Short() {
		t.Skip("writes 48 MiB per child run")
	}
	root := t.TempDir()
	path := filepath.Join(root, "mesh.vtu")
	if err := os.WriteFile(path, []byte("previous\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	var whole []byte
	for k := 0; k < chunkCount; k++ {
		whole = append(whole, chunk(k)...)
	}
	for _, at := range []string{"chunk 1", "chunk 30"} {
		runChild(t, "file:"+path, at)
		b, err := os.ReadFile(path)
		// The previous content, or (had the child finished before the kill
		// landed) the whole new one; never part of it.
		if err != nil || (string(b) != "previous\n" && !bytes.Equal(b, whole)) {
			t.Fatalf("killed at %q: file holds %d bytes (%v), want the previous content", at, len(b), err)
		}
		if err := os.WriteFile(path, []byte("previous\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func TestWriteFileErrorLeavesTarget(t *testing.T) {
	root := t.TempDir()
	path := filepath.Join(root, "a.txt")
	os.WriteFile(path, []byte("old"), 0o644)
	err := WriteFile(path, func(w io.Writer) error {
		w.Write([]byte("half"))
		return fmt.Errorf("writer gave up")
	})
	if err == nil || !strings.Contains(err.Error(), "writer gave up") || !strings.Contains(err.Error(), path) {
		t.Fatalf("error %v should name the file and the cause", err)
	}
	if b, _ := os.ReadFile(path); string(b) != "old" {
		t.Fatalf("target changed to %q", b)
	}
	if ents, _ := os.ReadDir(root); len(ents) != 1 {
		t.Fatalf("temporary file left: %d entries", len(ents))
	}
	if err := WriteFile(path, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	fi, _ := os.Stat(path)
	if b, _ := os.ReadFile(path); string(b) != "new" || fi.Mode().Perm() != 0o644 {
		t.Fatalf("got %q mode %v", b, fi.Mode())
	}
}

func TestReplaceDirBuildError(t *testing.T) {
	root := t.TempDir()
	deck := filepath.Join(root, "deck")
	os.MkdirAll(deck, 0o755)
	os.WriteFile(filepath.Join(deck, "x"), []byte("keep"), 0o644)
	err := ReplaceDir(deck, func(tmp string) error {
		os.WriteFile(filepath.Join(tmp, "x"), []byte("half"), 0o644)
		return fmt.Errorf("mesher failed")
	})
	if err == nil || !strings.Contains(err.Error(), "mesher failed") {
		t.Fatalf("got %v", err)
	}
	if b, _ := os.ReadFile(filepath.Join(deck, "x")); string(b) != "keep" {
		t.Fatalf("deck changed: %q", b)
	}
	if ents, _ := os.ReadDir(root); len(ents) != 1 {
		t.Fatalf("temporary folder left: %d entries", len(ents))
	}
	file := filepath.Join(root, "plain")
	os.WriteFile(file, nil, 0o644)
	if err := ReplaceDir(file, func(string) error { return nil }); err == nil || !strings.Contains(err.Error(), "not a folder") {
		t.Fatalf("replacing a file: %v", err)
	}
}
