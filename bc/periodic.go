package bc

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

// DefaultPeriodicTolerance is the face-matching tolerance used when a
// periodic condition gives none, relative to each face's length: the end
// nodes of a face moved by the translation must land within this fraction
// of its length of the end nodes of its partner face.
const DefaultPeriodicTolerance = 1e-6

// PeriodicMatch is a verified periodic pairing: face Pairs[k][0] of tag A,
// moved by Translation, coincides with face Pairs[k][1] of tag B.
type PeriodicMatch struct {
	A, B        string
	Translation orb.Point
	// Pairs are (face of A, face of B) mesh face indices, in A's face order.
	Pairs [][2]int32
	// MaxMismatch is the largest distance, in metres, between a moved end
	// node of A and the matching end node of B.
	MaxMismatch float64
}

// matchPeriodic pairs the faces [aLo, aHi) with the faces [bLo, bHi) under
// translation t. tol > 0 is an absolute tolerance in metres; tol == 0 means
// DefaultPeriodicTolerance times each face's length.
//
// B's faces are sorted by midpoint along the axis in which their midpoints
// spread most, so each face of A finds its candidates by binary search: the
// matching costs O(n log n) for the straight and gently curved boundaries
// periodic pairs are made of.
func matchPeriodic(m *mesh.Mesh, a, b string, aLo, aHi, bLo, bHi int, t orb.Point, tol float64) (PeriodicMatch, error) {
	pm := PeriodicMatch{A: a, B: b, Translation: t}
	na, nb := aHi-aLo, bHi-bLo
	if na != nb {
		return pm, fmt.Errorf("tag %q has %d faces and its periodic partner %q has %d; periodic faces must match one to one", a, na, b, nb)
	}
	mid := m.Geo.FaceMid
	lo, hi := orb.Point{math.Inf(1), math.Inf(1)}, orb.Point{math.Inf(-1), math.Inf(-1)}
	for f := bLo; f < bHi; f++ {
		for d := 0; d < 2; d++ {
			lo[d], hi[d] = math.Min(lo[d], mid[f][d]), math.Max(hi[d], mid[f][d])
		}
	}
	axis := 0
	if hi[1]-lo[1] > hi[0]-lo[0] {
		axis = 1
	}
	order := make([]int32, 0, nb)
	for f := bLo; f < bHi; f++ {
		order = append(order, int32(f))
	}
	sort.SliceStable(order, func(i, j int) bool { return mid[order[i]][axis] < mid[order[j]][axis] })
	used := make([]bool, m.NumFaces())
	pm.Pairs = make([][2]int32, 0, na)
	var bad []string
	for f := aLo; f < aHi; f++ {
		ftol := tol
		if ftol == 0 {
			ftol = DefaultPeriodicTolerance * m.Geo.FaceLength[f]
		}
		p0 := add(m.Nodes[m.FaceNodes[f][0]], t)
		p1 := add(m.Nodes[m.FaceNodes[f][1]], t)
		key := mid[f][axis] + t[axis]
		k := sort.Search(len(order), func(i int) bool { return mid[order[i]][axis] >= key-ftol })
		found := false
		for ; k < len(order) && mid[order[k]][axis] <= key+ftol; k++ {
			g := order[k]
			q0, q1 := m.Nodes[m.FaceNodes[g][0]], m.Nodes[m.FaceNodes[g][1]]
			d := math.Min(math.Max(dist(p0, q0), dist(p1, q1)), math.Max(dist(p0, q1), dist(p1, q0)))
			if d > ftol {
				continue
			}
			// Under a translation the normals keep their direction, so a
			// periodic partner face must face the other way: the two cells
			// lie on opposite sides of the joined face.
			if na, nb := m.Geo.FaceNormal[f], m.Geo.FaceNormal[g]; na[0]*nb[0]+na[1]*nb[1] > 0 {
				return pm, fmt.Errorf("face %d of tag %q lands on face %d of %q, but both have the domain on the same side (normals (%.3g, %.3g) and (%.3g, %.3g)); periodic partner faces must face opposite ways",
					f, a, g, b, na[0]+0, na[1]+0, nb[0]+0, nb[1]+0)
			}
			if used[g] {
				return pm, fmt.Errorf("faces of tag %q land twice on face %d of %q; periodic faces must match one to one", a, g, b)
			}
			used[g] = true
			pm.Pairs = append(pm.Pairs, [2]int32{int32(f), g})
			pm.MaxMismatch = math.Max(pm.MaxMismatch, d)
			found = true
			break
		}
		if !found && len(bad) < 3 {
			near, nd := nearestFace(m, bLo, bHi, add(mid[f], t))
			bad = append(bad, fmt.Sprintf("face %d at (%.9g, %.9g) moves to (%.9g, %.9g); the nearest face of %q, face %d, is %.3g m away (tolerance %.3g m)",
				f, mid[f][0], mid[f][1], mid[f][0]+t[0], mid[f][1]+t[1], b, near, nd, ftol))
		}
	}
	if miss := na - len(pm.Pairs); miss > 0 {
		return pm, fmt.Errorf("%d of %d faces of tag %q have no matching face in %q after the translation (%.9g, %.9g) m; first: %s",
			miss, na, a, b, t[0], t[1], strings.Join(bad, "; "))
	}
	return pm, nil
}

// nearestFace returns the face in [lo, hi) whose midpoint is nearest p, and
// the distance.
func nearestFace(m *mesh.Mesh, lo, hi int, p orb.Point) (int, float64) {
	best, bd := -1, math.Inf(1)
	for f := lo; f < hi; f++ {
		if d := dist(m.Geo.FaceMid[f], p); d < bd {
			best, bd = f, d
		}
	}
	return best, bd
}

func add(p, q orb.Point) orb.Point { return orb.Point{p[0] + q[0], p[1] + q[1]} }

func dist(p, q orb.Point) float64 { return math.Hypot(p[0]-q[0], p[1]-q[1]) }
