package cgns

import (
	"fmt"
	"math"
	"slices"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// xyz are the coordinates of a zone's nodes as the file gives them; z is
// nil in a base of physical dimension 2 or a zone without CoordinateZ.
type xyz struct{ x, y, z []float64 }

// zStep returns the 0-based index of the first node whose z differs from
// node 0's, −1 if every node has the same z exactly (as a plane mesh
// written on z = c has) or the zone has no z.
func (c xyz) zStep() int {
	for i, v := range c.z {
		if v != c.z[0] {
			return i
		}
	}
	return -1
}

// planeAxis returns the coordinate plane the nodes of the zones cs lie on,
// as the axis whose coordinate is constant there (0 for x, 1 for y, 2 for
// z): z if every zone's nodes share one z exactly (each zone its own, as
// the reader has always taken them), else y or x if every node's lies
// within mesh.PlaneTolerance of the largest coordinate magnitude of the first
// node's, the same test in the same order as the VTK reader's; −1 if none
// does (a tilted plane, or not a plane).
func planeAxis(cs []xyz) int {
	flat := true
	extent := 0.0
	for _, c := range cs {
		flat = flat && c.zStep() < 0
		for _, a := range [][]float64{c.x, c.y, c.z} {
			for _, v := range a {
				extent = max(extent, math.Abs(v))
			}
		}
	}
	if flat {
		return 2
	}
	for _, axis := range []int{1, 0} {
		first, same := math.NaN(), true
		for _, c := range cs {
			a := c.x
			if axis == 1 {
				a = c.y
			}
			for _, v := range a {
				if math.IsNaN(first) {
					first = v
				}
				same = same && math.Abs(v-first) <= mesh.PlaneTolerance*extent
			}
		}
		if same {
			return axis
		}
	}
	return -1
}

// points returns the nodes of c on the plane of axis (see planeAxis) as
// 2D points: (x, y) on z = c; on x = c and y = c the two coordinates that
// vary, (y, z) seen from +x and (x, z) seen from −y, both right-handed
// (ŷ × ẑ = x̂, x̂ × ẑ = −ŷ), so that a cell counter-clockwise in the new
// (x, y) is counter-clockwise seen from that side, as the VTK reader maps
// them.
func (c xyz) points(axis int) []orb.Point {
	u, v := c.x, c.y
	switch axis {
	case 0:
		u, v = c.y, c.z
	case 1:
		v = c.z
	}
	pts := make([]orb.Point, len(u))
	for i := range pts {
		pts[i] = orb.Point{u[i], v[i]}
	}
	return pts
}

// planeView is the side a mesh on the plane of axis is seen from: the one
// its (x, y), as points maps them, is counter-clockwise from.
func planeView(axis int) string {
	return [3]string{"+x", "−y", "+z"}[axis]
}

// mappedNote is the note on a mesh read from the plane x = at (axis 0) or
// y = at (axis 1), worded as the VTK reader's.
func mappedNote(axis int, at float64) string {
	name, u, v := "x", "y", "z"
	if axis == 1 {
		name, u = "y", "x"
	}
	return fmt.Sprintf("a plane mesh on %s = %.9g, read as 2D with (%s, %s) taken as (x, y), seen from %s (%s dropped; files written from it, such as check -o's, are in that (x, y) plane)", name, at, u, v, planeView(axis), name)
}

// planeVector is the 3D vector t in the (x, y) of the plane of axis, as
// points maps nodes: a translation between periodic sides.
func planeVector(axis int, t [3]float64) [2]float64 {
	switch axis {
	case 0:
		return [2]float64{t[1], t[2]}
	case 1:
		return [2]float64{t[0], t[2]}
	}
	return [2]float64{t[0], t[1]}
}

// plane finds the coordinate plane the zones' nodes lie on (see
// planeAxis), records it in r.axis with a note when it is not z = c, and
// returns each zone's nodes as 2D points; paths name the zones in errors.
// Nodes on no one such plane are an error naming the first zone whose z
// varies.
func (r *reader) plane(paths []string, cs []xyz) ([][]orb.Point, error) {
	r.axis = planeAxis(cs)
	if r.axis < 0 {
		// Not on z = c: some zone's z varies.
		k := slices.IndexFunc(cs, func(c xyz) bool { return c.zStep() >= 0 })
		i := cs[k].zStep()
		return nil, fmt.Errorf("%s/GridCoordinates/CoordinateZ varies (node %d has z = %g, node 1 has %g), and the nodes share no one x or y either; cvdeck reads plane 2D meshes lying in a plane x, y or z = constant", paths[k], i+1, cs[k].z[i], cs[k].z[0])
	}
	if r.axis < 2 {
		at := cs[0].x[0]
		if r.axis == 1 {
			at = cs[0].y[0]
		}
		r.notes = append(r.notes, mappedNote(r.axis, at))
	}
	out := make([][]orb.Point, len(cs))
	for k, c := range cs {
		out[k] = c.points(r.axis)
	}
	return out, nil
}
