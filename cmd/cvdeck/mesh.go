package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"

	"github.com/spf13/cobra"

	"cvdeck/deck"
	"cvdeck/deck/sweep"
	"cvdeck/quality"
)

// meshFlags are the flags of `cvdeck mesh`.
type meshFlags struct {
	out      string
	set      []string
	formats  []string
	maxCells int
	limits   string
	refine   float64
	oneDeck  bool
	sketch   deck.SketchOptions
}

func newMeshCommand(g *globals) *cobra.Command {
	f := &meshFlags{}
	cmd := &cobra.Command{
		Use:   "mesh CASE.yaml|SKETCH -o DIR",
		Short: "Mesh a case (or a bare sketch file), check it and write the deck folder",
		Long: `mesh reads a case file, meshes its geometry, assigns its boundary conditions,
checks the mesh and writes the deck folder DIR as a whole: an interrupted run
leaves the previous deck or none.

Instead of a case file it also takes a bare sketch (GeoJSON .geojson/.json,
WKT .wkt, an SVG document or path data .svg, x-y points .xy/.txt/.dat/.csv) and
meshes it with the unstructured mesher: --size sets the target cell size in
the sketch's units after --scale, --max-size lets cells grow away from the
boundary by --growth, --min-angle tunes the mesher, and boundary tags come
from the GeoJSON property "tag", from the data-tag or id of the SVG elements
that draw each edge, or are one per loop.

Exit codes: 0 deck written and checks pass; 1 deck written but a check
failed (the report names the cells); 2 bad input, nothing written.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 1 {
				return fmt.Errorf("%w: mesh takes one case or sketch file, got %d arguments", deck.ErrInput, len(args))
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := positiveFlags(cmd, "refine", "max-cells", "size", "max-size", "scale", "min-angle", "growth"); err != nil {
				return err
			}
			return runMesh(cmd, g, f, args[0])
		},
	}
	fl := cmd.Flags()
	fl.StringVarP(&f.out, "output", "o", "", "the deck folder to write (required)")
	fl.StringArrayVar(&f.set, "set", nil, "override a case parameter: --set name=value (repeatable)")
	fl.StringSliceVar(&f.formats, "format", nil, "outputs, comma-separated: "+joinFormats())
	fl.IntVar(&f.maxCells, "max-cells", deck.DefaultMaxCells, "refuse a mesh estimated to have more cells")
	fl.StringVar(&f.limits, "limits", "", "a limits file overriding the case's quality limits")
	fl.Float64Var(&f.refine, "refine", 1, "scale every spacing: 2 halves every cell size")
	fl.BoolVar(&f.oneDeck, "one-deck", false, "build one deck even when the case defines a refinement family")
	fl.Float64Var(&f.sketch.Size, "size", 0, "sketch only: target cell size in metres (the sketch's units after --scale): every boundary edge, and every cell unless --max-size is larger")
	fl.Float64Var(&f.sketch.MaxSize, "max-size", 0, "sketch only: largest cell size away from the boundary, metres (default --size); cells grow to it by --growth")
	fl.Float64Var(&f.sketch.MinAngle, "min-angle", 0, "sketch only: smallest triangle angle in degrees (default the mesher's)")
	fl.Float64Var(&f.sketch.Growth, "growth", 0, "sketch only: size growth ratio away from the boundary, up to --max-size (default the mesher's)")
	fl.Float64Var(&f.sketch.Scale, "scale", 1, "sketch only: multiply sketch coordinates by this to get metres")
	fl.BoolVar(&f.sketch.FlipY, "flip-y", false, "sketch only: flip the y axis (SVG drawings grow y downwards)")
	_ = cmd.MarkFlagRequired("output")
	return cmd
}

func joinFormats() string {
	return strings.Join(deck.Formats, ", ") + " (default " + strings.Join(deck.DefaultFormats, ",") + ")"
}

func runMesh(cmd *cobra.Command, g *globals, f *meshFlags, path string) error {
	overrides, err := deck.ParseAssignments(f.set)
	if err != nil {
		return err
	}
	var formats []string
	if len(f.formats) > 0 {
		if formats, err = deck.ParseFormats(f.formats); err != nil {
			return err
		}
	}
	opts := deck.RunOptions{Formats: formats}
	if cmd.Flags().Changed("max-cells") {
		// Only an explicit flag overrides the case's own mesh.max_cells.
		opts.MaxCells = f.maxCells
	}
	stderr := cmd.ErrOrStderr()
	if !g.quiet && !g.json && stderrIsTerminal(stderr) {
		opts.Stage = func(name string) { fmt.Fprintf(stderr, "\r\x1b[K%s …", name) }
		defer fmt.Fprint(stderr, "\r\x1b[K")
	}
	var c *deck.Case
	if deck.IsSketch(path) {
		c, err = deck.SketchCase(path, f.sketch, deck.LoadOptions{Params: overrides, Refine: f.refine})
	} else {
		if f.sketch != (deck.SketchOptions{Scale: 1}) {
			return fmt.Errorf("%w: --size, --max-size, --min-angle, --growth, --scale and --flip-y apply to sketch files, and %s is read as a case file (sketches are known by their extension: %s); set a case file's mesh in the file", deck.ErrInput, path, deck.SketchExtensions())
		}
		c, err = deck.Load(path, deck.LoadOptions{Params: overrides, Refine: f.refine})
	}
	if err != nil {
		return err
	}
	if f.limits != "" {
		if opts.Limits, err = c.AddLimitsFile(f.limits); err != nil {
			return err
		}
	}
	if c.Family != nil && !f.oneDeck {
		return runFamily(cmd, g, f, path, c, overrides, formats)
	}
	res, err := deck.Run(c, f.out, opts)
	var failed *deck.CheckFailure
	if err != nil && !errors.As(err, &failed) {
		return err
	}
	return report(cmd.OutOrStdout(), g, res, err)
}

// report prints the outcome of a run: the quality table on a terminal or
// pipe (unless --quiet), or one JSON object with --json.
func report(w io.Writer, g *globals, res *deck.Result, runErr error) error {
	if g.json {
		out := struct {
			Deck      string          `json:"deck"`
			Case      string          `json:"case"`
			Verdict   string          `json:"verdict"`
			InputHash string          `json:"input_hash"`
			Nodes     int             `json:"nodes"`
			Cells     int             `json:"cells"`
			Faces     int             `json:"faces"`
			Quality   *quality.Report `json:"quality"`
			Walls     []wallJSON      `json:"walls"`
			Notes     []string        `json:"notes"`
		}{res.Dir, res.Case, res.Report.Verdict.String(), res.InputHash, len(res.Mesh.Nodes), res.Mesh.NumCells(), res.Mesh.NumFaces(), res.Report, wallsJSON(res.Walls), append([]string{}, res.Notes...)}
		if err := writeJSON(w, out); err != nil {
			return err
		}
		return runErr
	}
	if !g.quiet {
		if err := quality.WriteText(w, res.Report); err != nil {
			return err
		}
		writeWalls(w, res.Walls)
		if len(res.Notes) > 0 {
			fmt.Fprintf(w, "\nnotes\n")
			for _, n := range res.Notes {
				fmt.Fprintf(w, "  %s\n", n)
			}
		}
		fmt.Fprintf(w, "\ndeck: %s (%d cells, %d faces, %d nodes)\n", res.Dir, res.Mesh.NumCells(), res.Mesh.NumFaces(), len(res.Mesh.Nodes))
	}
	return runErr
}

// writeWalls prints the first-cell height of each no-slip wall and, when
// the case sets a target y+, the y+ it gives.
func writeWalls(w io.Writer, walls []deck.WallResolution) {
	if len(walls) == 0 {
		return
	}
	fmt.Fprintf(w, "\nno-slip walls\n")
	if t := walls[0]; t.TargetHeight > 0 {
		fmt.Fprintf(w, "  target y+ %.3g: first-cell height %.3g m by the flat-plate estimate at the reference length\n", t.TargetYplus, t.TargetHeight)
	}
	for _, wr := range walls {
		h := wr.Height
		fmt.Fprintf(w, "  %-18s first-cell height %.3g to %.3g m, mean %.3g", wr.Tag, float64(h.Min), float64(h.Max), float64(h.Mean))
		if y := wr.Yplus; wr.TargetHeight > 0 {
			fmt.Fprintf(w, "; y+ about %.3g to %.3g, mean %.3g", float64(y.Min), float64(y.Max), float64(y.Mean))
		}
		fmt.Fprintln(w)
	}
}

// wallJSON is one no-slip wall in the --json output.
type wallJSON struct {
	Tag             string          `json:"tag"`
	FirstCellHeight quality.Spread  `json:"first_cell_height"`
	TargetYplus     *float64        `json:"target_yplus"`
	TargetHeight    *float64        `json:"target_first_cell_height"`
	Yplus           *quality.Spread `json:"yplus_estimate"`
}

// wallsJSON gives the walls for --json: the targets and y+ are null when
// the case sets no target y+.
func wallsJSON(walls []deck.WallResolution) []wallJSON {
	out := []wallJSON{}
	for _, w := range walls {
		j := wallJSON{Tag: w.Tag, FirstCellHeight: w.Height}
		if w.TargetHeight > 0 {
			j.TargetYplus, j.TargetHeight, j.Yplus = &w.TargetYplus, &w.TargetHeight, &w.Yplus
		}
		out = append(out, j)
	}
	return out
}

// stderrIsTerminal reports whether w is the process's terminal stderr.
func stderrIsTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && isTerminal(f)
}

// runFamily builds a case's refinement family (its refine section) as a
// sweep of one combination: DIR/<level folder> per level, and the family
// summary (representative cell size h and the ratio between levels) in
// DIR/summary.csv and summary.json. Parameters set with --set stay fixed
// over the family.
func runFamily(cmd *cobra.Command, g *globals, f *meshFlags, path string, c *deck.Case, overrides map[string]float64, formats []string) error {
	if f.refine != 1 {
		return fmt.Errorf("%w: the case defines a refinement family (refine: ...); --refine applies to single decks", deck.ErrInput)
	}
	if formats != nil || f.limits != "" || cmd.Flags().Changed("max-cells") {
		return fmt.Errorf("%w: --format, --limits and --max-cells apply to single decks; for a refinement family set them in the case file", deck.ErrInput)
	}
	sf := &sweep.File{Path: path, Base: path, Refine: &sweep.Refine{Levels: c.Family.Levels, Ratio: c.Family.Ratio}}
	for _, name := range c.ParamOrder {
		if v, ok := overrides[name]; ok {
			sf.Params = append(sf.Params, sweep.Param{Name: name, Values: []float64{v}})
		}
	}
	opt := sweep.Options{Workers: runtime.NumCPU()}
	s, err := sweep.Run(cmd.Context(), sf, f.out, newPipeline(sf, opt.Workers), opt)
	if s == nil {
		return err
	}
	if perr := printSweep(cmd.OutOrStdout(), cmd.OutOrStdout(), s, f.out, sweep.Shard{}, g.json, g.quiet || g.json); perr != nil {
		return perr
	}
	return err
}
