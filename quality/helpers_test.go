package quality

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

// build makes a mesh from nodes and cells with every boundary edge tagged
// "wall" (tagAll) or none tagged.
func build(t testing.TB, nodes []orb.Point, cells [][]int32, tagAll bool) *mesh.Mesh {
	t.Helper()
	in := mesh.Input{Nodes: nodes, CellStart: []int32{0}}
	for _, c := range cells {
		in.CellNodes = append(in.CellNodes, c...)
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
	}
	if tagAll {
		in.Tags = []string{"wall"}
		in.Edges = boundaryEdges(cells)
	}
	m, err := mesh.Build(in)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// boundaryEdges returns the edges used by one cell only, tagged 0.
func boundaryEdges(cells [][]int32) []mesh.TaggedEdge {
	count := map[[2]int32]int{}
	var order [][2]int32
	for _, c := range cells {
		for k := range c {
			a, b := c[k], c[(k+1)%len(c)]
			key := [2]int32{min(a, b), max(a, b)}
			if count[key] == 0 {
				order = append(order, key)
			}
			count[key]++
		}
	}
	var out []mesh.TaggedEdge
	for _, e := range order {
		if count[e] == 1 {
			out = append(out, mesh.TaggedEdge{A: e[0], B: e[1], Tag: 0})
		}
	}
	return out
}

// gridNodes returns the (nx+1)×(ny+1) nodes x = o + i·a + j·b, perturbed by
// up to jitter·|a| in each coordinate (interior nodes only) from a fixed
// seed.
func gridNodes(nx, ny int, o, a, b orb.Point, jitter float64) []orb.Point {
	rng := rand.New(rand.NewPCG(1, 2))
	h := math.Hypot(a[0], a[1])
	var pts []orb.Point
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			p := orb.Point{o[0] + float64(i)*a[0] + float64(j)*b[0], o[1] + float64(i)*a[1] + float64(j)*b[1]}
			if jitter > 0 && i > 0 && j > 0 && i < nx && j < ny {
				p[0] += jitter * h * (2*rng.Float64() - 1)
				p[1] += jitter * h * (2*rng.Float64() - 1)
			}
			pts = append(pts, p)
		}
	}
	return pts
}

// quadCells returns the cells of an nx×ny grid of quads (split into two
// triangles each when tri is true), counter-clockwise.
func quadCells(nx, ny int, tri bool) [][]int32 {
	id := func(i, j int) int32 { return int32(j*(nx+1) + i) }
	var cells [][]int32
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, b, c, d := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			if tri {
				cells = append(cells, []int32{a, b, c}, []int32{a, c, d})
			} else {
				cells = append(cells, []int32{a, b, c, d})
			}
		}
	}
	return cells
}

func everyday(t testing.TB) Limits {
	l, err := Profile(DefaultProfile)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

func evaluate(t testing.TB, m *mesh.Mesh) *Report {
	t.Helper()
	r, err := Evaluate(m, everyday(t))
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func field(t testing.TB, r *Report, name string) []float64 {
	t.Helper()
	v, ok := r.Field(name)
	if !ok {
		t.Fatalf("no field %q", name)
	}
	return v
}

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }
