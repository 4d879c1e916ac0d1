package cgns

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// interruptEnv makes the test binary a writer child: it writes a
// 1-million-cell deck to the path in the variable and exits.
const interruptEnv = "CVDECK_CGNS_WRITER_CHILD"

func TestMain(m *testing.M) {
	if target := os.Getenv(interruptEnv); target != "" {
		os.Exit(writerChild(target))
	}
	os.Exit(m.Run())
}

func writerChild(target string) int {
	d := testDeck(quadMesh(nopTB{}, 1000, 1000))
	if _, err := Write(target, d); err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	return 0
}

// nopTB lets the test mesh builders run outside a test; they call Fatal
// only on a builder error, which the child reports by exiting.
type nopTB struct{ testing.TB }

func (nopTB) Helper() {}
func (nopTB) Fatal(args ...any) {
	fmt.Fprintln(os.Stderr, args...)
	os.Exit(1)
}

// TestInterruptedWrite kills a writer (the test binary re-executed as a
// child) in the middle of writing a large deck: the target must then be the
// previous file, intact, or absent, never a partial file.
func TestInterruptedWrite(t *testing.T) {
	for _, previous := range []bool{false, true} {
		t.Run(fmt.Sprintf("previous=%v", previous), func(t *testing.T) {
			dir := t.TempDir()
			target := filepath.Join(dir, "deck.cgns")
			var old *Deck
			if previous {
				old = testDeck(triMesh(t, 10, 5))
				if _, err := Write(target, old); err != nil {
					t.Fatal(err)
				}
			}
			cmd := exec.Command(os.Args[0], "-test.run=^$")
			cmd.Env = append(os.Environ(), interruptEnv+"="+target)
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			// Kill as soon as the temporary file holds more than 4 MB:
			// the writer is then part-way through the arrays.
			deadline := time.Now().Add(2 * time.Minute)
			killed := false
			for !killed && time.Now().Before(deadline) {
				tmps, _ := filepath.Glob(filepath.Join(dir, ".deck.cgns.partial-*"))
				for _, p := range tmps {
					if st, err := os.Stat(p); err == nil && st.Size() > 4<<20 {
						cmd.Process.Kill()
						killed = true
					}
				}
				if !killed {
					time.Sleep(time.Millisecond)
				}
			}
			err := cmd.Wait()
			if !killed {
				t.Fatalf("the writer was not caught mid-write (exit %v): %s", err, stderr.String())
			}
			ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus)
			if !ok || !ws.Signaled() {
				t.Fatalf("the writer finished before the kill reached it (%v); the test did not interrupt a write", err)
			}
			if tmps, _ := filepath.Glob(filepath.Join(dir, ".deck.cgns.partial-*")); len(tmps) != 1 {
				t.Fatalf("want the killed writer's one temporary file left, found %v", tmps)
			}
			_, statErr := os.Stat(target)
			if !previous {
				if !os.IsNotExist(statErr) {
					t.Fatalf("after an interrupted first write the target exists (%v); it must be absent", statErr)
				}
				return
			}
			got, err := Read(target)
			if err != nil {
				t.Fatalf("the previous file is no longer readable: %v", err)
			}
			sameCounts(t, got, old.Mesh)
			sameUnstructured(t, got, old.Mesh)
			cgnscheck(t, target)
		})
	}
}
