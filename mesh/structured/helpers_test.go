package structured

import (
	"math"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
)

// chainOf tags every edge of pts with tag.
func chainOf(pts []orb.Point, tag string) geometry.Chain {
	t := make([]string, len(pts)-1)
	for k := range t {
		t[k] = tag
	}
	return geometry.Chain{Points: pts, Tags: t}
}

// line returns the chain from a to b through the fractions f (f[0] = 0,
// f[n-1] = 1).
func line(a, b orb.Point, f []float64, tag string) geometry.Chain {
	p := make([]orb.Point, len(f))
	for k, t := range f {
		p[k] = orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}
	}
	return chainOf(p, tag)
}

// uniform returns n fractions 0, 1/(n-1), ..., 1.
func uniform(n int) []float64 {
	f := make([]float64, n)
	for k := range f {
		f[k] = float64(k) / float64(n-1)
	}
	f[n-1] = 1
	return f
}

// geometric returns n fractions whose first step is h (as a fraction of the
// whole) and that grow geometrically to 1.
func geometric(n int, h float64) []float64 {
	r, err := GrowthFor(h, n-1, 1)
	if err != nil {
		panic(err)
	}
	f := make([]float64, n)
	d := h
	for k := 1; k < n; k++ {
		f[k] = f[k-1] + d
		d *= r
	}
	for k := range f {
		f[k] /= f[n-1]
	}
	return f
}

// arc returns n nodes on the circle of centre c and radius r from angle a0
// to a1 (radians), evenly spaced in angle.
func arc(c orb.Point, r, a0, a1 float64, n int, tag string) geometry.Chain {
	p := make([]orb.Point, n)
	for k := range p {
		t := a0 + (a1-a0)*float64(k)/float64(n-1)
		p[k] = orb.Point{c[0] + r*math.Cos(t), c[1] + r*math.Sin(t)}
	}
	return chainOf(p, tag)
}

// reversed returns c backwards.
func reversed(c geometry.Chain) geometry.Chain {
	r := geometry.Chain{Points: append([]orb.Point(nil), c.Points...), Tags: append([]string(nil), c.Tags...)}
	reverse(&r)
	return r
}
