package main

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"cvdeck/deck"
	"cvdeck/quality"
)

func newCheckCommand(g *globals) *cobra.Command {
	var limits, profile, out string
	cmd := &cobra.Command{
		Use:   "check FILE...",
		Short: "Check an existing mesh (.vtu, .vtk, .vtp, .vts, .vtm or .cgns), made by cvdeck or not",
		Long: `check reads a mesh file — a VTK unstructured grid (XML .vtu or legacy .vtk)
or polygon mesh (XML .vtp or legacy POLYDATA .vtk) with triangles, quads or
polygons (line cells are boundary faces, tagged by a "boundary_tag" or "tag"
cell array; vertex cells are skipped), a VTK structured grid (.vts) or a
multiblock index of them (.vtm, whose blocks are joined into one mesh where
they touch, their cells numbered on block after block, with a note giving
each block's cells), or a CGNS file — and runs every quality
metric, the connectivity checks and the conservation audit on it. A mesh on
a plane x, y or z = constant is read in the two coordinates that vary (a
coordinate that spreads by rounding only, within 1e-12 of the largest
coordinate, counts as constant), and one whose cells mostly run clockwise
is read turned round, each with a note. A 2D case
stored the way 3D solvers take one is read as its lower plane: in VTK a slab
one cell thick of hexahedra, voxels or wedges (side quads are its boundary
faces), in CGNS structured zones one node plane or one cell thick or an
unstructured zone of HEXA_8 and PENTA_6 one cell thick; a note says what was
left out with the front and back (patches, BCs and their tags), and for CGNS
another gives the BC type the file records for each tag. CGNS zones that touch
without connectivity (structured zones, or the unstructured zones of a 2D
base) are joined into one mesh, with a note. The report ends with
the boundary faces of each tag, so that you can see which tags the file
brought.

A mesh inside a deck (a quality.json beside it) is graded with the limits the
deck records, so the check gives the deck's verdict; --limits applies on top of
them and --profile starts afresh from a named profile. A deck's mesh.vtu,
mesh.vtk or blocks.vtm takes its tags from the boundary.vtp beside it, each
line placed on the boundary face it joins the way the face runs, so that
coincident nodes (the two sides of a thin plate) keep their own tags; a line
that could lie on either of two coincident faces is refused, not guessed. A mesh with no tags
at all is checked with its boundary as one tag "boundary", with a warning; in
a mesh tagged in part, the untagged faces fail boundary_tag.

With -o DIR the check also writes the folder DIR (replacing it as a whole, as
mesh -o does; not the folder the mesh file is in) so that bad cells can be
seen: mesh.vtu with every per-cell metric, the cells' status and defects as
cell data, boundary.vtp with the tags, quality.json and preview.svg zoomed on
the worst cells. Checking DIR/mesh.vtu again gives the same report.

Given several files, check checks each in turn and prints one table: cells,
verdict, failed and warned cells and the failing metrics of each (--json: an
object whose "files" list holds each file's report); a file that cannot be
read does not stop the others.
Exit codes: 0 every mesh passes; 1 a cell fails a limit; 2 a file cannot be
read.`,
		Args: func(cmd *cobra.Command, args []string) error {
			switch {
			case len(args) == 0:
				return fmt.Errorf("%w: check takes one or more mesh files", deck.ErrInput)
			case len(args) > 1 && out != "":
				return fmt.Errorf("%w: -o takes one mesh file, not %d", deck.ErrInput, len(args))
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			var patches []quality.Patch
			if profile != "" {
				patches = append(patches, quality.Patch{Profile: profile})
			}
			if limits != "" {
				p, err := quality.LoadPatch(limits)
				if err != nil {
					return fmt.Errorf("%w: %w", deck.ErrInput, err)
				}
				patches = append(patches, p)
			}
			if len(args) > 1 {
				return checkMany(cmd, g, args, patches)
			}
			res, err := deck.CheckAndWrite(args[0], out, patches...)
			var failed *deck.CheckFailure
			if err != nil && !errors.As(err, &failed) {
				return err
			}
			w := cmd.OutOrStdout()
			if g.json {
				if e := writeJSON(w, checkedEntry(res)); e != nil {
					return e
				}
				return err
			}
			printNotes(cmd, g, "", res)
			if !g.quiet {
				if e := quality.WriteText(w, res.Report); e != nil {
					return e
				}
			}
			return err
		},
	}
	cmd.Flags().StringVar(&limits, "limits", "", "a limits file overriding the profile's limits")
	cmd.Flags().StringVar(&profile, "profile", "", "the limit profile to start from: "+fmt.Sprint(quality.ProfileNames()))
	cmd.Flags().StringVarP(&out, "out", "o", "", "also write this folder, as a whole: the mesh with its per-cell metrics ("+strings.Join(deck.CheckFiles, ", ")+")")
	return cmd
}

// checkEntry is the JSON of one checked file: its report, or the error
// that kept it from being read.
type checkEntry struct {
	File     string          `json:"file"`
	Verdict  string          `json:"verdict"`
	Notes    []string        `json:"notes"`
	Warnings []string        `json:"warnings"`
	Quality  *quality.Report `json:"quality,omitempty"`
	Error    string          `json:"error,omitempty"`
}

// checkedEntry is the entry of a check that gave res.
func checkedEntry(res *deck.CheckResult) checkEntry {
	return checkEntry{res.File, res.Report.Verdict.String(), append([]string{}, res.Notes...), append([]string{}, res.Warnings...), res.Report, ""}
}

// unreadableEntry is the entry of a file the check could not read.
func unreadableEntry(file string, err error) checkEntry {
	return checkEntry{File: file, Verdict: "unreadable", Notes: []string{}, Warnings: []string{}, Error: err.Error()}
}

// printNotes writes the notes (unless quiet) and warnings of a check to
// standard error, each after prefix.
func printNotes(cmd *cobra.Command, g *globals, prefix string, res *deck.CheckResult) {
	if !g.quiet {
		for _, note := range res.Notes {
			fmt.Fprintf(cmd.ErrOrStderr(), "cvdeck: %s%s\n", prefix, note)
		}
	}
	for _, warn := range res.Warnings {
		fmt.Fprintf(cmd.ErrOrStderr(), "cvdeck: %swarning: %s\n", prefix, warn)
	}
}

// checkMany checks several files one after another and sums them up in
// one table (or, with --json, one object listing each file's entry). A
// file that cannot be read does not stop the others.
func checkMany(cmd *cobra.Command, g *globals, files []string, patches []quality.Patch) error {
	entries := make([]checkEntry, len(files))
	var unreadable, failed int
	for i, f := range files {
		res, err := deck.CheckAndWrite(f, "", patches...)
		var fail *deck.CheckFailure
		switch {
		case err != nil && !errors.As(err, &fail):
			unreadable++
			entries[i] = unreadableEntry(f, err)
			continue
		case err != nil:
			failed++
		}
		entries[i] = checkedEntry(res)
		if !g.json {
			printNotes(cmd, g, f+": ", res)
		}
	}
	w := cmd.OutOrStdout()
	if g.json {
		if err := writeJSON(w, struct {
			Files []checkEntry `json:"files"`
		}{entries}); err != nil {
			return err
		}
	} else if !g.quiet {
		if err := writeCheckTable(w, entries); err != nil {
			return err
		}
	}
	if unreadable+failed == 0 {
		return nil
	}
	return &checkManyError{files: len(files), unreadable: unreadable, failed: failed}
}

// writeCheckTable writes one row per checked file: cells, verdict, failed
// and warned cells, and the metrics with failing cells (or the error).
func writeCheckTable(w io.Writer, entries []checkEntry) error {
	b := bufio.NewWriter(w)
	const row = "%-32s %10s  %-10s %8s %8s  %s\n"
	fmt.Fprintf(b, "cvdeck mesh check of %d files\n\n", len(entries))
	fmt.Fprintf(b, row, "file", "cells", "verdict", "failed", "warned", "failing metrics (cells) or error")
	fmt.Fprintln(b, strings.Repeat("-", 101))
	for _, e := range entries {
		if e.Quality == nil {
			fmt.Fprintf(b, row, e.File, "-", e.Verdict, "-", "-", e.Error)
			continue
		}
		var failing []string
		for _, m := range e.Quality.Metrics {
			if m.Failed > 0 {
				failing = append(failing, fmt.Sprintf("%s (%d)", m.Name, m.Failed))
			}
		}
		for _, c := range e.Quality.Connectivity {
			if c.Status == quality.Fail && c.Count > 0 {
				failing = append(failing, fmt.Sprintf("%s (%d)", c.Name, c.Count))
			}
		}
		what := strings.Join(failing, ", ")
		if what == "" {
			what = "-"
		}
		verdict := map[quality.Status]string{quality.Pass: "PASS", quality.Warn: "PASS, warn", quality.Fail: "FAIL"}[e.Quality.Verdict]
		fmt.Fprintf(b, row, e.File, fmt.Sprint(e.Quality.Cells), verdict, fmt.Sprint(e.Quality.FailedCells), fmt.Sprint(e.Quality.WarnedCells), what)
	}
	fmt.Fprintf(b, "\ncvdeck check FILE gives one file's full report, with its worst cells.\n")
	return b.Flush()
}

// checkManyError ends a check of several files of which some could not be
// read (exit code 2) or failed (exit code 1).
type checkManyError struct{ files, unreadable, failed int }

func (e *checkManyError) Error() string {
	return fmt.Sprintf("of %d files, %d could not be read and %d failed their checks", e.files, e.unreadable, e.failed)
}

// ExitCode is 2 when a file could not be read, else 1.
func (e *checkManyError) ExitCode() int {
	if e.unreadable > 0 {
		return 2
	}
	return 1
}
