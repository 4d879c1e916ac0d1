package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"math"

	"cvdeck/mesh"
)

// Periodic is a periodic pair of boundary tags: face Pairs[k][0] of tag A,
// moved by Translation, lands on face Pairs[k][1] of tag B. The deck
// package fills it from the boundary conditions' verified pairing
// (bc.PeriodicMatch), whose Pairs have this meaning and order.
//
// A periodic pair is written as connectivity, as the CGNS standard (SIDS,
// GridConnectivityProperty_t/Periodic_t) describes periodic interfaces,
// not as boundary conditions: its tags take no BC entry in Deck.BCs.
type Periodic struct {
	// A and B are the two boundary tags; they must differ.
	A, B string
	// Translation in metres moves A's faces onto B's. The library stores
	// Periodic_t values in single precision (cg_conn_periodic_write and
	// cg_1to1_periodic_write take float), so it is written rounded to
	// float32, and read back as such.
	Translation [2]float64
	// Pairs are (face of A, face of B) mesh face indices, one per face of
	// A and one per face of B.
	Pairs [][2]int32
}

// periodicTag marks, in the BCType list of the mesh tags, a tag that is
// one side of a periodic pair: it gets a Family_t without FamilyBC and no
// BC_t, its faces being written as connectivity.
const periodicTag = C.BCTypeNull

// validatePeriodic checks the periodic pairs against the mesh and the BCs
// (given by tag) and marks the periodic tags in inPair.
func (d *Deck) validatePeriodic(byTag map[string]string, inPair map[string]int) error {
	m := d.Mesh
	for i, p := range d.Periodic {
		where := fmt.Sprintf("periodic pair %d (%q, %q)", i, p.A, p.B)
		if p.A == p.B {
			return fmt.Errorf("cgns: %s pairs a tag with itself; a periodic pair joins two different boundary tags", where)
		}
		ranges := [2][2]int{}
		for s, tag := range []string{p.A, p.B} {
			lo, hi, ok := m.TagRange(tag)
			if !ok {
				return fmt.Errorf("cgns: %s: tag %q is not a boundary tag of the mesh; mesh tags are %v", where, tag, m.Tags)
			}
			if j, dup := inPair[tag]; dup {
				return fmt.Errorf("cgns: %s: tag %q is already in periodic pair %d; a tag is in at most one pair", where, tag, j)
			}
			if _, ok := byTag[tag]; ok {
				return fmt.Errorf("cgns: %s: tag %q also has a boundary condition; a periodic tag is written as connectivity and takes no BC entry", where, tag)
			}
			inPair[tag] = i
			ranges[s] = [2]int{lo, hi}
		}
		t := p.Translation
		if math.IsNaN(t[0]) || math.IsNaN(t[1]) || math.IsInf(t[0], 0) || math.IsInf(t[1], 0) || t == ([2]float64{}) {
			return fmt.Errorf("cgns: %s: translation (%g, %g) must be finite and not zero", where, t[0], t[1])
		}
		na, nb := ranges[0][1]-ranges[0][0], ranges[1][1]-ranges[1][0]
		if na == 0 || nb == 0 {
			return fmt.Errorf("cgns: %s: tag %q has %d faces and tag %q has %d; a periodic pair needs faces on both sides", where, p.A, na, p.B, nb)
		}
		if len(p.Pairs) != na || len(p.Pairs) != nb {
			return fmt.Errorf("cgns: %s has %d face pairs; tag %q has %d faces and tag %q has %d, and every face needs exactly one partner", where, len(p.Pairs), p.A, na, p.B, nb)
		}
		used := make(map[int32]int, 2*len(p.Pairs))
		for k, fp := range p.Pairs {
			for s, f := range fp {
				tag, lo, hi := p.A, ranges[s][0], ranges[s][1]
				if s == 1 {
					tag = p.B
				}
				if f < int32(lo) || f >= int32(hi) {
					return fmt.Errorf("cgns: %s: pair %d: face %d is not a face of tag %q, whose faces are %d..%d", where, k, f, tag, lo, hi-1)
				}
				if j, dup := used[f]; dup {
					return fmt.Errorf("cgns: %s: pair %d: face %d of tag %q is already in pair %d; faces pair one to one", where, k, f, tag, j)
				}
				used[f] = k
			}
			// A gross check that the pairs are those of this mesh: the
			// moved midpoint of A's face lies within half a face length
			// of B's. The tolerance of the match itself is the boundary
			// conditions' business.
			a, b := fp[0], fp[1]
			dx := m.Geo.FaceMid[a][0] + t[0] - m.Geo.FaceMid[b][0]
			dy := m.Geo.FaceMid[a][1] + t[1] - m.Geo.FaceMid[b][1]
			if h := 0.5 * max(m.Geo.FaceLength[a], m.Geo.FaceLength[b]); math.Hypot(dx, dy) > h {
				return fmt.Errorf("cgns: %s: pair %d: face %d of %q moved by (%g, %g) lands %g m from face %d of %q, more than half a face length (%g m); the pairs do not match this mesh", where, k, a, p.A, t[0], t[1], math.Hypot(dx, dy), b, p.B, h)
			}
		}
	}
	return nil
}

// negate is −t, with +0 rather than −0 for a zero component.
func negate(t [2]float64) [2]float64 { return [2]float64{0 - t[0], 0 - t[1]} }

// float32s rounds a translation as the library stores it.
func float32s(t [2]float64) [2]C.float { return [2]C.float{C.float(t[0]), C.float(t[1])} }

// periodicProperty writes the Periodic_t of a connection (RotationCenter
// and RotationAngle zero, the translation t) and feeds its values to the
// hash as stored (single precision). write is cg_conn_periodic_write or
// cg_1to1_periodic_write bound to the connection.
func (w *writer) periodicProperty(path string, t [2]float64, write func(centre, angle, tr *C.float) C.int) error {
	var centre, angle [2]C.float
	tr := float32s(t)
	if err := libError(write(&centre[0], &angle[0], &tr[0]), "write Periodic_t of "+path); err != nil {
		return err
	}
	pp := path + "/GridConnectivityProperty/Periodic"
	w.sum.floats(pp+"/RotationCenter", []float64{0, 0})
	w.sum.floats(pp+"/RotationAngle", []float64{0, 0})
	w.sum.floats(pp+"/Translation", []float64{float64(tr[0]), float64(tr[1])})
	for _, a := range []struct {
		name string
		e    [5]float64
	}{{"RotationCenter", expLength}, {"RotationAngle", expAngle}, {"Translation", expLength}} {
		if err := w.exponents(pp+"/"+a.name, a.e); err != nil {
			return err
		}
	}
	return nil
}

// unstructuredPeriodic writes each periodic pair of an unstructured zone
// as two GridConnectivity_t of type Abutting1to1, one from each side,
// each naming the zone itself as donor, at FaceCenter (cg_conn_write of
// this library version refuses EdgeCenter, the face location its BCs
// take; cgnscheck accepts FaceCenter here): the connection named after
// tag A has as PointList the BAR_2 element numbers of A's faces in pair order and as PointListDonor those
// of the matching faces of B, with Periodic_t Translation t; the one named
// after B has B's faces, A's as donor, and −t. Each has its tag
// descriptor. nc is the number of cells (face f is element nc+1+f).
func (w *writer) unstructuredPeriodic(z C.int, zone string, nc int, ps []Periodic) error {
	for _, p := range ps {
		a, b := make([]int32, len(p.Pairs)), make([]int32, len(p.Pairs))
		for k, fp := range p.Pairs {
			a[k], b[k] = int32(nc+1)+fp[0], int32(nc+1)+fp[1]
		}
		neg := negate(p.Translation)
		if err := w.conn(z, zone, p.A, a, b, p.Translation); err != nil {
			return err
		}
		if err := w.conn(z, zone, p.B, b, a, neg); err != nil {
			return err
		}
	}
	return nil
}

// conn writes one periodic GridConnectivity_t of the zone to itself.
func (w *writer) conn(z C.int, zone, tag string, pts, donor []int32, t [2]float64) error {
	n, dn := cstr(tag), cstr(zone)
	defer free(n)
	defer free(dn)
	path := "/" + w.base + "/" + zone + "/ZoneGridConnectivity/" + tag
	var ci C.int
	if err := libError(C.cg_conn_write(w.fn, w.b, z, n, C.FaceCenter, C.Abutting1to1, C.PointList, C.int(len(pts)), ip(pts),
		dn, C.Unstructured, C.PointListDonor, C.Integer, C.int(len(donor)), ip(donor), &ci), "write periodic connectivity "+path); err != nil {
		return err
	}
	w.sum.text(path, "Abutting1to1 FaceCenter "+zone)
	w.sum.ints(path+"/PointList", pts)
	w.sum.ints(path+"/PointListDonor", donor)
	err := w.periodicProperty(path, t, func(c, a, tr *C.float) C.int {
		return C.cg_conn_periodic_write(w.fn, w.b, z, ci, c, a, tr)
	})
	if err != nil {
		return err
	}
	return w.tagDescriptor(path, tag)
}

// tagDescriptorName is the Descriptor_t under a periodic connection that
// names its boundary tag. This library version (3.4) has no FamilyName
// under GridConnectivity_t or GridConnectivity1to1_t, and a structured
// zone may hold several periodic joins of one tag, so the tag cannot
// always be the connection's name.
const tagDescriptorName = "BoundaryTag"

// tagDescriptor writes the tag descriptor under the connection at path.
func (w *writer) tagDescriptor(path, tag string) error {
	if err := gopath(w.fn, path); err != nil {
		return err
	}
	n, v := cstr(tagDescriptorName), cstr(tag)
	defer free(n)
	defer free(v)
	w.sum.text(path+"/"+tagDescriptorName, tag)
	return libError(C.cg_descriptor_write(n, v), "write Descriptor "+tagDescriptorName+" at "+path)
}

// periodicJoin is one direction of a structured periodic join: the whole
// side of block a that carries tag, joined to the whole side of block b.
type periodicJoin struct {
	a, b      int
	tag       string
	rng, drng []int32
	tr        [2]int32
	t         [2]float64
}

// structuredPeriodic plans the 1-to-1 periodic joins of a structured deck:
// for each pair, in each direction, one join per block side its first tag
// covers. Every block side that a periodic tag touches must be covered
// whole, and the partners of its faces must be the whole side of one
// block, in order; anything else is an error naming the tags.
func structuredPeriodic(m *mesh.Mesh, ps []Periodic) ([]periodicJoin, error) {
	if len(ps) == 0 {
		return nil, nil
	}
	// The block side edge of every boundary face.
	at := make(map[int32]sideEdge, m.NumBoundary())
	faceOf := make(map[[2]int32]int32, m.NumBoundary())
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		faceOf[edgeKey(m.FaceNodes[f][0], m.FaceNodes[f][1])] = int32(f)
	}
	for b := range m.Blocks {
		blk := &m.Blocks[b]
		for s := mesh.South; s <= mesh.West; s++ {
			for k := 0; k+1 < sideLen(blk, s); k++ {
				if f, ok := faceOf[edgeKey(sideNode(blk, s, k), sideNode(blk, s, k+1))]; ok {
					if _, seen := at[f]; !seen {
						at[f] = sideEdge{b, s, k}
					}
				}
			}
		}
	}
	var out []periodicJoin
	for _, p := range ps {
		ab := make(map[int32]int32, len(p.Pairs))
		ba := make(map[int32]int32, len(p.Pairs))
		for _, fp := range p.Pairs {
			ab[fp[0]], ba[fp[1]] = fp[1], fp[0]
		}
		neg := negate(p.Translation)
		for _, dir := range []struct {
			from, to string
			partner  map[int32]int32
			t        [2]float64
		}{{p.A, p.B, ab, p.Translation}, {p.B, p.A, ba, neg}} {
			js, err := sideJoins(m, at, faceOf, dir.from, dir.to, dir.partner, dir.t)
			if err != nil {
				return nil, fmt.Errorf("periodic pair (%q, %q): %w", p.A, p.B, err)
			}
			out = append(out, js...)
		}
	}
	return out, nil
}

// sideJoins finds the joins from the block sides of tag from to their
// partners (see structuredPeriodic).
func sideJoins(m *mesh.Mesh, at map[int32]sideEdge, faceOf map[[2]int32]int32, from, to string, partner map[int32]int32, t [2]float64) ([]periodicJoin, error) {
	lo, hi, _ := m.TagRange(from)
	var out []periodicJoin
	done := map[[2]int]bool{}
	for f := int32(lo); f < int32(hi); f++ {
		e, ok := at[f]
		if !ok {
			return nil, fmt.Errorf("face %d of tag %q lies on no block side", f, from)
		}
		if done[[2]int{e.b, int(e.s)}] {
			continue
		}
		done[[2]int{e.b, int(e.s)}] = true
		blk := &m.Blocks[e.b]
		n := sideLen(blk, e.s) - 1
		var q0 sideEdge
		same := false
		for k := 0; k < n; k++ {
			g, ok := faceOf[edgeKey(sideNode(blk, e.s, k), sideNode(blk, e.s, k+1))]
			if !ok || g < int32(lo) || g >= int32(hi) {
				return nil, fmt.Errorf("tag %q covers only part of side %v of block %d (%s) (edge %d is not one of its faces); a structured periodic join needs whole block sides, or write the deck unstructured", from, e.s, e.b, blk.Name, k)
			}
			q := at[partner[g]]
			if k == 0 {
				q0 = q
				// The sides run the same way if A's first side node,
				// moved, is nearer the partner edge's first node.
				pb := &m.Blocks[q.b]
				a := m.Nodes[sideNode(blk, e.s, 0)]
				a[0], a[1] = a[0]+t[0], a[1]+t[1]
				d0, d1 := m.Nodes[sideNode(pb, q.s, q.k)], m.Nodes[sideNode(pb, q.s, q.k+1)]
				same = math.Hypot(a[0]-d0[0], a[1]-d0[1]) < math.Hypot(a[0]-d1[0], a[1]-d1[1])
				continue
			}
			step := k
			if !same {
				step = -k
			}
			if q.b != q0.b || q.s != q0.s || q.k != q0.k+step {
				return nil, fmt.Errorf("the partners of side %v of block %d (%s) of tag %q are not one side of one block in order (edge %d pairs with edge %d of side %v of block %d); a structured periodic join needs whole block sides, or write the deck unstructured", e.s, e.b, blk.Name, from, k, q.k, q.s, q.b)
			}
		}
		pb := &m.Blocks[q0.b]
		if sideLen(pb, q0.s)-1 != n {
			return nil, fmt.Errorf("side %v of block %d (%s) of tag %q pairs with part of side %v of block %d (%s) of tag %q; a structured periodic join needs whole block sides, or write the deck unstructured", e.s, e.b, blk.Name, from, q0.s, q0.b, pb.Name, to)
		}
		dBeg, dEnd := q0.k, q0.k+n
		if !same {
			dBeg, dEnd = q0.k+1, q0.k+1-n
		}
		ai, aj := sideIJ(blk, e.s, 0)
		bi, bj := sideIJ(blk, e.s, n)
		di, dj := sideIJ(pb, q0.s, dBeg)
		ei, ej := sideIJ(pb, q0.s, dEnd)
		j := periodicJoin{a: e.b, b: q0.b, tag: from, t: t,
			rng:  []int32{int32(ai + 1), int32(aj + 1), int32(bi + 1), int32(bj + 1)},
			drng: []int32{int32(di + 1), int32(dj + 1), int32(ei + 1), int32(ej + 1)},
		}
		j.tr = transform(e.s, q0.s, same)
		out = append(out, j)
	}
	return out, nil
}

// transform is the SIDS 1-to-1 Transform from side s of one block to side
// ds of its donor, the sides running the same way or not: the index along
// s maps to the index along ds (negated if reversed), and leaving through
// s maps to entering through ds.
func transform(s, ds mesh.Side, same bool) [2]int32 {
	var tr [2]int32
	aa, an := sideAxis(s)
	ba, bn := sideAxis(ds)
	sign := int32(1)
	if !same {
		sign = -1
	}
	tr[aa-1] = sign * int32(ba)
	tr[an-1] = int32(outward(s)*-outward(ds)) * int32(bn)
	return tr
}

// blockPeriodic writes the periodic joins of block b, named Periodic_1,
// Periodic_2, ... in the zone, each a GridConnectivity1to1_t with its
// Periodic_t and its tag descriptor.
func (w *writer) blockPeriodic(b int, z C.int, names []string, joins []periodicJoin) error {
	n := 0
	for _, j := range joins {
		if j.a != b {
			continue
		}
		n++
		name := fmt.Sprintf("Periodic_%d", n)
		path := "/" + w.base + "/" + names[b] + "/ZoneGridConnectivity/" + name
		ci, err := w.join(z, names[b], name, names[j.b], j.rng, j.drng, j.tr)
		if err != nil {
			return err
		}
		err = w.periodicProperty(path, j.t, func(c, a, tr *C.float) C.int {
			return C.cg_1to1_periodic_write(w.fn, w.b, z, ci, c, a, tr)
		})
		if err != nil {
			return err
		}
		if err := w.tagDescriptor(path, j.tag); err != nil {
			return err
		}
	}
	return nil
}
