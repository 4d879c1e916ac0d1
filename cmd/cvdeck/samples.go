package main

import (
	"encoding/json"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"cvdeck/deck"
	"cvdeck/samples"
)

func newSamplesCommand() *cobra.Command {
	return &cobra.Command{
		Use:   "samples",
		Short: "List the sample cases, one a line: name, then a short description",
		Args:  noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			w := cmd.OutOrStdout()
			width := 0
			list := samples.List()
			if globalFlag(cmd, "json") {
				type item struct {
					Name        string `json:"name"`
					Description string `json:"description"`
				}
				items := []item{}
				for _, s := range list {
					items = append(items, item{s.Name, s.Description})
				}
				return writeJSON(w, items)
			}
			for _, s := range list {
				width = max(width, len(s.Name))
			}
			for _, s := range list {
				fmt.Fprintf(w, "%-*s  %s\n", width, s.Name, s.Description)
			}
			return nil
		},
	}
}

func newInitCommand() *cobra.Command {
	var from string
	var so deck.SketchOptions
	cmd := &cobra.Command{
		Use:   "init NAME DIR | init --from SKETCH DIR",
		Short: "Write a sample's case file (and the files it refers to) as DIR/NAME.yaml, or a case around a sketch",
		Long: `init NAME DIR writes the sample NAME as DIR/NAME.yaml, plus any data files it
refers to. init --from SKETCH DIR writes DIR/<sketch name>.yaml, a case file
that meshes the sketch (GeoJSON, WKT, SVG or x-y points) with the
unstructured mesher, ready for editing; the sketch is copied beside it.
Existing files are never overwritten.`,
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := positiveFlags(cmd, "size", "max-size", "scale", "min-angle", "growth"); err != nil {
				return err
			}
			var path string
			var err error
			if from != "" {
				if len(args) != 1 {
					return fmt.Errorf("%w: init --from SKETCH takes one folder, got %d arguments", deck.ErrInput, len(args))
				}
				path, err = deck.InitFromSketch(from, args[0], so)
			} else {
				if len(args) != 2 {
					return fmt.Errorf("%w: init takes a sample name and a folder (see `cvdeck samples`), got %d arguments", deck.ErrInput, len(args))
				}
				path, err = samples.Write(args[0], args[1])
				if err != nil {
					err = fmt.Errorf("%w: %w", deck.ErrInput, err)
				}
			}
			if err != nil {
				return err
			}
			if globalFlag(cmd, "json") {
				return writeJSON(cmd.OutOrStdout(), struct {
					Case string `json:"case"`
				}{path})
			}
			fmt.Fprintln(cmd.OutOrStdout(), path)
			return nil
		},
	}
	cmd.Flags().StringVar(&from, "from", "", "write a case file around this sketch file")
	cmd.Flags().Float64Var(&so.Size, "size", 0, "with --from: target cell size in metres (default a fiftieth of the sketch)")
	cmd.Flags().Float64Var(&so.MaxSize, "max-size", 0, "with --from: largest cell size away from the boundary, metres (default --size)")
	cmd.Flags().Float64Var(&so.MinAngle, "min-angle", 0, "with --from: smallest triangle angle, degrees")
	cmd.Flags().Float64Var(&so.Growth, "growth", 0, "with --from: size growth ratio away from the boundary, up to --max-size")
	cmd.Flags().Float64Var(&so.Scale, "scale", 1, "with --from: multiply sketch coordinates by this to get metres")
	cmd.Flags().BoolVar(&so.FlipY, "flip-y", false, "with --from: flip the y axis (SVG drawings grow y downwards)")
	return cmd
}

func newVersionCommand(g *globals) *cobra.Command {
	return &cobra.Command{
		Use:   "version",
		Short: "Print cvdeck's version",
		Args:  noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if g.json {
				return json.NewEncoder(cmd.OutOrStdout()).Encode(map[string]string{"version": deck.Build})
			}
			fmt.Fprintf(cmd.OutOrStdout(), "cvdeck %s\n", deck.Build)
			return nil
		},
	}
}

// noArgs rejects positional arguments with an input error.
func noArgs(cmd *cobra.Command, args []string) error {
	if len(args) > 0 {
		return fmt.Errorf("%w: %s takes no arguments, got %q", deck.ErrInput, cmd.CommandPath(), args)
	}
	return nil
}

// isTerminal reports whether f is a character device (a terminal), so
// progress is drawn only there.
func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
