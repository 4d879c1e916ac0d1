package deck

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cvdeck/quality"
)

// partlyTagged is a legacy ASCII VTK unstructured grid (VTK file formats,
// "Simple Legacy Formats": cell type 9 a quad, 3 a line) of two unit
// quads with two of its six boundary edges given as lines of tag 0; the
// quads carry tag −1, none.
const partlyTagged = `# vtk DataFile Version 3.0
two quads, floor tagged only
ASCII
DATASET UNSTRUCTURED_GRID
POINTS 6 double
0 0 0  1 0 0  2 0 0  0 1 0  1 1 0  2 1 0
CELLS 4 16
4 0 1 4 3
4 1 2 5 4
2 0 1
2 1 2
CELL_TYPES 4
9
9
3
3
CELL_DATA 4
FIELD FieldData 1
tag 1 4 int
-1 -1 0 0
`

// A mesh with some boundary faces tagged and others not is a defect of
// its tagging: the four untagged faces fail boundary_tag and the check
// fails, naming them; only a mesh with no tags at all has its boundary
// checked as one tag (the rule for meshes that carry none).
func TestCheckPartlyTagged(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "two.vtk")
	if err := os.WriteFile(path, []byte(partlyTagged), 0o644); err != nil {
		t.Fatal(err)
	}
	res, err := Check(path)
	var cf *CheckFailure
	if !errors.As(err, &cf) {
		t.Fatalf("Check: %v, want a check failure", err)
	}
	var bt quality.CheckResult
	for _, c := range res.Report.Connectivity {
		if c.Name == quality.CheckBoundaryTag {
			bt = c
		}
	}
	if bt.Count != 4 || !strings.Contains(cf.Error(), "boundary_tag: 4 defects") {
		t.Errorf("boundary_tag %d defects; error %q", bt.Count, cf)
	}
	for _, w := range res.Warnings {
		if strings.Contains(w, DefaultTag) {
			t.Errorf("warning %q: a mesh tagged in part is not given the default tag", w)
		}
	}
}
