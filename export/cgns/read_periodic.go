package cgns

/*
#include <stdlib.h>
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"math"
	"sort"
	"unsafe"

	"cvdeck/mesh"
)

// taggedEdges are the boundary edges (0-based mesh node pairs) a BC or a
// periodic connection gives one tag.
type taggedEdges struct {
	tag   string
	edges [][2]int32
}

// periodicFound is one periodic connection as read: its faces and their
// donor faces, as mesh node pairs, and its translation. A connection
// cvdeck cannot turn into face pairs (a rotation, a vertex point set, a
// donor in another zone) keeps the reason in unsupported: Read ignores
// it, ReadDeck reports it.
type periodicFound struct {
	path        string
	t           [2]float64
	faces       [][2][2]int32 // (face, donor face)
	unsupported string
}

// connInfo is what cg_conn_info says of one GridConnectivity_t.
type connInfo struct {
	name, donor string
	loc         C.GridLocation_t
	typ         C.GridConnectivityType_t
	set, dset   C.PointSetType_t
	npnts, nd   C.int
}

// connInfo reads the description of GridConnectivity_t i of zone z.
func (r *reader) connInfo(z, i C.int, zp string) (connInfo, error) {
	var (
		ci          connInfo
		name, donor [maxNameLen + 1]C.char
		dzt         C.ZoneType_t
		ddt         C.DataType_t
	)
	if err := libError(C.cg_conn_info(r.fn, r.b, z, i, &name[0], &ci.loc, &ci.typ, &ci.set, &ci.npnts, &donor[0], &dzt, &ci.dset, &ddt, &ci.nd), fmt.Sprintf("read GridConnectivity_t %d of %s", i, zp)); err != nil {
		return ci, err
	}
	ci.name, ci.donor = C.GoString(&name[0]), C.GoString(&donor[0])
	return ci, nil
}

// periodicOf reads the Periodic_t of a connection with read
// (cg_conn_periodic_read or cg_1to1_periodic_read bound to it), its
// translation taken into the (x, y) of the plane of axis (see
// planeVector); ok is false if the connection is not periodic. A rotation
// is kept as the reason the pairs cannot be read.
func periodicOf(path string, axis int, read func(centre, angle, tr *C.float) C.int) (f periodicFound, ok bool, err error) {
	var centre, angle, tr [3]C.float
	switch rc := read(&centre[0], &angle[0], &tr[0]); rc {
	case 0:
	case C.CG_NODE_NOT_FOUND:
		return f, false, nil
	default:
		return f, false, libError(rc, "read Periodic_t of "+path)
	}
	f = periodicFound{path: path, t: planeVector(axis, [3]float64{float64(tr[0]), float64(tr[1]), float64(tr[2])})}
	if angle[0] != 0 || angle[1] != 0 {
		f.unsupported = fmt.Sprintf("a rotational periodic interface (RotationAngle %g, %g); cvdeck reads periodic translations", angle[0], angle[1])
	}
	return f, true, nil
}

// connTag is the boundary tag of the connection at path: its
// BoundaryTag descriptor (see tagDescriptor), or its name.
func (r *reader) connTag(path, name string) (string, error) {
	if err := gopath(r.fn, path); err != nil {
		return "", err
	}
	var n C.int
	if err := libError(C.cg_ndescriptors(&n), "count descriptors of "+path); err != nil {
		return "", err
	}
	var dn [maxNameLen + 1]C.char
	for i := C.int(1); i <= n; i++ {
		var text *C.char
		if err := libError(C.cg_descriptor_read(i, &dn[0], &text), fmt.Sprintf("read descriptor %d of %s", i, path)); err != nil {
			return "", err
		}
		s := C.GoString(text)
		C.cg_free(unsafe.Pointer(text))
		if C.GoString(&dn[0]) == tagDescriptorName {
			return s, nil
		}
	}
	return name, nil
}

// unstructuredConns reads the periodic GridConnectivity_t of unstructured
// zone z: each tags the faces of its PointList (BAR_2 element numbers at
// FaceCenter or EdgeCenter) with its tag, and its pairs are kept for
// ReadDeck. Connections that are not periodic are ignored, as they were
// before periodic pairs were written.
func (r *reader) unstructuredConns(z C.int, zp, zone string, barOf func(int32) ([2]int32, bool)) ([]taggedEdges, error) {
	var n C.int
	if err := libError(C.cg_nconns(r.fn, r.b, z, &n), "count GridConnectivity_t nodes of "+zp); err != nil {
		return nil, err
	}
	var out []taggedEdges
	for i := C.int(1); i <= n; i++ {
		ci, err := r.connInfo(z, i, zp)
		if err != nil {
			return nil, err
		}
		path := zp + "/ZoneGridConnectivity/" + ci.name
		pf, ok, err := periodicOf(path, r.axis, func(c, a, t *C.float) C.int { return C.cg_conn_periodic_read(r.fn, r.b, z, i, c, a, t) })
		if err != nil {
			return nil, err
		}
		if !ok {
			continue
		}
		switch {
		case ci.loc != C.FaceCenter && ci.loc != C.EdgeCenter:
			pf.unsupported = "a periodic connection at " + C.GoString(C.cg_GridLocationName(ci.loc)) + "; cvdeck reads periodic faces at FaceCenter or EdgeCenter"
		case ci.typ != C.Abutting1to1:
			pf.unsupported = "a periodic connection of type " + C.GoString(C.cg_GridConnectivityTypeName(ci.typ)) + "; cvdeck reads Abutting1to1 periodic faces"
		case ci.set != C.PointList && ci.set != C.PointRange || ci.dset != C.PointListDonor:
			pf.unsupported = "a periodic connection by " + C.GoString(C.cg_PointSetTypeName(ci.set)) + " and " + C.GoString(C.cg_PointSetTypeName(ci.dset)) + "; cvdeck reads a PointList or PointRange with a PointListDonor"
		case ci.donor != zone:
			pf.unsupported = fmt.Sprintf("donor zone %q is not this zone", ci.donor)
		}
		if pf.unsupported != "" {
			r.periodic = append(r.periodic, pf)
			continue
		}
		pts := make([]int32, max(int(ci.npnts), 1))
		dpts := make([]int32, max(int(ci.nd), 1))
		if err := libError(C.cg_conn_read(r.fn, r.b, z, i, ip(pts), C.Integer, ip(dpts)), "read "+path); err != nil {
			return nil, err
		}
		pts, dpts = pts[:ci.npnts], dpts[:ci.nd]
		if ci.set == C.PointRange {
			if len(pts) != 2 || pts[1] < pts[0] {
				return nil, fmt.Errorf("%s: range %v is not a range [first, last]", path, pts)
			}
			lo, hi := pts[0], pts[1]
			pts = pts[:0:0]
			for id := lo; id <= hi; id++ {
				pts = append(pts, id)
			}
		}
		if len(pts) != len(dpts) {
			return nil, fmt.Errorf("%s lists %d faces and %d donor faces; a one-to-one interface pairs them one to one", path, len(pts), len(dpts))
		}
		tag, err := r.connTag(path, ci.name)
		if err != nil {
			return nil, err
		}
		te := taggedEdges{tag: tag, edges: make([][2]int32, len(pts))}
		pf.faces = make([][2][2]int32, len(pts))
		for k := range pts {
			e, ok := barOf(pts[k])
			de, dok := barOf(dpts[k])
			if !ok || !dok {
				return nil, fmt.Errorf("%s: point %d pairs elements %d and %d; both must be BAR_2 elements of the zone", path, k+1, pts[k], dpts[k])
			}
			te.edges[k] = e
			pf.faces[k] = [2][2]int32{e, de}
		}
		out = append(out, te)
		r.periodic = append(r.periodic, pf)
	}
	return out, nil
}

// joinEdges returns the edges of a structured periodic join along its
// PointRange and the matching donor edges, as global node ids of the two
// zones.
func joinEdges(jn *join, a, b *szone) ([][2][2]int32, error) {
	si, sj := step(jn.rng[0], jn.rng[2]), step(jn.rng[1], jn.rng[3])
	if jn.rng[0] != jn.rng[2] && jn.rng[1] != jn.rng[3] || jn.rng[0] == jn.rng[2] && jn.rng[1] == jn.rng[3] {
		return nil, fmt.Errorf("%s: PointRange %v is not a line of nodes along one index; a 2D join is", jn.path, jn.rng)
	}
	if jn.rng[0] == jn.rng[2] {
		si = 0
	} else {
		sj = 0
	}
	var out [][2][2]int32
	i, j := jn.rng[0], jn.rng[1]
	for i != jn.rng[2] || j != jn.rng[3] {
		i2, j2 := i+si, j+sj
		di, dj := jn.donorOf(i, j)
		ei, ej := jn.donorOf(i2, j2)
		if !b.inside(di, dj) || !b.inside(ei, ej) {
			return nil, fmt.Errorf("%s: point (%d, %d) maps outside donor zone %s (%d×%d)", jn.path, i, j, b.name, b.ni, b.nj)
		}
		out = append(out, [2][2]int32{{a.id(i, j), a.id(i2, j2)}, {b.id(di, dj), b.id(ei, ej)}})
		i, j = i2, j2
	}
	return out, nil
}

// periodicPairs turns the periodic connections read into face pairs of
// the mesh: one Periodic per pair of tags, A being the tag of the first
// connection found, Pairs sorted by A's face (the order a writer gives),
// the two directions of an interface merged. Connections that disagree
// (a face paired twice, translations that are not each other's negative)
// are an error naming the connection.
func (r *reader) periodicPairs(m *mesh.Mesh) ([]Periodic, error) {
	if len(r.periodic) == 0 {
		return nil, nil
	}
	faceOf := make(map[[2]int32]int32, m.NumBoundary())
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		faceOf[edgeKey(m.FaceNodes[f][0], m.FaceNodes[f][1])] = int32(f)
	}
	type group struct {
		a, b   int16
		t      [2]float64
		aToB   map[int32]int32
		bToA   map[int32]int32
		origin string
	}
	var groups []*group
	for _, pf := range r.periodic {
		if pf.unsupported != "" {
			return nil, fmt.Errorf("%s is %s", pf.path, pf.unsupported)
		}
		for k, e := range pf.faces {
			fa, ok := faceOf[edgeKey(e[0][0], e[0][1])]
			fb, dok := faceOf[edgeKey(e[1][0], e[1][1])]
			if !ok || !dok {
				return nil, fmt.Errorf("%s: point %d: a face of the pair is not a boundary face of the mesh", pf.path, k+1)
			}
			ta, tb := m.FaceTag[fa], m.FaceTag[fb]
			if ta < 0 || tb < 0 || ta == tb {
				return nil, fmt.Errorf("%s: point %d pairs face %d (tag %d) with face %d (tag %d); periodic faces pair two different tags", pf.path, k+1, fa, ta, fb, tb)
			}
			var g *group
			for _, h := range groups {
				if h.a == ta && h.b == tb || h.a == tb && h.b == ta {
					g = h
				}
			}
			if g == nil {
				g = &group{a: ta, b: tb, t: pf.t, aToB: map[int32]int32{}, bToA: map[int32]int32{}, origin: pf.path}
				groups = append(groups, g)
			}
			// The expected translation of this direction: the group's,
			// or its negative for the way back.
			want := g.t
			if g.a != ta {
				fa, fb, want = fb, fa, negate(g.t)
			}
			if math.Hypot(pf.t[0]-want[0], pf.t[1]-want[1]) > 1e-5*math.Hypot(g.t[0], g.t[1]) {
				return nil, fmt.Errorf("%s: translation (%g, %g) does not match %s, whose translation (%g, %g) makes it (%g, %g) in this direction", pf.path, pf.t[0], pf.t[1], g.origin, g.t[0], g.t[1], want[0], want[1])
			}
			if x, dup := g.aToB[fa]; dup && x != fb {
				return nil, fmt.Errorf("%s: point %d pairs face %d with face %d, but it is already paired with face %d", pf.path, k+1, fa, fb, x)
			}
			if x, dup := g.bToA[fb]; dup && x != fa {
				return nil, fmt.Errorf("%s: point %d pairs face %d with face %d, but it is already paired with face %d", pf.path, k+1, fb, fa, x)
			}
			g.aToB[fa], g.bToA[fb] = fb, fa
		}
	}
	out := make([]Periodic, len(groups))
	for i, g := range groups {
		p := Periodic{A: m.Tags[g.a], B: m.Tags[g.b], Translation: g.t, Pairs: make([][2]int32, 0, len(g.aToB))}
		for fa, fb := range g.aToB {
			p.Pairs = append(p.Pairs, [2]int32{fa, fb})
		}
		sort.Slice(p.Pairs, func(x, y int) bool { return p.Pairs[x][0] < p.Pairs[y][0] })
		out[i] = p
	}
	return out, nil
}
