package sweep

import (
	"crypto/rand"
	"fmt"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
	"time"
)

// needTool skips the test when a reference tool or a condition is
// missing, and fails it under CI (CI=true), where everything must be there.
func needTool(t testing.TB, why string) {
	t.Helper()
	if os.Getenv("CI") == "true" {
		t.Fatalf("CI=true but %s", why)
	}
	t.Skip(why)
}

// cluster is a one-node Slurm cluster started by a test: munged, slurmctld
// and slurmd in the foreground as children of the test, with every file
// (key, sockets, spool, state, logs) in a temporary folder and free ports,
// so it touches neither /etc nor a cluster that may already run here.
// Recipe: shared/recipes/one-node-slurm.md (Debian 12, slurm-wlm 22.05,
// munge 0.5.15).
type cluster struct {
	dir  string
	conf string
	t    *testing.T
}

// env returns the environment for the Slurm client commands.
func (c *cluster) env() []string {
	return append(os.Environ(), "SLURM_CONF="+c.conf)
}

// run runs a Slurm client command against the cluster.
func (c *cluster) run(name string, args ...string) (string, error) {
	cmd := exec.Command(name, args...)
	cmd.Env = c.env()
	out, err := cmd.CombinedOutput()
	return string(out), err
}

// logs returns the tail of the daemons' logs, for a failure message.
func (c *cluster) logs() string {
	var b strings.Builder
	for _, f := range []string{"munged.log", "slurmctld.log", "slurmd.log", "slurmctld.out", "slurmd.out"} {
		data, err := os.ReadFile(filepath.Join(c.dir, f))
		if err != nil {
			continue
		}
		lines := strings.Split(strings.TrimSpace(string(data)), "\n")
		if len(lines) > 15 {
			lines = lines[len(lines)-15:]
		}
		fmt.Fprintf(&b, "--- %s\n%s\n", f, strings.Join(lines, "\n"))
	}
	return b.String()
}

func freePort(t *testing.T) int {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	return l.Addr().(*net.TCPAddr).Port
}

// startCluster starts the daemons and waits until the node is idle. The
// daemons are stopped by t.Cleanup, by their process ids, also when the
// test fails.
func startCluster(t *testing.T) *cluster {
	t.Helper()
	if os.Geteuid() != 0 {
		needTool(t, "the Slurm test needs root, to run slurmd and munged")
	}
	for _, tool := range []string{"munged", "munge", "slurmctld", "slurmd", "sbatch", "sinfo"} {
		if _, err := exec.LookPath(tool); err != nil {
			needTool(t, fmt.Sprintf("%s is not installed (apt-get install slurm-wlm munge)", tool))
		}
	}
	host, err := os.Hostname()
	if err != nil {
		t.Fatal(err)
	}
	host, _, _ = strings.Cut(host, ".")
	// munged refuses a socket folder that others can write; a folder of
	// our own under the system temp folder is 0700.
	dir, err := os.MkdirTemp("", "cvdeck-slurm-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(dir) })
	if err := os.Chmod(dir, 0o755); err != nil { // munge clients need to reach the socket
		t.Fatal(err)
	}
	c := &cluster{dir: dir, conf: filepath.Join(dir, "slurm.conf"), t: t}
	key := make([]byte, 1024)
	if _, err := rand.Read(key); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "munge.key"), key, 0o400); err != nil {
		t.Fatal(err)
	}
	for _, d := range []string{"state", "spool"} {
		if err := os.Mkdir(filepath.Join(dir, d), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	socket := filepath.Join(dir, "munge.socket")
	conf := fmt.Sprintf(`ClusterName=cvdecktest
SlurmctldHost=%[1]s
SlurmctldPort=%[3]d
SlurmdPort=%[4]d
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=%[5]s
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
StateSaveLocation=%[2]s/state
SlurmdSpoolDir=%[2]s/spool
SlurmctldPidFile=%[2]s/slurmctld.pid
SlurmdPidFile=%[2]s/slurmd.pid
SlurmctldLogFile=%[2]s/slurmctld.log
SlurmdLogFile=%[2]s/slurmd.log
NodeName=%[1]s CPUs=%[6]d State=UNKNOWN
PartitionName=main Nodes=%[1]s Default=YES State=UP MaxTime=INFINITE
`, host, dir, freePort(t), freePort(t), socket, runtime.NumCPU())
	if err := os.WriteFile(c.conf, []byte(conf), 0o644); err != nil {
		t.Fatal(err)
	}
	c.start("munged", "munged", "--foreground", "--force",
		"--key-file="+filepath.Join(dir, "munge.key"), "--socket="+socket,
		"--pid-file="+filepath.Join(dir, "munged.pid"), "--log-file="+filepath.Join(dir, "munged.log"),
		"--seed-file="+filepath.Join(dir, "munged.seed"))
	c.waitFor("munged", func() bool {
		_, err := os.Stat(socket)
		return err == nil
	})
	c.start("slurmctld", "slurmctld", "-D", "-f", c.conf)
	c.start("slurmd", "slurmd", "-D", "-f", c.conf)
	c.waitFor("the node to be idle", func() bool {
		out, err := c.run("sinfo", "-h", "-o", "%T")
		return err == nil && strings.TrimSpace(out) == "idle"
	})
	return c
}

// start starts a daemon in the foreground and registers its stop.
func (c *cluster) start(name string, prog string, args ...string) {
	t := c.t
	out, err := os.Create(filepath.Join(c.dir, name+".out"))
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(prog, args...)
	cmd.Env = c.env()
	cmd.Stdout, cmd.Stderr = out, out
	if err := cmd.Start(); err != nil {
		out.Close()
		t.Fatalf("starting %s: %v", name, err)
	}
	exited := make(chan struct{})
	go func() {
		cmd.Wait()
		out.Close()
		close(exited)
	}()
	t.Cleanup(func() {
		// Stop by process id: SIGTERM, then SIGKILL if it lingers.
		cmd.Process.Signal(syscall.SIGTERM)
		select {
		case <-exited:
		case <-time.After(10 * time.Second):
			cmd.Process.Kill()
			<-exited
		}
	})
}

// waitFor polls cond for up to 30 s.
func (c *cluster) waitFor(what string, cond func() bool) {
	c.t.Helper()
	deadline := time.Now().Add(30 * time.Second)
	for !cond() {
		if time.Now().After(deadline) {
			c.t.Fatalf("timed out waiting for %s\n%s", what, c.logs())
		}
		time.Sleep(200 * time.Millisecond)
	}
}
