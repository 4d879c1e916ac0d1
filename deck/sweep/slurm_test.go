package sweep

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"sort"
	"strings"
	"testing"
	"time"
)

// buildCvdeck builds the cvdeck command into a temporary folder and
// returns its path.
func buildCvdeck(t testing.TB) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "cvdeck")
	cmd := exec.Command("go", "build", "-o", bin, "./cmd/cvdeck")
	cmd.Dir = filepath.Join("..", "..")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build ./cmd/cvdeck: %v\n%s", err, out)
	}
	// main.go registers the command with root.AddCommand(newSweepCommand());
	// until it does, the test cannot run (and fails under CI).
	if out, _ := exec.Command(bin, "sweep", "--help").CombinedOutput(); !strings.Contains(string(out), "--shard") {
		needTool(t, "the cvdeck binary has no sweep command: register newSweepCommand() in cmd/cvdeck/main.go")
	}
	return bin
}

// sameDecks compares two sweep output folders as issue 8 defines equal:
// the same variant folders holding the same files, byte for byte for every
// file cvdeck writes itself and by content (cgnsdiff -d, from the CGNS
// library, Debian cgns-convert) for CGNS files, whose HDF5 layer stamps
// object times; the summaries equal apart from their run columns (run,
// seconds) and the shard field.
func sameDecks(t *testing.T, a, b string) {
	t.Helper()
	fa, fb := deckFiles(t, a), deckFiles(t, b)
	if !reflect.DeepEqual(sortedNames(fa), sortedNames(fb)) {
		t.Fatalf("the folders hold different files:\n%s: %v\n%s: %v", a, sortedNames(fa), b, sortedNames(fb))
	}
	cgnsFiles := 0
	for _, name := range sortedNames(fa) {
		if strings.HasSuffix(name, ".cgns") {
			cgnsFiles++
			if d := cgnsDiff(t, filepath.Join(a, name), filepath.Join(b, name)); d != "" {
				t.Errorf("%s: cgnsdiff -d finds differences:\n%s", name, d)
			}
			continue
		}
		if !bytes.Equal(fa[name], fb[name]) {
			t.Errorf("%s differs between %s and %s", name, a, b)
		}
	}
	if cgnsFiles == 0 {
		t.Errorf("no CGNS file in %s: the decks were not compared by content", a)
	}
	sa, err := ReadSummary(filepath.Join(a, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	sb, err := ReadSummary(filepath.Join(b, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(rowsWithoutRun(sa.Rows), rowsWithoutRun(sb.Rows)) || sa.Plan != sb.Plan ||
		sa.Total != sb.Total || !reflect.DeepEqual(sa.Warnings, sb.Warnings) {
		t.Error("summary.json differs apart from the run columns")
	}
	ca, _ := os.ReadFile(filepath.Join(a, "summary.csv"))
	cb, _ := os.ReadFile(filepath.Join(b, "summary.csv"))
	if csvWithoutRun(t, ca) != csvWithoutRun(t, cb) {
		t.Errorf("summary.csv differs apart from the run columns:\n%s\n%s", ca, cb)
	}
}

// deckFiles returns the files of the variant folders (not the summaries
// nor the scheduler's logs), by relative path.
func deckFiles(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if !e.IsDir() {
			continue
		}
		for name, data := range treeFiles(t, filepath.Join(dir, e.Name())) {
			out[filepath.Join(e.Name(), name)] = data
		}
	}
	return out
}

func sortedNames(m map[string][]byte) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// cgnsDiff returns what cgnsdiff -d reports between two files: nothing
// when their trees and node data agree.
func cgnsDiff(t *testing.T, a, b string) string {
	t.Helper()
	if _, err := exec.LookPath("cgnsdiff"); err != nil {
		needTool(t, "cgnsdiff is not installed (apt-get install cgns-convert)")
	}
	out, err := exec.Command("cgnsdiff", "-d", a, b).CombinedOutput()
	if err != nil {
		return string(out) + err.Error()
	}
	return strings.TrimSpace(string(out))
}

// TestSlurmJobArrayEqualsLocalRun runs the sample sweep twice: locally on
// two workers, and as a four-task job array on a one-node Slurm cluster
// (Debian slurm-wlm and munge) started by the test, each task running one
// shard with --shard $SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT through
// the job-array script the README shows; then it merges the shard
// summaries and compares the two results.
func TestSlurmJobArrayEqualsLocalRun(t *testing.T) {
	bin := buildCvdeck(t)
	c := startCluster(t)
	sweepFile, err := filepath.Abs(filepath.Join("..", "..", "samples", "sweeps", "nozzle-throat-exit.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	script, err := filepath.Abs(filepath.Join("testdata", "slurm", "sweep-array.sh"))
	if err != nil {
		t.Fatal(err)
	}
	work := t.TempDir()
	local, array := filepath.Join(work, "local"), filepath.Join(work, "array")
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()

	run := func(name string, args ...string) {
		t.Helper()
		cmd := exec.CommandContext(ctx, name, args...)
		cmd.Env = append(c.env(), "PATH="+filepath.Dir(bin)+string(os.PathListSeparator)+os.Getenv("PATH"))
		cmd.Dir = work
		out, err := cmd.CombinedOutput()
		if err != nil {
			logs, _ := filepath.Glob(filepath.Join(work, "slurm-*.out"))
			var b strings.Builder
			for _, l := range logs {
				data, _ := os.ReadFile(l)
				b.WriteString("--- " + filepath.Base(l) + "\n" + string(data))
			}
			t.Fatalf("%s %s: %v\n%s\n%s\n%s", name, strings.Join(args, " "), err, out, b.String(), c.logs())
		}
	}
	run(bin, "sweep", sweepFile, "-o", local, "-j", "2", "--quiet")
	run("sbatch", "--array=1-4", "--wait", "--time=5", "--chdir="+work,
		"--output="+filepath.Join(work, "slurm-%A_%a.out"), script, sweepFile, array)
	for k := 1; k <= 4; k++ {
		if _, err := os.Stat(filepath.Join(array, "summary-shard-"+string(rune('0'+k))+"-of-4.json")); err != nil {
			t.Errorf("task %d wrote no shard summary: %v", k, err)
		}
	}
	run(bin, "sweep", "merge", array, "--quiet")
	sameDecks(t, local, array)

	cgnsDiffSeesVariants(t, local)
}

// cgnsDiffSeesVariants checks that the CGNS comparison can fail: the CGNS
// files of the first two variants of a sweep differ by content.
func cgnsDiffSeesVariants(t *testing.T, dir string) {
	t.Helper()
	s, err := ReadSummary(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	cg, _ := filepath.Glob(filepath.Join(dir, s.Rows[0].Name, "*.cgns"))
	cg2, _ := filepath.Glob(filepath.Join(dir, s.Rows[1].Name, "*.cgns"))
	if len(cg) == 0 || len(cg2) == 0 || cgnsDiff(t, cg[0], cg2[0]) == "" {
		t.Error("cgnsdiff -d finds no difference between two different variants")
	}
}
