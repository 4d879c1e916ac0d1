package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"

	"cvdeck/mesh"
)

// sideEdge is edge k (between side nodes k and k+1) of side s of block b.
type sideEdge struct {
	b int
	s mesh.Side
	k int
}

// sideLen is the number of nodes along side s of blk.
func sideLen(blk *mesh.Block, s mesh.Side) int {
	if s == mesh.South || s == mesh.North {
		return blk.NI
	}
	return blk.NJ
}

// sideIJ is the 0-based (i, j) of node p along side s, counted in the
// block's increasing i or j.
func sideIJ(blk *mesh.Block, s mesh.Side, p int) (int, int) {
	switch s {
	case mesh.South:
		return p, 0
	case mesh.East:
		return blk.NI - 1, p
	case mesh.North:
		return p, blk.NJ - 1
	default:
		return 0, p
	}
}

func sideNode(blk *mesh.Block, s mesh.Side, p int) int32 {
	i, j := sideIJ(blk, s, p)
	return blk.Node[j*blk.NI+i]
}

// sideAxis is the index axis (1 for i, 2 for j) along side s, and the
// normal axis.
func sideAxis(s mesh.Side) (along, normal int) {
	if s == mesh.South || s == mesh.North {
		return 1, 2
	}
	return 2, 1
}

// outward is the sign of the index direction that leaves the block through
// side s.
func outward(s mesh.Side) int {
	if s == mesh.South || s == mesh.West {
		return -1
	}
	return 1
}

func edgeKey(a, b int32) [2]int32 { return [2]int32{min(a, b), max(a, b)} }

// validateBlocks checks the structured view against the mesh (before a
// structured write): node maps
// in range, and every mesh cell in exactly one block, cell FirstCell +
// j*(NI-1) + i of a block having the corners of block cell (i, j) as its
// nodes, so zone coordinates and cell fields describe the same cells.
func validateBlocks(m *mesh.Mesh) error {
	owner := make([]int32, m.NumCells())
	for c := range owner {
		owner[c] = -1
	}
	for b := range m.Blocks {
		blk := &m.Blocks[b]
		if blk.NI < 2 || blk.NJ < 2 {
			return fmt.Errorf("block %d (%s) is %d×%d nodes; a block needs at least 2×2", b, blk.Name, blk.NI, blk.NJ)
		}
		if len(blk.Node) != blk.NI*blk.NJ {
			return fmt.Errorf("block %d (%s) maps %d nodes; %d×%d needs %d", b, blk.Name, len(blk.Node), blk.NI, blk.NJ, blk.NI*blk.NJ)
		}
		for k, v := range blk.Node {
			if v < 0 || int(v) >= len(m.Nodes) {
				return fmt.Errorf("block %d (%s) node (%d, %d) is mesh node %d; nodes run from 0 to %d", b, blk.Name, k%blk.NI, k/blk.NI, v, len(m.Nodes)-1)
			}
		}
		nc := (blk.NI - 1) * (blk.NJ - 1)
		if blk.FirstCell < 0 || int(blk.FirstCell)+nc > m.NumCells() {
			return fmt.Errorf("block %d (%s) cells %d..%d lie outside the mesh's %d cells", b, blk.Name, blk.FirstCell, int(blk.FirstCell)+nc-1, m.NumCells())
		}
		for j := 0; j+1 < blk.NJ; j++ {
			for i := 0; i+1 < blk.NI; i++ {
				c := int(blk.FirstCell) + j*(blk.NI-1) + i
				if owner[c] >= 0 {
					return fmt.Errorf("mesh cell %d is in block %d (%s) and in block %d (%s)", c, owner[c], m.Blocks[owner[c]].Name, b, blk.Name)
				}
				owner[c] = int32(b)
				corners := [4]int32{blk.Node[j*blk.NI+i], blk.Node[j*blk.NI+i+1], blk.Node[(j+1)*blk.NI+i+1], blk.Node[(j+1)*blk.NI+i]}
				cell := m.Cell(c)
				for _, v := range corners {
					found := false
					for _, u := range cell {
						found = found || u == v
					}
					if !found {
						return fmt.Errorf("block %d (%s) cell (%d, %d) is mesh cell %d, which does not have the block's corner node %d", b, blk.Name, i, j, c, v)
					}
				}
				if len(cell) > 4 {
					return fmt.Errorf("block %d (%s) cell (%d, %d) is mesh cell %d, which has %d nodes; a block cell has at most 4", b, blk.Name, i, j, c, len(cell))
				}
			}
		}
	}
	for c, b := range owner {
		if b < 0 {
			return fmt.Errorf("mesh cell %d is in no block; a structured export needs every cell in a block", c)
		}
	}
	return nil
}

// zoneNames are the zone names: "Mesh" for an unstructured mesh, and for
// a structured one the block name if it is a valid CGNS name used by no
// other zone, family (tag) or standard base child, otherwise "Block_<n>".
func zoneNames(m *mesh.Mesh, structured bool) []string {
	used := map[string]bool{}
	for _, t := range m.Tags {
		used[t] = true
	}
	free := func(n string) string {
		for used[n] || reservedBaseChild[n] {
			n += "_"
		}
		used[n] = true
		return n
	}
	if !structured {
		return []string{free(unstructuredZone)}
	}
	names := make([]string, len(m.Blocks))
	for b, blk := range m.Blocks {
		n := blk.Name
		if checkName("", n) != nil || used[n] || reservedBaseChild[n] {
			n = fmt.Sprintf("Block_%d", b+1)
		}
		names[b] = free(n)
	}
	return names
}

// structured writes one structured zone per block. Zone coordinates are
// the block's nodes, i fastest. Every run of block-side edges shared with
// a side of another (or the same) block becomes a GridConnectivity1to1_t
// with its PointRange, PointRangeDonor and Transform (SIDS 8.4); joins are
// found from shared mesh nodes, so they include the wake cut of a C-type
// block as well as the joins listed in Mesh.Interfaces, and each is
// written from both sides. Periodic pairs of whole block sides become
// periodic 1-to-1 joins (see structuredPeriodic and blockPeriodic). Every
// other run of boundary edges of one tag along a side becomes a BC with a
// Vertex PointRange, FamilyName the tag and the tag's values, if any, as a
// BCDataSet (see (*writer).bcDataSet).
func (w *writer) structured(d *Deck, pl *plan) error {
	m, pjoins := d.Mesh, pl.joins
	names := zoneNames(m, true)
	bface := make(map[[2]int32]int32, m.NumBoundary())
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		bface[edgeKey(m.FaceNodes[f][0], m.FaceNodes[f][1])] = int32(f)
	}
	// Every block-side edge, keyed by its nodes, to find joins.
	onSide := map[[2]int32][]sideEdge{}
	for b := range m.Blocks {
		blk := &m.Blocks[b]
		for s := mesh.South; s <= mesh.West; s++ {
			for k := 0; k+1 < sideLen(blk, s); k++ {
				key := edgeKey(sideNode(blk, s, k), sideNode(blk, s, k+1))
				if _, ok := bface[key]; !ok {
					onSide[key] = append(onSide[key], sideEdge{b, s, k})
				}
			}
		}
	}
	zs := make([]C.int, len(m.Blocks))
	for b := range m.Blocks {
		blk := &m.Blocks[b]
		z, err := w.zone(names[b], C.Structured, []int32{int32(blk.NI), int32(blk.NJ), int32(blk.NI - 1), int32(blk.NJ - 1), 0, 0})
		if err != nil {
			return err
		}
		zs[b] = z
		x, y := make([]float64, len(blk.Node)), make([]float64, len(blk.Node))
		for i, v := range blk.Node {
			x[i], y[i] = m.Nodes[v][0], m.Nodes[v][1]
		}
		if err := w.coords(z, names[b], x, y); err != nil {
			return err
		}
	}
	for b := range m.Blocks {
		if err := w.blockJoins(m, b, zs[b], names, onSide); err != nil {
			return err
		}
		if err := w.blockPeriodic(b, zs[b], names, pjoins); err != nil {
			return err
		}
	}
	for b := range m.Blocks {
		if err := w.blockBCs(m, b, zs[b], names[b], bface, pl); err != nil {
			return err
		}
	}
	for b := range m.Blocks {
		blk := &m.Blocks[b]
		lo, hi := int(blk.FirstCell), int(blk.FirstCell)+(blk.NI-1)*(blk.NJ-1)
		if err := w.cellFields(zs[b], names[b], d, []int32{int32(blk.NI - 1), int32(blk.NJ - 1)}, func(f int) []float64 { return d.CellFields[f].Values[lo:hi] }); err != nil {
			return err
		}
	}
	return nil
}

// blockJoins writes the 1-to-1 joins of block b.
func (w *writer) blockJoins(m *mesh.Mesh, b int, z C.int, names []string, onSide map[[2]int32][]sideEdge) error {
	blk := &m.Blocks[b]
	n := 0
	for s := mesh.South; s <= mesh.West; s++ {
		nk := sideLen(blk, s) - 1
		for k := 0; k < nk; {
			p, same, ok := partner(m, onSide, sideEdge{b, s, k})
			if !ok {
				k++
				continue
			}
			k1 := k + 1 // run is edges [k, k1)
			for ; k1 < nk; k1++ {
				q, qsame, ok := partner(m, onSide, sideEdge{b, s, k1})
				step := 1
				if !same {
					step = -1
				}
				if !ok || q.b != p.b || q.s != p.s || qsame != same || q.k != p.k+step*(k1-k) {
					break
				}
			}
			// Donor node positions matching A's nodes k and k1.
			dBeg, dEnd := p.k, p.k+(k1-k)
			if !same {
				dBeg, dEnd = p.k+1, p.k+1-(k1-k)
			}
			dblk := &m.Blocks[p.b]
			ai, aj := sideIJ(blk, s, k)
			bi, bj := sideIJ(blk, s, k1)
			di, dj := sideIJ(dblk, p.s, dBeg)
			ei, ej := sideIJ(dblk, p.s, dEnd)
			rng := []int32{int32(ai + 1), int32(aj + 1), int32(bi + 1), int32(bj + 1)}
			drng := []int32{int32(di + 1), int32(dj + 1), int32(ei + 1), int32(ej + 1)}
			n++
			if _, err := w.join(z, names[b], fmt.Sprintf("Join_%d", n), names[p.b], rng, drng, transform(s, p.s, same)); err != nil {
				return err
			}
			k = k1
		}
	}
	return nil
}

// partner is the other block-side edge with the same nodes as e, and
// whether its nodes run in the same direction.
func partner(m *mesh.Mesh, onSide map[[2]int32][]sideEdge, e sideEdge) (sideEdge, bool, bool) {
	blk := &m.Blocks[e.b]
	a, c := sideNode(blk, e.s, e.k), sideNode(blk, e.s, e.k+1)
	for _, o := range onSide[edgeKey(a, c)] {
		if o == e {
			continue
		}
		return o, sideNode(&m.Blocks[o.b], o.s, o.k) == a, true
	}
	return sideEdge{}, false, false
}

// join writes one GridConnectivity1to1_t (cg_1to1_write) and returns its
// index in the zone.
func (w *writer) join(z C.int, zone, name, donor string, rng, drng []int32, tr [2]int32) (C.int, error) {
	n, dn := cstr(name), cstr(donor)
	defer free(n)
	defer free(dn)
	path := "/" + w.base + "/" + zone + "/ZoneGridConnectivity/" + name
	t := [2]C.int{C.int(tr[0]), C.int(tr[1])}
	var i C.int
	if err := libError(C.cg_1to1_write(w.fn, w.b, z, n, dn, ip(rng), ip(drng), &t[0], &i), "write 1-to-1 join "+path); err != nil {
		return 0, err
	}
	w.sum.text(path, donor)
	w.sum.ints(path+"/PointRange", rng)
	w.sum.ints(path+"/PointRangeDonor", drng)
	w.sum.ints(path+"/Transform", tr[:])
	return i, nil
}

// blockBCs writes the point-range BCs of block b.
func (w *writer) blockBCs(m *mesh.Mesh, b int, z C.int, zone string, bface map[[2]int32]int32, pl *plan) error {
	blk, bcTypes := &m.Blocks[b], pl.bcTypes
	zp := "/" + w.base + "/" + zone
	used := map[string]bool{}
	tagAt := func(s mesh.Side, k int) int16 {
		f, ok := bface[edgeKey(sideNode(blk, s, k), sideNode(blk, s, k+1))]
		if !ok {
			return -1
		}
		return m.FaceTag[f]
	}
	for s := mesh.South; s <= mesh.West; s++ {
		nk := sideLen(blk, s) - 1
		for k := 0; k < nk; {
			t := tagAt(s, k)
			if t < 0 || bcTypes[t] == periodicTag {
				k++
				continue
			}
			k1 := k + 1
			for k1 < nk && tagAt(s, k1) == t {
				k1++
			}
			ai, aj := sideIJ(blk, s, k)
			bi, bj := sideIJ(blk, s, k1)
			// BC names are unique in the zone: the tag, then tag_2, tag_3...
			tag := m.Tags[t]
			name := tag
			for n := 2; used[name]; n++ {
				suffix := fmt.Sprintf("_%d", n)
				name = tag[:min(len(tag), maxNameLen-len(suffix))] + suffix
			}
			used[name] = true
			rng := []int32{int32(ai + 1), int32(aj + 1), int32(bi + 1), int32(bj + 1)}
			if err := w.boco(z, zp, name, tag, bcTypes[t], pl.bcData[t], C.PointRange, rng, C.Vertex); err != nil {
				return err
			}
			k = k1
		}
	}
	return nil
}
