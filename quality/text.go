package quality

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// WriteText writes the report as a plain-text table for a terminal: a
// verdict line, one row per metric (min, mean, max, the warn and fail
// thresholds, and how many cells pass each), the audit, the connectivity
// checks with the defects they found, the boundary faces of each tag, and
// the worst cells of every metric that has any past its warn threshold.
func WriteText(w io.Writer, r *Report) error {
	b := bufio.NewWriter(w)
	verdict := map[Status]string{Pass: "PASS", Warn: "PASS with warnings", Fail: "FAIL"}[r.Verdict]
	limits := fmt.Sprintf("limits %q", r.Profile)
	if len(r.ChangedLimits) > 0 {
		limits += ", changed: " + strings.Join(r.ChangedLimits, ", ")
	}
	fmt.Fprintf(b, "cvdeck mesh check: %s   (%s)\n", verdict, limits)
	fmt.Fprintf(b, "%d cells, %d faces (%d on the boundary), %d nodes; %d cells fail, %d warn; %d nodes fail\n\n",
		r.Cells, r.Faces, r.BoundaryFaces, r.Nodes, r.FailedCells, r.WarnedCells, r.FailedNodes)

	const row = "%-20s %-4s %11s %11s %11s   %-21s %7s %7s\n"
	fmt.Fprintf(b, row, "metric", "unit", "min", "mean", "max", "warn / fail", "warned", "failed")
	fmt.Fprintln(b, strings.Repeat("-", 101))
	for _, s := range r.Metrics {
		lim := limitText(s)
		name := s.Name
		if s.Per == "node" {
			name += " (nodes)"
		}
		fmt.Fprintf(b, row, name, s.Unit, num(float64(s.Min)), num(float64(s.Mean)), num(float64(s.Max)), lim,
			fmt.Sprint(s.Warned), fmt.Sprint(s.Failed))
	}

	thin := false
	for _, s := range r.Metrics {
		if s.FailedThin == 0 {
			continue
		}
		if !thin {
			fmt.Fprintf(b, "\nthin cells\n")
			thin = true
		}
		fmt.Fprintf(b, "  %s: %d of the %d failing cells have an aspect ratio of %d or more and a largest angle within its warn limit (long cells, not slivers)\n", s.Name, s.FailedThin, s.Failed, ThinAspect)
	}
	if thin {
		fmt.Fprintf(b, "  A thin cell's centroid lies far from its short faces compared with their length, so a slight\n"+
			"  taper, curve or shear of the cell carries the line from the centroid across such a face (to the\n"+
			"  neighbour's centroid, or square to a boundary face) well off the face's midpoint: these values\n"+
			"  are then large by construction, and the cell may still serve. Look at the cells (preview,\n"+
			"  mesh.vtu) and judge them before raising a limit for them with --limits.\n")
	}

	a := r.Audit
	fmt.Fprintf(b, "\nconservation audit\n")
	fmt.Fprintf(b, "  boundary  |Σ S n| / Σ |S| over all boundary faces    %s\n", num(float64(a.BoundaryClosure)))
	fmt.Fprintf(b, "  cells     closure max %s; free-stream max %s, rms %s; Green–Gauss error max %s\n",
		num(float64(a.ClosureMax)), num(float64(a.FreeStreamMax)), num(float64(a.FreeStreamRMS)), num(float64(a.GradientMax)))
	fmt.Fprintf(b, "  nodes     median-dual closure max %s\n", num(float64(a.DualClosureMax)))

	fmt.Fprintf(b, "\nconnectivity\n")
	for _, c := range r.Connectivity {
		if c.Count == 0 {
			fmt.Fprintf(b, "  %-18s ok\n", c.Name)
			continue
		}
		fmt.Fprintf(b, "  %-18s %d defect(s)\n", c.Name, c.Count)
		for _, p := range c.Problems {
			fmt.Fprintf(b, "      %s\n", p.Message)
		}
		if c.Count > len(c.Problems) {
			fmt.Fprintf(b, "      ... and %d more\n", c.Count-len(c.Problems))
		}
	}

	fmt.Fprintf(b, "\nboundary tags\n")
	for _, t := range r.Boundary {
		name := t.Tag
		if name == "" {
			name = "(no tag)"
		}
		fmt.Fprintf(b, "  %-18s %8d faces, length %s m", name, t.Faces, num(float64(t.Length)))
		if h := t.FirstCellHeight; t.Faces > 0 {
			fmt.Fprintf(b, "; first-cell height %s to %s m, mean %s", num(float64(h.Min)), num(float64(h.Max)), num(float64(h.Mean)))
		}
		if q := t.QuadLayers; t.Faces > 0 && q.Max > 0 {
			fmt.Fprintf(b, "; %s to %s quadrilaterals stacked, mean %s", num(float64(q.Min)), num(float64(q.Max)), num(float64(q.Mean)))
		}
		fmt.Fprintln(b)
	}

	// Positions are written to a hundredth of the typical cell size, so
	// that cells far from the origin can still be told apart.
	res := math.Inf(1)
	if a, ok := r.Metric("area"); ok {
		res = math.Sqrt(math.Abs(float64(a.Mean))) / 100
	}
	header := false
	for _, s := range r.Metrics {
		if s.Warned+s.Failed == 0 {
			continue
		}
		if !header {
			fmt.Fprintf(b, "\nworst cells (index at centroid: value)\n")
			header = true
		}
		what := "cell"
		if s.Per == "node" {
			what = "node"
		}
		fmt.Fprintf(b, "  %s\n", s.Name)
		for _, l := range s.Worst {
			fmt.Fprintf(b, "      %s %d at (%s, %s): %s\n", what, l.Index, position(l.X, res), position(l.Y, res), num(float64(l.Value)))
		}
	}
	return b.Flush()
}

// position formats a coordinate with 6 significant digits, or as many
// more as resolve res (up to all 17 a float64 has).
func position(x, res float64) string {
	digits := 6
	if ax := math.Abs(x); res > 0 && ax > res {
		// The leading digit's place down to the place of res's leading
		// digit, both included.
		digits = min(max(digits, int(math.Floor(math.Log10(ax))-math.Floor(math.Log10(res)))+1), 17)
	}
	return strconv.FormatFloat(x, 'g', digits, 64)
}

// limitText shows the thresholds of a metric as "> warn / > fail" (or with
// "<" where smaller is worse); a metric whose non-positive values always
// fail shows "≤ 0" when its fail threshold is 0.
func limitText(s MetricSummary) string {
	cmp := ">"
	if s.Worse == "lower" {
		cmp = "<"
	}
	fail := cmp + " " + num(s.Limit.Fail)
	if d := metricByName(s.Name); d != nil && d.positive && s.Limit.Fail <= 0 {
		fail = "≤ 0"
	}
	return fmt.Sprintf("%s %s / %s", cmp, num(s.Limit.Warn), fail)
}

// num formats a value for the table in at most 11 characters.
func num(x float64) string {
	switch {
	case math.IsNaN(x):
		return "n/a"
	case math.IsInf(x, 1):
		return "+inf"
	case math.IsInf(x, -1):
		return "-inf"
	}
	return fmt.Sprintf("%.4g", x)
}

// WriteJSON writes the report as indented JSON with snake_case keys, for
// --json and quality.json. The per-cell, per-face and per-node arrays are
// left out (they go to the mesh files as cell and point data); values that
// are not finite are written as null. The output is the same bytes for the
// same mesh and limits.
func WriteJSON(w io.Writer, r *Report) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(r)
}
