package quality

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// The bucketed sweep finds exactly the duplicates that comparing every
// pair finds (the O(n²) oracle), on points scattered so that close pairs
// straddle bucket sides and corners.
func TestDuplicatesMatchBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	const tol = 1e-3
	var pts []orb.Point
	for i := 0; i < 3000; i++ {
		p := orb.Point{rng.Float64(), rng.Float64()}
		pts = append(pts, p)
		if i%10 == 0 {
			// A partner within, or just beyond, the tolerance in a random
			// direction.
			r := tol * (0.5 + rng.Float64())
			a := 2 * math.Pi * rng.Float64()
			pts = append(pts, orb.Point{p[0] + r*math.Cos(a), p[1] + r*math.Sin(a)})
		}
	}
	// Snap some points onto bucket sides (bucket size 16·tol from the
	// lower-left corner) to test the edge cases.
	lo, _ := bounds(pts)
	for i := 0; i < len(pts); i += 37 {
		pts[i][0] = lo[0] + 16*tol*math.Round((pts[i][0]-lo[0])/(16*tol))
	}
	m := &mesh.Mesh{Nodes: pts}
	first := make([]int32, len(pts))
	all := make([]int32, len(pts))
	for i := range all {
		all[i] = int32(i)
	}
	cn := newConnectivity(1 << 20)
	findDuplicates(m, all, first, tol, cn)
	// Each finding names the node and, in its message, the lowest node it
	// duplicates; compare both with the oracle.
	var got, want []string
	for _, p := range cn.results[slices.Index(checkNames, CheckDuplicate)].Problems {
		got = append(got, fmt.Sprintf("%d<%s", p.Node, strings.Fields(p.Message)[1]))
	}
	for w := range pts {
		for v := 0; v < w; v++ {
			if math.Hypot(pts[w][0]-pts[v][0], pts[w][1]-pts[v][1]) < tol {
				want = append(want, fmt.Sprintf("%d<%d", w, v))
				break
			}
		}
	}
	if len(want) < 100 || !slices.Equal(got, want) {
		t.Errorf("found %d duplicates, brute force %d", len(got), len(want))
	}
}
