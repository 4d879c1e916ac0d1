package predicates

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// The oracle: the same determinants in exact rational arithmetic
// (math/big), the reference the issue names for these predicates.

func rat(x float64) *big.Rat { return new(big.Rat).SetFloat64(x) }

func sub(a, b *big.Rat) *big.Rat { return new(big.Rat).Sub(a, b) }
func mul(a, b *big.Rat) *big.Rat { return new(big.Rat).Mul(a, b) }
func add(a, b *big.Rat) *big.Rat { return new(big.Rat).Add(a, b) }

func orientOracle(ax, ay, bx, by, cx, cy float64) int {
	acx, acy := sub(rat(ax), rat(cx)), sub(rat(ay), rat(cy))
	bcx, bcy := sub(rat(bx), rat(cx)), sub(rat(by), rat(cy))
	return sub(mul(acx, bcy), mul(acy, bcx)).Sign()
}

func incircleOracle(ax, ay, bx, by, cx, cy, dx, dy float64) int {
	adx, ady := sub(rat(ax), rat(dx)), sub(rat(ay), rat(dy))
	bdx, bdy := sub(rat(bx), rat(dx)), sub(rat(by), rat(dy))
	cdx, cdy := sub(rat(cx), rat(dx)), sub(rat(cy), rat(dy))
	lift := func(x, y *big.Rat) *big.Rat { return add(mul(x, x), mul(y, y)) }
	cross := func(x1, y1, x2, y2 *big.Rat) *big.Rat { return sub(mul(x1, y2), mul(y1, x2)) }
	d := mul(lift(adx, ady), cross(bdx, bdy, cdx, cdy))
	d = add(d, mul(lift(bdx, bdy), cross(cdx, cdy, adx, ady)))
	d = add(d, mul(lift(cdx, cdy), cross(adx, ady, bdx, bdy)))
	return d.Sign()
}

func sign(x float64) int {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// inRange reports whether every coordinate is zero or of a magnitude whose
// products of up to four differences neither overflow nor underflow: the
// domain on which Shewchuk's predicates are exact (Shewchuk 1997, section 2).
func inRange(xs ...float64) bool {
	for _, x := range xs {
		a := math.Abs(x)
		if math.IsNaN(x) || a > 1e30 || (a != 0 && a < 1e-30) {
			return false
		}
	}
	return true
}

// nearlyCollinear returns three points on a line through random points,
// each moved by a few units in the last place: inputs where the
// floating-point determinant alone gets the sign wrong.
func nearlyCollinear(r *rand.Rand) [6]float64 {
	ax, ay := r.Float64(), r.Float64()
	bx, by := ax+r.Float64()*1e3, ay+r.Float64()*1e3
	t := r.Float64()*3 - 1
	cx, cy := ax+t*(bx-ax), ay+t*(by-ay)
	ulps := func(x float64) float64 {
		for k := r.IntN(5) - 2; k != 0; {
			if k > 0 {
				x = math.Nextafter(x, math.Inf(1))
				k--
			} else {
				x = math.Nextafter(x, math.Inf(-1))
				k++
			}
		}
		return x
	}
	return [6]float64{ax, ay, bx, by, ulps(cx), ulps(cy)}
}

func TestOrient2dNearDegenerate(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	naiveWrong := 0
	for i := 0; i < 20000; i++ {
		p := nearlyCollinear(r)
		want := orientOracle(p[0], p[1], p[2], p[3], p[4], p[5])
		if got := sign(Orient2d(p[0], p[1], p[2], p[3], p[4], p[5])); got != want {
			t.Fatalf("Orient2d%v = %d, exact sign %d", p, got, want)
		}
		naive := (p[0]-p[4])*(p[3]-p[5]) - (p[1]-p[5])*(p[2]-p[4])
		if sign(naive) != want {
			naiveWrong++
		}
	}
	// The test is only meaningful if the plain floating-point formula fails
	// on some of these inputs.
	if naiveWrong == 0 {
		t.Fatal("no input defeated the plain floating-point determinant; the test inputs are too easy")
	}
	t.Logf("plain determinant wrong on %d of 20000 inputs", naiveWrong)
}

// nearlyCocircular returns three points on a circle and a fourth on it too,
// all rounded to float64 and then moved by a few ulps.
func nearlyCocircular(r *rand.Rand) [8]float64 {
	cx, cy, rad := r.Float64()*10, r.Float64()*10, 0.1+r.Float64()*100
	var p [8]float64
	for k := 0; k < 4; k++ {
		th := r.Float64() * 2 * math.Pi
		p[2*k] = cx + rad*math.Cos(th)
		p[2*k+1] = cy + rad*math.Sin(th)
	}
	for k := range p {
		for j := r.IntN(3); j > 0; j-- {
			p[k] = math.Nextafter(p[k], math.Inf(1))
		}
	}
	return p
}

func TestIncircleNearDegenerate(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	naiveWrong := 0
	for i := 0; i < 5000; i++ {
		p := nearlyCocircular(r)
		want := incircleOracle(p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7])
		if got := sign(Incircle(p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7])); got != want {
			t.Fatalf("Incircle%v = %d, exact sign %d", p, got, want)
		}
		adx, ady := p[0]-p[6], p[1]-p[7]
		bdx, bdy := p[2]-p[6], p[3]-p[7]
		cdx, cdy := p[4]-p[6], p[5]-p[7]
		naive := (adx*adx+ady*ady)*(bdx*cdy-bdy*cdx) + (bdx*bdx+bdy*bdy)*(cdx*ady-cdy*adx) + (cdx*cdx+cdy*cdy)*(adx*bdy-ady*bdx)
		if sign(naive) != want {
			naiveWrong++
		}
	}
	if naiveWrong == 0 {
		t.Fatal("no input defeated the plain floating-point determinant; the test inputs are too easy")
	}
	t.Logf("plain determinant wrong on %d of 5000 inputs", naiveWrong)
}

// TestExactlyDegenerate checks inputs whose determinant is exactly zero:
// collinear points on a binary-exact line and cocircular lattice points
// (3-4-5 triangles on a circle of radius 5, common practice).
func TestExactlyDegenerate(t *testing.T) {
	if s := Orient2d(0.5, 0.25, 1.5, 0.75, 3.5, 1.75); s != 0 {
		t.Errorf("collinear points: Orient2d = %g, want 0", s)
	}
	if s := Incircle(5, 0, 3, 4, -4, 3, 0, -5); s != 0 {
		t.Errorf("cocircular lattice points: Incircle = %g, want 0", s)
	}
	if s := Incircle(5, 0, 3, 4, -4, 3, 0, 0); s <= 0 {
		t.Errorf("centre of the circle: Incircle = %g, want > 0", s)
	}
	if s := Orient2d(0, 0, 1, 0, 0, 1); s <= 0 {
		t.Errorf("counter-clockwise triangle: Orient2d = %g, want > 0", s)
	}
}

func FuzzOrient2d(f *testing.F) {
	f.Add(0.0, 0.0, 1.0, 0.0, 0.0, 1.0)
	f.Add(0.5, 0.25, 1.5, 0.75, 3.5, 1.75)
	f.Add(0.1, 0.1, 0.3, 0.3, 0.7, 0.7000000000000001)
	f.Fuzz(func(t *testing.T, ax, ay, bx, by, cx, cy float64) {
		if !inRange(ax, ay, bx, by, cx, cy) {
			t.Skip()
		}
		want := orientOracle(ax, ay, bx, by, cx, cy)
		if got := sign(Orient2d(ax, ay, bx, by, cx, cy)); got != want {
			t.Fatalf("Orient2d(%v,%v, %v,%v, %v,%v) sign %d, exact %d", ax, ay, bx, by, cx, cy, got, want)
		}
	})
}

func FuzzIncircle(f *testing.F) {
	f.Add(5.0, 0.0, 3.0, 4.0, -4.0, 3.0, 0.0, -5.0)
	f.Add(0.0, 0.0, 1.0, 0.0, 0.0, 1.0, 0.5, 0.5)
	f.Add(0.1, 0.1, 0.3, 0.1, 0.3, 0.3, 0.1, 0.30000000000000004)
	f.Fuzz(func(t *testing.T, ax, ay, bx, by, cx, cy, dx, dy float64) {
		if !inRange(ax, ay, bx, by, cx, cy, dx, dy) {
			t.Skip()
		}
		want := incircleOracle(ax, ay, bx, by, cx, cy, dx, dy)
		if got := sign(Incircle(ax, ay, bx, by, cx, cy, dx, dy)); got != want {
			t.Fatalf("Incircle(%v,%v, %v,%v, %v,%v, %v,%v) sign %d, exact %d", ax, ay, bx, by, cx, cy, dx, dy, got, want)
		}
	})
}

func BenchmarkOrient2d(b *testing.B) {
	r := rand.New(rand.NewPCG(5, 6))
	p := make([]float64, 6*1024)
	for i := range p {
		p[i] = r.Float64()
	}
	s := 0.0
	for i := 0; b.Loop(); i++ {
		q := p[6*(i&1023):]
		s += Orient2d(q[0], q[1], q[2], q[3], q[4], q[5])
	}
	_ = s
}

func BenchmarkIncircle(b *testing.B) {
	r := rand.New(rand.NewPCG(7, 8))
	p := make([]float64, 8*1024)
	for i := range p {
		p[i] = r.Float64()
	}
	s := 0.0
	for i := 0; b.Loop(); i++ {
		q := p[8*(i&1023):]
		s += Incircle(q[0], q[1], q[2], q[3], q[4], q[5], q[6], q[7])
	}
	_ = s
}
