package cgns

/*
#include <stdlib.h>
#include <cgnslib.h>
*/
import "C"

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
	"strings"
	"unsafe"

	"cvdeck/mesh"
)

// Read reads the 2D mesh of a CGNS file written by cvdeck or another
// program and returns it as a face-based mesh built with mesh.Build.
//
// The file's first base must have cell dimension 2 (physical dimension 2,
// or 3 with the nodes on one plane x, y or z = constant: see planeAxis;
// a mesh on x or y = c is read in the two coordinates that vary, with a
// note, as the VTK reader reads one) and hold either one or more
// unstructured zones (several are joined where they touch: see
// joinUnstructured) or one or more structured zones; or it is a 3D base holding a 2D
// case the way 3D solvers take one: structured zones one node plane
// thick, or one cell thick in k (see structured below), or one
// unstructured zone one cell thick (HEXA_8 and PENTA_6 between two planes
// z = z0 < z1, read as the lower plane whichever face of an element lies
// there: see slab.lowerFace; QUAD_4 across the slab are its boundary
// faces, TRI_3 and QUAD_4 in its planes its front and back, left out with
// their BCs):
//
//   - unstructured: sections of TRI_3, QUAD_4, MIXED (of those) and NGON_n
//     (polygons) are the cells, in element-number order whatever the order
//     or numbering of the sections; BAR_2 elements are faces. Each BC_t
//     names the faces it covers by element number (PointList, PointRange,
//     ElementList or ElementRange at EdgeCenter or FaceCenter) or by nodes
//     (GridLocation Vertex: every boundary edge with both nodes listed);
//     its tag is its FamilyName, or its own name if it has none. (This
//     library version, 3.4, has no FamilyName under Elements_t.)
//     Each periodic GridConnectivity_t (Periodic_t under its
//     GridConnectivityProperty_t) tags the BAR_2 faces of its PointList
//     with its BoundaryTag descriptor, or its name; other connections
//     are ignored.
//   - structured: each zone's quadrilaterals, i fastest, zone after zone;
//     nodes joined by GridConnectivity1to1_t records (PointRange,
//     PointRangeDonor, Transform) are merged into one node, and the result
//     keeps the structured view (one mesh.Block per zone, and a
//     mesh.BlockInterface for every join of two whole sides). A periodic
//     join (Periodic_t under its GridConnectivityProperty_t) merges
//     nothing: its edges are boundary faces tagged with its BoundaryTag
//     descriptor, or its name. A
//     left-handed zone's cells are turned counter-clockwise. Nodes on the
//     sides of two zones that coincide but that no join merges are merged
//     too, with a note (see mergeTouching); the faces of BCs on sides so
//     made interior are left out, with a note naming the BCs and zones,
//     while a BC on a side the joins make interior is an error. BCs are
//     Vertex point ranges or lists, or face ranges (EdgeCenter, the 2D
//     face location, or IFaceCenter/JFaceCenter).
//   - structured zones of a 3D base: each zone is a single node plane in
//     one index direction (of size 1), or has two node planes in k that
//     differ only in z (one cell thick); that plane, or the k = 1 one, is
//     read as above, its other two index directions in order taken as
//     (i, j) (see readAcross). Joins must take the direction a zone is
//     read across to the one its donor is, and are read in those planes
//     (see joinPlane), BCs likewise (FaceCenter, IFaceCenter, JFaceCenter,
//     KFaceCenter or Vertex), and BCs on the planes read (the front and
//     back of the slab) are left out.
//
// Tags are the base's Family_t nodes that have a FamilyBC or are used by a
// BC, in file order, then the other BC tags in the order BCs first use
// them. Errors name the node path that could not be read.
func Read(path string) (*mesh.Mesh, error) {
	m, _, err := ReadNotes(path)
	return m, err
}

// ReadNotes is Read that also returns notes on how the file was read
// where the mesh does not show it, for a user who did not write the file:
// a 3D base read as a 2D plane, the BCs on the front and back of the slab
// that were left out with it, and the BC types the file gives each tag
// (all of them where its BCs disagree, which ReadDeck refuses).
func ReadNotes(path string) (*mesh.Mesh, []string, error) {
	r, m, err := open(path)
	if err != nil {
		return nil, nil, err
	}
	var types []string
	for _, tag := range m.Tags {
		ts := r.tagTypes(tag)
		if len(ts) == 0 {
			continue
		}
		names := make([]string, len(ts))
		for i, t := range ts {
			names[i] = bcTypeName(t)
		}
		types = append(types, tag+" "+strings.Join(names, " or "))
	}
	if len(types) > 0 {
		r.notes = append(r.notes, "boundary condition types in the file: "+strings.Join(types, ", "))
	}
	return m, r.notes, nil
}

// tagTypes returns the distinct BC types the file gives tag: the BCType of
// its BCs, or the FamilyBC of its family when no BC names a type (see
// ReadDeck); none for a tag without either, such as a periodic one.
func (r *reader) tagTypes(tag string) []C.BCType_t {
	if ts, ok := r.bcTypes[tag]; ok {
		return ts
	}
	if ft, ok := r.famBC[tag]; ok {
		return []C.BCType_t{ft}
	}
	return nil
}

// ReadDeck reads a CGNS file like Read and also returns the base name,
// the boundary condition of every tag: the BCType of its BCs, or for
// FamilySpecified (and for a boundary family no BC uses) the FamilyBC of
// its family, and the periodic pairs (see periodicPairs). Tags whose BCs
// disagree are an error naming them, as is a periodic connection whose
// faces cannot be paired by a translation (a rotation, faces given by
// vertices).
func ReadDeck(path string) (*Deck, error) {
	r, m, err := open(path)
	if err != nil {
		return nil, err
	}
	d := &Deck{Mesh: m, Name: r.base}
	for _, tag := range m.Tags {
		ts := r.tagTypes(tag)
		if len(ts) == 0 {
			continue
		}
		if len(ts) > 1 {
			names := make([]string, len(ts))
			for i, t := range ts {
				names[i] = bcTypeName(t)
			}
			return nil, fmt.Errorf("cgns: read %s: tag %q has BCs of types %v; one tag takes one boundary condition", path, tag, names)
		}
		d.BCs = append(d.BCs, BC{Tag: tag, BCType: bcTypeName(ts[0])})
	}
	if d.Periodic, err = r.periodicPairs(m); err != nil {
		return nil, fmt.Errorf("cgns: read %s: %w", path, err)
	}
	return d, nil
}

// open reads the mesh of the file at path, keeping the reader for the
// boundary conditions it found.
func open(path string) (*reader, *mesh.Mesh, error) {
	if _, err := os.Stat(path); err != nil {
		return nil, nil, fmt.Errorf("cgns: %w", err)
	}
	libMu.Lock()
	defer libMu.Unlock()
	p := cstr(path)
	defer free(p)
	var ft C.int
	if C.cg_is_cgns(p, &ft) != 0 {
		if kind := container(path); kind != "" {
			return nil, nil, fmt.Errorf("cgns: %s begins as an %s file does, but the CGNS library cannot read a CGNS tree from it: the file may be cut short or damaged", path, kind)
		}
		return nil, nil, fmt.Errorf("cgns: %s is not a CGNS file (the CGNS library finds neither an HDF5 nor an ADF CGNS tree in it)", path)
	}
	var fn C.int
	if err := libError(C.cg_open(p, C.CG_MODE_READ, &fn), "open "+path); err != nil {
		return nil, nil, err
	}
	defer C.cg_close(fn)
	r := &reader{fn: fn, b: 1, axis: 2, bcTypes: map[string][]C.BCType_t{}, famBC: map[string]C.BCType_t{}}
	m, err := r.read()
	if err != nil {
		return nil, nil, fmt.Errorf("cgns: read %s: %w", path, err)
	}
	return r, m, nil
}

// container names the storage format whose signature the file at path
// begins with, "HDF5" or "ADF", or "" for neither (or a file that cannot
// be read). HDF5 puts its 8-byte signature \x89HDF\r\n\x1a\n at byte 0
// of a file (HDF5 File Format Specification, superblock; a user block
// can move it to 512, 1024, ... which cvdeck does not look for); ADF
// files begin with four bytes and the text "ADF Database" (as in an ADF
// file written by the Debian CGNS tools, which starts c0 a8 a3 a9, the
// text "@(#)" with the high bits set).
func container(path string) string {
	f, err := os.Open(path)
	if err != nil {
		return ""
	}
	defer f.Close()
	head := make([]byte, 16)
	n, _ := io.ReadFull(f, head)
	switch head = head[:n]; {
	case bytes.HasPrefix(head, []byte("\x89HDF\r\n\x1a\n")):
		return "HDF5"
	case len(head) == 16 && string(head[4:]) == "ADF Database":
		return "ADF"
	}
	return ""
}

type reader struct {
	fn   C.int
	b    C.int
	base string
	pdim int
	// thin marks a 3D base (cell and physical dimension 3) read as a 2D
	// case stored in 3D: structured zones one node plane or one cell thick
	// in k, whose k = 1 plane is the mesh (see structured).
	thin bool
	// families are the Family_t names of the base, in file order, and
	// bcFamily marks those with a FamilyBC: boundary families, kept as
	// tags even when no face uses them.
	families []string
	bcFamily map[string]bool
	// famBC is the FamilyBC type of each boundary family; bcTypes the
	// distinct BC types found for each tag, in the order found.
	famBC   map[string]C.BCType_t
	bcTypes map[string][]C.BCType_t
	// tags collects tag names in the order of families, then of use.
	tags  []string
	tagIx map[string]int16
	// axis is the coordinate plane the mesh lies on, by the axis constant
	// there (see planeAxis): 2 for z, 0 or 1 for a mesh read from x = c or
	// y = c, whose coordinates and translations are mapped (see
	// xyz.points).
	axis int
	// periodic are the periodic connections found, in file order.
	periodic []periodicFound
	// notes say how the file was read where the mesh does not show it.
	notes []string
}

// planeNote is the note on a 3D base read as a 2D plane (what is the
// plane, as a phrase) and the BCs left out with the front and back of the
// slab, each as "name (tag t)" or with a count of faces.
func planeNote(what string, left []string) string {
	note := "a 3D base read as 2D: " + what
	if len(left) > 0 {
		note += "; BCs on the front and back left out: " + strings.Join(left, ", ")
	}
	return note
}

func (r *reader) read() (*mesh.Mesh, error) {
	var nb C.int
	if err := libError(C.cg_nbases(r.fn, &nb), "count bases"); err != nil {
		return nil, err
	}
	if nb < 1 {
		return nil, errors.New("the file has no CGNSBase_t node")
	}
	var name [maxNameLen + 1]C.char
	var cdim, pdim C.int
	if err := libError(C.cg_base_read(r.fn, r.b, &name[0], &cdim, &pdim), "read base 1"); err != nil {
		return nil, err
	}
	r.base = C.GoString(&name[0])
	r.pdim = int(pdim)
	bp := "/" + r.base
	r.thin = cdim == 3 && pdim == 3
	if !r.thin && (cdim != 2 || pdim < 2 || pdim > 3) {
		return nil, fmt.Errorf("%s: cell dimension %d, physical dimension %d; cvdeck reads 2D meshes (cell dimension 2, physical dimension 2 or 3), or 2D cases stored as 3D structured zones one plane or one cell thick", bp, cdim, pdim)
	}
	var nf C.int
	if err := libError(C.cg_nfamilies(r.fn, r.b, &nf), "count families of "+bp); err != nil {
		return nil, err
	}
	for f := C.int(1); f <= nf; f++ {
		var nboco, ngeo C.int
		if err := libError(C.cg_family_read(r.fn, r.b, f, &name[0], &nboco, &ngeo), fmt.Sprintf("read family %d of %s", f, bp)); err != nil {
			return nil, err
		}
		r.families = append(r.families, C.GoString(&name[0]))
		if nboco > 0 {
			if r.bcFamily == nil {
				r.bcFamily = map[string]bool{}
			}
			r.bcFamily[C.GoString(&name[0])] = true
			var bt C.BCType_t
			var fb [maxNameLen + 1]C.char
			if err := libError(C.cg_fambc_read(r.fn, r.b, f, 1, &fb[0], &bt), fmt.Sprintf("read FamilyBC of %s/%s", bp, C.GoString(&name[0]))); err != nil {
				return nil, err
			}
			r.famBC[C.GoString(&name[0])] = bt
		}
	}
	var nz C.int
	if err := libError(C.cg_nzones(r.fn, r.b, &nz), "count zones of "+bp); err != nil {
		return nil, err
	}
	if nz < 1 {
		return nil, fmt.Errorf("%s has no zone", bp)
	}
	types := make([]C.ZoneType_t, nz)
	nstruct := 0
	for z := C.int(1); z <= nz; z++ {
		if err := libError(C.cg_zone_type(r.fn, r.b, z, &types[z-1]), fmt.Sprintf("read type of zone %d of %s", z, bp)); err != nil {
			return nil, err
		}
		if types[z-1] == C.Structured {
			nstruct++
		}
	}
	switch {
	case nstruct == int(nz):
		return r.structured(int(nz))
	case r.thin && nstruct == 0 && nz > 1:
		return nil, fmt.Errorf("%s is a 3D base with %d unstructured zones; cvdeck reads a slab one cell thick from one unstructured zone (several unstructured zones it joins in a base of cell dimension 2 only)", bp, nz)
	case nstruct == 0:
		return r.unstructured(int(nz))
	default:
		return nil, fmt.Errorf("%s mixes %d structured and %d unstructured zones; cvdeck reads one kind", bp, nstruct, int(nz)-nstruct)
	}
}

// zoneName reads the name and size of zone z.
func (r *reader) zoneName(z C.int, size []int32) (string, error) {
	var name [maxNameLen + 1]C.char
	if err := libError(C.cg_zone_read(r.fn, r.b, z, &name[0], ip(size)), fmt.Sprintf("read zone %d of /%s", z, r.base)); err != nil {
		return "", err
	}
	return C.GoString(&name[0]), nil
}

// coords reads the n Cartesian node coordinates of a zone, over the index
// range [1, rmax] (one entry per index dimension): x and y, and z when the
// physical dimension is 3 and the zone has one, which needZ requires.
func (r *reader) coords(z C.int, zp string, rmax []int32, n int, needZ bool) (xyz, error) {
	var c xyz
	var nc C.int
	if err := libError(C.cg_ncoords(r.fn, r.b, z, &nc), "count coordinates of "+zp); err != nil {
		return c, err
	}
	have := map[string]bool{}
	var name [maxNameLen + 1]C.char
	for k := C.int(1); k <= nc; k++ {
		var dt C.DataType_t
		if err := libError(C.cg_coord_info(r.fn, r.b, z, k, &dt, &name[0]), fmt.Sprintf("read coordinate %d of %s", k, zp)); err != nil {
			return c, err
		}
		have[C.GoString(&name[0])] = true
	}
	if !have["CoordinateX"] || !have["CoordinateY"] {
		return c, fmt.Errorf("%s/GridCoordinates has no CoordinateX and CoordinateY; cvdeck reads Cartesian coordinates", zp)
	}
	if needZ && !have["CoordinateZ"] {
		return c, fmt.Errorf("%s/GridCoordinates has no CoordinateZ; a 3D zone needs one", zp)
	}
	rmin := make([]int32, len(rmax))
	for i := range rmin {
		rmin[i] = 1
	}
	read := func(axis string) ([]float64, error) {
		v := make([]float64, n)
		a := cstr(axis)
		defer free(a)
		err := libError(C.cg_coord_read(r.fn, r.b, z, a, C.RealDouble, ip(rmin), ip(rmax), unsafe.Pointer(&v[0])), "read "+zp+"/GridCoordinates/"+axis)
		return v, err
	}
	var err error
	if c.x, err = read("CoordinateX"); err != nil {
		return c, err
	}
	if c.y, err = read("CoordinateY"); err != nil {
		return c, err
	}
	if r.pdim == 3 && have["CoordinateZ"] {
		if c.z, err = read("CoordinateZ"); err != nil {
			return c, err
		}
	}
	return c, nil
}

// buildTagged orders the tags of the boundary edges found (see
// orderTags), adds the edges to in with their tag numbers and builds the
// mesh; where names the base or zone in errors.
func (r *reader) buildTagged(in mesh.Input, found []taggedEdges, where string) (*mesh.Mesh, error) {
	used := make([]string, len(found))
	for i, t := range found {
		used[i] = t.tag
	}
	r.orderTags(used)
	in.Tags = r.tags
	for _, t := range found {
		ti := r.tag(t.tag)
		for _, e := range t.edges {
			in.Edges = append(in.Edges, mesh.TaggedEdge{A: e[0], B: e[1], Tag: ti})
		}
	}
	m, err := mesh.Build(in)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", where, err)
	}
	return m, nil
}

// bcInfo is one BC_t as read: its point set expanded to a list.
type bcInfo struct {
	path string
	name string
	tag  string
	set  C.PointSetType_t
	loc  C.GridLocation_t
	pts  []int32
}

// bocos reads the BCs of a zone whose index dimension is idim.
func (r *reader) bocos(z C.int, zp string, idim int) ([]bcInfo, error) {
	var n C.int
	if err := libError(C.cg_nbocos(r.fn, r.b, z, &n), "count BCs of "+zp); err != nil {
		return nil, err
	}
	out := make([]bcInfo, 0, n)
	var name [maxNameLen + 1]C.char
	for bc := C.int(1); bc <= n; bc++ {
		var (
			typ    C.BCType_t
			set    C.PointSetType_t
			npts   C.int
			nindex [3]C.int
			nlist  C.int
			ndt    C.DataType_t
			nds    C.int
		)
		if err := libError(C.cg_boco_info(r.fn, r.b, z, bc, &name[0], &typ, &set, &npts, &nindex[0], &nlist, &ndt, &nds), fmt.Sprintf("read BC %d of %s/ZoneBC", bc, zp)); err != nil {
			return nil, err
		}
		b := bcInfo{name: C.GoString(&name[0]), set: set}
		b.path = zp + "/ZoneBC/" + b.name
		if err := libError(C.cg_boco_gridlocation_read(r.fn, r.b, z, bc, &b.loc), "read GridLocation of "+b.path); err != nil {
			return nil, err
		}
		raw := make([]int32, max(int(npts)*idim, 1))
		var normals []float64
		var np unsafe.Pointer
		if nlist > 0 {
			normals = make([]float64, int(nlist)*r.pdim)
			np = unsafe.Pointer(&normals[0])
		}
		if err := libError(C.cg_boco_read(r.fn, r.b, z, bc, ip(raw), np), "read points of "+b.path); err != nil {
			return nil, err
		}
		raw = raw[:int(npts)*idim]
		tag, err := r.familyAt(b.path)
		if err != nil {
			return nil, err
		}
		if tag == "" {
			tag = b.name
		}
		b.tag = tag
		if typ == C.FamilySpecified {
			if ft, ok := r.famBC[tag]; ok {
				typ = ft
			}
		}
		if !slices.Contains(r.bcTypes[tag], typ) {
			r.bcTypes[tag] = append(r.bcTypes[tag], typ)
		}
		b.pts = raw
		out = append(out, b)
	}
	return out, nil
}

// familyAt reads the FamilyName child of the node at path, "" if none.
func (r *reader) familyAt(path string) (string, error) {
	if err := gopath(r.fn, path); err != nil {
		return "", err
	}
	var fam [maxNameLen + 1]C.char
	switch rc := C.cg_famname_read(&fam[0]); rc {
	case 0:
		return C.GoString(&fam[0]), nil
	case C.CG_NODE_NOT_FOUND:
		return "", nil
	default:
		return "", libError(rc, "read FamilyName of "+path)
	}
}

// tag returns the index of tag name, adding it if new.
func (r *reader) tag(name string) int16 {
	if r.tagIx == nil {
		r.tagIx = map[string]int16{}
	}
	if t, ok := r.tagIx[name]; ok {
		return t
	}
	t := int16(len(r.tags))
	r.tagIx[name] = t
	r.tags = append(r.tags, name)
	return t
}

// orderTags registers the tags: families that are used or have a
// FamilyBC first, in file order, then the others in the order given.
func (r *reader) orderTags(used []string) {
	isUsed := map[string]bool{}
	for _, u := range used {
		isUsed[u] = true
	}
	for _, f := range r.families {
		if isUsed[f] || r.bcFamily[f] {
			r.tag(f)
		}
	}
	for _, u := range used {
		r.tag(u)
	}
}
