package geometry

import (
	"errors"
	"fmt"
	"math"
)

// ErrSpacing marks an invalid spacing law or one that cannot be met on a
// given length.
var ErrSpacing = errors.New("invalid spacing")

// MaxSegmentNodes bounds the node count a spacing law may produce on one
// segment, so a tiny size on a long segment is refused before allocation.
const MaxSegmentNodes = 10_000_000

type spacingLaw uint8

const (
	lawVertices spacingLaw = iota // the zero value: keep the segment's own vertices
	lawCount
	lawSize
	lawGrowth
	lawGrowthCount
	lawCosine
	lawOneSided
	lawTwoSided
)

// Spacing is a law that places nodes along a segment by arc length. Build
// one with Count, Size, Growth, GrowthCount, Cosine, OneSided or Clustered;
// the zero value keeps a segment's own vertices (the two ends of a line,
// the vertices of a polyline, the data points of a spline) and is refused
// by curves that have none (arcs, NACA surfaces).
//
// Lengths in a Spacing (size, first and last spacing) are in the same unit
// as the geometry and are scaled with it by Scaled.
type Spacing struct {
	law         spacingLaw
	n           int     // node count (count, growth-count, cosine, Vinokur laws)
	size        float64 // target edge length (size law)
	first, last float64 // spacing at the start and at the end
	ratio       float64 // growth ratio (growth law)
	fromEnd     bool    // growth or one-sided clustering measured from the end
}

// OwnVertices returns the zero Spacing: keep the segment's own vertices.
func OwnVertices() Spacing { return Spacing{} }

// Count returns a law of n equally spaced nodes (n ≥ 2, ends included).
func Count(n int) (Spacing, error) {
	if err := checkCount(n, 2); err != nil {
		return Spacing{}, err
	}
	return Spacing{law: lawCount, n: n}, nil
}

// Size returns a law of equal edges as close to size h as the length
// allows: round(L/h) edges, at least one.
func Size(h float64) (Spacing, error) {
	if err := checkLength("size", h); err != nil {
		return Spacing{}, err
	}
	return Spacing{law: lawSize, size: h}, nil
}

// Growth returns a geometric law: the first edge is exactly first long and
// each next edge is about ratio times the previous one. The edge count is
// the one whose geometric sum with that ratio comes closest to the length;
// the ratio is then adjusted so the edges fill the length exactly while
// the first spacing stays exact. With fromEnd the first edge is at the
// segment's end and edges grow towards its start.
func Growth(first, ratio float64, fromEnd bool) (Spacing, error) {
	if err := checkLength("first spacing", first); err != nil {
		return Spacing{}, err
	}
	if !(ratio > 0) || math.IsInf(ratio, 0) {
		return Spacing{}, fmt.Errorf("growth ratio %g must be a positive finite number (1 gives equal edges): %w", ratio, ErrSpacing)
	}
	return Spacing{law: lawGrowth, first: first, ratio: ratio, fromEnd: fromEnd}, nil
}

// GrowthCount returns a geometric law with n nodes whose first edge is
// exactly first long; the growth ratio r solves
// first·(rⁿ⁻¹ − 1)/(r − 1) = L. With fromEnd the first edge is at the end.
func GrowthCount(first float64, n int, fromEnd bool) (Spacing, error) {
	if err := checkLength("first spacing", first); err != nil {
		return Spacing{}, err
	}
	if err := checkCount(n, 2); err != nil {
		return Spacing{}, err
	}
	return Spacing{law: lawGrowthCount, first: first, n: n, fromEnd: fromEnd}, nil
}

// Cosine returns n nodes at arc-length fractions (1 − cos(πi/(n−1)))/2:
// clustered at both ends, the usual choice for an aerofoil surface from
// leading to trailing edge (common practice).
func Cosine(n int) (Spacing, error) {
	if err := checkCount(n, 2); err != nil {
		return Spacing{}, err
	}
	return Spacing{law: lawCosine, n: n}, nil
}

// OneSided returns Vinokur's one-sided stretching with n nodes and the
// first edge exactly first long (at the end instead with fromEnd); see
// VinokurOneSided.
func OneSided(first float64, n int, fromEnd bool) (Spacing, error) {
	if err := checkLength("first spacing", first); err != nil {
		return Spacing{}, err
	}
	if err := checkCount(n, 3); err != nil {
		return Spacing{}, err
	}
	return Spacing{law: lawOneSided, first: first, n: n, fromEnd: fromEnd}, nil
}

// Clustered returns Vinokur's two-sided stretching with n nodes, the first
// edge exactly first long and the last exactly last long; see
// VinokurTwoSided.
func Clustered(first, last float64, n int) (Spacing, error) {
	if err := checkLength("first spacing", first); err != nil {
		return Spacing{}, err
	}
	if err := checkLength("last spacing", last); err != nil {
		return Spacing{}, err
	}
	if err := checkCount(n, 4); err != nil {
		return Spacing{}, err
	}
	return Spacing{law: lawTwoSided, first: first, last: last, n: n}, nil
}

func checkCount(n, min int) error {
	if n < min || n > MaxSegmentNodes {
		return fmt.Errorf("node count %d must be between %d and %d: %w", n, min, MaxSegmentNodes, ErrSpacing)
	}
	return nil
}

func checkLength(what string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s %g must be a positive finite length: %w", what, v, ErrSpacing)
	}
	return nil
}

// KeepsVertices reports whether s is the zero law that keeps a segment's
// own vertices.
func (s Spacing) KeepsVertices() bool { return s.law == lawVertices }

// String describes the law in words, for messages and manifests.
func (s Spacing) String() string {
	end := "start"
	if s.fromEnd {
		end = "end"
	}
	switch s.law {
	case lawCount:
		return fmt.Sprintf("%d equal nodes", s.n)
	case lawSize:
		return fmt.Sprintf("size %g", s.size)
	case lawGrowth:
		return fmt.Sprintf("growth from %s: first %g, ratio %g", end, s.first, s.ratio)
	case lawGrowthCount:
		return fmt.Sprintf("growth from %s: first %g, %d nodes", end, s.first, s.n)
	case lawCosine:
		return fmt.Sprintf("cosine, %d nodes", s.n)
	case lawOneSided:
		return fmt.Sprintf("Vinokur one-sided from %s: first %g, %d nodes", end, s.first, s.n)
	case lawTwoSided:
		return fmt.Sprintf("Vinokur two-sided: first %g, last %g, %d nodes", s.first, s.last, s.n)
	}
	return "own vertices"
}

// Reversed returns the law seen from the other end of its segment: growth
// and one-sided laws switch ends, a two-sided law swaps its first and last
// spacings. Symmetric laws are unchanged.
func (s Spacing) Reversed() Spacing {
	switch s.law {
	case lawGrowth, lawGrowthCount, lawOneSided:
		s.fromEnd = !s.fromEnd
	case lawTwoSided:
		s.first, s.last = s.last, s.first
	}
	return s
}

// Scaled returns the law with its lengths multiplied by f (for a change of
// units applied to the geometry as well).
func (s Spacing) Scaled(f float64) Spacing {
	s.size *= f
	s.first *= f
	s.last *= f
	return s
}

// NodeCount returns the number of nodes the law gives on a segment of the
// given length, without placing them: cheap enough to estimate a mesh
// size before any allocation.
func (s Spacing) NodeCount(length float64) (int, error) {
	if err := checkLength("segment length", length); err != nil {
		return 0, err
	}
	switch s.law {
	case lawVertices:
		return 0, fmt.Errorf("the own-vertices law has no node count of its own: %w", ErrSpacing)
	case lawSize:
		m := math.Round(length / s.size)
		if m > MaxSegmentNodes-1 {
			return 0, fmt.Errorf("size %g on length %g gives %.3g nodes, more than %d: %w", s.size, length, m+1, MaxSegmentNodes, ErrSpacing)
		}
		return max(1, int(m)) + 1, nil
	case lawGrowth:
		m, err := growthEdges(s.first, s.ratio, length)
		return m + 1, err
	}
	return s.n, nil
}

// Counted reports whether the law fixes its own node count (count, cosine,
// and the geometric and Vinokur laws given a count), rather than deriving
// it from the segment's length (size, growth) or from the segment's
// vertices.
func (s Spacing) Counted() bool {
	switch s.law {
	case lawCount, lawCosine, lawGrowthCount, lawOneSided, lawTwoSided:
		return true
	}
	return false
}

// Edges returns the edge count the law aims at on a segment of the given
// length before it is rounded to a whole number: n − 1 for a counted law,
// L/h for a size law and the real m of first·(rᵐ − 1)/(r − 1) = L for a
// growth law. A caller that must round several segments together (the
// sides of a structured block) starts from it; see WithEdges.
func (s Spacing) Edges(length float64) (float64, error) {
	if err := checkLength("segment length", length); err != nil {
		return 0, err
	}
	switch s.law {
	case lawVertices:
		return 0, fmt.Errorf("the own-vertices law has no edge count of its own: %w", ErrSpacing)
	case lawSize:
		return length / s.size, nil
	case lawGrowth:
		return growthEdgesReal(s.first, s.ratio, length)
	}
	return float64(s.n - 1), nil
}

// MinEdges returns the fewest edges the law accepts: 3 for Vinokur's
// two-sided law, 2 for the one-sided one, 1 for the others.
func (s Spacing) MinEdges() int {
	switch s.law {
	case lawOneSided:
		return 2
	case lawTwoSided:
		return 3
	}
	return 1
}

// WithEdges returns the law with exactly m edges: a counted law with m + 1
// nodes, a size law as m equal edges (Count), a growth law as the
// geometric law with the same first spacing and m edges (GrowthCount).
// Where m is the count the law rounds to itself, the nodes are the same.
// The own-vertices law has no count to change.
func (s Spacing) WithEdges(m int) (Spacing, error) {
	if m < s.MinEdges() || m > MaxSegmentNodes-1 {
		return Spacing{}, fmt.Errorf("%s: %d edges is outside %d to %d: %w", s, m, s.MinEdges(), MaxSegmentNodes-1, ErrSpacing)
	}
	switch s.law {
	case lawVertices:
		return Spacing{}, fmt.Errorf("the own-vertices law has no edge count to change: %w", ErrSpacing)
	case lawSize:
		return Count(m + 1)
	case lawGrowth:
		return GrowthCount(s.first, m+1, s.fromEnd)
	}
	s.n = m + 1
	return s, nil
}

// Fractions returns the arc-length fractions 0 = f₀ < f₁ < … < fₙ₋₁ = 1 of
// the nodes the law places on a segment of the given length. Other
// packages (the structured mesher) reuse it to distribute nodes along any
// curve.
func (s Spacing) Fractions(length float64) ([]float64, error) {
	n, err := s.NodeCount(length)
	if err != nil {
		return nil, err
	}
	var f []float64
	switch s.law {
	case lawCount, lawSize:
		f = make([]float64, n)
		for i := range f {
			f[i] = float64(i) / float64(n-1)
		}
	case lawCosine:
		f = make([]float64, n)
		for i := range f {
			if 2*i <= n-1 {
				f[i] = (1 - math.Cos(math.Pi*float64(i)/float64(n-1))) / 2
			} else {
				f[i] = 1 - f[n-1-i] // keep the law exactly symmetric
			}
		}
	case lawGrowth, lawGrowthCount:
		f, err = geometricFractions(s.first/length, n-1)
	case lawOneSided:
		f, err = VinokurOneSided(n, s.first/length)
	case lawTwoSided:
		f, err = VinokurTwoSided(n, s.first/length, s.last/length)
	}
	if err != nil {
		return nil, fmt.Errorf("%s on length %g: %w", s, length, err)
	}
	if s.fromEnd {
		mirror(f)
	}
	f[0], f[len(f)-1] = 0, 1
	return f, nil
}

// mirror turns fractions measured from the end into fractions from the
// start: f[i] ← 1 − f[n−1−i].
func mirror(f []float64) {
	for i, j := 0, len(f)-1; i <= j; i, j = i+1, j-1 {
		f[i], f[j] = 1-f[j], 1-f[i]
	}
}

// growthEdges returns the edge count m whose geometric sum
// first·(rᵐ − 1)/(r − 1) comes closest to length.
func growthEdges(first, ratio, length float64) (int, error) {
	m, err := growthEdgesReal(first, ratio, length)
	if err != nil {
		return 0, err
	}
	m = math.Round(m)
	if math.IsNaN(m) || m > MaxSegmentNodes-1 {
		return 0, fmt.Errorf("first spacing %g with ratio %g cannot fill length %g within %d nodes: %w", first, ratio, length, MaxSegmentNodes, ErrSpacing)
	}
	return max(1, int(m)), nil
}

// growthEdgesReal returns the real m that solves
// first·(rᵐ − 1)/(r − 1) = length: m = ln(1 + (length/first)(r − 1)) / ln r,
// or length/first for r = 1.
func growthEdgesReal(first, ratio, length float64) (float64, error) {
	if first > length {
		return 0, fmt.Errorf("first spacing %g exceeds the segment length %g: %w", first, length, ErrSpacing)
	}
	if math.Abs(ratio-1) < 1e-12 {
		return length / first, nil
	}
	return math.Log1p(length/first*(ratio-1)) / math.Log(ratio), nil
}

// geometricFractions returns m+1 fractions whose first edge is exactly d
// (a fraction of the length) and whose edges grow by a constant ratio r
// solving d·(rᵐ − 1)/(r − 1) = 1. With ρ = ln r the k-th node is at
// d·expm1(kρ)/expm1(ρ), which stays accurate for r near 1.
func geometricFractions(d float64, m int) ([]float64, error) {
	f := make([]float64, m+1)
	f[m] = 1
	if m == 1 {
		return f, nil
	}
	if d >= 1 {
		return nil, fmt.Errorf("first spacing is %g times the segment length, which leaves no room for %d edges: %w", d, m, ErrSpacing)
	}
	rho := solveGrowth(d, m)
	for k := 1; k < m; k++ {
		if rho == 0 {
			f[k] = d * float64(k)
		} else {
			f[k] = d * math.Expm1(float64(k)*rho) / math.Expm1(rho)
		}
	}
	if !(f[m-1] < 1) {
		return nil, fmt.Errorf("first spacing fraction %g over %d edges gives coincident nodes: %w", d, m, ErrSpacing)
	}
	return f, nil
}

// solveGrowth returns ρ = ln r with S(ρ) = expm1(mρ)/expm1(ρ) = 1/d, by
// bisection (S grows monotonically with ρ, S(0) = m).
func solveGrowth(d float64, m int) float64 {
	target := 1 / d
	sum := func(rho float64) float64 {
		if rho == 0 {
			return float64(m)
		}
		return math.Expm1(float64(m)*rho) / math.Expm1(rho)
	}
	if math.Abs(target-float64(m)) <= 1e-15*target {
		return 0
	}
	lo, hi := 0.0, 0.0
	if target > float64(m) {
		// S(ρ) ≥ e^{(m−1)ρ}, so ρ = ln(target)/(m−1) brackets the root.
		hi = math.Log(target)/float64(m-1) + 1e-300
	} else {
		lo = -1
		for sum(lo) > target && lo > -1e6 {
			lo *= 2
		}
	}
	return bisect(func(rho float64) float64 { return sum(rho) - target }, lo, hi)
}

// bisect returns a root of the increasing or decreasing function g on
// [lo, hi] (g(lo) and g(hi) of opposite signs), to full float precision.
func bisect(g func(float64) float64, lo, hi float64) float64 {
	glo := g(lo)
	for range 4000 {
		mid := lo + (hi-lo)/2
		if mid <= lo || mid >= hi {
			break
		}
		gm := g(mid)
		if gm == 0 {
			return mid
		}
		if (gm < 0) == (glo < 0) {
			lo, glo = mid, gm
		} else {
			hi = mid
		}
	}
	return lo + (hi-lo)/2
}
