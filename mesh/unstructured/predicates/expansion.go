package predicates

import "math"

// Exact floating-point expansion arithmetic after Shewchuk, "Adaptive
// Precision Floating-Point Arithmetic and Fast Robust Geometric Predicates",
// Discrete & Computational Geometry 18 (1997) 305–363. An expansion is a
// sum of float64 components, non-overlapping and in increasing order of
// magnitude; its sign is the sign of its last (largest) component.

// twoSum returns x = fl(a+b) and the exact roundoff y, so a+b = x+y
// (Knuth's Two-Sum, Shewchuk Theorem 7).
func twoSum(a, b float64) (x, y float64) {
	x = a + b
	bv := x - a
	av := x - bv
	return x, (a - av) + (b - bv)
}

// twoDiffTail returns the roundoff of x = fl(a-b), so a-b = x+tail.
func twoDiffTail(a, b, x float64) float64 {
	bv := a - x
	av := x + bv
	return (a - av) + (bv - b)
}

// twoProduct returns x = fl(a*b) and the exact roundoff y, so a*b = x+y.
// The fused multiply-add gives the roundoff exactly in one operation, in
// place of Dekker's splitting used in the 1997 paper.
func twoProduct(a, b float64) (x, y float64) {
	x = a * b
	return x, math.FMA(a, b, -x)
}

// twoTwoDiff returns the four-component expansion of (a1+a0) − (b1+b0)
// (Shewchuk's Two_Two_Diff), components in increasing magnitude.
func twoTwoDiff(a1, a0, b1, b0 float64) [4]float64 {
	i, x0 := twoSum(a0, -b0)
	j, r0 := twoSum(a1, i)
	i, x1 := twoSum(r0, -b1)
	x3, x2 := twoSum(j, i)
	return [4]float64{x0, x1, x2, x3}
}

// growExpansion adds b to the expansion e, dropping zero components
// (Shewchuk's Grow-Expansion with zero elimination). The result is appended
// to out[:0]; out may not alias e.
func growExpansion(out, e []float64, b float64) []float64 {
	out = out[:0]
	q := b
	for _, c := range e {
		var h float64
		q, h = twoSum(q, c)
		if h != 0 {
			out = append(out, h)
		}
	}
	if q != 0 || len(out) == 0 {
		out = append(out, q)
	}
	return out
}

// sumExpansions returns e+f as an expansion by growing e with every
// component of f (Shewchuk's Expansion-Sum, Theorem 12).
func sumExpansions(e, f []float64) []float64 {
	acc := append(make([]float64, 0, len(e)+len(f)), e...)
	tmp := make([]float64, 0, len(e)+len(f))
	for _, c := range f {
		tmp = growExpansion(tmp, acc, c)
		acc, tmp = tmp, acc
	}
	return acc
}

// scaleExpansion returns e·b as an expansion (Shewchuk's Scale-Expansion,
// Theorem 19), zero components dropped.
func scaleExpansion(e []float64, b float64) []float64 {
	out := make([]float64, 0, 2*len(e))
	if len(e) == 0 {
		return append(out, 0)
	}
	q, h := twoProduct(e[0], b)
	if h != 0 {
		out = append(out, h)
	}
	for _, c := range e[1:] {
		p1, p0 := twoProduct(c, b)
		s, h := twoSum(q, p0)
		if h != 0 {
			out = append(out, h)
		}
		q, h = twoSum(p1, s)
		if h != 0 {
			out = append(out, h)
		}
	}
	if q != 0 || len(out) == 0 {
		out = append(out, q)
	}
	return out
}

// mulExpansions returns e·f as an expansion: the sum over the components
// of f of e scaled by that component.
func mulExpansions(e, f []float64) []float64 {
	acc := []float64{0}
	for _, c := range f {
		acc = sumExpansions(acc, scaleExpansion(e, c))
	}
	return acc
}

// negate returns −e.
func negate(e []float64) []float64 {
	out := make([]float64, len(e))
	for i, c := range e {
		out[i] = -c
	}
	return out
}

// diffExpansion returns the exact difference a−b of two floats as an
// expansion of one or two components.
func diffExpansion(a, b float64) []float64 {
	x := a - b
	if y := twoDiffTail(a, b, x); y != 0 {
		return []float64{y, x}
	}
	return []float64{x}
}

// estimate returns the floating-point sum of the components, an
// approximation of the expansion's value.
func estimate(e []float64) float64 {
	s := 0.0
	for _, c := range e {
		s += c
	}
	return s
}
