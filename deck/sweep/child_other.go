//go:build !linux

package sweep

import "os/exec"

// runChild runs a variant's child process. Outside Linux the child shares
// the sweep's process group, so a terminal's Ctrl-C reaches it too and
// ends its build, and it is not killed when the sweep dies by SIGKILL;
// cancelling the command's context kills it.
func runChild(cmd *exec.Cmd) error {
	return cmd.Run()
}
