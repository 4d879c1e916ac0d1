package geometry

import (
	"fmt"
	"math"
	"slices"
	"strconv"

	"github.com/paulmach/orb"
)

// SVGOptions say how SVG path data becomes an outline.
type SVGOptions struct {
	// Scale multiplies every coordinate (after FlipY), turning drawing
	// units into metres; 0 means 1.
	Scale float64
	// FlipY negates y, since SVG's y axis points down.
	FlipY bool
	// Tolerance is the largest distance, in drawing units, between a curve
	// (C S Q T A) and the chords that replace it; 0 means 1e-4 × the
	// diagonal of the bounding box of the path's points.
	Tolerance float64
	// Tags gives the tag of each loop, in path order (a loop joined from
	// open subpaths counts at its first); a missing or empty entry leaves
	// each piece of the loop its element's data-tag or id
	// (ReadSVGDocument), or else the default ("outer" for the outer loop,
	// "inner1", "inner2", ... for the others in path order). More tags
	// than the drawing has loops are refused: the extra ones would tag
	// nothing, which a miscounted drawing causes.
	Tags []string
}

// MaxSVGPoints bounds the points a path's curves may be flattened into;
// a tolerance that would need more is refused (raise it).
const MaxSVGPoints = 200_000

// svgSeg is one drawing command in absolute coordinates.
type svgSeg struct {
	op           byte        // 'L', 'C', 'Q' or 'A'
	pts          []orb.Point // L: end; C: c1, c2, end; Q: c, end; A: end
	rx, ry, phi  float64     // A: radii and x-axis rotation (degrees)
	large, sweep bool        // A: flags
	cmd          int         // index of the command in the path data
}

// svgSubpath is a subpath: its start and its drawing commands.
type svgSubpath struct {
	start  orb.Point
	segs   []svgSeg
	closed bool
	cmd    int    // index of its moveto
	where  string // the path it belongs to, for messages
	whole  bool   // the subpath is all its element draws, so where names it
	tag    string // default tag (its element's data-tag or id), or ""
	// m maps the path's coordinates to the document's (the transforms of
	// its element and the groups around it); nil is the identity.
	m *svgMatrix
}

// svgMatrix is an SVG transform matrix [a b c d e f] (SVG 1.1 §7.4): it
// maps (x, y) to (a x + c y + e, b x + d y + f).
type svgMatrix [6]float64

// apply maps p by m; a nil m leaves p as it is.
func (m *svgMatrix) apply(p orb.Point) orb.Point {
	if m == nil {
		return p
	}
	return orb.Point{m[0]*p[0] + m[2]*p[1] + m[4], m[1]*p[0] + m[3]*p[1] + m[5]}
}

// times returns m × n: the transform that applies n, then m.
func (m svgMatrix) times(n svgMatrix) svgMatrix {
	return svgMatrix{
		m[0]*n[0] + m[2]*n[1], m[1]*n[0] + m[3]*n[1],
		m[0]*n[2] + m[2]*n[3], m[1]*n[2] + m[3]*n[3],
		m[0]*n[4] + m[2]*n[5] + m[4], m[1]*n[4] + m[3]*n[5] + m[5],
	}
}

// stretch returns the largest factor by which m lengthens a vector, the
// larger singular value of its linear part: √((s + √(s² − 4 det²))/2)
// with s the sum of the squared entries (elementary linear algebra), 1
// for a nil m.
func (m *svgMatrix) stretch() float64 {
	if m == nil {
		return 1
	}
	sum := m[0]*m[0] + m[1]*m[1] + m[2]*m[2] + m[3]*m[3]
	det := m[0]*m[3] - m[1]*m[2]
	return math.Sqrt((sum + math.Sqrt(max(0, sum*sum-4*det*det))) / 2)
}

// ReadSVGPath reads SVG path data (the d attribute of a path element,
// SVG 1.1 §8.3: commands M L H V C S Q T A Z, absolute and relative,
// repeated parameters meaning repeated commands, a moveto's extra pairs
// meaning linetos) into an outline. Each closed subpath (closed by Z, or
// ending where it starts within ClosureTolerance) becomes a loop. Open
// subpaths, which end without a closepath (SVG 1.1 §8.3.3: a subpath is
// closed only by Z or z; from memory), are joined end to end into loops
// where their ends meet within JoinTolerance of the drawing's size
// (JoinStrokes: two ends to a point, every end meeting another); a loop
// so joined counts, among the loops in path order, at its first
// subpath. The loop enclosing the largest area is the outer loop, the
// others inner loops. Each drawing command becomes one segment: lines
// stay lines, curves become polylines (a line where one chord is close
// enough) whose chords stay within the tolerance (cubic
// and quadratic Béziers by recursive halving until the control points lie
// within it of the chord; arcs by the endpoint-to-centre conversion of
// SVG 1.1 Appendix F.6.5, with out-of-range radii scaled up as F.6.6
// says). Commands that draw nothing (zero length) are dropped. The outline
// is validated and oriented. Errors name the command by its index and its
// byte offset.
func ReadSVGPath(d string, opt SVGOptions) (Outline, error) {
	subs, err := parseSVGPath(d, "SVG path")
	if err != nil {
		return Outline{}, err
	}
	return buildSVG(subs, opt)
}

// svgPiece is a closed subpath or one open subpath of a joined loop: its
// drawing commands as runs of points in the document's coordinates, its
// tag from the file and its name in messages.
type svgPiece struct {
	runs  [][]orb.Point
	tag   string
	where string
}

// svgLoop is one loop of a drawing before it is tagged.
type svgLoop struct {
	order  int // the index of its first subpath
	pieces []svgPiece
}

// buildSVG turns parsed subpaths into a validated, oriented outline:
// closed subpaths are loops by themselves, and open ones are joined end
// to end into loops (JoinStrokes, ends meeting within JoinTolerance of
// the drawing's size, in the document's coordinates).
func buildSVG(subs []svgSubpath, opt SVGOptions) (Outline, error) {
	scale := opt.Scale
	if scale == 0 {
		scale = 1
	}
	if !(scale > 0) || math.IsInf(scale, 0) {
		return Outline{}, fmt.Errorf("SVG path: scale %g must be positive and finite: %w", opt.Scale, ErrFormat)
	}
	if len(subs) == 0 {
		// Empty path data, or a document whose shapes draw nothing: say
		// so rather than measure the extent of no points.
		return Outline{}, fmt.Errorf("SVG path: no drawing command (the path data is empty): %w", ErrFormat)
	}
	extent := svgExtent(subs)
	if !(extent > 0) {
		return Outline{}, fmt.Errorf("SVG path: no closed subpath that draws anything: %w", ErrFormat)
	}
	if !(extent <= MaxCoordinate) {
		return Outline{}, fmt.Errorf("SVG path: points span %g, beyond the coordinate limit %g: %w", extent, MaxCoordinate, ErrFormat)
	}
	tol := opt.Tolerance
	if tol == 0 {
		tol = 1e-4 * extent
	}
	if !(tol > 0) || math.IsInf(tol, 0) {
		return Outline{}, fmt.Errorf("SVG path: tolerance %g must be positive and finite (the path must span a non-zero extent): %w", opt.Tolerance, ErrFormat)
	}
	transform := func(p orb.Point) orb.Point {
		if opt.FlipY {
			p[1] = -p[1]
		}
		return orb.Point{p[0] * scale, p[1] * scale}
	}
	var loops []svgLoop
	var strokes []Stroke
	var strokeAt []int // the subpath of each stroke
	budget := MaxSVGPoints
	for si, sp := range subs {
		var runs [][]orb.Point
		cur := sp.start
		// The curves are flattened in the path's own coordinates, to the
		// tolerance divided by the most the transform stretches, so that
		// the chords stay within the tolerance in the document's.
		local := tol / sp.m.stretch()
		for _, s := range sp.segs {
			pts, err := flattenSVG(cur, s, local, &budget, sp.where)
			if err != nil {
				return Outline{}, err
			}
			cur = svgEnd(s)
			if len(pts) < 2 {
				continue
			}
			for i := range pts {
				pts[i] = sp.m.apply(pts[i])
			}
			runs = append(runs, pts)
		}
		if len(runs) == 0 {
			continue
		}
		last := runs[len(runs)-1]
		start, end := runs[0][0], last[len(last)-1]
		if sp.closed || math.Hypot(end[0]-start[0], end[1]-start[1]) <= ClosureTolerance*extent {
			loops = append(loops, svgLoop{order: si, pieces: []svgPiece{{runs, sp.tag, sp.where}}})
			continue
		}
		where := sp.where
		if !sp.whole {
			where = fmt.Sprintf("%s: subpath from command %d", sp.where, sp.cmd)
		}
		strokes = append(strokes, Stroke{Runs: runs, Tag: sp.tag, Where: where})
		strokeAt = append(strokeAt, si)
	}
	if len(strokes) > 0 {
		joined, err := JoinStrokes(strokes, JoinTolerance*extent)
		if err != nil {
			return Outline{}, err
		}
		for _, jl := range joined {
			l := svgLoop{order: strokeAt[jl.Parts[0].Stroke]}
			for _, p := range jl.Parts {
				l.pieces = append(l.pieces, svgPiece{p.Runs, strokes[p.Stroke].Tag, strokes[p.Stroke].Where})
			}
			loops = append(loops, l)
		}
		slices.SortStableFunc(loops, func(a, b svgLoop) int { return a.order - b.order })
	}
	if len(loops) == 0 {
		return Outline{}, fmt.Errorf("SVG path: no closed subpath that draws anything: %w", ErrFormat)
	}
	if len(opt.Tags) > len(loops) {
		loopWord := "loops"
		if len(loops) == 1 {
			loopWord = "loop"
		}
		return Outline{}, fmt.Errorf("SVG path: tags gives %d tags; the drawing has %d %s: give at most one tag per loop, in path order (a loop joined from open subpaths counts at its first): %w", len(opt.Tags), len(loops), loopWord, ErrFormat)
	}
	outer, outerArea := 0, -1.0
	for i, l := range loops {
		var ring []orb.Point
		for _, pc := range l.pieces {
			for _, r := range pc.runs {
				ring = append(ring, r[:len(r)-1]...)
			}
		}
		if a := math.Abs(signedArea(ring)); a > outerArea {
			outer, outerArea = i, a
		}
	}
	var o Outline
	inner := 0
	for i, l := range loops {
		given := ""
		if i < len(opt.Tags) {
			given = opt.Tags[i]
		}
		if i != outer {
			inner++
		}
		fallback := "outer"
		if i != outer {
			fallback = fmt.Sprintf("inner%d", inner)
		}
		if err := svgLoopTags(l.pieces, given, fallback); err != nil {
			return Outline{}, err
		}
		var loop Loop
		for _, pc := range l.pieces {
			tag := given
			if tag == "" {
				tag = pc.tag
			}
			if tag == "" {
				tag = fallback
			}
			for _, r := range pc.runs {
				pts := make([]orb.Point, len(r))
				for k, p := range r {
					pts[k] = transform(p)
				}
				if len(pts) == 2 {
					loop.Segments = append(loop.Segments, &Line{A: pts[0], B: pts[1], attr: Attr{Tag: tag}})
					continue
				}
				pl, err := NewPolyline(pts, Attr{Tag: tag})
				if err != nil {
					return Outline{}, fmt.Errorf("%s: %w", pc.where, err)
				}
				loop.Segments = append(loop.Segments, pl)
			}
		}
		if i == outer {
			o.Outer = loop
		} else {
			o.Inner = append(o.Inner, loop)
		}
	}
	n, err := o.Normalise()
	if err != nil {
		return Outline{}, fmt.Errorf("SVG path (loops in path order, the largest first as the outer loop; a loop's segments are its drawing commands, piece by piece): %w", err)
	}
	return n, nil
}

// svgLoopTags refuses a loop joined from pieces of which some carry a tag
// from the file and others do not, unless the caller gives the loop a
// tag (given): a piece without one would take the loop's default tag
// (fallback), which the drawing's tags do not intend.
func svgLoopTags(pieces []svgPiece, given, fallback string) error {
	if given != "" {
		return nil
	}
	var tags []string
	bare := ""
	for _, p := range pieces {
		t := p.tag
		if t == "" && bare == "" {
			bare = p.where
		}
		if t != "" && !slices.Contains(tags, t) {
			tags = append(tags, t)
		}
	}
	if bare == "" || len(tags) == 0 {
		return nil
	}
	quoted := make([]string, len(tags))
	for i, t := range tags {
		quoted[i] = strconv.Quote(t)
	}
	return fmt.Errorf("%s has no data-tag or id, while the other pieces of its loop are tagged %s: give it a data-tag or an id (as it stands its edges would take the loop's default tag %q): %w", bare, listWords(quoted), fallback, ErrFormat)
}

// signedArea is the shoelace area of an open ring, shifted to its first
// point for round-off (as orb's planar package does).
func signedArea(r []orb.Point) float64 {
	a := 0.0
	for i := 1; i+1 < len(r); i++ {
		a += (r[i][0]-r[0][0])*(r[i+1][1]-r[0][1]) - (r[i+1][0]-r[0][0])*(r[i][1]-r[0][1])
	}
	return a / 2
}

func svgEnd(s svgSeg) orb.Point { return s.pts[len(s.pts)-1] }

func svgExtent(subs []svgSubpath) float64 {
	b := orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}
	for _, sp := range subs {
		b = b.Extend(sp.m.apply(sp.start))
		for _, s := range sp.segs {
			for _, p := range s.pts {
				b = b.Extend(sp.m.apply(p))
			}
		}
	}
	return math.Hypot(b.Max[0]-b.Min[0], b.Max[1]-b.Min[1])
}

// flattenSVG returns the points of one command from cur, both ends
// included; budget bounds the total point count.
func flattenSVG(cur orb.Point, s svgSeg, tol float64, budget *int, where string) ([]orb.Point, error) {
	pts := []orb.Point{cur}
	switch s.op {
	case 'L':
		if s.pts[0] != cur {
			pts = append(pts, s.pts[0])
		}
	case 'C':
		flattenCubic(cur, s.pts[0], s.pts[1], s.pts[2], tol, 0, &pts, *budget)
	case 'Q':
		// Degree elevation: c₁ = p₀ + ⅔(q − p₀), c₂ = p₃ + ⅔(q − p₃).
		q, e := s.pts[0], s.pts[1]
		c1 := orb.Point{cur[0] + 2.0/3*(q[0]-cur[0]), cur[1] + 2.0/3*(q[1]-cur[1])}
		c2 := orb.Point{e[0] + 2.0/3*(q[0]-e[0]), e[1] + 2.0/3*(q[1]-e[1])}
		flattenCubic(cur, c1, c2, e, tol, 0, &pts, *budget)
	case 'A':
		end := s.pts[0]
		a, ok := svgArcCentre(cur, end, s.rx, s.ry, s.phi, s.large, s.sweep)
		if !ok { // zero radius: a straight line (F.6.2)
			if end != cur {
				pts = append(pts, end)
			}
			break
		}
		r := math.Max(a.rx, a.ry)
		step := math.Pi / 2
		if tol < r {
			step = math.Min(step, 2*math.Acos(1-tol/r)) // sagitta r(1 − cos(δ/2)) ≤ tol
		}
		n := int(math.Ceil(math.Abs(a.dtheta) / step))
		if n > *budget {
			return nil, fmt.Errorf("%s: command %d: an arc of radius %g at tolerance %g needs more than %d points; raise the tolerance: %w", where, s.cmd, r, tol, MaxSVGPoints, ErrFormat)
		}
		for i := 1; i < n; i++ {
			pts = append(pts, a.point(a.theta1+a.dtheta*float64(i)/float64(n)))
		}
		pts = append(pts, end)
	}
	// Drop repeated points (commands or pieces that draw nothing).
	out := pts[:1]
	for _, p := range pts[1:] {
		if p != out[len(out)-1] {
			out = append(out, p)
		}
	}
	*budget -= len(out)
	if *budget < 0 {
		return nil, fmt.Errorf("%s: command %d: flattening at tolerance %g needs more than %d points in all; raise the tolerance: %w", where, s.cmd, tol, MaxSVGPoints, ErrFormat)
	}
	return out, nil
}

// flattenCubic appends to out the points after p0 of a polyline within tol
// of the cubic Bézier p0 p1 p2 p3: the curve lies in the convex hull of
// its control points, so once p1 and p2 are within tol of the chord p0p3
// so is the curve; otherwise it is halved by de Casteljau's construction.
// It stops halving at depth 20 or once out holds more than limit points
// (the caller then refuses the result).
func flattenCubic(p0, p1, p2, p3 orb.Point, tol float64, depth int, out *[]orb.Point, limit int) {
	if depth >= 20 || len(*out) > limit || (SegmentDistance(p1, p0, p3) <= tol && SegmentDistance(p2, p0, p3) <= tol) {
		*out = append(*out, p3)
		return
	}
	mid := func(a, b orb.Point) orb.Point { return orb.Point{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2} }
	a, b, c := mid(p0, p1), mid(p1, p2), mid(p2, p3)
	d, e := mid(a, b), mid(b, c)
	m := mid(d, e)
	flattenCubic(p0, a, d, m, tol, depth+1, out, limit)
	flattenCubic(m, e, c, p3, tol, depth+1, out, limit)
}

// svgArc is an elliptical arc in centre parametrisation (SVG 1.1 F.6.3).
type svgArc struct {
	cx, cy, rx, ry float64
	cosPhi, sinPhi float64
	theta1, dtheta float64 // radians
}

// point returns the arc point at angle θ (SVG 1.1 F.6.3.1):
// x = cx + rx cos φ cos θ − ry sin φ sin θ, y = cy + rx sin φ cos θ + ry cos φ sin θ.
func (a svgArc) point(theta float64) orb.Point {
	c, s := math.Cos(theta), math.Sin(theta)
	return orb.Point{a.cx + a.rx*a.cosPhi*c - a.ry*a.sinPhi*s, a.cy + a.rx*a.sinPhi*c + a.ry*a.cosPhi*s}
}

// svgArcCentre converts an arc from endpoint to centre parametrisation by
// SVG 1.1 Appendix F.6.5, scaling radii that cannot reach the end point by
// √Λ, Λ = x₁′²/rx² + y₁′²/ry² (F.6.6). ok is false for an arc with a zero
// radius, which F.6.2 draws as a straight line; equal end points draw
// nothing and give dtheta = 0.
func svgArcCentre(p1, p2 orb.Point, rx, ry, phiDeg float64, large, sweep bool) (svgArc, bool) {
	rx, ry = math.Abs(rx), math.Abs(ry)
	if rx == 0 || ry == 0 {
		return svgArc{}, false
	}
	phi := math.Mod(phiDeg, 360) * math.Pi / 180
	a := svgArc{rx: rx, ry: ry, cosPhi: math.Cos(phi), sinPhi: math.Sin(phi)}
	if p1 == p2 {
		a.cx, a.cy = p1[0], p1[1]
		return a, true
	}
	// Step 1: (x₁′, y₁′) = R(−φ) · (p₁ − p₂)/2.
	hx, hy := (p1[0]-p2[0])/2, (p1[1]-p2[1])/2
	x1 := a.cosPhi*hx + a.sinPhi*hy
	y1 := -a.sinPhi*hx + a.cosPhi*hy
	// F.6.6: scale up radii that are too small.
	if lambda := x1*x1/(rx*rx) + y1*y1/(ry*ry); lambda > 1 {
		s := math.Sqrt(lambda)
		rx, ry = rx*s, ry*s
		a.rx, a.ry = rx, ry
	}
	// Step 2: c′ = ±√((rx²ry² − rx²y₁′² − ry²x₁′²)/(rx²y₁′² + ry²x₁′²)) · (rx y₁′/ry, −ry x₁′/rx),
	// + when the flags differ.
	num := rx*rx*ry*ry - rx*rx*y1*y1 - ry*ry*x1*x1
	den := rx*rx*y1*y1 + ry*ry*x1*x1
	k := math.Sqrt(math.Max(0, num/den))
	if large == sweep {
		k = -k
	}
	cxp, cyp := k*rx*y1/ry, -k*ry*x1/rx
	// Step 3: c = R(φ) · c′ + (p₁ + p₂)/2.
	a.cx = a.cosPhi*cxp - a.sinPhi*cyp + (p1[0]+p2[0])/2
	a.cy = a.sinPhi*cxp + a.cosPhi*cyp + (p1[1]+p2[1])/2
	// Step 4: θ₁ = ∠((1, 0), u), Δθ = ∠(u, v) mod 360°, with
	// u = ((x₁′ − cx′)/rx, (y₁′ − cy′)/ry), v = ((−x₁′ − cx′)/rx, (−y₁′ − cy′)/ry);
	// Δθ < 0 when sweep is 0, > 0 when it is 1.
	ux, uy := (x1-cxp)/rx, (y1-cyp)/ry
	vx, vy := (-x1-cxp)/rx, (-y1-cyp)/ry
	a.theta1 = math.Atan2(uy, ux)
	a.dtheta = math.Atan2(ux*vy-uy*vx, ux*vx+uy*vy)
	if !sweep && a.dtheta > 0 {
		a.dtheta -= 2 * math.Pi
	} else if sweep && a.dtheta < 0 {
		a.dtheta += 2 * math.Pi
	}
	return a, true
}

// svgParser reads path data.
type svgParser struct {
	s     string
	i     int
	cmd   int    // index of the command being read
	where string // names the path in messages
}

func (p *svgParser) errorf(format string, args ...any) error {
	return fmt.Errorf("%s: command %d at byte %d: %s: %w", p.where, p.cmd, p.i, fmt.Sprintf(format, args...), ErrFormat)
}

func (p *svgParser) skipSpace() {
	for p.i < len(p.s) {
		switch p.s[p.i] {
		case ' ', '\t', '\n', '\r', '\f':
			p.i++
		default:
			return
		}
	}
}

// skipSep skips white space with at most one comma in it.
func (p *svgParser) skipSep() {
	p.skipSpace()
	if p.i < len(p.s) && p.s[p.i] == ',' {
		p.i++
		p.skipSpace()
	}
}

// atNumber reports whether a number starts at the current position.
func (p *svgParser) atNumber() bool {
	if p.i >= len(p.s) {
		return false
	}
	c := p.s[p.i]
	return c == '+' || c == '-' || c == '.' || (c >= '0' && c <= '9')
}

// number reads one number: sign? (digits ('.' digits?)? | '.' digits)
// (('e'|'E') sign? digits)?, as SVG 1.1's path grammar has it, so "1.5.5"
// is 1.5 then .5 and "1-2" is 1 then −2.
func (p *svgParser) number() (float64, error) {
	p.skipSep()
	start := p.i
	if p.i < len(p.s) && (p.s[p.i] == '+' || p.s[p.i] == '-') {
		p.i++
	}
	digits := 0
	for p.i < len(p.s) && p.s[p.i] >= '0' && p.s[p.i] <= '9' {
		p.i++
		digits++
	}
	if p.i < len(p.s) && p.s[p.i] == '.' {
		p.i++
		for p.i < len(p.s) && p.s[p.i] >= '0' && p.s[p.i] <= '9' {
			p.i++
			digits++
		}
	}
	if digits == 0 {
		p.i = start
		if p.i >= len(p.s) {
			return 0, p.errorf("expected a number, found the end of the data")
		}
		return 0, p.errorf("expected a number, found %q", p.s[p.i])
	}
	if p.i < len(p.s) && (p.s[p.i] == 'e' || p.s[p.i] == 'E') {
		j := p.i + 1
		if j < len(p.s) && (p.s[j] == '+' || p.s[j] == '-') {
			j++
		}
		if j < len(p.s) && p.s[j] >= '0' && p.s[j] <= '9' {
			for j < len(p.s) && p.s[j] >= '0' && p.s[j] <= '9' {
				j++
			}
			p.i = j
		}
	}
	v, err := strconv.ParseFloat(p.s[start:p.i], 64)
	if err != nil || math.IsInf(v, 0) {
		text := p.s[start:p.i]
		p.i = start
		return 0, p.errorf("number %q is out of range", text)
	}
	return v, nil
}

// flag reads an arc flag: a single '0' or '1'.
func (p *svgParser) flag() (bool, error) {
	p.skipSep()
	if p.i < len(p.s) && (p.s[p.i] == '0' || p.s[p.i] == '1') {
		p.i++
		return p.s[p.i-1] == '1', nil
	}
	return false, p.errorf("expected an arc flag 0 or 1")
}

func (p *svgParser) numbers(n int) ([]float64, error) {
	v := make([]float64, n)
	for k := range v {
		x, err := p.number()
		if err != nil {
			return nil, err
		}
		v[k] = x
	}
	return v, nil
}

// parseSVGPath parses path data into absolute subpaths; where names the
// path in messages.
func parseSVGPath(d, where string) ([]svgSubpath, error) {
	p := &svgParser{s: d, cmd: -1, where: where}
	var subs []svgSubpath
	var cur, start orb.Point
	var lastCtrl orb.Point // last cubic (C/S) or quadratic (Q/T) control point
	var last byte          // previous command, upper case
	add := func(s svgSeg) {
		if len(subs) == 0 || subs[len(subs)-1].closed {
			// Drawing after Z starts a new subpath at the current point.
			subs = append(subs, svgSubpath{start: cur, cmd: p.cmd, where: where})
			start = cur
		}
		subs[len(subs)-1].segs = append(subs[len(subs)-1].segs, s)
		cur = svgEnd(s)
	}
	for {
		p.skipSpace()
		if p.i >= len(p.s) {
			break
		}
		c := p.s[p.i]
		if !isSVGCommand(c) {
			return nil, fmt.Errorf("%s: byte %d: expected a command letter (M L H V C S Q T A Z, or lower case), found %q: %w", where, p.i, c, ErrFormat)
		}
		p.i++
		p.cmd++
		if p.cmd == 0 && c != 'M' && c != 'm' {
			return nil, p.errorf("path data must begin with a moveto (M or m), found %q", c)
		}
		rel := c >= 'a'
		up := c &^ 0x20
		offset := func(x, y float64) orb.Point {
			if rel {
				return orb.Point{cur[0] + x, cur[1] + y}
			}
			return orb.Point{x, y}
		}
		first := true
		for {
			if !first {
				p.skipSep()
				if !p.atNumber() {
					break
				}
			}
			switch up {
			case 'Z':
				if len(subs) > 0 && !subs[len(subs)-1].closed {
					if cur != start {
						add(svgSeg{op: 'L', pts: []orb.Point{start}, cmd: p.cmd})
					}
					subs[len(subs)-1].closed = true
				}
				cur = start
			case 'M':
				v, err := p.numbers(2)
				if err != nil {
					return nil, err
				}
				q := offset(v[0], v[1])
				if first {
					cur, start = q, q
					subs = append(subs, svgSubpath{start: q, cmd: p.cmd, where: where})
				} else { // extra pairs are implicit linetos
					add(svgSeg{op: 'L', pts: []orb.Point{q}, cmd: p.cmd})
				}
			case 'L':
				v, err := p.numbers(2)
				if err != nil {
					return nil, err
				}
				add(svgSeg{op: 'L', pts: []orb.Point{offset(v[0], v[1])}, cmd: p.cmd})
			case 'H', 'V':
				v, err := p.numbers(1)
				if err != nil {
					return nil, err
				}
				q := cur
				k := 0
				if up == 'V' {
					k = 1
				}
				if rel {
					q[k] += v[0]
				} else {
					q[k] = v[0]
				}
				add(svgSeg{op: 'L', pts: []orb.Point{q}, cmd: p.cmd})
			case 'C', 'S':
				n := 6
				if up == 'S' {
					n = 4
				}
				v, err := p.numbers(n)
				if err != nil {
					return nil, err
				}
				var c1 orb.Point
				if up == 'C' {
					c1 = offset(v[0], v[1])
					v = v[2:]
				} else if last == 'C' || last == 'S' {
					c1 = orb.Point{2*cur[0] - lastCtrl[0], 2*cur[1] - lastCtrl[1]}
				} else {
					c1 = cur
				}
				c2, e := offset(v[0], v[1]), offset(v[2], v[3])
				add(svgSeg{op: 'C', pts: []orb.Point{c1, c2, e}, cmd: p.cmd})
				lastCtrl = c2
			case 'Q', 'T':
				n := 4
				if up == 'T' {
					n = 2
				}
				v, err := p.numbers(n)
				if err != nil {
					return nil, err
				}
				var q orb.Point
				if up == 'Q' {
					q = offset(v[0], v[1])
					v = v[2:]
				} else if last == 'Q' || last == 'T' {
					q = orb.Point{2*cur[0] - lastCtrl[0], 2*cur[1] - lastCtrl[1]}
				} else {
					q = cur
				}
				add(svgSeg{op: 'Q', pts: []orb.Point{q, offset(v[0], v[1])}, cmd: p.cmd})
				lastCtrl = q
			case 'A':
				v, err := p.numbers(3)
				if err != nil {
					return nil, err
				}
				large, err := p.flag()
				if err != nil {
					return nil, err
				}
				sweep, err := p.flag()
				if err != nil {
					return nil, err
				}
				e, err := p.numbers(2)
				if err != nil {
					return nil, err
				}
				add(svgSeg{op: 'A', pts: []orb.Point{offset(e[0], e[1])}, rx: v[0], ry: v[1], phi: v[2], large: large, sweep: sweep, cmd: p.cmd})
			}
			last = up
			if up == 'Z' {
				break
			}
			first = false
		}
	}
	return subs, nil
}

func isSVGCommand(c byte) bool {
	switch c &^ 0x20 {
	case 'M', 'L', 'H', 'V', 'C', 'S', 'Q', 'T', 'A', 'Z':
		return true
	}
	return false
}
