package structured

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The block-tridiagonal solver against gonum's dense LU solve of the same
// system assembled in full (gonum mat.Dense.Solve as the reference).
func TestBlockTriAgainstDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, periodic := range []bool{false, true} {
		const n = 9
		a, b, c := make([]mat2, n), make([]mat2, n), make([]mat2, n)
		g := make([]vec2, n)
		for i := 0; i < n; i++ {
			for k := 0; k < 4; k++ {
				a[i][k], c[i][k] = rng.Float64()-0.5, rng.Float64()-0.5
				b[i][k] = rng.Float64() - 0.5
			}
			b[i][0] += 3
			b[i][3] += 3
			g[i] = vec2{rng.Float64(), rng.Float64()}
		}
		A := mat.NewDense(2*n, 2*n, nil)
		rhs := mat.NewVecDense(2*n, nil)
		put := func(row, col int, m mat2) {
			col = (col + n) % n
			for r := 0; r < 2; r++ {
				for q := 0; q < 2; q++ {
					A.Set(2*row+r, 2*col+q, A.At(2*row+r, 2*col+q)+m[2*r+q])
				}
			}
		}
		for i := 0; i < n; i++ {
			put(i, i, b[i])
			if i > 0 || periodic {
				put(i, i-1, a[i])
			}
			if i < n-1 || periodic {
				put(i, i+1, c[i])
			}
			rhs.SetVec(2*i, g[i][0])
			rhs.SetVec(2*i+1, g[i][1])
		}
		var want mat.VecDense
		if err := want.SolveVec(A, rhs); err != nil {
			t.Fatal(err)
		}
		if err := newBlockTri(n).solve(a, b, c, g, periodic); err != nil {
			t.Fatal(err)
		}
		for i := 0; i < n; i++ {
			for r := 0; r < 2; r++ {
				if d := math.Abs(g[i][r] - want.AtVec(2*i+r)); d > 1e-12 {
					t.Fatalf("periodic=%v: x[%d][%d] = %g, dense solve %g", periodic, i, r, g[i][r], want.AtVec(2*i+r))
				}
			}
		}
	}
}
