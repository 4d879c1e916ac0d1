package deck

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"cvdeck/samples"
)

// TestCheckBlocksVTM: a multi-block deck written with its structured
// grids (--format vts,vtu) checks from blocks.vtm, its blocks joined into
// one mesh, as it checks from its mesh.vtu. The reference is the deck's
// own mesh.vtu check (its reader is compared with the VTK library in
// export/vtk) and the mesh the run made: the same cell count, total area
// to 1e-12 relative, boundary face count, verdict and failed and warned
// cells. Each block file alone checks too, its cells those of its block.
func TestCheckBlocksVTM(t *testing.T) {
	for _, name := range []string{"nozzle-blocks", "cylinder-duct"} {
		t.Run(name, func(t *testing.T) {
			path, err := samples.Write(name, t.TempDir())
			if err != nil {
				t.Fatal(err)
			}
			c, err := Load(path, LoadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			dir := filepath.Join(t.TempDir(), "deck")
			run, err := Run(c, dir, RunOptions{Formats: []string{"vts", "vtu"}})
			var fail *CheckFailure
			if err != nil && !errors.As(err, &fail) {
				t.Fatal(err)
			}
			if len(run.Mesh.Blocks) < 2 {
				t.Fatalf("%d blocks; the test needs a multi-block sample", len(run.Mesh.Blocks))
			}
			vtu, errVTU := Check(filepath.Join(dir, "mesh.vtu"))
			vtm, errVTM := Check(filepath.Join(dir, "blocks.vtm"))
			for _, e := range []error{errVTU, errVTM} {
				if e != nil && !errors.As(e, &fail) {
					t.Fatal(e)
				}
			}
			if (errVTU == nil) != (errVTM == nil) {
				t.Errorf("mesh.vtu check: %v; blocks.vtm check: %v", errVTU, errVTM)
			}
			area := func(a []float64) float64 {
				s := 0.0
				for _, v := range a {
					s += v
				}
				return s
			}
			want := area(run.Mesh.Geo.CellArea)
			for _, r := range []*CheckResult{vtu, vtm} {
				if r.Mesh.NumCells() != run.Mesh.NumCells() || r.Mesh.NumBoundary() != run.Mesh.NumBoundary() || len(r.Mesh.Nodes) != len(run.Mesh.Nodes) {
					t.Errorf("%s: %d cells, %d boundary faces, %d nodes; the deck's mesh has %d, %d, %d", r.File, r.Mesh.NumCells(), r.Mesh.NumBoundary(), len(r.Mesh.Nodes), run.Mesh.NumCells(), run.Mesh.NumBoundary(), len(run.Mesh.Nodes))
				}
				if got := area(r.Mesh.Geo.CellArea); math.Abs(got-want) > 1e-12*want {
					t.Errorf("%s: total area %.17g, the deck's mesh %.17g", r.File, got, want)
				}
			}
			if vtm.Report.Verdict != vtu.Report.Verdict || vtm.Report.FailedCells != vtu.Report.FailedCells || vtm.Report.WarnedCells != vtu.Report.WarnedCells {
				t.Errorf("blocks.vtm: %s, %d failed, %d warned; mesh.vtu: %s, %d failed, %d warned", vtm.Report.Verdict, vtm.Report.FailedCells, vtm.Report.WarnedCells, vtu.Report.Verdict, vtu.Report.FailedCells, vtu.Report.WarnedCells)
			}
			if vtm.Report.Verdict != run.Report.Verdict {
				t.Errorf("blocks.vtm: %s; the deck's own verdict %s", vtm.Report.Verdict, run.Report.Verdict)
			}
			// The tags come from the deck's boundary.vtp, as for mesh.vtu.
			tags := func(r *CheckResult) string { return fmt.Sprint(r.Report.Boundary) }
			if len(vtm.Warnings) != 0 || tags(vtm) != tags(vtu) {
				t.Errorf("blocks.vtm: warnings %q, tags %s; mesh.vtu's tags %s", vtm.Warnings, tags(vtm), tags(vtu))
			}
			blk := run.Mesh.Blocks[0]
			one, err := Check(filepath.Join(dir, "blocks_0.vts"))
			if err != nil && !errors.As(err, &fail) {
				t.Fatal(err)
			}
			if n := (blk.NI - 1) * (blk.NJ - 1); one.Mesh.NumCells() != n {
				t.Errorf("blocks_0.vts: %d cells, block %q has %d", one.Mesh.NumCells(), blk.Name, n)
			}
		})
	}
}
