package deck

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// Limits of the block-side notes (common practice).
const (
	// sideCornerTurn: a block side that turns by more than this at one
	// of its inner nodes has a corner inside it.
	sideCornerTurn = 45 * math.Pi / 180
	// sideSpacingJump: neighbouring edges of a block side that differ in
	// length by more than this factor make a jump in cell size across
	// the block; neighbouring spacings are commonly kept within 1.2 to 1.5
	// of each other.
	sideSpacingJump = 2.0
)

// sideNotes says where the sides of the case's blocks (not its grown
// grids, whose wall follows the body by design) turn sharply at an inner
// node, a corner of the outline inside a block side, around which the
// cells fold, or where neighbouring edges of a side differ in length by
// more than sideSpacingJump, so that a user can trace poor cells back to
// the spacing or the blocking that made them. One note a side at most for
// each: the sharpest turn and the largest jump, placed in the case's
// units.
func (c *Case) sideNotes(m *mesh.Mesh) []string {
	blocks := map[string]bool{}
	for _, b := range c.Mesh.blocks {
		blocks[b.name] = true
	}
	var notes []string
	for _, b := range m.Blocks {
		if !blocks[b.Name] {
			continue
		}
		for side := mesh.South; side <= mesh.West; side++ {
			var pts []orb.Point
			for _, v := range b.SideNodes(side) {
				pts = append(pts, m.Nodes[v])
			}
			turn, at := 0.0, -1
			jump, jat := 0.0, -1
			for k := 1; k+1 < len(pts); k++ {
				ux, uy := pts[k][0]-pts[k-1][0], pts[k][1]-pts[k-1][1]
				vx, vy := pts[k+1][0]-pts[k][0], pts[k+1][1]-pts[k][1]
				lu, lv := math.Hypot(ux, uy), math.Hypot(vx, vy)
				if lu == 0 || lv == 0 {
					continue
				}
				if t := math.Abs(math.Atan2(ux*vy-uy*vx, ux*vx+uy*vy)); t > turn {
					turn, at = t, k
				}
				if r := math.Max(lu/lv, lv/lu); r > jump {
					jump, jat = r, k
				}
			}
			if turn > sideCornerTurn {
				notes = append(notes, fmt.Sprintf("block %q %s side turns by %.0f° at %s, inside the side: the cells there fold around the corner (their angles and skewness show it); end the side at the corner, so that it is a corner of the blocks", b.Name, side, turn*180/math.Pi, c.point(pts[at], 1e-9)))
			}
			if jump > sideSpacingJump {
				p, q, r := pts[jat-1], pts[jat], pts[jat+1]
				notes = append(notes, fmt.Sprintf("block %q %s side: neighbouring edges at %s differ in length by %.3g times (%s against %s), a jump in cell size across the block; neighbouring spacings are commonly kept within 1.2 to 1.5 of each other: adjust the spacing of the curves there", b.Name, side, c.point(q, 1e-9), jump, c.length(dist(p, q)), c.length(dist(q, r))))
			}
		}
	}
	return notes
}
