package quality

import (
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// One Evaluator, reused on meshes that grow, shrink and carry defects,
// gives each time the same report as a fresh Evaluate: nothing of an
// earlier mesh leaks into a later report through the reused memory. One
// with NoFields gives the same report and cell status without the arrays.
func TestEvaluatorReuse(t *testing.T) {
	folded := gridNodes(3, 3, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0)
	folded[5] = orb.Point{2.2, 2.2}
	unused := append(gridNodes(4, 2, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), orb.Point{9, 9})
	gap := build(t, gridNodes(2, 2, orb.Point{0, 0}, orb.Point{1, 0}, orb.Point{0, 1}, 0), quadCells(2, 2, false), true)
	dropLastFace(gap)
	twin := []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {1, 0}, {2, 0}, {2, 1}, {1, 1}}
	meshes := []struct {
		name string
		m    *mesh.Mesh
	}{
		{"folded quads", build(t, folded, quadCells(3, 3, false), true)},
		{"jittered triangles", build(t, gridNodes(120, 90, orb.Point{0, 0}, orb.Point{0.01, 0}, orb.Point{0, 0.01}, 0.45), quadCells(120, 90, true), true)},
		{"quads with an unused node", build(t, unused, quadCells(4, 2, false), true)},
		{"untagged quads", build(t, gridNodes(40, 30, orb.Point{0, 0}, orb.Point{0.1, 0}, orb.Point{0, 0.1}, 0.3), quadCells(40, 30, false), false)},
		{"duplicate nodes", build(t, twin, [][]int32{{0, 1, 2, 3}, {4, 5, 6, 7}}, true)},
		{"open boundary", gap},
		{"folded quads again", build(t, folded, quadCells(3, 3, false), true)},
	}
	var e Evaluator
	bare := Evaluator{NoFields: true}
	for _, c := range meshes {
		got, err := e.Evaluate(c.m, everyday(t))
		if err != nil {
			t.Fatal(err)
		}
		fresh := evaluate(t, c.m)
		sameReport(t, "for "+c.name+" from a reused Evaluator and a fresh one", got, fresh)

		// Without fields: the same report, the same cell status, no arrays.
		noFields, err := bare.Evaluate(c.m, everyday(t))
		if err != nil {
			t.Fatal(err)
		}
		if noFields.CellFields != nil || noFields.FaceFields != nil || noFields.NodeFields != nil {
			t.Errorf("%s: NoFields report has fields", c.name)
		}
		noFields.CellFields, noFields.FaceFields, noFields.NodeFields = fresh.CellFields, fresh.FaceFields, fresh.NodeFields
		sameReport(t, "for "+c.name+" without fields and with", noFields, fresh)
	}
}
