package sweep

import (
	"os/exec"
	"runtime"
	"syscall"
)

// runChild runs a variant's child process in a process group of its own
// (Setpgid), so that a signal to the terminal's foreground group (Ctrl-C)
// or to the sweep's group reaches the sweep alone, and with Pdeathsig, so
// that the kernel kills the child when the sweep dies, also by SIGKILL,
// rather than leave it running as an orphan. Cancelling the command's
// context kills the child's whole group.
//
// Linux sends Pdeathsig when the thread that started the child ends, not
// the process (prctl(2), PR_SET_PDEATHSIG); the goroutine therefore stays
// locked to its thread until the child has been waited for, so that the
// Go runtime cannot retire that thread while the child runs.
func runChild(cmd *exec.Cmd) error {
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true, Pdeathsig: syscall.SIGKILL}
	cmd.Cancel = func() error {
		return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	return cmd.Run()
}
