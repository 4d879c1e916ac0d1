package structured

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// BlockSides are the four discretised sides of a block. They run
// counter-clockwise around it: South from the south-west corner to the
// south-east one, East up to the north-east corner, North back to the
// north-west corner and West down to the start. A side given in the opposite
// direction is reversed; the sides must meet at the four corners.
type BlockSides struct {
	Name                     string
	South, East, North, West geometry.Chain
	// Tol is how far apart two sides' ends may be and still count as one
	// corner; 0 means 1e-9 times the block's bounding-box diagonal.
	Tol float64
}

// TFI fills the block bounded by s by transfinite interpolation (Gordon and
// Hall 1973, Int. J. Numer. Meth. Eng. 7):
//
//	X(ξ,η) = (1−η) S(ξ) + η N(ξ) + (1−ξ) W(η) + ξ E(η)
//	       − [(1−ξ)(1−η) P₀₀ + ξ(1−η) P₁₀ + (1−ξ)η P₀₁ + ξη P₁₁]
//
// where S, N, W, E are the sides and P the corners. Node (i, j) takes S and
// N at node i and W and E at node j; its blending parameters (ξ, η) are
// where the line joining the i-th arc-length fractions of south and north,
// ξ = s_S(i) + η (s_N(i) − s_S(i)), crosses the line joining the j-th
// fractions of west and east, η = t_W(j) + ξ (t_E(j) − t_W(j)). Interior
// lines thus follow the clustering of the sides, every side is reproduced
// exactly, and so is any affine map of a tensor-product grid.
//
// Opposite sides must have equal node counts; the error says which sides
// differ and by how many.
func TFI(s BlockSides) (*Block, error) {
	sides, err := orient(s)
	if err != nil {
		return nil, err
	}
	S, E, N, W := sides[0], sides[1], sides[2], sides[3]
	ni, nj := len(S.Points), len(W.Points)
	b := NewBlock(s.Name, ni, nj)
	b.Tags[mesh.South], b.Tags[mesh.East], b.Tags[mesh.North], b.Tags[mesh.West] = S.Tags, E.Tags, N.Tags, W.Tags
	b.Smooth[mesh.South], b.Smooth[mesh.East], b.Smooth[mesh.North], b.Smooth[mesh.West] = S.Smooth, E.Smooth, N.Smooth, W.Smooth

	sS, sN, tW, tE := fractions(S.Points), fractions(N.Points), fractions(W.Points), fractions(E.Points)
	p00, p10, p01, p11 := S.Points[0], S.Points[ni-1], N.Points[0], N.Points[ni-1]
	for j := 0; j < nj; j++ {
		w, e := W.Points[j], E.Points[j]
		for i := 0; i < ni; i++ {
			so, no := S.Points[i], N.Points[i]
			ds, dt := sN[i]-sS[i], tE[j]-tW[j]
			d := 1 - ds*dt
			xi := (sS[i] + tW[j]*ds) / d
			eta := (tW[j] + sS[i]*dt) / d
			a, c := 1-xi, 1-eta
			k := j*ni + i
			b.X[k] = c*so[0] + eta*no[0] + a*w[0] + xi*e[0] - (a*c*p00[0] + xi*c*p10[0] + a*eta*p01[0] + xi*eta*p11[0])
			b.Y[k] = c*so[1] + eta*no[1] + a*w[1] + xi*e[1] - (a*c*p00[1] + xi*c*p10[1] + a*eta*p01[1] + xi*eta*p11[1])
		}
	}
	// Boundary nodes exactly as given, free of the blend's round-off.
	for i := 0; i < ni; i++ {
		b.X[i], b.Y[i] = S.Points[i][0], S.Points[i][1]
		k := (nj-1)*ni + i
		b.X[k], b.Y[k] = N.Points[i][0], N.Points[i][1]
	}
	for j := 0; j < nj; j++ {
		b.X[j*ni], b.Y[j*ni] = W.Points[j][0], W.Points[j][1]
		b.X[j*ni+ni-1], b.Y[j*ni+ni-1] = E.Points[j][0], E.Points[j][1]
	}
	return b, nil
}

// fractions returns the normalised cumulative arc length at each point.
func fractions(p []orb.Point) []float64 {
	f := make([]float64, len(p))
	for k := 1; k < len(p); k++ {
		f[k] = f[k-1] + math.Hypot(p[k][0]-p[k-1][0], p[k][1]-p[k-1][1])
	}
	L := f[len(f)-1]
	for k := range f {
		f[k] /= L
	}
	f[len(f)-1] = 1
	return f
}

// orient checks the four sides and returns copies of them as TFI uses them:
// south and north in increasing i (west to east), west and east in
// increasing j (south to north), corners snapped to the south and north
// sides' ends, tags reordered with their edges.
func orient(s BlockSides) ([4]geometry.Chain, error) {
	var out [4]geometry.Chain
	in := [4]geometry.Chain{s.South, s.East, s.North, s.West}
	var lo, hi orb.Point
	first := true
	for k, c := range in {
		side := mesh.Side(k)
		if len(c.Points) < 2 {
			return out, fmt.Errorf("block %q: %s side has %d nodes; a side needs at least 2", s.Name, side, len(c.Points))
		}
		if len(c.Tags) != len(c.Points)-1 {
			return out, fmt.Errorf("block %q: %s side has %d nodes but %d edge tags; it needs %d", s.Name, side, len(c.Points), len(c.Tags), len(c.Points)-1)
		}
		for e := 1; e < len(c.Points); e++ {
			p, q := c.Points[e-1], c.Points[e]
			if !finite(p) || !finite(q) {
				return out, fmt.Errorf("block %q: %s side node %d is not finite", s.Name, side, e)
			}
			if p == q {
				return out, fmt.Errorf("block %q: %s side edge %d has zero length (nodes %d and %d both at (%g, %g))", s.Name, side, e-1, e-1, e, p[0], p[1])
			}
		}
		for _, p := range c.Points {
			if first {
				lo, hi, first = p, p, false
			}
			lo = orb.Point{math.Min(lo[0], p[0]), math.Min(lo[1], p[1])}
			hi = orb.Point{math.Max(hi[0], p[0]), math.Max(hi[1], p[1])}
		}
	}
	if ns, nn := len(s.South.Points), len(s.North.Points); ns != nn {
		return out, fmt.Errorf("block %q: south side has %d nodes and north side %d (they differ by %d); opposite sides need equal node counts", s.Name, ns, nn, abs(ns-nn))
	}
	if nw, ne := len(s.West.Points), len(s.East.Points); nw != ne {
		return out, fmt.Errorf("block %q: west side has %d nodes and east side %d (they differ by %d); opposite sides need equal node counts", s.Name, nw, ne, abs(nw-ne))
	}
	tol := s.Tol
	if tol <= 0 {
		tol = 1e-9 * math.Hypot(hi[0]-lo[0], hi[1]-lo[1])
	}

	// Walk the corners counter-clockwise: each side must start where the
	// previous one ended (after reversing it if needed). The south side may
	// be reversed too, if that is what makes it meet the east side.
	for k := range in {
		out[k] = geometry.Chain{Points: append([]orb.Point(nil), in[k].Points...), Tags: append([]string(nil), in[k].Tags...)}
		if len(in[k].Smooth) == len(in[k].Points) {
			out[k].Smooth = append([]bool(nil), in[k].Smooth...)
		} else {
			out[k].Smooth = make([]bool, len(in[k].Points))
		}
	}
	sw, se := out[0].Points[0], out[0].Points[len(out[0].Points)-1]
	e0, e1 := out[1].Points[0], out[1].Points[len(out[1].Points)-1]
	if math.Min(dist(se, e0), dist(se, e1)) > tol && math.Min(dist(sw, e0), dist(sw, e1)) <= tol {
		reverse(&out[0])
	}
	for k := 1; k < 4; k++ {
		end := out[k-1].Points[len(out[k-1].Points)-1]
		c := &out[k]
		a, z := c.Points[0], c.Points[len(c.Points)-1]
		switch {
		case dist(a, end) <= tol:
		case dist(z, end) <= tol:
			reverse(c)
		default:
			return out, fmt.Errorf("block %q: %s side does not meet the %s side's end (%g, %g): its ends (%g, %g) and (%g, %g) are %.3g and %.3g away (tolerance %.3g)",
				s.Name, mesh.Side(k), mesh.Side(k-1), end[0], end[1], a[0], a[1], z[0], z[1], dist(a, end), dist(z, end), tol)
		}
		c.Points[0] = end
	}
	start, end := out[0].Points[0], out[3].Points[len(out[3].Points)-1]
	if d := dist(start, end); d > tol {
		return out, fmt.Errorf("block %q: west side ends at (%g, %g), %.3g from the south side's start (%g, %g) (tolerance %.3g)", s.Name, end[0], end[1], d, start[0], start[1], tol)
	}
	out[3].Points[len(out[3].Points)-1] = start
	// East's last node is the north-east corner: keep the north side's.
	out[1].Points[len(out[1].Points)-1] = out[2].Points[0]

	// Counter-clockwise check on the boundary polygon.
	var a2 float64
	for k := range out {
		p := out[k].Points
		for e := 1; e < len(p); e++ {
			a2 += (p[e-1][0]-start[0])*(p[e][1]-start[1]) - (p[e][0]-start[0])*(p[e-1][1]-start[1])
		}
	}
	if a2 <= 0 {
		return out, fmt.Errorf("block %q: the sides south, east, north, west run clockwise (signed area %.3g); name them so that they go counter-clockwise", s.Name, a2/2)
	}
	// North and west run backwards around the loop; TFI wants them in
	// increasing i and j.
	reverse(&out[2])
	reverse(&out[3])
	return out, nil
}

func reverse(c *geometry.Chain) {
	for a, z := 0, len(c.Points)-1; a < z; a, z = a+1, z-1 {
		c.Points[a], c.Points[z] = c.Points[z], c.Points[a]
	}
	for a, z := 0, len(c.Tags)-1; a < z; a, z = a+1, z-1 {
		c.Tags[a], c.Tags[z] = c.Tags[z], c.Tags[a]
	}
	for a, z := 0, len(c.Smooth)-1; a < z; a, z = a+1, z-1 {
		c.Smooth[a], c.Smooth[z] = c.Smooth[z], c.Smooth[a]
	}
}

func dist(a, b orb.Point) float64 { return math.Hypot(a[0]-b[0], a[1]-b[1]) }

func finite(p orb.Point) bool {
	return !math.IsNaN(p[0]) && !math.IsInf(p[0], 0) && !math.IsNaN(p[1]) && !math.IsInf(p[1], 0)
}

func abs(n int) int {
	if n < 0 {
		return -n
	}
	return n
}
