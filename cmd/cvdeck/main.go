// Command cvdeck turns 2D geometry outlines into checked finite-volume meshes
// and solver-ready decks. Run `cvdeck --help` for the commands.
//
// Exit codes: 0 the deck is written and every check passes; 1 the deck is
// written but a quality or boundary check failed (the report names the
// cells); 2 bad input or usage, and nothing is written.
package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"

	"github.com/spf13/cobra"

	"cvdeck/deck"
)

// Exit codes, as DESIGN.md fixes them.
const (
	exitOK     = 0
	exitFailed = 1
	exitInput  = 2
)

// globals are the flags every command shares.
type globals struct {
	quiet bool
	json  bool
}

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run executes the command line and returns the exit code.
func run(args []string, stdout, stderr io.Writer) int {
	root := newRootCommand(stdout, stderr)
	root.SetArgs(args)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	var failed *deck.CheckFailure
	var coded interface{ ExitCode() int }
	switch {
	case errors.As(err, &failed):
		// The report was printed already; say where the deck is.
		fmt.Fprintf(stderr, "cvdeck: %v\n", err)
		return exitFailed
	case errors.As(err, &coded):
		fmt.Fprintf(stderr, "cvdeck: %v\n", err)
		return coded.ExitCode()
	}
	fmt.Fprintf(stderr, "cvdeck: %v\n", err)
	return exitInput
}

func newRootCommand(stdout, stderr io.Writer) *cobra.Command {
	g := &globals{}
	root := &cobra.Command{
		Use:   "cvdeck",
		Short: "Turn 2D outlines into checked finite-volume meshes and solver-ready decks",
		Long: `cvdeck meshes 2D geometry outlines into structured or unstructured control
volumes, checks them (areas, closure, non-orthogonality, skewness, a
conservation audit), tags boundaries with conditions and a reference flow
state, and writes the deck: CGNS, VTK, a manifest and preview pictures.

Mesh checks do not validate a simulation: verification, validation and review
by a qualified engineer under the applicable codes come first.`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.PersistentFlags().BoolVarP(&g.quiet, "quiet", "q", false, "print nothing but errors")
	root.PersistentFlags().BoolVar(&g.json, "json", false, "print machine-readable results on stdout")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return fmt.Errorf("%w: %w (see `%s --help`)", deck.ErrInput, err, c.CommandPath())
	})
	root.AddCommand(
		newMeshCommand(g),
		newCheckCommand(g),
		newStateCommand(),
		newSweepCommand(),
		newSamplesCommand(),
		newInitCommand(),
		newVersionCommand(g),
	)
	return root
}

// positiveFlags refuses a flag among names that was given with a value
// that is not positive: for these flags zero is the "not given" default
// inside, so --refine 0 or --max-cells 0 would otherwise silently mean the
// default rather than what was typed.
func positiveFlags(cmd *cobra.Command, names ...string) error {
	for _, name := range names {
		fl := cmd.Flags().Lookup(name)
		if fl == nil || !fl.Changed {
			continue
		}
		v, err := strconv.ParseFloat(fl.Value.String(), 64)
		if err != nil || !(v > 0) {
			return fmt.Errorf("%w: --%s must be positive, got %s", deck.ErrInput, name, fl.Value.String())
		}
	}
	return nil
}

// writeJSON prints v as indented JSON, one object on stdout, as --json
// asks of every command.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
