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

// spreadOf returns the 0-based indices of the least and greatest of v
// (0 and 0 for none).
func spreadOf(v []float64) (lo, hi int) {
	for i, x := range v {
		if x < v[lo] {
			lo = i
		} else if x > v[hi] {
			hi = i
		}
	}
	return lo, hi
}

// meanOf is the mean of v, summed about v[0] so that large coordinates
// lose nothing to the sum; v[0] itself when every value equals it.
func meanOf(v []float64) float64 {
	sum := 0.0
	for _, x := range v {
		sum += x - v[0]
	}
	return v[0] + sum/float64(len(v))
}

// onPlane is the coordinate plane the nodes of a base's zones lie on (see
// planeAxis): the axis whose coordinate is constant (0 for x, 1 for y, 2
// for z, −1 for none), the coordinate there (for x and y the mean of
// every node's; z is each zone's own), the largest spread of the nodes'
// coordinates on that axis (within one zone for z), tol, the largest
// spread taken as rounding, and zone, the zone of the largest z spread.
type onPlane struct {
	axis       int
	at, spread float64
	tol        float64
	zone       int
}

// planeAxis finds the coordinate plane the nodes of the zones cs lie on:
// z if every zone's nodes share one z (each zone its own, as the reader
// has always taken them), else y or x if every node's does; a coordinate
// is shared when it spreads over at most mesh.PlaneTolerance times the
// largest coordinate magnitude of any node. That is the VTK reader's test
// in the same order with the same constant (see its planeOf3 for why the
// tolerance scales with the magnitude): a spread within it is rounding,
// and the coordinate is set to its mean (for z, each zone's own), so that
// the readers after it see one plane exactly. Axis −1: none is shared (a
// tilted plane, or not a plane).
func planeAxis(cs []xyz) onPlane {
	extent := 0.0
	for _, c := range cs {
		for _, a := range [][]float64{c.x, c.y, c.z} {
			for _, v := range a {
				extent = max(extent, math.Abs(v))
			}
		}
	}
	pl := onPlane{axis: -1, tol: mesh.PlaneTolerance * extent}
	flat, zs := true, 0.0
	for k, c := range cs {
		if len(c.z) == 0 {
			continue
		}
		lo, hi := spreadOf(c.z)
		if d := c.z[hi] - c.z[lo]; !(d <= zs) {
			zs, pl.zone = d, k
		}
		flat = flat && c.z[hi]-c.z[lo] <= pl.tol
	}
	if flat {
		pl.axis, pl.spread = 2, zs
		for _, c := range cs {
			if len(c.z) > 0 && zs > 0 {
				mean := meanOf(c.z)
				for i := range c.z {
					c.z[i] = mean
				}
			}
		}
		return pl
	}
	for _, axis := range []int{1, 0} {
		coord := func(c xyz) []float64 { return [2][]float64{c.x, c.y}[axis] }
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, c := range cs {
			for _, v := range coord(c) {
				lo, hi = min(lo, v), max(hi, v)
			}
		}
		if !(hi-lo <= pl.tol) {
			continue
		}
		pl.axis, pl.spread, pl.at = axis, hi-lo, coord(cs[0])[0]
		if pl.spread > 0 {
			var all []float64
			for _, c := range cs {
				all = append(all, coord(c)...)
			}
			pl.at = meanOf(all)
			for _, c := range cs {
				a := coord(c)
				for i := range a {
					a[i] = pl.at
				}
			}
		}
		return pl
	}
	return pl
}

// spreadNote is the phrase a note on the plane adds when the nodes'
// coordinates on its axis were not all equal, worded as the VTK
// reader's; "" when they were equal.
func (pl onPlane) spreadNote() string {
	if pl.spread == 0 {
		return ""
	}
	return fmt.Sprintf(" (the points' %s spread over %.3g, within the %.3g that rounding gives: taken as one plane at their mean)", [3]string{"x", "y", "z"}[pl.axis], pl.spread, pl.tol)
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

// mappedNote is the note on a mesh read from the plane pl, x = c (axis
// 0) or y = c (axis 1), worded as the VTK reader's.
func mappedNote(pl onPlane) string {
	axis := pl.axis
	name, u, v := "x", "y", "z"
	if axis == 1 {
		name, u = "y", "x"
	}
	at := pl.at
	if pl.spread > 0 {
		// Rounded to the decade of the spread, below which its digits are
		// the sum's rounding, as the VTK reader's note rounds it.
		q := math.Pow(10, math.Floor(math.Log10(pl.spread)))
		at = math.Round(at/q)*q + 0
	}
	return fmt.Sprintf("a plane mesh on %s = %.9g%s, read as 2D with (%s, %s) taken as (x, y), seen from %s (%s dropped; files written from it, such as check -o's, are in that (x, y) plane)", name, at, pl.spreadNote(), u, v, planeView(axis), name)
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
// planeAxis), records it in r.axis with a note when it is not z = c or
// the nodes' coordinate spread by rounding, and returns each zone's nodes
// as 2D points; paths name the zones in errors. Nodes on no one such
// plane are an error naming the zone whose z spreads most, its nodes of
// least and greatest z, and the spread against the tolerance.
func (r *reader) plane(paths []string, cs []xyz) ([][]orb.Point, error) {
	for k, c := range cs {
		for a, v := range [][]float64{c.x, c.y, c.z} {
			if i := slices.IndexFunc(v, func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }); i >= 0 {
				return nil, fmt.Errorf("%s/GridCoordinates/Coordinate%s: node %d is %g; coordinates must be finite", paths[k], [3]string{"X", "Y", "Z"}[a], i+1, v[i])
			}
		}
	}
	pl := planeAxis(cs)
	r.axis = pl.axis
	switch {
	case r.axis < 0:
		c := cs[pl.zone]
		lo, hi := spreadOf(c.z)
		return nil, fmt.Errorf("%s/GridCoordinates/CoordinateZ spreads over %.3g (node %d has z = %g, node %d has %g), more than the %.3g that rounding gives, and the nodes' x and y spread as far: they lie on no plane x, y or z = constant (a tilted plane, or a 3D surface); cvdeck reads plane 2D meshes lying in a plane x, y or z = constant", paths[pl.zone], c.z[hi]-c.z[lo], lo+1, c.z[lo], hi+1, c.z[hi], pl.tol)
	case r.axis < 2:
		r.notes = append(r.notes, mappedNote(pl))
	case pl.spread > 0:
		where := ""
		if len(cs) > 1 {
			where = " (most in " + paths[pl.zone] + ")"
		}
		r.notes = append(r.notes, fmt.Sprintf("a plane mesh on z = constant, read as 2D (z dropped): the nodes' z spread over up to %.3g within a zone%s, within the %.3g that rounding gives, and each zone is taken as one plane at their mean", pl.spread, where, pl.tol))
	}
	out := make([][]orb.Point, len(cs))
	for k, c := range cs {
		out[k] = c.points(r.axis)
	}
	return out, nil
}
