// Package predicates gives the two geometric tests a Delaunay mesher rests
// on, orient2d and incircle, with signs that are always correct for
// float64 input.
//
// Both follow Shewchuk, "Adaptive Precision Floating-Point Arithmetic and
// Fast Robust Geometric Predicates", Discrete & Computational Geometry 18
// (1997): a floating-point evaluation with a forward error bound (stage A)
// answers almost every call; when the bound does not decide the sign, the
// determinant is refined in stages of growing precision and finally computed
// exactly in expansion arithmetic, so the cost of exactness is paid only near
// degeneracy.
package predicates

import "math"

// epsilon is half a unit in the last place of 1.0 for float64, 2⁻⁵³
// (Shewchuk's ε).
const epsilon = 1.0 / (1 << 53)

// Error-bound coefficients of Shewchuk (1997), section 4.
const (
	resultErrBound = (3 + 8*epsilon) * epsilon
	ccwErrBoundA   = (3 + 16*epsilon) * epsilon
	ccwErrBoundB   = (2 + 12*epsilon) * epsilon
	ccwErrBoundC   = (9 + 64*epsilon) * epsilon * epsilon
	iccErrBoundA   = (10 + 96*epsilon) * epsilon
	iccErrBoundB   = (4 + 48*epsilon) * epsilon
	iccErrBoundC   = (44 + 576*epsilon) * epsilon * epsilon
)

// Orient2d returns a positive value when a, b, c run counter-clockwise, a
// negative value when clockwise and zero when they are collinear: the sign
// of the determinant
//
//	| ax−cx  ay−cy |
//	| bx−cx  by−cy |
//
// (twice the signed area of triangle abc). The sign is exact; the magnitude
// is an approximation.
func Orient2d(ax, ay, bx, by, cx, cy float64) float64 {
	detLeft := (ax - cx) * (by - cy)
	detRight := (ay - cy) * (bx - cx)
	det := detLeft - detRight
	var detSum float64
	switch {
	case detLeft > 0:
		if detRight <= 0 {
			return det
		}
		detSum = detLeft + detRight
	case detLeft < 0:
		if detRight >= 0 {
			return det
		}
		detSum = -detLeft - detRight
	default:
		return det
	}
	if det >= ccwErrBoundA*detSum || -det >= ccwErrBoundA*detSum {
		return det
	}
	return orient2dAdapt(ax, ay, bx, by, cx, cy, detSum)
}

// orient2dAdapt refines Orient2d in Shewchuk's stages B, C and D.
func orient2dAdapt(ax, ay, bx, by, cx, cy, detSum float64) float64 {
	acx, bcx := ax-cx, bx-cx
	acy, bcy := ay-cy, by-cy
	l1, l0 := twoProduct(acx, bcy)
	r1, r0 := twoProduct(acy, bcx)
	b := twoTwoDiff(l1, l0, r1, r0)
	det := b[0] + b[1] + b[2] + b[3]
	errBound := ccwErrBoundB * detSum
	if det >= errBound || -det >= errBound {
		return det
	}
	acxTail := twoDiffTail(ax, cx, acx)
	bcxTail := twoDiffTail(bx, cx, bcx)
	acyTail := twoDiffTail(ay, cy, acy)
	bcyTail := twoDiffTail(by, cy, bcy)
	if acxTail == 0 && acyTail == 0 && bcxTail == 0 && bcyTail == 0 {
		return exactSign(b[:])
	}
	errBound = ccwErrBoundC*detSum + resultErrBound*math.Abs(det)
	det += (acx*bcyTail + bcy*acxTail) - (acy*bcxTail + bcx*acyTail)
	if det >= errBound || -det >= errBound {
		return det
	}
	// Stage D: the exact determinant (acx+acxTail)(bcy+bcyTail) −
	// (acy+acyTail)(bcx+bcxTail) as a sum of four two-by-two differences.
	e := b[:]
	for _, p := range [3][4]float64{
		{acxTail, bcy, acyTail, bcx},
		{acx, bcyTail, acy, bcxTail},
		{acxTail, bcyTail, acyTail, bcxTail},
	} {
		s1, s0 := twoProduct(p[0], p[1])
		t1, t0 := twoProduct(p[2], p[3])
		u := twoTwoDiff(s1, s0, t1, t0)
		e = sumExpansions(e, u[:])
	}
	return exactSign(e)
}

// exactSign returns the most significant component of the expansion,
// which carries the sign of its value.
func exactSign(e []float64) float64 {
	for i := len(e) - 1; i >= 0; i-- {
		if e[i] != 0 {
			return e[i]
		}
	}
	return 0
}

// Incircle returns a positive value when d lies inside the circle through
// a, b, c (given counter-clockwise), a negative value when outside and zero
// when the four points are cocircular: the sign of
//
//	| adx  ady  adx²+ady² |
//	| bdx  bdy  bdx²+bdy² |     with adx = ax−dx, …
//	| cdx  cdy  cdx²+cdy² |
//
// For a, b, c clockwise the sign is reversed. The sign is exact.
func Incircle(ax, ay, bx, by, cx, cy, dx, dy float64) float64 {
	adx, bdx, cdx := ax-dx, bx-dx, cx-dx
	ady, bdy, cdy := ay-dy, by-dy, cy-dy

	bdxcdy, cdxbdy := bdx*cdy, cdx*bdy
	aLift := adx*adx + ady*ady
	cdxady, adxcdy := cdx*ady, adx*cdy
	bLift := bdx*bdx + bdy*bdy
	adxbdy, bdxady := adx*bdy, bdx*ady
	cLift := cdx*cdx + cdy*cdy

	det := aLift*(bdxcdy-cdxbdy) + bLift*(cdxady-adxcdy) + cLift*(adxbdy-bdxady)
	permanent := (math.Abs(bdxcdy)+math.Abs(cdxbdy))*aLift +
		(math.Abs(cdxady)+math.Abs(adxcdy))*bLift +
		(math.Abs(adxbdy)+math.Abs(bdxady))*cLift
	errBound := iccErrBoundA * permanent
	if det > errBound || -det > errBound {
		return det
	}
	return incircleAdapt(ax, ay, bx, by, cx, cy, dx, dy, permanent)
}

// incircleAdapt refines Incircle: stage B evaluates the determinant of the
// rounded differences exactly, stage C adds the first-order effect of the
// differences' roundoff, and the last stage is fully exact.
func incircleAdapt(ax, ay, bx, by, cx, cy, dx, dy, permanent float64) float64 {
	adx, bdx, cdx := ax-dx, bx-dx, cx-dx
	ady, bdy, cdy := ay-dy, by-dy, cy-dy
	b := incircleExpansion([]float64{adx}, []float64{ady}, []float64{bdx}, []float64{bdy}, []float64{cdx}, []float64{cdy})
	det := estimate(b)
	errBound := iccErrBoundB * permanent
	if det >= errBound || -det >= errBound {
		return det
	}
	adxTail, adyTail := twoDiffTail(ax, dx, adx), twoDiffTail(ay, dy, ady)
	bdxTail, bdyTail := twoDiffTail(bx, dx, bdx), twoDiffTail(by, dy, bdy)
	cdxTail, cdyTail := twoDiffTail(cx, dx, cdx), twoDiffTail(cy, dy, cdy)
	if adxTail == 0 && adyTail == 0 && bdxTail == 0 && bdyTail == 0 && cdxTail == 0 && cdyTail == 0 {
		return exactSign(b)
	}
	errBound = iccErrBoundC*permanent + resultErrBound*math.Abs(det)
	det += ((adx*adx+ady*ady)*((bdx*cdyTail+cdy*bdxTail)-(bdy*cdxTail+cdx*bdyTail)) +
		2*(adx*adxTail+ady*adyTail)*(bdx*cdy-bdy*cdx)) +
		((bdx*bdx+bdy*bdy)*((cdx*adyTail+ady*cdxTail)-(cdy*adxTail+adx*cdyTail)) +
			2*(bdx*bdxTail+bdy*bdyTail)*(cdx*ady-cdy*adx)) +
		((cdx*cdx+cdy*cdy)*((adx*bdyTail+bdy*adxTail)-(ady*bdxTail+bdx*adyTail)) +
			2*(cdx*cdxTail+cdy*cdyTail)*(adx*bdy-ady*bdx))
	if det >= errBound || -det >= errBound {
		return det
	}
	e := incircleExpansion(diffExpansion(ax, dx), diffExpansion(ay, dy),
		diffExpansion(bx, dx), diffExpansion(by, dy),
		diffExpansion(cx, dx), diffExpansion(cy, dy))
	return exactSign(e)
}

// incircleExpansion evaluates the incircle determinant exactly from the
// six coordinate differences, each given as an expansion:
// (adx²+ady²)(bdx·cdy−bdy·cdx) + (bdx²+bdy²)(cdx·ady−cdy·adx) +
// (cdx²+cdy²)(adx·bdy−ady·bdx).
func incircleExpansion(adx, ady, bdx, bdy, cdx, cdy []float64) []float64 {
	lift := func(x, y []float64) []float64 {
		return sumExpansions(mulExpansions(x, x), mulExpansions(y, y))
	}
	cross := func(x1, y1, x2, y2 []float64) []float64 {
		return sumExpansions(mulExpansions(x1, y2), negate(mulExpansions(y1, x2)))
	}
	t := mulExpansions(lift(adx, ady), cross(bdx, bdy, cdx, cdy))
	t = sumExpansions(t, mulExpansions(lift(bdx, bdy), cross(cdx, cdy, adx, ady)))
	return sumExpansions(t, mulExpansions(lift(cdx, cdy), cross(adx, ady, bdx, bdy)))
}
