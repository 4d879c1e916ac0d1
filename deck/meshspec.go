package deck

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// DefaultMaxCells is the largest mesh a run makes unless told otherwise.
const DefaultMaxCells = 50_000_000

// meshSpec is the decoded mesh section.
type meshSpec struct {
	at       value
	maxCells int
	// structured: blocks over named curves.
	blocks []blockSpec
	// jointSmooth smooths the smoothed blocks together, shared sides and all.
	jointSmooth bool
	// grow: grids marched off bodies and walls, joined to the blocks.
	grow []growSpec
	// unstructured: the outline meshed by the unstructured mesher.
	unstructured *unstructuredSpec
}

// blockSpec is one four-sided structured block: each side a run of named
// curves.
type blockSpec struct {
	name   string
	sides  [4][]sideCurve // south, east, north, west
	smooth *smoothSpec
	at     value
}

// sideCurve is one named curve on a block side.
type sideCurve struct {
	curve *curveSpec
	at    value
}

// decodeMesh reads the mesh section:
//
//	mesh:
//	  max_cells: 2e6          # refuse larger meshes (default 50 million)
//	  structured:
//	    blocks:
//	      - name: section
//	        south: [floor_in, bump, floor_out]   # named curves, in order
//	        east: outlet
//	        north: ceiling
//	        west: inlet
//
// A side's curves may be listed in either direction along the side; each
// curve is turned to join the one before it.
func decodeMesh(c *Case, v value) (*meshSpec, error) {
	o, err := v.object()
	if err != nil {
		return nil, err
	}
	ms := &meshSpec{at: v, maxCells: DefaultMaxCells}
	if mv, ok := o.get("max_cells"); ok {
		if ms.maxCells, err = mv.count(1); err != nil {
			return nil, err
		}
	}
	sv, hasS := o.get("structured")
	uv, hasU := o.get("unstructured")
	switch {
	case hasS && hasU:
		return nil, uv.errf("a mesh is structured or unstructured, not both")
	case hasU:
		if ms.unstructured, err = decodeUnstructured(c, uv); err != nil {
			return nil, err
		}
		return ms, o.done()
	case !hasS:
		return nil, v.errf("the mesh section needs structured: {blocks: [...]} or unstructured: {...}")
	}
	so, err := sv.object()
	if err != nil {
		return nil, err
	}
	if jv, ok := so.get("smooth_across_interfaces"); ok {
		if ms.jointSmooth, err = jv.boolean(); err != nil {
			return nil, err
		}
	}
	var items []value
	if bv, ok := so.get("blocks"); ok {
		if items, err = bv.list(); err != nil {
			return nil, err
		}
	}
	if gv, ok := so.get("grow"); ok {
		list, err := gv.list()
		if err != nil {
			return nil, err
		}
		for i, it := range list {
			gs, err := decodeGrow(c, it, i)
			if err != nil {
				return nil, err
			}
			ms.grow = append(ms.grow, gs)
		}
	}
	if len(items) == 0 && len(ms.grow) == 0 {
		return nil, sv.errf("a structured mesh needs blocks: [...] or grow: [...], or both")
	}
	names := map[string]bool{}
	for i, it := range items {
		bs, err := decodeBlock(c, it, i)
		if err != nil {
			return nil, err
		}
		if names[bs.name] {
			return nil, it.errf("two blocks are named %q", bs.name)
		}
		names[bs.name] = true
		ms.blocks = append(ms.blocks, bs)
	}
	if err := so.done(); err != nil {
		return nil, err
	}
	if err := o.done(); err != nil {
		return nil, err
	}
	return ms, nil
}

func decodeBlock(c *Case, v value, index int) (blockSpec, error) {
	o, err := v.object()
	if err != nil {
		return blockSpec{}, err
	}
	bs := blockSpec{name: fmt.Sprintf("block%d", index+1), at: v}
	if nv, ok := o.get("name"); ok {
		if bs.name, err = nv.str(); err != nil {
			return bs, err
		}
	}
	for s := mesh.South; s <= mesh.West; s++ {
		sv, err := o.need(s.String())
		if err != nil {
			return bs, err
		}
		names, err := sv.strings()
		if err != nil {
			return bs, err
		}
		for _, n := range names {
			cs, err := c.Geometry.curve(sv, n)
			if err != nil {
				return bs, err
			}
			bs.sides[s] = append(bs.sides[s], sideCurve{curve: cs, at: sv})
		}
	}
	if sv, ok := o.get("smooth"); ok {
		if bs.smooth, err = decodeSmooth(c, sv); err != nil {
			return bs, err
		}
	}
	return bs, o.done()
}

// estimateCells gives the cell count before any node is placed, from the
// spacing laws of the block sides (the larger of two opposite sides, so
// that no side is discretised if the count is too large).
func (ms *meshSpec) estimateCells() (int, error) {
	total := 0
	for _, bs := range ms.blocks {
		var n [4]int
		for s := range bs.sides {
			k, err := sideEdges(bs.sides[s])
			if err != nil {
				return 0, err
			}
			n[s] = k
		}
		total += max(n[mesh.South], n[mesh.North]) * max(n[mesh.East], n[mesh.West])
		if total > ms.maxCells {
			break
		}
	}
	return total, nil
}

// sideEdges counts the edges the spacing laws put on a block side.
func sideEdges(side []sideCurve) (int, error) {
	n := 0
	for _, sc := range side {
		for _, seg := range sc.curve.segments {
			sp := seg.Attr().Spacing
			if sp.KeepsVertices() {
				pts, err := geometry.DiscretiseSegment(seg)
				if err != nil {
					return 0, sc.at.wrap(err)
				}
				n += len(pts) - 1
				continue
			}
			k, err := sp.NodeCount(seg.Length())
			if err != nil {
				return 0, sc.at.wrap(err)
			}
			n += k - 1
		}
	}
	return n, nil
}

// sideChain discretises a block side: its curves joined end to start, each
// turned as needed so that it begins where the previous one ended.
func sideChain(side []sideCurve) (geometry.Chain, error) {
	var segs []geometry.Segment
	var names []string // the curve of each segment, for messages
	var end orb.Point
	for k, sc := range side {
		cs := sc.curve.segments
		if k > 0 {
			first, last := cs[0].At(0), cs[len(cs)-1].At(1)
			if dist(last, end) < dist(first, end) {
				cs = reversed(cs)
			}
		} else if len(side) > 1 {
			// Turn the first curve so that its end meets the second curve.
			next := side[1].curve.segments
			a, b := next[0].At(0), next[len(next)-1].At(1)
			first, last := cs[0].At(0), cs[len(cs)-1].At(1)
			if math.Min(dist(first, a), dist(first, b)) < math.Min(dist(last, a), dist(last, b)) {
				cs = reversed(cs)
			}
		}
		segs = append(segs, cs...)
		for range cs {
			names = append(names, sc.curve.name)
		}
		end = cs[len(cs)-1].At(1)
	}
	ch, err := geometry.DiscretiseChain(segs)
	if err != nil {
		return ch, side[0].at.wrap(inMetres(geometry.NameChain(err, names), side[0].at.d.scale))
	}
	return ch, nil
}

func reversed(segs []geometry.Segment) []geometry.Segment {
	out := make([]geometry.Segment, len(segs))
	for i, s := range segs {
		out[len(segs)-1-i] = s.Reversed()
	}
	return out
}

func dist(a, b orb.Point) float64 { return math.Hypot(a[0]-b[0], a[1]-b[1]) }
