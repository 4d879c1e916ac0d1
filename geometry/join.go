package geometry

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/paulmach/orb"
)

// JoinTolerance is how near two ends of open strokes must be to meet, as a
// fraction of the drawing's size (the diagonal of its bounding box):
// 1e-5. Drawing programs snap ends together exactly or to within the
// round-off of the few digits they write (a part in 10⁶ to 10⁸ of the
// drawing), while a mesh rarely resolves less than a part in 10⁴ of it,
// so ends this near are one point to any mesh, and ends further apart are
// a gap the drawing should close. It is far above ClosureTolerance,
// which only absorbs floating-point round-off.
const JoinTolerance = 1e-5

// Stroke is an open piece of boundary read from a file, to be joined end
// to end with others into loops: its runs of points, each the points of
// one segment (a line for two points, a polyline for more), each run
// starting where the one before ends; its boundary tag ("" when the file
// gives none); and how messages name it.
type Stroke struct {
	Runs  [][]orb.Point
	Tag   string
	Where string
}

func (s Stroke) start() orb.Point { return s.Runs[0][0] }
func (s Stroke) end() orb.Point {
	r := s.Runs[len(s.Runs)-1]
	return r[len(r)-1]
}

// StrokeLoop is a closed loop joined from strokes, its parts in loop
// order.
type StrokeLoop struct {
	Parts []StrokePart
}

// StrokePart is one stroke as it runs in a loop: its index among the
// strokes, whether it runs from its end to its start, and its runs in
// loop order with their far ends moved onto the joints.
type StrokePart struct {
	Stroke    int
	Backwards bool
	Runs      [][]orb.Point
}

// Ring returns the loop's vertices, each once (the closing edge from the
// last back to the first implied).
func (l StrokeLoop) Ring() []orb.Point {
	var ring []orb.Point
	for _, p := range l.Parts {
		for _, r := range p.Runs {
			ring = append(ring, r[:len(r)-1]...)
		}
	}
	return ring
}

// JoinStrokes joins open strokes into closed loops: two ends meet where
// they lie within tol of each other (or of an end that meets them), and
// each point where ends meet becomes a joint, the mean of its ends, onto
// which they are moved. Every point must gather exactly two ends; a
// stroke whose own ends meet is a loop by itself. Loops come in the order
// of their first stroke, each starting with it run forwards, so the
// result depends only on the order of the strokes.
//
// Errors name the strokes by their Where: an end that meets no other
// (the open chain it belongs to, its two loose ends, the gap between
// them and the nearest loose end of another chain), a point where three or
// more ends meet (a branch, which no loop can run through), and a stroke
// that its joints shrink to nothing.
func JoinStrokes(strokes []Stroke, tol float64) ([]StrokeLoop, error) {
	for i, s := range strokes {
		if len(s.Runs) == 0 {
			return nil, fmt.Errorf("%s draws nothing: %w", strokes[i].Where, ErrFormat)
		}
	}
	// End e of stroke e/2: its start when e is even, its end when odd.
	at := func(e int) orb.Point {
		if e%2 == 0 {
			return strokes[e/2].start()
		}
		return strokes[e/2].end()
	}
	name := func(e int) string {
		if e%2 == 0 {
			return "the start of " + strokes[e/2].Where
		}
		return "the end of " + strokes[e/2].Where
	}
	n := 2 * len(strokes)
	root := make([]int, n)
	for e := range root {
		root[e] = e
	}
	find := func(e int) int {
		for root[e] != e {
			root[e] = root[root[e]]
			e = root[e]
		}
		return e
	}
	// Ends sorted by x, so that only ends within tol in x are compared.
	byX := make([]int, n)
	for e := range byX {
		byX[e] = e
	}
	slices.SortStableFunc(byX, func(a, b int) int { return cmp.Compare(at(a)[0], at(b)[0]) })
	for k, a := range byX {
		for _, b := range byX[k+1:] {
			pa, pb := at(a), at(b)
			if pb[0]-pa[0] > tol {
				break
			}
			if math.Hypot(pb[0]-pa[0], pb[1]-pa[1]) <= tol {
				ra, rb := find(a), find(b)
				root[max(ra, rb)] = min(ra, rb)
			}
		}
	}
	// The ends at each joint, in end order.
	joint := make(map[int][]int)
	for e := range n {
		r := find(e)
		joint[r] = append(joint[r], e)
	}
	for e := range n {
		if ends := joint[find(e)]; len(ends) > 2 && ends[0] == e {
			var names []string
			for _, f := range ends {
				names = append(names, name(f))
			}
			p := at(e)
			return nil, fmt.Errorf("%d ends meet at (%.9g, %.9g): %s; a loop runs through each point once, so pieces may meet only two at a point (split the drawing where its boundary branches): %w", len(ends), p[0], p[1], listWords(names), ErrFormat)
		}
	}
	// other returns the end that meets e, or -1.
	other := func(e int) int {
		for _, f := range joint[find(e)] {
			if f != e {
				return f
			}
		}
		return -1
	}
	centre := func(e int) orb.Point {
		ends := joint[find(e)]
		var c orb.Point
		for _, f := range ends {
			c[0], c[1] = c[0]+at(f)[0], c[1]+at(f)[1]
		}
		return orb.Point{c[0] / float64(len(ends)), c[1] / float64(len(ends))}
	}
	used := make([]bool, len(strokes))
	var loops []StrokeLoop
	for first := range strokes {
		if used[first] {
			continue
		}
		// Walk on from the end of the first stroke; in is the end by which
		// each next stroke is entered.
		chain := []int{2 * first}
		for in := other(2*first + 1); in != 2*first; in = other(in ^ 1) {
			if in < 0 {
				return nil, openChain(strokes, chain, at, name, other, tol)
			}
			chain = append(chain, in)
		}
		var l StrokeLoop
		for _, in := range chain {
			s := in / 2
			used[s] = true
			part := StrokePart{Stroke: s, Backwards: in%2 == 1}
			runs := strokes[s].Runs
			if part.Backwards {
				runs = slices.Clone(runs)
				slices.Reverse(runs)
				for i := range runs {
					runs[i] = reversedPoints(runs[i])
				}
			}
			a, b := centre(in), centre(in^1)
			var err error
			if part.Runs, err = snapRuns(runs, a, b); err != nil {
				return nil, fmt.Errorf("%s: %w", strokes[s].Where, err)
			}
			l.Parts = append(l.Parts, part)
		}
		loops = append(loops, l)
	}
	return loops, nil
}

// openChain reports the open chain through the stroke entered by end
// chain[0] (walked forwards as far as chain reaches): the whole chain,
// its loose ends, the gap between them, and the nearest loose end of
// another chain to each of them.
func openChain(strokes []Stroke, chain []int, at func(int) orb.Point, name func(int) string, other func(int) int, tol float64) error {
	// Walk back from the first stroke's start to the chain's other end.
	for in := other(chain[0]); in >= 0; in = other(in ^ 1) {
		chain = append([]int{in ^ 1}, chain...)
	}
	in := make(map[int]bool)
	var names []string
	for _, e := range chain {
		in[e/2] = true
		names = append(names, strokes[e/2].Where)
	}
	head, tail := chain[0], chain[len(chain)-1]^1
	p, q := at(head), at(tail)
	gap := math.Hypot(q[0]-p[0], q[1]-p[1])
	var msg string
	if len(chain) == 1 {
		msg = fmt.Sprintf("%s is open: it starts at (%.9g, %.9g) and ends at (%.9g, %.9g), a gap of %.3g, and no other piece meets either end", strokes[head/2].Where, p[0], p[1], q[0], q[1], gap)
	} else {
		msg = fmt.Sprintf("the pieces %s join into an open chain that starts at (%.9g, %.9g) (%s) and ends at (%.9g, %.9g) (%s), a gap of %.3g that no other piece closes", listWords(names), p[0], p[1], name(head), q[0], q[1], name(tail), gap)
	}
	for _, e := range []int{head, tail} {
		best, bestD := -1, math.Inf(1)
		for f := range 2 * len(strokes) {
			if in[f/2] || other(f) >= 0 {
				continue // an end of this chain, or one that meets another
			}
			if d := math.Hypot(at(f)[0]-at(e)[0], at(f)[1]-at(e)[1]); d < bestD {
				best, bestD = f, d
			}
		}
		if best >= 0 {
			msg += fmt.Sprintf("; the nearest end to (%.9g, %.9g) is %s, %.3g away", at(e)[0], at(e)[1], name(best), bestD)
		}
	}
	return fmt.Errorf("%s (ends meet within %.3g, %g × the drawing's size): join the loose ends in the drawing, end a path that closes by itself with Z, or remove pieces that are not boundary (a centre line, a dimension): %w", msg, tol, JoinTolerance, ErrFormat)
}

// snapRuns moves the first point of runs to a and the last to b, then
// drops the points that the move makes repeat and the first or last run
// if it shrinks to one point (the runs between are left as they are, so
// the runs kept still meet end to end).
func snapRuns(runs [][]orb.Point, a, b orb.Point) ([][]orb.Point, error) {
	out := make([][]orb.Point, 0, len(runs))
	for i, r := range runs {
		r = slices.Clone(r)
		if i == 0 {
			r[0] = a
		}
		if i == len(runs)-1 {
			r[len(r)-1] = b
		}
		k := 1
		for _, p := range r[1:] {
			if p != r[k-1] {
				r[k] = p
				k++
			}
		}
		if r = r[:k]; len(r) >= 2 {
			out = append(out, r)
		}
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("it is no longer than the distance within which ends meet, so it shrinks to the point (%.9g, %.9g): %w", a[0], a[1], ErrFormat)
	}
	return out, nil
}

// listWords joins words as "a", "a and b" or "a, b and c".
func listWords(w []string) string {
	if len(w) <= 1 {
		return strings.Join(w, "")
	}
	return strings.Join(w[:len(w)-1], ", ") + " and " + w[len(w)-1]
}
