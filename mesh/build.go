package mesh

import (
	"fmt"
	"runtime"

	"github.com/paulmach/orb"

	"cvdeck/internal/hugepage"
)

// TaggedEdge marks the boundary edge between nodes A and B (either order)
// with the tag Tags[Tag] of the builder input.
type TaggedEdge struct {
	A, B int32
	Tag  int16
}

// Input is what Build turns into a Mesh: node positions, cells in CSR form
// (counter-clockwise), and the tags of boundary edges.
type Input struct {
	Nodes     []orb.Point
	CellStart []int32
	CellNodes []int32
	// Tags are the boundary tag names; their face groups appear in this order.
	Tags []string
	// Edges tag boundary edges. Every listed edge must be a boundary face;
	// boundary faces not listed stay untagged.
	Edges []TaggedEdge
	// Blocks and Interfaces are copied into the mesh's structured view.
	Blocks     []Block
	Interfaces []BlockInterface
}

// Build derives the faces of a mesh from its cells and orders everything
// deterministically:
//
//   - each edge used by one cell is a boundary face, by two cells an interior
//     face, by more an error naming the edge and its cells;
//   - a face's owner is the lower-numbered of its cells and its nodes are in
//     the owner's counter-clockwise order, so the normal points from owner to
//     neighbour and outward on the boundary;
//   - a cell of negative signed area (listed clockwise, or folded over) is
//     turned the wrong way, and the faces it touches are set by its
//     neighbours and the boundary, not by it, so that its defect stays its
//     own: where it traverses an interior face the same way as a
//     neighbour of positive area, that neighbour owns the face and gives
//     its direction, and its boundary faces run against its node order,
//     as the boundary loop of the cells around it runs, their normals
//     pointing out of the mesh. The cell itself is kept as given, for the
//     checks to find (its area, and its node order against its faces);
//   - interior faces come first in order of (owner, position in the owner),
//     then boundary faces grouped by tag in the order of in.Tags, each group
//     in the same order, then untagged boundary faces.
//
// Faces are matched by a counting sort on the lower node index, so building
// is linear in the number of cell edges. The input slices are kept, not
// copied.
func Build(in Input) (*Mesh, error) {
	nn := int32(len(in.Nodes))
	nc := len(in.CellStart) - 1
	if nc < 0 {
		return nil, fmt.Errorf("mesh: CellStart is empty; it needs one entry more than the cell count")
	}
	if len(in.Tags) > 32767 {
		return nil, fmt.Errorf("mesh: %d boundary tags; at most 32767 are allowed", len(in.Tags))
	}
	if in.CellStart[0] != 0 || int(in.CellStart[nc]) != len(in.CellNodes) {
		return nil, fmt.Errorf("mesh: CellStart must run from 0 to len(CellNodes)=%d, got %d..%d", len(in.CellNodes), in.CellStart[0], in.CellStart[nc])
	}
	nh := len(in.CellNodes)
	// Half-edge h runs from node CellNodes[h] to node nextOf[h], in cell
	// halfCell[h]. Every loop below runs on consecutive ranges side by
	// side (see inParts) and gives what one pass in order gives: counts
	// are kept per range and offset by the ranges before, and an error is
	// the one the lowest range finds first.
	halfCell := hugepage.Make[int32](nh)
	nextOf := hugepage.Make[int32](nh)
	// sign is the sign of each cell's signed area: −1 for a cell turned
	// the wrong way, 0 for one of no area.
	sign := hugepage.Make[int8](nc)
	cellParts := partBounds(nc)
	cellErr := make([]error, len(cellParts)-1)
	inParts(cellParts, func(k, clo, chi int) {
		for c := clo; c < chi; c++ {
			s, e := in.CellStart[c], in.CellStart[c+1]
			if e-s < 3 {
				cellErr[k] = fmt.Errorf("mesh: cell %d has %d nodes; a cell needs at least 3", c, e-s)
				return
			}
			for h := s; h < e; h++ {
				if v := in.CellNodes[h]; v < 0 || v >= nn {
					cellErr[k] = fmt.Errorf("mesh: cell %d refers to node %d; nodes run from 0 to %d", c, v, nn-1)
					return
				}
				halfCell[h] = int32(c)
				if h+1 < e {
					nextOf[h] = in.CellNodes[h+1]
				} else {
					nextOf[h] = in.CellNodes[s]
				}
			}
			switch a, _ := PolygonAreaCentroid(in.Nodes, in.CellNodes[s:e]); {
			case a < 0:
				sign[c] = -1
			case a > 0:
				sign[c] = 1
			}
		}
	})
	if err := firstError(cellErr); err != nil {
		return nil, err
	}
	lohi := func(h int32) (int32, int32) {
		a, b := in.CellNodes[h], nextOf[h]
		return min(a, b), max(a, b)
	}

	// Bucket half-edges by their lower node (counting sort, stable in h),
	// each entry with its upper node, so that matching reads the buckets
	// alone. Each range of half-edges counts into its own histogram; the
	// histograms then become each range's fill positions. They take no more
	// memory than one half-edge array: at most nh/nn ranges.
	hParts := partBoundsUpTo(nh, min(runtime.GOMAXPROCS(0), nh/max(int(nn), 1)))
	hist := make([][]int32, len(hParts)-1)
	inParts(hParts, func(k, hlo, hhi int) {
		n := make([]int32, nn)
		for h := int32(hlo); h < int32(hhi); h++ {
			lo, _ := lohi(h)
			n[lo]++
		}
		hist[k] = n
	})
	start := rangeOffsets(hist, int(nn))
	bucket := hugepage.Make[halfEdge](nh)
	inParts(hParts, func(k, hlo, hhi int) {
		fill := hist[k]
		for h := int32(hlo); h < int32(hhi); h++ {
			lo, hi := lohi(h)
			bucket[fill[lo]] = halfEdge{h, hi}
			fill[lo]++
		}
	})
	hist = nil

	// twin[h] is the other half-edge of h's face, -1 on the boundary; the
	// first half-edge (lowest h, so lowest cell) of each face owns it,
	// unless both run the same way and only the other's cell has positive
	// area.
	twin := hugepage.Make[int32](nh)
	isOwner := hugepage.Make[bool](nh)
	nodeParts := partBounds(int(nn))
	matchErr := make([]error, len(nodeParts)-1)
	inParts(nodeParts, func(k, nlo, nhi int) {
		for lo := int32(nlo); lo < int32(nhi); lo++ {
			b := bucket[start[lo]:start[lo+1]]
			for x, e := range b {
				h, hi := e.h, e.hi
				if h < 0 {
					continue
				}
				twin[h] = -1
				isOwner[h] = true
				for y := x + 1; y < len(b); y++ {
					g := b[y].h
					if g < 0 || b[y].hi != hi {
						continue
					}
					if twin[h] >= 0 {
						matchErr[k] = fmt.Errorf("mesh: edge between nodes %d and %d is shared by cells %d, %d and %d; an edge may belong to at most two cells",
							lo, hi, halfCell[h], halfCell[twin[h]], halfCell[g])
						return
					}
					twin[h] = g
					twin[g] = h
					b[y].h = -1
					if in.CellNodes[h] == in.CellNodes[g] && sign[halfCell[h]] < 0 && sign[halfCell[g]] > 0 {
						isOwner[h], isOwner[g] = false, true
					}
				}
			}
		}
	})
	if err := firstError(matchErr); err != nil {
		return nil, err
	}

	// Tagged edges, bucketed the same way.
	tagOf := hugepage.Make[int16](nh)
	for h := range tagOf {
		tagOf[h] = -1
	}
	if len(in.Edges) > 0 {
		for i, e := range in.Edges {
			if e.A < 0 || e.A >= nn || e.B < 0 || e.B >= nn {
				return nil, fmt.Errorf("mesh: tagged edge %d refers to node %d-%d; nodes run from 0 to %d", i, e.A, e.B, nn-1)
			}
			if e.Tag < 0 || int(e.Tag) >= len(in.Tags) {
				return nil, fmt.Errorf("mesh: tagged edge %d (nodes %d-%d) has tag index %d; there are %d tags", i, e.A, e.B, e.Tag, len(in.Tags))
			}
			lo, hi := min(e.A, e.B), max(e.A, e.B)
			found := false
			for _, be := range bucket[start[lo]:start[lo+1]] {
				h := be.h
				if h < 0 {
					continue
				}
				if be.hi == hi {
					if twin[h] >= 0 {
						return nil, fmt.Errorf("mesh: edge %d-%d tagged %q is an interior face (cells %d and %d), not a boundary face",
							e.A, e.B, in.Tags[e.Tag], halfCell[h], halfCell[twin[h]])
					}
					if tagOf[h] >= 0 && tagOf[h] != e.Tag {
						return nil, fmt.Errorf("mesh: boundary edge %d-%d is tagged both %q and %q", e.A, e.B, in.Tags[tagOf[h]], in.Tags[e.Tag])
					}
					tagOf[h] = e.Tag
					found = true
					break
				}
			}
			if !found {
				return nil, fmt.Errorf("mesh: edge %d-%d tagged %q is not an edge of any cell", e.A, e.B, in.Tags[e.Tag])
			}
		}
	}
	bucket, start = nil, nil

	// Count faces per group: interior, each tag, untagged; each range of
	// half-edges counts its own, so that it can place its faces.
	ng := len(in.Tags) + 2
	group := func(h int32) int {
		if twin[h] >= 0 {
			return 0
		}
		if t := tagOf[h]; t >= 0 {
			return 1 + int(t)
		}
		return ng - 1
	}
	counts := make([][]int32, len(hParts)-1)
	inParts(hParts, func(k, hlo, hhi int) {
		n := make([]int32, ng)
		for h := int32(hlo); h < int32(hhi); h++ {
			if isOwner[h] {
				n[group(h)]++
			}
		}
		counts[k] = n
	})
	// count[g] is where group g begins; counts[k][g] becomes where range k
	// places its first face of group g.
	count := rangeOffsets(counts, ng)
	nf := int(count[ng])
	m := &Mesh{
		Nodes:       in.Nodes,
		CellStart:   in.CellStart,
		CellNodes:   in.CellNodes,
		FaceNodes:   hugepage.Make[[2]int32](nf),
		Owner:       hugepage.Make[int32](nf),
		Neighbour:   hugepage.Make[int32](nf),
		NumInterior: int(count[1]),
		Tags:        in.Tags,
		FaceTag:     hugepage.Make[int16](nf),
		TagStart:    make([]int32, len(in.Tags)+1),
		Blocks:      in.Blocks,
		Interfaces:  in.Interfaces,
	}
	copy(m.TagStart, count[1:len(in.Tags)+2])
	inParts(hParts, func(k, hlo, hhi int) {
		pos := counts[k]
		for h := int32(hlo); h < int32(hhi); h++ {
			if !isOwner[h] {
				continue
			}
			gi := group(h)
			f := pos[gi]
			pos[gi]++
			m.FaceNodes[f] = [2]int32{in.CellNodes[h], nextOf[h]}
			m.Owner[f] = halfCell[h]
			if t := twin[h]; t >= 0 {
				m.Neighbour[f] = halfCell[t]
			} else {
				m.Neighbour[f] = -1
				if sign[halfCell[h]] < 0 {
					m.FaceNodes[f] = [2]int32{nextOf[h], in.CellNodes[h]}
				}
			}
			m.FaceTag[f] = tagOf[h]
		}
	})
	m.Geo = ComputeGeometry(m)
	return m, nil
}

// halfEdge is a bucket entry of Build: half-edge h and its upper node. A
// matched entry gets h = −1.
type halfEdge struct{ h, hi int32 }

// rangeOffsets turns per-range counts of m slots (counts[k][i]: how many
// items range k puts in slot i) into where each range puts its first item
// of each slot, slots one after another and, within a slot, ranges in
// order, as one pass in order would place them; it returns the slot
// starts, of length m+1.
func rangeOffsets(counts [][]int32, m int) []int32 {
	start := make([]int32, m+1)
	for i := range m {
		pos := start[i]
		for _, n := range counts {
			c := n[i]
			n[i] = pos
			pos += c
		}
		start[i+1] = pos
	}
	return start
}

// firstError returns the first non-nil error of the ranges, in range
// order, or nil.
func firstError(errs []error) error {
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// TurnRound reverses the node order of every cell of in (after its first
// node: a, b, c, d becomes a, d, c, b) when more of its cells of non-zero
// area run clockwise (negative signed area) than counter-clockwise, and
// returns a note saying so, sense (a phrase such as "run clockwise seen
// from +z (negative signed area)") saying how the clockwise cells ran; ""
// when it left in as it was. Readers call it before Build.
//
// A file whose cells are listed clockwise follows a convention of its own
// and is no defect; where a few cells disagree with it, they are the odd
// ones, and turning the mesh round makes them the ones the checks name
// (as cells of negative area, see Build) rather than the many that follow
// the file's convention. The majority is by count, not by area: the
// report counts and names cells, and a count is not swayed by a few large
// far-field cells against many small ones near a wall. A tie leaves the
// mesh as the file lists it. Cells are tested and turned in ranges side
// by side; nothing is allocated but the per-range counts.
func TurnRound(in *Input, sense string) string {
	nc := len(in.CellStart) - 1
	if nc <= 0 {
		return ""
	}
	parts := partBounds(nc)
	neg, pos := make([]int, len(parts)-1), make([]int, len(parts)-1)
	inParts(parts, func(k, lo, hi int) {
		for c := lo; c < hi; c++ {
			switch a, _ := PolygonAreaCentroid(in.Nodes, in.CellNodes[in.CellStart[c]:in.CellStart[c+1]]); {
			case a < 0:
				neg[k]++
			case a > 0:
				pos[k]++
			}
		}
	})
	cw, ccw := 0, 0
	for k := range neg {
		cw, ccw = cw+neg[k], ccw+pos[k]
	}
	if cw <= ccw {
		return ""
	}
	inParts(parts, func(_, lo, hi int) {
		for c := lo; c < hi; c++ {
			cell := in.CellNodes[in.CellStart[c]:in.CellStart[c+1]]
			for i, j := 1, len(cell)-1; i < j; i, j = i+1, j-1 {
				cell[i], cell[j] = cell[j], cell[i]
			}
		}
	})
	zero := nc - cw - ccw
	switch {
	case ccw == 0 && zero == 0:
		return fmt.Sprintf("all %d cells %s as the file lists them; their node order is reversed", nc, sense)
	case ccw == 0:
		return fmt.Sprintf("all %d cells of non-zero area (%d have none) %s as the file lists them; the node order of every cell is reversed", cw, zero, sense)
	}
	note := fmt.Sprintf("%d of the %d cells %s as the file lists them, %d the other way", cw, nc, sense, ccw)
	if zero > 0 {
		note += fmt.Sprintf(" and %d have zero area", zero)
	}
	return note + fmt.Sprintf(": the mesh is read turned round (every cell's node order reversed), so the %d that ran the other way are the cells the checks name", ccw)
}
