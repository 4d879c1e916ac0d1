package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"cvdeck/deck"
	"cvdeck/quality"
)

func newCheckCommand(g *globals) *cobra.Command {
	var limits, profile, out string
	cmd := &cobra.Command{
		Use:   "check FILE",
		Short: "Check an existing mesh (.vtu, .vtk, .vtp or .cgns), made by cvdeck or not",
		Long: `check reads a mesh file — a VTK unstructured grid (XML .vtu or legacy .vtk)
or polygon mesh (XML .vtp or legacy POLYDATA .vtk) with triangles, quads or
polygons (line cells are boundary faces, tagged by a "boundary_tag" or "tag"
cell array; vertex cells are skipped), or a CGNS file — and runs every quality
metric, the connectivity checks and the conservation audit on it. A 2D case
stored the way 3D solvers take one is read as its lower plane: in VTK a slab
one cell thick of hexahedra, voxels or wedges (side quads are its boundary
faces), in CGNS structured zones one node plane or one cell thick or an
unstructured zone of HEXA_8 and PENTA_6 one cell thick; a note says what was
left out with the front and back (patches, BCs and their tags), and for CGNS
another gives the BC type the file records for each tag. The report ends with
the boundary faces of each tag, so that you can see which tags the file
brought.

A mesh inside a deck (a quality.json beside it) is graded with the limits the
deck records, so the check gives the deck's verdict; --limits applies on top of
them and --profile starts afresh from a named profile. Boundary faces with no
tag are checked as one tag "boundary", with a warning.

With -o DIR the check also writes the folder DIR (replacing it as a whole, as
mesh -o does; not the folder the mesh file is in) so that bad cells can be
seen: mesh.vtu with every per-cell metric, the cells' status and defects as
cell data, boundary.vtp with the tags, quality.json and preview.svg zoomed on
the worst cells. Checking DIR/mesh.vtu again gives the same report.
Exit codes: 0 the mesh passes; 1 a cell fails a limit; 2 the file cannot be read.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 1 {
				return fmt.Errorf("%w: check takes one mesh file, got %d arguments", deck.ErrInput, len(args))
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
			res, err := deck.CheckAndWrite(args[0], out, patches...)
			var failed *deck.CheckFailure
			if err != nil && !errors.As(err, &failed) {
				return err
			}
			w := cmd.OutOrStdout()
			if g.json {
				out := struct {
					File     string          `json:"file"`
					Verdict  string          `json:"verdict"`
					Notes    []string        `json:"notes"`
					Warnings []string        `json:"warnings"`
					Quality  *quality.Report `json:"quality"`
				}{res.File, res.Report.Verdict.String(), append([]string{}, res.Notes...), append([]string{}, res.Warnings...), res.Report}
				enc := json.NewEncoder(w)
				enc.SetIndent("", "  ")
				if e := enc.Encode(out); e != nil {
					return e
				}
				return err
			}
			for _, note := range res.Notes {
				if !g.quiet {
					fmt.Fprintf(cmd.ErrOrStderr(), "cvdeck: %s\n", note)
				}
			}
			for _, warn := range res.Warnings {
				fmt.Fprintf(cmd.ErrOrStderr(), "cvdeck: warning: %s\n", warn)
			}
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
