package structured

import "fmt"

// mat2 is a 2 × 2 matrix, row-major.
type mat2 [4]float64

// vec2 is a 2-vector.
type vec2 [2]float64

func (m mat2) mul(v vec2) vec2 { return vec2{m[0]*v[0] + m[1]*v[1], m[2]*v[0] + m[3]*v[1]} }

func (m mat2) mulM(n mat2) mat2 {
	return mat2{m[0]*n[0] + m[1]*n[2], m[0]*n[1] + m[1]*n[3], m[2]*n[0] + m[3]*n[2], m[2]*n[1] + m[3]*n[3]}
}

func (m mat2) sub(n mat2) mat2 { return mat2{m[0] - n[0], m[1] - n[1], m[2] - n[2], m[3] - n[3]} }

func (m mat2) add(n mat2) mat2 { return mat2{m[0] + n[0], m[1] + n[1], m[2] + n[2], m[3] + n[3]} }

func (m mat2) inv() (mat2, bool) {
	d := m[0]*m[3] - m[1]*m[2]
	if d == 0 {
		return mat2{}, false
	}
	return mat2{m[3] / d, -m[1] / d, -m[2] / d, m[0] / d}, true
}

// blockTri solves the block-tridiagonal system
//
//	a[i] x[i−1] + b[i] x[i] + c[i] x[i+1] = g[i],  i = 0 … n−1,
//
// with 2 × 2 blocks, by block Gaussian elimination (the Thomas algorithm
// with matrix pivots). When periodic, x[−1] is x[n−1] and x[n] is x[0]:
// the unknowns 1 … n−1 are written as u + V x[0] from two eliminations (one
// for g, one for the two columns coupling to x[0]), and the first row then
// gives x[0] from a 2 × 2 solve. Otherwise a[0] and c[n−1] are ignored.
// The solution overwrites g.
type blockTri struct {
	cp []mat2 // modified super-diagonal
	dp []vec2 // modified right-hand side
	vp []mat2 // modified coupling columns (periodic)
}

func newBlockTri(n int) *blockTri {
	return &blockTri{cp: make([]mat2, n), dp: make([]vec2, n), vp: make([]mat2, n)}
}

func (t *blockTri) solve(a, b, c []mat2, g []vec2, periodic bool) error {
	n := len(g)
	if !periodic {
		return t.thomas(a, b, c, g, 0, n, nil)
	}
	// Couplings of rows 1 and n−1 to x[0], moved to the right-hand side.
	e := t.vp
	for i := range e[:n] {
		e[i] = mat2{}
	}
	e[1] = mat2{-a[1][0], -a[1][1], -a[1][2], -a[1][3]}
	e[n-1] = e[n-1].sub(c[n-1])
	if err := t.thomas(a, b, c, g, 1, n, e); err != nil {
		return err
	}
	// Row 0: b0 x0 + c0 x1 + a0 x(n−1) = g0 with x_i = u_i + V_i x0.
	m := b[0].add(c[0].mulM(e[1])).add(a[0].mulM(e[n-1]))
	r := g[0]
	u1, un := c[0].mul(g[1]), a[0].mul(g[n-1])
	r = vec2{r[0] - u1[0] - un[0], r[1] - u1[1] - un[1]}
	mi, ok := m.inv()
	if !ok {
		return fmt.Errorf("singular periodic pivot")
	}
	x0 := mi.mul(r)
	g[0] = x0
	for i := 1; i < n; i++ {
		v := e[i].mul(x0)
		g[i] = vec2{g[i][0] + v[0], g[i][1] + v[1]}
	}
	return nil
}

// thomas eliminates rows lo … hi−1 as a plain block-tridiagonal system
// (the couplings a[lo] and c[hi−1] left out). When e is not nil its blocks
// are a matrix right-hand side solved alongside g, in place.
func (t *blockTri) thomas(a, b, c []mat2, g []vec2, lo, hi int, e []mat2) error {
	cp, dp := t.cp, t.dp
	for i := lo; i < hi; i++ {
		m := b[i]
		r := g[i]
		var re mat2
		if e != nil {
			re = e[i]
		}
		if i > lo {
			m = m.sub(a[i].mulM(cp[i-1]))
			v := a[i].mul(dp[i-1])
			r = vec2{r[0] - v[0], r[1] - v[1]}
			if e != nil {
				re = re.sub(a[i].mulM(e[i-1]))
			}
		}
		mi, ok := m.inv()
		if !ok {
			return fmt.Errorf("singular pivot at row %d", i)
		}
		cp[i] = mi.mulM(c[i])
		dp[i] = mi.mul(r)
		if e != nil {
			e[i] = mi.mulM(re)
		}
	}
	g[hi-1] = dp[hi-1]
	for i := hi - 2; i >= lo; i-- {
		v := cp[i].mul(g[i+1])
		g[i] = vec2{dp[i][0] - v[0], dp[i][1] - v[1]}
		if e != nil {
			e[i] = e[i].sub(cp[i].mulM(e[i+1]))
		}
	}
	return nil
}
