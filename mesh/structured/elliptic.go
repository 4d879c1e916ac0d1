package structured

import (
	"fmt"
	"math"

	"cvdeck/mesh"
)

// SideMode says how the nodes of a block side may move while smoothing.
type SideMode uint8

const (
	// Fixed keeps the side's nodes where they are.
	Fixed SideMode = iota
	// Slide lets the side's nodes (not its end nodes) move along the side's
	// original polyline, each towards the foot of the perpendicular from
	// its interior neighbour, so grid lines meet the side at right angles.
	Slide
)

func (m SideMode) String() string {
	if m == Slide {
		return "slide"
	}
	return "fixed"
}

// SideControl is what the smoother does at one block side.
type SideControl struct {
	Mode SideMode
	// FirstHeight, when positive, is the height of the first cell off this
	// side, measured along the side's normal, that the control holds. The
	// side must be Fixed. Give the two sides that meet this one a node
	// distribution that already starts near this height: the control then
	// only corrects it along the wall. From a far-off start (a uniform
	// distribution and a height a hundred times smaller) it still reaches
	// the height, but the next few cells grow fast; a smaller Decay spreads
	// the change over more cells.
	FirstHeight float64
	// Orthogonal asks for grid lines that leave the side at right angles.
	// The side must be Fixed (a sliding side is made orthogonal by sliding).
	Orthogonal bool
}

func (c SideControl) controlled() bool { return c.FirstHeight > 0 || c.Orthogonal }

// SmoothOptions tune Smooth. The zero value smooths with every side fixed
// and no wall control, to the default tolerance.
type SmoothOptions struct {
	// Sides holds the control of each side, indexed by mesh.Side.
	Sides [4]SideControl
	// MaxIterations bounds the sweeps; 0 means 5000.
	MaxIterations int
	// Tolerance is the residual at which iteration stops: the largest node
	// move of one sweep divided by the local cell size. 0 means 1e-6. A
	// negative tolerance runs exactly MaxIterations sweeps.
	Tolerance float64
	// Omega is the over-relaxation factor of the point SOR sweeps, in
	// (0, 2); 0 means one chosen from the block size (see defaultOmega).
	Omega float64
	// Decay is the rate a at which wall control fades into the block, as
	// e^(−a·k) at k cells from the wall; 0 means 0.25.
	Decay float64
	// Gain scales the feedback that drives the wall controls; 0 means 0.05.
	Gain float64
	// NoSpacingTerms drops the Thomas–Middlecoff terms that carry the
	// boundary node distribution inwards, leaving pure Winslow smoothing
	// (plus any wall control).
	NoSpacingTerms bool
	// SingleLevel smooths the given grid alone, without first smoothing
	// it on every other node (see presmooth); in SmoothBlocks, one block
	// asking for it is enough.
	SingleLevel bool
}

// SmoothResult reports how smoothing went.
type SmoothResult struct {
	// Iterations is the number of sweeps done.
	Iterations int
	// Residual is the larger of the last sweep's largest node move over
	// the local cell size and the last change of the wall-control
	// amplitudes (dimensionless), so convergence means both the grid and
	// the controls have settled.
	Residual float64
	// Converged is true when Residual reached the tolerance.
	Converged bool
	// Damped counts node updates that would have inverted or folded a cell
	// and were shortened (or dropped) instead.
	Damped int
	// FoldedAtStart counts the cells of the starting grid with
	// non-positive area (all of them are untangled, or Smooth fails).
	FoldedAtStart int
	// HeightError is the largest |h/h_req − 1| of the first-cell heights
	// over the height-controlled sides, and MeanHeightError its mean; both
	// are 0 when no side has height control.
	HeightError, MeanHeightError float64
	// AngleError is the largest and MeanAngleError the mean departure from
	// 90° (degrees) of the first grid line off the orthogonality-controlled
	// sides, over their interior nodes.
	AngleError, MeanAngleError float64
	// EndAngleError is the largest departure from 90° (degrees) at the two
	// end nodes of those sides, where the grid line off the side is the
	// block's next side: an interface or another boundary, whose angle
	// with the side the control does not set (the corner of the outline,
	// or where a shared side smoothed across the interface meets the
	// wall). 0 without orthogonality control.
	EndAngleError float64
}

// Smooth improves the block in place by elliptic grid generation, starting
// from its present nodes (normally the TFI grid). It solves the
// Thompson–Thames–Mastin equations (J. Comput. Phys. 15, 1974) in Winslow's
// form (J. Comput. Phys. 1, 1967), with the control functions written as in
// Thomas and Middlecoff (AIAA J. 18, 1980):
//
//	α (x_ξξ + φ x_ξ) − 2β x_ξη + γ (x_ηη + ψ x_η) = 0   (and the same for y)
//	α = x_η² + y_η²,  β = x_ξ x_η + y_ξ y_η,  γ = x_ξ² + y_ξ²
//
// by point successive over-relaxation with central differences.
//
// φ and ψ have two parts. The Thomas–Middlecoff part carries the node
// distribution of the sides inwards: on the south and north sides
// φ = −(r_ξ·r_ξξ)/|r_ξ|², on the west and east sides ψ = −(r_η·r_ηη)/|r_η|²,
// interpolated linearly across the block. The wall part holds a prescribed
// first-cell height and orthogonality at the controlled sides by feedback in
// the manner of Steger and Sorenson (J. Comput. Phys. 33, 1979; Sorenson,
// NASA TM-81198, 1980): after each sweep the height h and the tangential lean
// t of each first grid line are measured, the side's amplitude for the
// normal direction moves by −Gain·ln(h/h_req) and the one for the tangential
// direction by −Gain·atan(t/h) (signs for the south side; they follow the
// side's orientation), and both act in the block through the factor e^(−a·k)
// at k cells from the wall.
//
// No update may fold the grid. On a grid of strictly convex cells a node's
// new position must leave the eight triangles it forms with consecutive
// neighbours positive; on one with non-convex cells, the four cells around
// it must keep a positive area. A move that fails is halved up to four
// times and otherwise dropped, and counted in Damped. A starting grid with
// inverted cells (TFI folds on strongly curved sides) is first smoothed
// without the test and without control terms, since Winslow's mapping
// untangles it, until no cell is inverted; if some still are at the end,
// Smooth returns an error naming the first.
//
// The residual is the largest proposed move of a sweep over the local cell
// size, before any damping, so a node held back by the fold test keeps the
// iteration from reporting convergence.
//
// Two sides of the block that coincide (an O-grid's seam) are smoothed
// across, as SmoothBlocks does for sides shared between blocks.
func Smooth(b *Block, opt SmoothOptions) (SmoothResult, error) {
	res, err := SmoothBlocks([]*Block{b}, []SmoothOptions{opt})
	if len(res) == 0 {
		return SmoothResult{}, err
	}
	return res[0], err
}

// normalise checks the options for block b and fills in the defaults.
func (opt *SmoothOptions) normalise(b *Block) error {
	if err := b.check(); err != nil {
		return fmt.Errorf("structured: %w", err)
	}
	if b.NI < 3 || b.NJ < 3 {
		return fmt.Errorf("structured: block %q is %d × %d nodes; smoothing needs interior nodes (at least 3 × 3)", b.Name, b.NI, b.NJ)
	}
	for s, c := range opt.Sides {
		side := mesh.Side(s)
		if c.Mode > Slide {
			return fmt.Errorf("structured: block %q %s side: unknown side mode %d", b.Name, side, c.Mode)
		}
		if c.FirstHeight < 0 || math.IsNaN(c.FirstHeight) || math.IsInf(c.FirstHeight, 0) {
			return fmt.Errorf("structured: block %q %s side: first-cell height %g must be positive (or 0 for none)", b.Name, side, c.FirstHeight)
		}
		if c.controlled() && c.Mode != Fixed {
			return fmt.Errorf("structured: block %q %s side: first-height and orthogonality control need fixed nodes, the side is set to %s", b.Name, side, c.Mode)
		}
		if c.Mode == Slide {
			p := b.SidePoints(side)
			for e := 1; e < len(p); e++ {
				if p[e] == p[e-1] {
					return fmt.Errorf("structured: block %q %s side: edge %d has zero length, so its nodes cannot slide along it", b.Name, side, e-1)
				}
			}
		}
	}
	if opt.MaxIterations == 0 {
		opt.MaxIterations = 5000
	}
	if opt.MaxIterations < 0 {
		return fmt.Errorf("structured: smoothing iteration limit %d is negative", opt.MaxIterations)
	}
	if opt.Tolerance == 0 {
		opt.Tolerance = 1e-6
	}
	if opt.Omega == 0 {
		opt.Omega = defaultOmega(b.NI-1, b.NJ-1)
	}
	if !(opt.Omega > 0 && opt.Omega < 2) {
		return fmt.Errorf("structured: over-relaxation factor %g must lie in (0, 2)", opt.Omega)
	}
	if opt.Decay == 0 {
		opt.Decay = 0.25
	}
	if opt.Gain == 0 {
		opt.Gain = 0.05
	}
	if !(opt.Decay > 0) || !(opt.Gain > 0) {
		return fmt.Errorf("structured: control decay %g and gain %g must be positive", opt.Decay, opt.Gain)
	}
	return nil
}

// defaultOmega is the over-relaxation factor for a block of n × m cells:
// the optimum of point SOR for Laplace's equation on that grid,
// 2/(1 + √(1 − ρ²)) with ρ = (cos(π/n) + cos(π/m))/2 the spectral radius
// of the Jacobi iteration (Young's theory of SOR; e.g. Varga, Matrix
// Iterative Analysis, 1962; from memory), held within [1.5, 1.95]. The
// optimum tends to 2 as the grid grows, and a fixed factor makes the
// sweeps needed grow with the square of the block size instead of
// linearly; but the generating system is nonlinear and the fold test
// shortens moves, so the factor stops short of 2. The cap is from trials
// on the smoothed sample cases at refinements 1 to 8: with 1.95 every
// block converged, no move was damped, and fewer sweeps were needed than
// with 1.85 or 1.9.
func defaultOmega(n, m int) float64 {
	rho := 0.5 * (math.Cos(math.Pi/float64(n)) + math.Cos(math.Pi/float64(m)))
	return min(1.95, max(1.5, 2/(1+math.Sqrt(1-rho*rho))))
}

// step does one iteration on the block: a sweep, the sliding sides, the
// wall-control feedback and, while the grid is not strictly convex, a
// fresh look at which fold test applies. It returns the residual.
func (s *smoother) step(it int) float64 {
	r2 := s.sweep()
	for _, sl := range s.sliders {
		r2 = math.Max(r2, s.slide(sl))
	}
	control := 0.0
	if s.mode != freeMode {
		control = s.feedback()
	}
	if s.mode != starMode && it%10 == 9 {
		s.updateMode()
	}
	return math.Max(math.Sqrt(r2), control)
}

// foldMode is the test a node move must pass.
type foldMode uint8

const (
	starMode foldMode = iota // keep the eight triangles around the node positive
	areaMode                 // keep the four cells around the node of positive area
	freeMode                 // the grid is tangled: move freely until it is not
)

// smoother holds the state of one Smooth call.
type smoother struct {
	b      *Block
	ni, nj int
	x, y   []float64
	omega  float64
	gain   float64
	sides  [4]SideControl

	// Thomas–Middlecoff terms: φ on the south and north rows (by i), ψ on
	// the west and east columns (by j), and the linear weights across.
	phiS, dPhi, psiW, dPsi []float64
	eta, xi                []float64
	anyControl             bool
	// phiRow and psiRow hold φ and ψ along the row being swept.
	phiRow, psiRow []float64
	// held collects the moves of one pass that wait for damping.
	held []heldMove
	// Wall control amplitudes: p drives the tangential, q the normal
	// direction; south and north by i, west and east by j. Decay factors
	// e^(−a k) by distance k from each side.
	p, q                           [4][]float64
	decayS, decayN, decayW, decayE []float64

	// mode is the fold test in force (see updateMode).
	mode    foldMode
	damped  int
	sliders []*slider
}

func newSmoother(b *Block, opt SmoothOptions) *smoother {
	ni, nj := b.NI, b.NJ
	s := &smoother{b: b, ni: ni, nj: nj, x: b.X, y: b.Y, omega: opt.Omega, gain: opt.Gain, sides: opt.Sides}
	s.phiS, s.dPhi = make([]float64, ni), make([]float64, ni)
	s.psiW, s.dPsi = make([]float64, nj), make([]float64, nj)
	s.eta, s.xi = make([]float64, nj), make([]float64, ni)
	s.phiRow, s.psiRow = make([]float64, ni), make([]float64, ni)
	s.held = make([]heldMove, (ni+1)/2)
	for j := range s.eta {
		s.eta[j] = float64(j) / float64(nj-1)
	}
	for i := range s.xi {
		s.xi[i] = float64(i) / float64(ni-1)
	}
	if !opt.NoSpacingTerms {
		for i := 1; i+1 < ni; i++ {
			s.phiS[i] = spacingTerm(b.X, b.Y, i-1, i, i+1)
			k := (nj - 1) * ni
			s.dPhi[i] = spacingTerm(b.X, b.Y, k+i-1, k+i, k+i+1) - s.phiS[i]
		}
		for j := 1; j+1 < nj; j++ {
			s.psiW[j] = spacingTerm(b.X, b.Y, (j-1)*ni, j*ni, (j+1)*ni)
			e := ni - 1
			s.dPsi[j] = spacingTerm(b.X, b.Y, (j-1)*ni+e, j*ni+e, (j+1)*ni+e) - s.psiW[j]
		}
	}
	for _, c := range opt.Sides {
		s.anyControl = s.anyControl || c.controlled()
	}
	for side := range s.p {
		n := b.SideLen(mesh.Side(side))
		s.p[side], s.q[side] = make([]float64, n), make([]float64, n)
	}
	decay := func(n int, fromEnd bool) []float64 {
		d := make([]float64, n)
		for k := range d {
			dist := k
			if fromEnd {
				dist = n - 1 - k
			}
			d[k] = math.Exp(-opt.Decay * float64(dist))
		}
		return d
	}
	s.decayS, s.decayN = decay(nj, false), decay(nj, true)
	s.decayW, s.decayE = decay(ni, false), decay(ni, true)
	for side, c := range opt.Sides {
		if c.Mode == Slide {
			s.sliders = append(s.sliders, newSlider(b, mesh.Side(side)))
		}
	}
	s.updateMode()
	return s
}

// spacingTerm is −(r'·r”)/|r'|² at node c between a and b, from central
// differences: the Thomas–Middlecoff control value on a boundary line.
func spacingTerm(x, y []float64, a, c, b int) float64 {
	dx, dy := 0.5*(x[b]-x[a]), 0.5*(y[b]-y[a])
	ddx, ddy := x[b]-2*x[c]+x[a], y[b]-2*y[c]+y[a]
	g := dx*dx + dy*dy
	if g == 0 {
		return 0
	}
	return -(dx*ddx + dy*ddy) / g
}

// starCheck looks at interior node k moved to P = (px, py) and its
// neighbours Q in counter-clockwise order E, NE, N, NW, W, SW, S, SE. It
// returns the smallest doubled signed area of the eight triangles
// (P, Q_m, Q_m+1), and the smallest doubled area of the four cells around
// the node, each the sum of two consecutive triangles (the cell split along
// its diagonal from P).
func starCheck(x, y []float64, k, ni int, px, py float64) (tri, cell float64) {
	ex, ey := x[k+1]-px, y[k+1]-py
	nex, ney := x[k+1+ni]-px, y[k+1+ni]-py
	nx, ny := x[k+ni]-px, y[k+ni]-py
	nwx, nwy := x[k-1+ni]-px, y[k-1+ni]-py
	wx, wy := x[k-1]-px, y[k-1]-py
	swx, swy := x[k-1-ni]-px, y[k-1-ni]-py
	sx, sy := x[k-ni]-px, y[k-ni]-py
	sex, sey := x[k+1-ni]-px, y[k+1-ni]-py
	c := [8]float64{
		ex*ney - nex*ey, nex*ny - nx*ney, nx*nwy - nwx*ny, nwx*wy - wx*nwy,
		wx*swy - swx*wy, swx*sy - sx*swy, sx*sey - sex*sy, sex*ey - ex*sey,
	}
	tri, cell = c[0], c[0]+c[1]
	for m := 1; m < 8; m++ {
		tri = math.Min(tri, c[m])
	}
	for m := 2; m < 8; m += 2 {
		cell = math.Min(cell, c[m]+c[m+1])
	}
	return tri, cell
}

// controlRows fills s.phiRow and s.psiRow with φ and ψ along row j: the
// Thomas–Middlecoff part φ = φ_S + η (φ_N − φ_S), ψ = ψ_W + ξ (ψ_E − ψ_W)
// (none while untangling: pure Winslow, whose mapping is folding-free) plus
// the wall-control part faded by distance from each controlled side.
func (s *smoother) controlRows(j int) {
	const negligible = 1e-12
	ni := s.ni
	phi, psi := s.phiRow[:ni], s.psiRow[:ni]
	if s.mode == freeMode {
		clear(phi)
		clear(psi)
		return
	}
	eta, psiW, dPsi := s.eta[j], s.psiW[j], s.dPsi[j]
	phiS, dPhi, xi := s.phiS[:ni], s.dPhi[:ni], s.xi[:ni]
	for i := range phi {
		phi[i] = phiS[i] + eta*dPhi[i]
		psi[i] = psiW + xi[i]*dPsi
	}
	if !s.anyControl {
		return
	}
	// South and north controls act along the whole row, faded by distance.
	for _, w := range [2]struct {
		side mesh.Side
		d    float64
	}{{mesh.South, s.decayS[j]}, {mesh.North, s.decayN[j]}} {
		if !s.sides[w.side].controlled() || w.d < negligible {
			continue
		}
		p, q := s.p[w.side][:ni], s.q[w.side][:ni]
		for i := range phi {
			phi[i] += p[i] * w.d
			psi[i] += q[i] * w.d
		}
	}
	// West and east controls reach the first columns from their side.
	if s.sides[mesh.West].controlled() {
		p, q := s.p[mesh.West][j], s.q[mesh.West][j]
		for i, d := range s.decayW[:ni] {
			if d < negligible {
				break
			}
			phi[i] += q * d
			psi[i] += p * d
		}
	}
	if s.sides[mesh.East].controlled() {
		p, q := s.p[mesh.East][j], s.q[mesh.East][j]
		for i := ni - 1; i >= 0; i-- {
			d := s.decayE[i]
			if d < negligible {
				break
			}
			phi[i] += q * d
			psi[i] += p * d
		}
	}
}

// sweep does one SOR sweep over the interior nodes and returns the largest
// squared node move over the squared local cell size. The loop body uses
// only row views of plain slices (no allocation, no bounds checks inside),
// and is ordered so that few values are live at once: each difference is
// formed from the loaded positions where it is used, and the fold test
// loads the eight neighbours afresh. With sixteen floating-point registers
// this keeps the loop out of the stack, where holding all sixteen relative
// neighbour coordinates put it.
func (s *smoother) sweep() float64 {
	ni, nj := s.ni, s.nj
	x, y := s.x, s.y
	hom := 0.5 * s.omega
	worst := 0.0
	for j := 1; j+1 < nj; j++ {
		s.controlRows(j)
		row := j * ni
		xc := x[row:][:ni]
		yc := y[row:][:ni]
		xs, ys := x[row-ni:][:len(xc)], y[row-ni:][:len(xc)]
		xn, yn := x[row+ni:][:len(xc)], y[row+ni:][:len(xc)]
		phiRow, psiRow := s.phiRow[:len(xc)], s.psiRow[:len(xc)]
		// Odd nodes of the row first, then even ones: each node still uses
		// the latest values (a Gauss–Seidel ordering), but consecutive
		// updates no longer wait on each other's result.
		for i0 := 1; i0 <= 2; i0++ {
			held, nheld := s.held[:(len(xc)+1)/2], 0
			for i := i0; i < len(xc)-1; i += 2 {
				px, py := xc[i], yc[i]
				xxi, yxi := 0.5*(xc[i+1]-xc[i-1]), 0.5*(yc[i+1]-yc[i-1])
				xeta, yeta := 0.5*(xn[i]-xs[i]), 0.5*(yn[i]-ys[i])
				al := xeta*xeta + yeta*yeta
				be := xxi*xeta + yxi*yeta
				ga := xxi*xxi + yxi*yxi
				// Gauss–Seidel value minus the present one:
				// [α(e+w−2p+φ r_ξ) + γ(n+s−2p+ψ r_η) − 2β r_ξη] / 2(α+γ).
				if !(al+ga > 0) {
					continue // all neighbours on the node: no direction to move in
				}
				inv := hom / (al + ga)
				be2 := 0.5 * be // 2β × the 1/4 of the cross difference
				phi, psi := phiRow[i], psiRow[i]
				dx := (al*(xc[i+1]+xc[i-1]-2*px+phi*xxi) + ga*(xn[i]+xs[i]-2*px+psi*xeta) -
					be2*(xn[i+1]-xn[i-1]-xs[i+1]+xs[i-1])) * inv
				dy := (al*(yc[i+1]+yc[i-1]-2*py+phi*yxi) + ga*(yn[i]+ys[i]-2*py+psi*yeta) -
					be2*(yn[i+1]-yn[i-1]-ys[i+1]+ys[i-1])) * inv

				h := al
				if ga < h {
					h = ga
				}
				if d2 := dx*dx + dy*dy; d2 > worst*h && h > 0 {
					worst = d2 / h
				}

				// Fold test: the eight triangles (P', Q_m, Q_m+1) around the
				// moved node P' = P + d, neighbours Q in counter-clockwise
				// order E, NE, N, NW, W, SW, S, SE, taken relative to P'.
				// The node is stored first, which also makes the compiler load
				// the neighbours afresh instead of keeping the earlier loads
				// (on the stack, for want of registers); a failed test puts
				// it back.
				qx, qy := px+dx, py+dy
				xc[i], yc[i] = qx, qy
				ex, ey := xc[i+1]-qx, yc[i+1]-qy
				ax, ay := xn[i+1]-qx, yn[i+1]-qy
				if ex*ay-ax*ey <= 0 {
					goto damp
				}
				if bx, by := xn[i]-qx, yn[i]-qy; ax*by-bx*ay <= 0 {
					goto damp
				} else if ax, ay = xn[i-1]-qx, yn[i-1]-qy; bx*ay-ax*by <= 0 {
					goto damp
				}
				if bx, by := xc[i-1]-qx, yc[i-1]-qy; ax*by-bx*ay <= 0 {
					goto damp
				} else if ax, ay = xs[i-1]-qx, ys[i-1]-qy; bx*ay-ax*by <= 0 {
					goto damp
				}
				if bx, by := xs[i]-qx, ys[i]-qy; ax*by-bx*ay <= 0 {
					goto damp
				} else if ax, ay = xs[i+1]-qx, ys[i+1]-qy; bx*ay-ax*by <= 0 {
					goto damp
				}
				if ax*ey-ex*ay <= 0 {
					goto damp
				}
				continue
			damp:
				xc[i], yc[i] = px, py
				held[nheld] = heldMove{i, dx, dy}
				nheld++
			}
			// The nodes held back are damped after the pass. Their stars are
			// made of the other parity of this row and of the rows beside it,
			// none of which the pass moves, so this is the same as damping
			// them in turn; it keeps the call out of the loop, whose values
			// would otherwise all live on the stack.
			for _, h := range held[:nheld] {
				if dx, dy, ok := s.damp(row+h.i, xc[h.i], yc[h.i], h.dx, h.dy); ok {
					xc[h.i], yc[h.i] = xc[h.i]+dx, yc[h.i]+dy
				}
			}
		}
	}
	return worst
}

// heldMove is a proposed move of node i of the row being swept that failed
// the fold test and waits for damping.
type heldMove struct {
	i      int
	dx, dy float64
}

// damp handles a move (dx, dy) of interior node k from (px, py) that
// failed the star test. In starMode it halves the move up to four times
// until the eight triangles are positive, else drops it; in areaMode it
// does the same with the four cell areas as the test; in freeMode it lets
// the move through. It returns the move to make and whether to make it;
// a shortened or dropped move counts as damped.
func (s *smoother) damp(k int, px, py, dx, dy float64) (float64, float64, bool) {
	x, y, ni := s.x, s.y, s.ni
	ok := func(dx, dy float64) bool {
		tri, cell := starCheck(x, y, k, ni, px+dx, py+dy)
		if s.mode == starMode {
			return tri > 0
		}
		return cell > 0
	}
	switch s.mode {
	case freeMode:
		return dx, dy, true
	case areaMode:
		if ok(dx, dy) {
			return dx, dy, true
		}
	}
	s.damped++
	for h := 0; h < 4; h++ {
		dx, dy = 0.5*dx, 0.5*dy
		if ok(dx, dy) {
			return dx, dy, true
		}
	}
	return 0, 0, false
}

// updateMode picks the fold test the present grid allows: starMode when
// every interior node's eight triangles are positive (every cell strictly
// convex), areaMode when only every cell area is positive, freeMode while
// some cell is inverted.
func (s *smoother) updateMode() {
	s.mode = starMode
	ni := s.ni
	for j := 1; j+1 < s.nj; j++ {
		for i := 1; i+1 < ni; i++ {
			k := j*ni + i
			tri, cell := starCheck(s.x, s.y, k, ni, s.x[k], s.y[k])
			if cell <= 0 {
				s.mode = freeMode
				return
			}
			if tri <= 0 {
				s.mode = areaMode
			}
		}
	}
}

// inverted counts the cells of non-positive area and returns the first.
func inverted(b *Block) (n, fi, fj int) {
	fi, fj = -1, -1
	for j := 0; j+1 < b.NJ; j++ {
		for i := 0; i+1 < b.NI; i++ {
			if quadArea(b, i, j) <= 0 {
				if n == 0 {
					fi, fj = i, j
				}
				n++
			}
		}
	}
	return n, fi, fj
}

// quadArea is the signed area of cell (i, j), half the cross product of its
// diagonals.
func quadArea(b *Block, i, j int) float64 {
	k := j*b.NI + i
	k1, k2, k3 := k+1, k+1+b.NI, k+b.NI
	return 0.5 * ((b.X[k2]-b.X[k])*(b.Y[k3]-b.Y[k1]) - (b.Y[k2]-b.Y[k])*(b.X[k3]-b.X[k1]))
}

// wallFrame returns, for node k of controlled side sd, the first-line
// vector d from the wall node to its interior neighbour and the wall's unit
// tangent (in increasing index) and inward unit normal.
func (s *smoother) wallFrame(sd mesh.Side, k int) (dx, dy, tx, ty, nx, ny float64) {
	b := s.b
	w := b.SideNode(sd, k)
	// At the side's ends the tangent is one-sided.
	a, c := b.SideNode(sd, max(k-1, 0)), b.SideNode(sd, min(k+1, b.SideLen(sd)-1))
	var in int
	switch sd {
	case mesh.South:
		in = w + s.ni
	case mesh.North:
		in = w - s.ni
	case mesh.West:
		in = w + 1
	default:
		in = w - 1
	}
	tx, ty = s.x[c]-s.x[a], s.y[c]-s.y[a]
	l := math.Hypot(tx, ty)
	if l == 0 {
		// The side doubles back on itself here: no tangent. A zero
		// tangent gives zero height, which the callers skip.
		return 0, 0, 0, 0, 0, 0
	}
	tx, ty = tx/l, ty/l
	// The block lies left of south and east (walked in increasing index),
	// right of north and west.
	if sd == mesh.South || sd == mesh.East {
		nx, ny = -ty, tx
	} else {
		nx, ny = ty, -tx
	}
	return s.x[in] - s.x[w], s.y[in] - s.y[w], tx, ty, nx, ny
}

// feedback moves the wall control amplitudes towards the requested height
// and orthogonality (Steger and Sorenson 1979) and returns the largest
// change it made.
func (s *smoother) feedback() float64 {
	change := 0.0
	const limit = 4 // bound on the amplitudes, against runaway on hopeless requests
	for side, c := range s.sides {
		if !c.controlled() {
			continue
		}
		sd := mesh.Side(side)
		// sign is +1 where the control acts towards increasing index from the
		// wall (south, west), −1 where it acts from the far end.
		sign := 1.0
		if sd == mesh.North || sd == mesh.East {
			sign = -1
		}
		p, q := s.p[side], s.q[side]
		for k := 1; k+1 < len(p); k++ {
			dx, dy, tx, ty, nx, ny := s.wallFrame(sd, k)
			h := dx*nx + dy*ny
			t := dx*tx + dy*ty
			if h <= 0 {
				continue
			}
			if c.FirstHeight > 0 {
				v := clamp(q[k]-sign*s.gain*math.Log(h/c.FirstHeight), limit)
				change = math.Max(change, math.Abs(v-q[k]))
				q[k] = v
			}
			if c.Orthogonal {
				v := clamp(p[k]-s.gain*math.Atan(t/h), limit)
				change = math.Max(change, math.Abs(v-p[k]))
				p[k] = v
			}
		}
	}
	return change
}

func clamp(v, lim float64) float64 { return math.Max(-lim, math.Min(lim, v)) }

// wallErrors measures the first-cell heights and the angles at the
// controlled sides: over their interior nodes, and (the angle) at their
// two end nodes (see SmoothResult).
func (s *smoother) wallErrors() (hmax, hmean, amax, amean, emax float64) {
	var nh, na int
	for side, c := range s.sides {
		sd := mesh.Side(side)
		n := s.b.SideLen(sd)
		if c.Orthogonal {
			for _, k := range [2]int{0, n - 1} {
				dx, dy, tx, ty, nx, ny := s.wallFrame(sd, k)
				if tx != 0 || ty != 0 {
					emax = math.Max(emax, math.Abs(math.Atan2(dx*tx+dy*ty, dx*nx+dy*ny))*180/math.Pi)
				}
			}
		}
		for k := 1; k+1 < n; k++ {
			dx, dy, tx, ty, nx, ny := s.wallFrame(sd, k)
			if c.FirstHeight > 0 {
				e := math.Abs((dx*nx+dy*ny)/c.FirstHeight - 1)
				hmax = math.Max(hmax, e)
				hmean += e
				nh++
			}
			if c.Orthogonal {
				a := math.Abs(math.Atan2(dx*tx+dy*ty, dx*nx+dy*ny)) * 180 / math.Pi
				amax = math.Max(amax, a)
				amean += a
				na++
			}
		}
	}
	if nh > 0 {
		hmean /= float64(nh)
	}
	if na > 0 {
		amean /= float64(na)
	}
	return
}
