package structured

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// MarchOptions tune a hyperbolic march. FirstHeight and exactly two of
// Growth, Layers and OuterDistance are required, and so is OuterTag.
type MarchOptions struct {
	// Name names the block (a C-grid's wake blocks get -wake-lower and
	// -wake-upper added).
	Name string
	// FirstHeight is the height of the first layer of cells off the wall.
	FirstHeight float64
	// Growth is the ratio of one layer's height to the one below it.
	Growth float64
	// Layers is the number of cell layers.
	Layers int
	// OuterDistance is how far the outer boundary lies from the wall. With
	// Growth it sets the layer count (the growth is then eased down so the
	// distance is reached exactly); with Layers it sets the growth.
	OuterDistance float64
	// OuterTag is the boundary tag of the outer boundary, e.g. "farfield".
	OuterTag string
	// StartTag and EndTag tag the grid lines marched from the first and the
	// last node of an open wall (for a C-grid, the downstream ends of the
	// lower and the upper wake). They are required for open walls.
	StartTag, EndTag string
	// Dissipation is the explicit smoothing coefficient ε_e; the implicit
	// one is 2ε_e (Steger and Chaussee's choice). 0 means 0.5. It is raised
	// at concave corners, and doubled (up to five times) for a layer that
	// would otherwise fold.
	Dissipation float64
}

// MarchReport says what a march did.
type MarchReport struct {
	// Layers and Growth are the layer count and growth ratio used.
	Layers int
	Growth float64
	// OuterDistance is the distance the layers add up to.
	OuterDistance float64
	// Retried counts the layers that needed more dissipation than asked
	// for to advance without folding, and MaxDissipation is the largest
	// multiple of the base coefficient used.
	Retried        int
	MaxDissipation float64
}

// Plan resolves the layer count, growth ratio and outer distance the options
// give, without marching, so a caller can size the grid (and refuse one
// that is too large) before any allocation.
func (o MarchOptions) Plan() (MarchReport, error) {
	_, rep, err := o.resolve(false)
	return rep, err
}

// heights resolves the layer heights from the options.
func (o MarchOptions) heights() ([]float64, MarchReport, error) {
	return o.resolve(true)
}

// resolve works out layers and growth, and the heights when asked.
func (o MarchOptions) resolve(withHeights bool) ([]float64, MarchReport, error) {
	var rep MarchReport
	h := o.FirstHeight
	if !(h > 0) || math.IsInf(h, 0) {
		return nil, rep, fmt.Errorf("first-cell height %g must be positive", h)
	}
	set := 0
	if o.Growth != 0 {
		set++
	}
	if o.Layers != 0 {
		set++
	}
	if o.OuterDistance != 0 {
		set++
	}
	if set != 2 {
		return nil, rep, fmt.Errorf("give exactly two of growth ratio (%g), layer count (%d) and outer distance (%g)", o.Growth, o.Layers, o.OuterDistance)
	}
	if o.OuterDistance != 0 && h > o.OuterDistance {
		return nil, rep, fmt.Errorf("first-cell height %g is larger than the outer distance %g", h, o.OuterDistance)
	}
	if o.Growth < 0 || o.Layers < 0 || o.OuterDistance < 0 {
		return nil, rep, fmt.Errorf("growth ratio %g, layer count %d and outer distance %g must not be negative", o.Growth, o.Layers, o.OuterDistance)
	}
	var err error
	n, r := o.Layers, o.Growth
	switch {
	case o.Layers == 0:
		if n, err = LayersFor(h, r, o.OuterDistance); err != nil {
			return nil, rep, err
		}
		if r, err = GrowthFor(h, n, o.OuterDistance); err != nil {
			return nil, rep, err
		}
	case o.Growth == 0:
		if r, err = GrowthFor(h, n, o.OuterDistance); err != nil {
			return nil, rep, err
		}
	}
	if n > 1<<20 {
		return nil, rep, fmt.Errorf("%d layers is more than the %d a march allows", n, 1<<20)
	}
	rep.Layers, rep.Growth = n, r
	rep.OuterDistance = geometricSum(h, r, n)
	if math.IsInf(rep.OuterDistance, 0) || math.IsNaN(rep.OuterDistance) {
		return nil, rep, fmt.Errorf("%d layers growing by %g from %g reach no finite distance", n, r, h)
	}
	if !withHeights {
		return nil, rep, nil
	}
	d := GeometricHeights(h, r, n)
	rep.OuterDistance = sum(d)
	return d, rep, nil
}

// MarchClosed grows an O-grid outward from the closed body loop by
// hyperbolic marching (see march). The loop may run either way; it is
// walked clockwise so that the grid lies to its left. The block has
// NI = len(body.Points)+1, its last column repeating the first (the seam,
// which Assemble joins as a West–East interface), the body on the south
// side with the loop's tags, and OuterTag on the north side.
func MarchClosed(body geometry.DiscreteLoop, opt MarchOptions) (*Block, MarchReport, error) {
	fail := func(err error) (*Block, MarchReport, error) {
		return nil, MarchReport{}, fmt.Errorf("structured: hyperbolic O-grid %q: %w", opt.Name, err)
	}
	n := len(body.Points)
	if n < 4 {
		return fail(fmt.Errorf("the body has %d nodes; a closed body needs at least 4", n))
	}
	if len(body.Tags) != n {
		return fail(fmt.Errorf("the body has %d nodes but %d edge tags; a closed loop needs one per node", n, len(body.Tags)))
	}
	if opt.OuterTag == "" {
		return fail(fmt.Errorf("no tag for the outer boundary"))
	}
	if err := checkPoints(body.Points, true); err != nil {
		return fail(err)
	}
	pts, tags := body.Points, body.Tags
	if signedArea(pts) > 0 {
		// Counter-clockwise: walk it the other way from the same start.
		p, t := make([]orb.Point, n), make([]string, n)
		for k := 0; k < n; k++ {
			p[k] = pts[(n-k)%n]
			t[k] = tags[n-1-k]
		}
		pts, tags = p, t
	}
	heights, rep, err := opt.heights()
	if err != nil {
		return fail(err)
	}
	xs, ys, err := march(pts, true, heights, opt, &rep)
	if err != nil {
		return fail(err)
	}
	nk := len(heights) + 1
	b := NewBlock(opt.Name, n+1, nk)
	for j := 0; j < nk; j++ {
		copy(b.X[j*(n+1):], xs[j*n:(j+1)*n])
		copy(b.Y[j*(n+1):], ys[j*n:(j+1)*n])
		b.X[j*(n+1)+n], b.Y[j*(n+1)+n] = xs[j*n], ys[j*n]
	}
	copy(b.Tags[mesh.South], tags)
	fillTag(b.Tags[mesh.North], opt.OuterTag)
	return b, rep, nil
}

// MarchOpen grows a grid from an open wall chain by hyperbolic marching,
// to the left of the chain's direction (the side the region lies on when
// the chain is part of a counter-clockwise outer loop). The wall is the
// block's south side; the lines marched from its first and last node are
// the west and east sides, tagged StartTag and EndTag; the outer boundary
// is tagged OuterTag. The end nodes march like their neighbours (their
// steps are copied), which keeps the end lines straight and free.
func MarchOpen(wall geometry.Chain, opt MarchOptions) (*Block, MarchReport, error) {
	fail := func(err error) (*Block, MarchReport, error) {
		return nil, MarchReport{}, fmt.Errorf("structured: hyperbolic grid %q: %w", opt.Name, err)
	}
	n := len(wall.Points)
	if n < 3 {
		return fail(fmt.Errorf("the wall has %d nodes; an open wall needs at least 3", n))
	}
	if len(wall.Tags) != n-1 {
		return fail(fmt.Errorf("the wall has %d nodes but %d edge tags; it needs %d", n, len(wall.Tags), n-1))
	}
	if opt.OuterTag == "" || opt.StartTag == "" || opt.EndTag == "" {
		return fail(fmt.Errorf("an open wall needs tags for the outer boundary (%q) and both end lines (%q, %q)", opt.OuterTag, opt.StartTag, opt.EndTag))
	}
	if err := checkPoints(wall.Points, false); err != nil {
		return fail(err)
	}
	heights, rep, err := opt.heights()
	if err != nil {
		return fail(err)
	}
	xs, ys, err := march(wall.Points, false, heights, opt, &rep)
	if err != nil {
		return fail(err)
	}
	b := &Block{Name: opt.Name, NI: n, NJ: len(heights) + 1, X: xs, Y: ys}
	b.Tags[mesh.South] = append([]string(nil), wall.Tags...)
	b.Tags[mesh.North] = fillTag(make([]string, n-1), opt.OuterTag)
	b.Tags[mesh.West] = fillTag(make([]string, b.NJ-1), opt.StartTag)
	b.Tags[mesh.East] = fillTag(make([]string, b.NJ-1), opt.EndTag)
	return b, rep, nil
}

// WakeOptions shape the wake cut of a C-grid.
type WakeOptions struct {
	// Length is the length of the wake cut from the trailing edge.
	Length float64
	// Cells is the number of cells along the wake. If 0, it follows from
	// Growth.
	Cells int
	// Growth is the ratio of consecutive wake cells, used when Cells is 0;
	// 0 means 1.1.
	Growth float64
}

// MarchCGrid grows a C-grid around an airfoil with a sharp trailing edge.
// The airfoil chain runs from the trailing edge round the leading edge back
// to the trailing edge (its two ends must coincide); it is walked clockwise
// (lower surface first). A straight wake cut leaves the trailing edge along
// the bisector of its two last panels, its first cell as long as their mean
// and growing geometrically to Length. The grid line marched is lower wake
// (downstream to the trailing edge), airfoil, upper wake (back
// downstream); the result is three blocks: name-wake-lower, name (the
// airfoil, south side tagged from the chain) and name-wake-upper. The two
// wake blocks' south sides are the two faces of the cut: they coincide
// node for node, so Assemble merges them into interior faces. The outflow
// ends of the wake are tagged StartTag (lower) and EndTag (upper).
func MarchCGrid(airfoil geometry.Chain, wake WakeOptions, opt MarchOptions) ([]*Block, MarchReport, error) {
	fail := func(err error) ([]*Block, MarchReport, error) {
		return nil, MarchReport{}, fmt.Errorf("structured: hyperbolic C-grid %q: %w", opt.Name, err)
	}
	n := len(airfoil.Points)
	if n < 5 {
		return fail(fmt.Errorf("the airfoil has %d nodes; it needs at least 5", n))
	}
	if len(airfoil.Tags) != n-1 {
		return fail(fmt.Errorf("the airfoil has %d nodes but %d edge tags; it needs %d", n, len(airfoil.Tags), n-1))
	}
	if opt.OuterTag == "" || opt.StartTag == "" || opt.EndTag == "" {
		return fail(fmt.Errorf("a C-grid needs tags for the outer boundary (%q) and both wake outflow ends (%q, %q)", opt.OuterTag, opt.StartTag, opt.EndTag))
	}
	if err := checkPoints(airfoil.Points[:n-1], true); err != nil {
		return fail(err)
	}
	pts := append([]orb.Point(nil), airfoil.Points...)
	tags := append([]string(nil), airfoil.Tags...)
	te := pts[0]
	scale := 0.0
	for _, p := range pts {
		scale = math.Max(scale, dist(p, te))
	}
	if d := dist(pts[0], pts[n-1]); d > 1e-9*scale {
		return fail(fmt.Errorf("the airfoil's ends (%g, %g) and (%g, %g) are %.3g apart; a C-grid needs a sharp trailing edge, both ends at one point", pts[0][0], pts[0][1], pts[n-1][0], pts[n-1][1], d))
	}
	pts[n-1] = te
	if signedArea(pts[:n-1]) > 0 {
		c := geometry.Chain{Points: pts, Tags: tags}
		reverse(&c)
	}
	if !(wake.Length > 0) || math.IsInf(wake.Length, 0) {
		return fail(fmt.Errorf("wake length %g must be positive", wake.Length))
	}
	if wake.Cells < 0 || wake.Growth < 0 {
		return fail(fmt.Errorf("wake cells %d and growth %g must not be negative", wake.Cells, wake.Growth))
	}
	// Wake direction: bisector of the directions in which the two last
	// panels arrive at the trailing edge.
	u1 := unit(te[0]-pts[1][0], te[1]-pts[1][1])
	u2 := unit(te[0]-pts[n-2][0], te[1]-pts[n-2][1])
	dir := unit(u1[0]+u2[0], u1[1]+u2[1])
	if math.IsNaN(dir[0]) {
		return fail(fmt.Errorf("the two panels at the trailing edge (%g, %g) point opposite ways; the wake direction is undefined", te[0], te[1]))
	}
	h0 := 0.5 * (dist(te, pts[1]) + dist(te, pts[n-2]))
	if h0 > wake.Length {
		return fail(fmt.Errorf("the first wake cell (%g, the mean trailing-edge panel) is longer than the wake length %g", h0, wake.Length))
	}
	m := wake.Cells
	var r float64
	var err error
	if m == 0 {
		g := wake.Growth
		if g == 0 {
			g = 1.1
		}
		if m, err = LayersFor(h0, g, wake.Length); err != nil {
			return fail(fmt.Errorf("wake: %w", err))
		}
	}
	if r, err = GrowthFor(h0, m, wake.Length); err != nil {
		return fail(fmt.Errorf("wake: %w", err))
	}
	wk := make([]orb.Point, m+1) // wk[0] is the trailing edge
	s, step := 0.0, h0
	for k := 1; k <= m; k++ {
		s += step
		step *= r
		wk[k] = orb.Point{te[0] + s*dir[0], te[1] + s*dir[1]}
	}
	wk[m] = orb.Point{te[0] + wake.Length*dir[0], te[1] + wake.Length*dir[1]}

	// The marched line: lower wake inwards, airfoil, upper wake outwards.
	line := make([]orb.Point, 0, 2*m+n)
	for k := m; k >= 1; k-- {
		line = append(line, wk[k])
	}
	line = append(line, pts...)
	line = append(line, wk[1:]...)

	heights, rep, err := opt.heights()
	if err != nil {
		return fail(err)
	}
	xs, ys, err := march(line, false, heights, opt, &rep)
	if err != nil {
		return fail(err)
	}
	ni, nj := len(line), len(heights)+1
	full := &Block{NI: ni, NJ: nj, X: xs, Y: ys}
	full.Tags[mesh.South] = make([]string, ni-1)
	copy(full.Tags[mesh.South][m:], tags)
	full.Tags[mesh.North] = fillTag(make([]string, ni-1), opt.OuterTag)
	full.Tags[mesh.West] = fillTag(make([]string, nj-1), opt.StartTag)
	full.Tags[mesh.East] = fillTag(make([]string, nj-1), opt.EndTag)
	full.Name = opt.Name
	parts, err := full.SplitI(m, m+n-1)
	if err != nil {
		return fail(err)
	}
	parts[0].Name, parts[1].Name, parts[2].Name = opt.Name+"-wake-lower", opt.Name, opt.Name+"-wake-upper"
	return parts, rep, nil
}

func fillTag(t []string, tag string) []string {
	for k := range t {
		t[k] = tag
	}
	return t
}

func unit(x, y float64) vec2 {
	l := math.Hypot(x, y)
	return vec2{x / l, y / l}
}

// signedArea is the shoelace area of the closed polygon p.
func signedArea(p []orb.Point) float64 {
	var a2 float64
	o := p[0]
	for k := range p {
		a, b := p[k], p[(k+1)%len(p)]
		a2 += (a[0]-o[0])*(b[1]-o[1]) - (b[0]-o[0])*(a[1]-o[1])
	}
	return a2 / 2
}

// checkPoints rejects non-finite nodes and zero-length edges.
func checkPoints(p []orb.Point, closed bool) error {
	for k, q := range p {
		if !finite(q) {
			return fmt.Errorf("node %d (%g, %g) is not finite", k, q[0], q[1])
		}
		if k+1 < len(p) || closed {
			if r := p[(k+1)%len(p)]; r == q {
				return fmt.Errorf("edge %d has zero length (nodes %d and %d both at (%g, %g))", k, k, (k+1)%len(p), q[0], q[1])
			}
		}
	}
	return nil
}

// march advances the line pts layer by layer (heights[k] is the step of
// layer k) by the hyperbolic method of Steger and Chaussee (SIAM J. Sci.
// Stat. Comput. 1, 1980). Each layer solves, linearised about the present
// line r⁰ (index units, Δη = 1), the orthogonality and cell-area equations
//
//	x_ξ x_η + y_ξ y_η = 0,   x_ξ y_η − y_ξ x_η = ΔV,
//
// which in delta form, with r_η⁰ = Δs n the step along the left normal n
// (at an inner node the bisector of its two edges' normals, whatever their
// lengths) and ΔV = Δs |r_ξ⁰|, read
//
//	(I + C δ_ξ − ε_i δ_ξξ) Δr = Δs n + ε_e δ_ξξ r⁰,   C = B⁻¹A,
//	A = [x_η⁰ y_η⁰; y_η⁰ −x_η⁰],   B = [x_ξ⁰ y_ξ⁰; −y_ξ⁰ x_ξ⁰],
//
// with central differences δ_ξ, δ_ξξ, implicit dissipation ε_i twice the
// explicit coefficient before the scaling below (which keeps even a large
// explicit coefficient stable), and explicit
// dissipation ε_e scaled by min(1, Δs/ℓ) with ℓ the local edge length (so
// it does not overwhelm the first thin layers), raised by
// 1 + 8θ/π near a concave turn of θ radians (the largest turn within three
// nodes), and with the backward normal part of δ_ξξ r⁰ dropped at convex
// turns. One block-tridiagonal solve (periodic for a closed line)
// gives Δr; each node's step is then rescaled to length Δs (or kept
// longer where the solve asks for more, at concave turns, which it rounds
// off), which makes the layer heights exact on convex and straight walls
// and, on a circle, the layers exact concentric circles.
//
// Where the lines have drawn together since the layer below (near a
// concave corner) a node's step is raised by the ratio of the mean spacing
// of its five-node neighbourhood to its own, in the spirit of Steger and
// Chaussee's cell-area smoothing: such nodes step further and the front
// rounds the corner off. A layer whose cells would not all be strictly
// convex is tried again with twice the dissipation, up to five times; then
// the march stops with an error naming the layer and the position. A
// right-angle inside corner marches out some twenty wall spacings; sharper
// ones stop sooner, with that error. A layer whose line runs into itself
// or into the line below (frontCrossing: two parts of the front meeting
// across a narrow gap, which no cell-by-cell test sees) also stops the
// march, with the layer and the place.
func march(pts []orb.Point, periodic bool, heights []float64, opt MarchOptions, rep *MarchReport) (xs, ys []float64, err error) {
	n := len(pts)
	nk := len(heights) + 1
	xs, ys = make([]float64, n*nk), make([]float64, n*nk)
	for i, p := range pts {
		xs[i], ys[i] = p[0], p[1]
	}
	eps := opt.Dissipation
	if eps == 0 {
		eps = 0.5
	}
	if eps < 0 || math.IsNaN(eps) || math.IsInf(eps, 0) {
		return nil, nil, fmt.Errorf("dissipation %g must be positive", eps)
	}
	a, b, c := make([]mat2, n), make([]mat2, n), make([]mat2, n)
	g := make([]vec2, n)
	epsLocal, turn := make([]float64, n), make([]float64, n)
	spacing, prevSpacing, boost := make([]float64, n), make([]float64, n), make([]float64, n)
	solver := newBlockTri(n)
	rep.MaxDissipation = 1
	at := func(x []float64, i int) float64 {
		if periodic {
			return x[(i+n)%n]
		}
		return x[max(0, min(n-1, i))]
	}
	for k := 0; k+1 < nk; k++ {
		x0, y0 := xs[k*n:(k+1)*n], ys[k*n:(k+1)*n]
		x1, y1 := xs[(k+1)*n:(k+2)*n], ys[(k+1)*n:(k+2)*n]
		ds := heights[k]
		// Local spacing of this line, and a boost of the step where the
		// lines have drawn together since the layer below (they do near a
		// concave corner): the area asked of such a node's cells is that of
		// the mean spacing around it, so the node steps further and the
		// front rounds the corner off instead of piling nodes onto it.
		for i := 0; i < n; i++ {
			spacing[i] = localSpacing(x0, y0, i, periodic)
		}
		for i := 0; i < n; i++ {
			boost[i] = 1
			if k == 0 || spacing[i] >= prevSpacing[i] {
				continue
			}
			mean, cnt := 0.0, 0
			for d := -2; d <= 2; d++ {
				if j := i + d; periodic || (j >= 0 && j < n) {
					mean += spacing[(j+n)%n]
					cnt++
				}
			}
			boost[i] = math.Max(1, mean/float64(cnt)/spacing[i])
		}
		copy(prevSpacing, spacing)
		// Concavity of the line at each node: the left turn in radians, the
		// largest within three nodes (a corner's neighbours need the extra
		// smoothing too).
		for i := 0; i < n; i++ {
			turn[i] = 0
			if !periodic && (i == 0 || i == n-1) {
				continue
			}
			ex, ey := x0[i]-at(x0, i-1), y0[i]-at(y0, i-1)
			fx, fy := at(x0, i+1)-x0[i], at(y0, i+1)-y0[i]
			turn[i] = math.Max(0, math.Atan2(ex*fy-ey*fx, ex*fx+ey*fy))
		}
		for i := 0; i < n; i++ {
			t := 0.0
			for d := -3; d <= 3; d++ {
				if periodic || (i+d >= 0 && i+d < n) {
					t = math.Max(t, turn[(i+d+n)%n])
				}
			}
			epsLocal[i] = 1 + 8*t/math.Pi
		}
		ok := false
		for try := 0; try < 6 && !ok; try++ {
			scale := math.Pow(2, float64(try))
			for i := 0; i < n; i++ {
				var xx, yx float64
				switch {
				case periodic || (i > 0 && i < n-1):
					xx, yx = 0.5*(at(x0, i+1)-at(x0, i-1)), 0.5*(at(y0, i+1)-at(y0, i-1))
				case i == 0:
					xx, yx = x0[1]-x0[0], y0[1]-y0[0]
				default:
					xx, yx = x0[n-1]-x0[n-2], y0[n-1]-y0[n-2]
				}
				L2 := xx*xx + yx*yx
				L := math.Sqrt(L2)
				nx, ny := -yx/L, xx/L
				if periodic || (i > 0 && i < n-1) {
					// The step's direction bisects the normals of the two
					// edges at the node, whatever their lengths: the
					// central difference leans towards the longer edge's
					// normal, which at a corner between a long and a short
					// edge (a blunt trailing edge, finely spaced) points
					// along the short one and folds its cell.
					u := unit(x0[i]-at(x0, i-1), y0[i]-at(y0, i-1))
					v := unit(at(x0, i+1)-x0[i], at(y0, i+1)-y0[i])
					if bx, by := -u[1]-v[1], u[0]+v[0]; bx != 0 || by != 0 {
						l := math.Hypot(bx, by)
						nx, ny = bx/l, by/l
					}
				}
				if !periodic && (i == 0 || i == n-1) {
					// Free end: the end node takes its neighbour's step.
					b[i] = mat2{1, 0, 0, 1}
					if i == 0 {
						c[i] = mat2{-1, 0, 0, -1}
					} else {
						a[i] = mat2{-1, 0, 0, -1}
					}
					g[i] = vec2{}
					continue
				}
				// Mean length of the two edges at the node. It stands for
				// |r_ξ| in C: the two agree on a smooth line, but at a sharp
				// corner (a trailing edge) the central difference is short
				// and would blow the coupling up.
				ell := 0.5 * (math.Hypot(at(x0, i+1)-x0[i], at(y0, i+1)-y0[i]) + math.Hypot(x0[i]-at(x0, i-1), y0[i]-at(y0, i-1)))
				f := ds / (L2 * ell)
				C := mat2{-2 * xx * yx * f, (xx*xx - yx*yx) * f, (xx*xx - yx*yx) * f, 2 * xx * yx * f}
				ee := eps * scale * epsLocal[i] * math.Min(1, ds/ell)
				ei := 2 * eps * scale * epsLocal[i]
				a[i] = mat2{-0.5*C[0] - ei, -0.5 * C[1], -0.5 * C[2], -0.5*C[3] - ei}
				b[i] = mat2{1 + 2*ei, 0, 0, 1 + 2*ei}
				c[i] = mat2{0.5*C[0] - ei, 0.5 * C[1], 0.5 * C[2], 0.5*C[3] - ei}
				// Explicit smoothing: the line's second difference, whose
				// part along the line evens out the node spacing; its part
				// along the normal is kept only where it points forward (a
				// concave turn), since at a convex corner it would pull the
				// node back against the step.
				lx := at(x0, i+1) - 2*x0[i] + at(x0, i-1)
				ly := at(y0, i+1) - 2*y0[i] + at(y0, i-1)
				if ln := lx*nx + ly*ny; ln < 0 {
					lx, ly = lx-ln*nx, ly-ln*ny
				}
				g[i] = vec2{boost[i]*ds*nx + ee*lx, boost[i]*ds*ny + ee*ly}
			}
			if err := solver.solve(a, b, c, g, periodic); err != nil {
				return nil, nil, fmt.Errorf("layer %d: %w", k+1, err)
			}
			for i := 0; i < n; i++ {
				l := math.Hypot(g[i][0], g[i][1])
				if !(l > 0) || math.IsInf(l, 0) {
					return nil, nil, fmt.Errorf("layer %d: node %d at (%g, %g) got no step", k+1, i, x0[i], y0[i])
				}
				// Never shorter than the layer height; longer where the
				// solve asks for it (concave turns, which it rounds off).
				f := math.Max(1, l/ds) * ds / l
				x1[i], y1[i] = x0[i]+g[i][0]*f, y0[i]+g[i][1]*f
			}
			ok = convexLayer(x0, y0, x1, y1, periodic) < 0
			if ok && try > 0 {
				rep.Retried++
				rep.MaxDissipation = math.Max(rep.MaxDissipation, scale)
			}
		}
		if !ok {
			i := convexLayer(x0, y0, x1, y1, periodic)
			depth := sum(heights[:k+1])
			if j, gap, near := facingFront(x0, y0, i, periodic, depth); near {
				return nil, nil, fmt.Errorf("layer %d of %d (height %.3g, %.3g from the wall) cannot advance without folding the cell at i = %d near (%.4g, %.4g): the front there is %.3g from its own node i = %d at (%.4g, %.4g), grown from another part of the wall that faces it (across a gap, or round a concave corner), and the two grow into each other; lower the outer distance or the number of layers so that the grid stays within half the gap, or mesh the gap by blocks or with the unstructured mesher",
					k+1, nk-1, ds, depth, i, x0[i], y0[i], gap, j, x0[j], y0[j])
			}
			return nil, nil, fmt.Errorf("layer %d of %d (height %.3g, %.3g from the wall) cannot advance without folding the cell at i = %d near (%g, %g), even with 32 times the dissipation; lower the first height or growth, use fewer layers, or refine the wall there",
				k+1, nk-1, ds, depth, i, x0[i], y0[i])
		}
		if i, j, px, py, hit := frontCrossing(x0, y0, x1, y1, periodic); hit {
			return nil, nil, fmt.Errorf("layer %d of %d (height %.3g, %.3g from the wall) runs into the grid near (%g, %g): its cell at i = %d would overlap the one at i = %d, across a gap or cavity narrower than the grid is deep; lower the outer distance or the number of layers, or mesh that region by blocks or with the unstructured mesher",
				k+1, nk-1, ds, sum(heights[:k+1]), px, py, i, j)
		}
	}
	return xs, ys, nil
}

// facingFront looks, for the front node i of a grid grown depth from the
// wall, for the nearest front node j more than 2·depth from it along the
// front (outside the stretch of front around node i). It reports that
// node and its distance when it is nearer than 2·depth: two parts of the
// wall that face each other across a gap (a slot or a cavity) or round a
// concave corner, no more than about four times the grid's depth apart,
// whose fronts then meet, rather than a fold of the front on itself.
func facingFront(x, y []float64, i int, periodic bool, depth float64) (int, float64, bool) {
	n := len(x)
	// Arc length along the front from node i, both ways.
	along := make([]float64, n)
	for k := i + 1; k < n; k++ {
		along[k] = along[k-1] + math.Hypot(x[k]-x[k-1], y[k]-y[k-1])
	}
	for k := i - 1; k >= 0; k-- {
		along[k] = along[k+1] + math.Hypot(x[k+1]-x[k], y[k+1]-y[k])
	}
	if periodic {
		total := along[n-1] + along[0] + math.Hypot(x[0]-x[n-1], y[0]-y[n-1])
		for k := range along {
			along[k] = math.Min(along[k], total-along[k])
		}
	}
	best, bj := math.Inf(1), -1
	for k := range x {
		if along[k] <= 2*depth {
			continue // the front's own stretch around node i
		}
		if d := math.Hypot(x[k]-x[i], y[k]-y[i]); d < best {
			best, bj = d, k
		}
	}
	return bj, best, bj >= 0 && best < 2*depth
}

func sum(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x
	}
	return s
}

// convexLayer returns the first i whose cell between the lines (x0, y0)
// and (x1, y1), nodes i and i+1, is not strictly convex (all four corner
// turns counter-clockwise), or −1 if every cell is.
func convexLayer(x0, y0, x1, y1 []float64, periodic bool) int {
	n := len(x0)
	cells := n - 1
	if periodic {
		cells = n
	}
	for i := 0; i < cells; i++ {
		i1 := (i + 1) % n
		qx := [4]float64{x0[i], x0[i1], x1[i1], x1[i]}
		qy := [4]float64{y0[i], y0[i1], y1[i1], y1[i]}
		for v := 0; v < 4; v++ {
			p, q, r := v, (v+1)%4, (v+2)%4
			if (qx[q]-qx[p])*(qy[r]-qy[q])-(qy[q]-qy[p])*(qx[r]-qx[q]) <= 0 {
				return i
			}
		}
	}
	return -1
}

// localSpacing is the mean length of the edges at node i of the line.
func localSpacing(x, y []float64, i int, periodic bool) float64 {
	n := len(x)
	var sum float64
	var cnt int
	if i > 0 || periodic {
		j := (i - 1 + n) % n
		sum += math.Hypot(x[i]-x[j], y[i]-y[j])
		cnt++
	}
	if i < n-1 || periodic {
		j := (i + 1) % n
		sum += math.Hypot(x[j]-x[i], y[j]-y[i])
		cnt++
	}
	return sum / float64(cnt)
}
