package vtk

import (
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/internal/hugepage"
	"cvdeck/mesh"
)

// mergeTolerance is how close, relative to the local face length, two
// nodes of structured blocks must be to be taken as one node: two nodes
// merge when their distance is at most mergeTolerance times the shorter
// of the two nodes' local face lengths, a node's local face length being
// the shortest grid edge that meets it in its own block. It lies far above
// the roundoff of coordinates written in double precision and far below
// any spacing of a mesh fit to check, so nodes an interface shares are
// found and distinct nodes are never joined; exactly coincident nodes
// always merge, even where a face has zero length.
const mergeTolerance = 1e-6

// ReadVTS builds a mesh from the bytes of an XML StructuredGrid (.vts)
// file (name is used in errors); see ReadFile. The grid must be 2D: one
// of its three extents a single node plane with every point on one z, or
// a slab one cell thick (one extent two nodes deep, each of its two node
// planes on one z, each node of the upper plane straight above its
// partner), which is read as its lower plane, as ReadFile reads a slab.
// Its quads become cells, counter-clockwise (see joinBlocks); nodes that
// coincide where the grid closes on itself (an O-grid's seam) are merged
// as ReadVTM merges block interfaces. A StructuredGrid names no boundary
// tags (WriteVTS writes only the area and quality fields as cell data), so
// the boundary faces are untagged. It reads every encoding ReadVTU reads,
// and refuses a file that is not whole as ReadVTU does.
func ReadVTS(data []byte, name string) (*mesh.Mesh, error) {
	m, _, err := readVTS(data, name)
	return m, err
}

// readVTS is ReadVTS that also returns the notes on how it read the file.
func readVTS(data []byte, name string) (*mesh.Mesh, []string, error) {
	pl, err := parseVTS(data, name)
	if err != nil {
		return nil, nil, err
	}
	m, merged, err := joinBlocks([]*nodePlane{pl}, name)
	if err != nil {
		return nil, nil, err
	}
	notes := pl.notes
	if merged > 0 {
		notes = append(notes, fmt.Sprintf("%d coincident nodes merged where the grid meets itself (within %g of the local face length)", merged, mergeTolerance))
	}
	return m, notes, nil
}

// ReadVTM builds one mesh from the XML multiblock index (.vtm) at path and
// the structured grids (.vts) it lists, as WriteStructured writes them: the
// DataSet elements, at any depth, in file order, their file attributes
// relative to the index's folder. Each block is read as ReadVTS reads it;
// the blocks' cells follow one another in that order, and nodes of
// different blocks that coincide (within mergeTolerance of the local face
// length) become one node, so a block interface becomes interior faces. A
// DataSet with no file (an empty block) is skipped with a note. A file
// that is missing, not a .vts or not readable is an error naming the index
// and the DataSet.
func ReadVTM(path string) (*mesh.Mesh, error) {
	data, err := hugepage.ReadFile(path)
	if err != nil {
		return nil, err
	}
	m, _, err := readVTM(data, path)
	return m, err
}

// readVTM is ReadVTM on the index's bytes, read from path, that also
// returns the notes on how it read the files.
func readVTM(data []byte, path string) (*mesh.Mesh, []string, error) {
	x, err := parseXML(data, path)
	if err != nil {
		return nil, nil, err
	}
	const dataset = "vtkMultiBlockDataSet"
	if t := x.root.attr["type"]; t != dataset {
		return nil, nil, fmt.Errorf("%s: VTKFile type is %q; cvdeck reads %s files as .vtm", path, t, dataset)
	}
	top := x.root.child(dataset)
	if top == nil {
		return nil, nil, fmt.Errorf("%s: no %s element", path, dataset)
	}
	var planes []*nodePlane
	var notes []string
	var walk func(e *element) error
	walk = func(e *element) error {
		for _, c := range e.children {
			if c.name != "DataSet" {
				if err := walk(c); err != nil {
					return err
				}
				continue
			}
			what := fmt.Sprintf("DataSet index=%q", c.attr["index"])
			if n := c.attr["name"]; n != "" {
				what += fmt.Sprintf(" name=%q", n)
			}
			file := c.attr["file"]
			if file == "" {
				notes = append(notes, fmt.Sprintf("%s names no file (an empty block); skipped", what))
				continue
			}
			if ext := strings.ToLower(filepath.Ext(file)); ext != ".vts" {
				return fmt.Errorf("%s: %s names %s, a %q file; cvdeck reads .vtm files whose blocks are structured grids (.vts)", path, what, file, ext)
			}
			p := filepath.FromSlash(file)
			if !filepath.IsAbs(p) {
				p = filepath.Join(filepath.Dir(path), p)
			}
			b, err := hugepage.ReadFile(p)
			if err != nil {
				return fmt.Errorf("%s: %s names the file %s, which cannot be read: %w", path, what, file, err)
			}
			pl, err := parseVTS(b, p)
			if err != nil {
				return err
			}
			pl.label = file
			planes = append(planes, pl)
		}
		return nil
	}
	if err := walk(top); err != nil {
		return nil, nil, err
	}
	if len(planes) == 0 {
		return nil, nil, fmt.Errorf("%s: lists no structured grid files; nothing to check", path)
	}
	// The blocks' planes may differ by rounding, as one block's points may
	// (see planeOf3): by the same tolerance.
	reach := 0.0
	for _, pl := range planes {
		reach = max(reach, math.Abs(pl.z))
		for _, p := range pl.xy {
			reach = max(reach, math.Abs(p[0]), math.Abs(p[1]))
		}
	}
	for _, pl := range planes[1:] {
		if math.Abs(pl.z-planes[0].z) > mesh.PlaneTolerance*reach {
			return nil, nil, fmt.Errorf("%s: block %s lies on z = %g but block %s on z = %g; the blocks of a 2D mesh lie in one plane", path, pl.file, pl.z, planes[0].file, planes[0].z)
		}
	}
	m, merged, err := joinBlocks(planes, path)
	if err != nil {
		return nil, nil, err
	}
	notes = append(notes, blockNotes(planes)...)
	if len(planes) == 1 {
		notes = append(notes, fmt.Sprintf("1 block: %d coincident nodes merged where it meets itself (within %g of the local face length)", merged, mergeTolerance))
		return m, notes, nil
	}
	notes = append(notes, fmt.Sprintf("%d blocks joined into one mesh: %d coincident nodes merged (within %g of the local face length)", len(planes), merged, mergeTolerance))
	notes = append(notes, cellRanges(planes))
	return m, notes, nil
}

// cellRanges is the note saying which cells of the joined mesh each block
// gave: its cells follow the previous block's, so that a cell number of
// the report can be traced to its block and, in the block, to its (i, j)
// index, i fastest.
func cellRanges(planes []*nodePlane) string {
	parts := make([]string, len(planes))
	c := 0
	for b, pl := range planes {
		n := (pl.nu - 1) * (pl.nv - 1)
		parts[b] = fmt.Sprintf("%d–%d %s (%d × %d cells)", c, c+n-1, pl.label, pl.nu-1, pl.nv-1)
		c += n
	}
	return "the blocks' cells are numbered on, block after block, each its first grid index fastest: cells " + strings.Join(parts, ", ")
}

// blockNotes gives the blocks' notes once each, naming the blocks a note
// is about unless it is about all of them.
func blockNotes(planes []*nodePlane) []string {
	var order []string
	files := map[string][]string{}
	for _, pl := range planes {
		for _, n := range pl.notes {
			if files[n] == nil {
				order = append(order, n)
			}
			files[n] = append(files[n], pl.file)
		}
	}
	out := make([]string, 0, len(order))
	for _, n := range order {
		if len(files[n]) < len(planes) {
			n += " (" + strings.Join(files[n], ", ") + ")"
		}
		out = append(out, n)
	}
	return out
}

// nodePlane is the 2D node plane of a structured grid as read: nu × nv
// nodes, u fastest, u and v the grid's two directions other than the one
// a node deep (or, for a slab, two nodes deep) in (i, j, k) order.
type nodePlane struct {
	file   string
	label  string // the file as the .vtm index names it
	nu, nv int
	xy     []orb.Point
	z      float64  // the plane's z: the lower plane's for a slab
	notes  []string // how the grid was read, where the mesh does not show it
}

// parseVTS reads the node plane of an XML StructuredGrid file: its one
// piece, whose Extent (VTK file-format specification, "XML File Formats",
// StructuredGrid: "x0 x1 y0 y1 z0 z1", inclusive node index ranges, points
// i fastest, then j, then k) must be the WholeExtent and give the number of
// points the Points array holds.
func parseVTS(data []byte, name string) (*nodePlane, error) {
	x, ds, p, err := openPiece(data, name, "StructuredGrid")
	if err != nil {
		return nil, err
	}
	ext, err := parseExtent(name, "Piece Extent", p.attr["Extent"])
	if err != nil {
		return nil, err
	}
	if w := ds.attr["WholeExtent"]; w != "" {
		whole, err := parseExtent(name, "WholeExtent", w)
		if err != nil {
			return nil, err
		}
		if whole != ext {
			return nil, fmt.Errorf("%s: Piece Extent %q is not the WholeExtent %q; cvdeck reads single-piece files whose piece is the whole grid", name, p.attr["Extent"], w)
		}
	}
	var n [3]int
	np := 1
	for a := range n {
		n[a] = ext[2*a+1] - ext[2*a] + 1
		if n[a] < 1 {
			return nil, fmt.Errorf("%s: Piece Extent %q runs from %d down to %d; each range must run upward", name, p.attr["Extent"], ext[2*a], ext[2*a+1])
		}
		if n[a] > math.MaxInt32/np {
			return nil, fmt.Errorf("%s: Piece Extent %q makes more than %d nodes; cvdeck meshes hold at most that many", name, p.attr["Extent"], math.MaxInt32)
		}
		np *= n[a]
	}
	why := fmt.Sprintf(" (Piece Extent %q makes %d × %d × %d nodes)", p.attr["Extent"], n[0], n[1], n[2])
	pts, err := x.points(p, np, why)
	if err != nil {
		return nil, err
	}
	// A grid in the plane x = c or y = c is read as ReadFile reads a plane
	// mesh there: its coordinates mapped (see mapPlane), after which it is
	// a grid on one z. A plane whose coordinate spreads by rounding is
	// first made exact (see planeOf3).
	if err := finitePoints(name, pts); err != nil {
		return nil, err
	}
	on := planeOf3(pts)
	if on.axis != 0 && on.axis != 1 {
		pl, err := planeOf(name, p.attr["Extent"], n, pts)
		if err == nil && on.axis == 2 && on.spread > 0 {
			pl.notes = []string{fmt.Sprintf("a plane mesh on z = %s%s, read as 2D (z dropped)", on.atText(), on.spreadNote())}
		}
		return pl, err
	}
	note, _ := mapPlane(pts, on)
	pl, err := planeOf(name, p.attr["Extent"], n, pts)
	if err != nil {
		return nil, err
	}
	pl.notes = []string{note} // in place of the note on its z, which is the old x or y
	return pl, nil
}

// parseExtent parses an extent attribute (what names it in errors): six
// integers.
func parseExtent(file, what, s string) ([6]int, error) {
	var e [6]int
	f := strings.Fields(s)
	if len(f) != 6 {
		return e, fmt.Errorf("%s: %s %q is not six integers", file, what, s)
	}
	for k, w := range f {
		v, err := strconv.Atoi(w)
		if err != nil || v < -math.MaxInt32 || v > math.MaxInt32 {
			return e, fmt.Errorf("%s: %s %q is not six integers", file, what, s)
		}
		e[k] = v
	}
	return e, nil
}

// planeOf finds the 2D node plane of a grid of n[0] × n[1] × n[2] nodes
// with points pts (x, y, z each, i fastest): the grid itself when every
// point has one z and exactly one direction is a single node plane, the
// lower plane when it is a slab one cell thick (see ReadVTS).
func planeOf(file, extent string, n [3]int, pts []float64) (*nodePlane, error) {
	stride := [3]int{1, n[0], n[0] * n[1]}
	np := len(pts) / 3
	z := func(k int) float64 { return pts[3*k+2] }
	// plane returns the nodes of the plane w = c of direction a.
	plane := func(a, c int) *nodePlane {
		u, v := (a+1)%3, (a+2)%3
		if u > v {
			u, v = v, u
		}
		pl := &nodePlane{file: file, nu: n[u], nv: n[v], xy: hugepage.Make[orb.Point](n[u] * n[v])}
		for jv := range n[v] {
			for iu := range n[u] {
				k := iu*stride[u] + jv*stride[v] + c*stride[a]
				pl.xy[jv*n[u]+iu] = orb.Point{pts[3*k], pts[3*k+1]}
			}
		}
		pl.z = z(c * stride[a])
		return pl
	}
	// constZ says whether every node of the plane w = c of direction a has
	// the z of its first node.
	constZ := func(a, c int) bool {
		u, v := (a+1)%3, (a+2)%3
		z0 := z(c * stride[a])
		for jv := range n[v] {
			for iu := range n[u] {
				if z(iu*stride[u]+jv*stride[v]+c*stride[a]) != z0 {
					return false
				}
			}
		}
		return true
	}
	noCells := func() error {
		return fmt.Errorf("%s: Piece Extent %q makes %d × %d × %d nodes, a line or a point of nodes: no cells", file, extent, n[0], n[1], n[2])
	}
	flat := true
	for k := range np {
		if z(k) != z(0) {
			flat = false
			break
		}
	}
	if flat {
		var single []int
		for a := range n {
			if n[a] == 1 {
				single = append(single, a)
			}
		}
		switch len(single) {
		case 0:
			return nil, fmt.Errorf("%s: a 3D grid of %d × %d × %d nodes with every point on z = %g: its cells have no thickness; cvdeck reads a structured grid of one node plane, or a slab one cell thick", file, n[0], n[1], n[2], z(0))
		case 1:
		default:
			return nil, noCells()
		}
		pl := plane(single[0], 0)
		if pl.z != 0 {
			pl.notes = append(pl.notes, fmt.Sprintf("a plane mesh on z = %g, read as 2D (z dropped)", pl.z))
		}
		return pl, nil
	}
	// A slab: a direction two nodes deep whose two node planes each have
	// one z, and differ.
	for a := 2; a >= 0; a-- {
		if n[a] != 2 || !constZ(a, 0) || !constZ(a, 1) || z(0) == z(stride[a]) {
			continue
		}
		if n[(a+1)%3] < 2 || n[(a+2)%3] < 2 {
			return nil, noCells()
		}
		lo, hi := plane(a, 0), plane(a, 1)
		if hi.z < lo.z {
			lo, hi = hi, lo
		}
		// Straight above within 1e-12 of the largest coordinate, as for
		// an unstructured slab (see slabMesh).
		reach := 0.0
		for _, p := range lo.xy {
			reach = max(reach, math.Abs(p[0]), math.Abs(p[1]))
		}
		for k, p := range lo.xy {
			q := hi.xy[k]
			if math.Abs(p[0]-q[0]) > 1e-12*reach || math.Abs(p[1]-q[1]) > 1e-12*reach {
				return nil, fmt.Errorf("%s: node (%d, %d) of the plane z = %g, at (%g, %g), is not straight below its partner on z = %g, at (%g, %g); cvdeck reads slabs extruded along z", file, k%lo.nu, k/lo.nu, lo.z, p[0], p[1], hi.z, q[0], q[1])
			}
		}
		lo.notes = append(lo.notes, fmt.Sprintf("a slab one cell thick between z = %g and z = %g, read as its lower plane", lo.z, hi.z))
		return lo, nil
	}
	zs := []float64{z(0)}
	for k := range np {
		if len(zs) < 3 && z(k) != zs[0] && (len(zs) == 1 || z(k) != zs[1]) {
			zs = append(zs, z(k))
		}
	}
	if len(zs) == 3 {
		return nil, fmt.Errorf("%s: points lie on z = %g, %g and %g: a 3D grid; cvdeck reads a structured grid of one node plane (every z equal) or a slab one cell thick (two node planes, each on one z)", file, zs[0], zs[1], zs[2])
	}
	return nil, fmt.Errorf("%s: points lie on z = %g and %g, but not on the two node planes of a grid direction two nodes deep (%d × %d × %d nodes): the grid is not plane, nor a slab one cell thick", file, zs[0], zs[1], n[0], n[1], n[2])
}

// joinBlocks builds one mesh from node planes (file names the whole in
// errors) and returns it with the number of nodes merged. Each plane's
// quads (u, v), (u+1, v), (u+1, v+1), (u, v+1) become cells, u fastest,
// plane after plane. A plane whose quads have a negative total signed
// area (its index directions run clockwise seen from +z) has every cell's
// node order reversed, so that the cells are counter-clockwise: the
// orientation is decided for the whole plane, never cell by cell, so a
// folded cell stays inverted for the checks to find. Nodes on the sides
// of the planes that coincide within mergeTolerance become one node,
// numbered where it first appears; the others keep their order.
func joinBlocks(planes []*nodePlane, file string) (*mesh.Mesh, int, error) {
	first := make([]int, len(planes)+1)
	nc := 0
	for b, pl := range planes {
		if pl.nu < 2 || pl.nv < 2 {
			return nil, 0, fmt.Errorf("%s: a plane of %d × %d nodes has no cells", pl.file, pl.nu, pl.nv)
		}
		first[b+1] = first[b] + pl.nu*pl.nv
		nc += (pl.nu - 1) * (pl.nv - 1)
		if first[b+1] > math.MaxInt32 || 4*nc > math.MaxInt32 {
			return nil, 0, fmt.Errorf("%s: more than %d nodes or cell nodes; cvdeck meshes hold at most that many", file, math.MaxInt32)
		}
	}
	root := mergeNodes(planes, first)
	index := hugepage.Make[int32](first[len(planes)])
	kept := 0
	for g, r := range root {
		if int(r) == g {
			kept++
		}
	}
	in := mesh.Input{
		Nodes:     hugepage.Make[orb.Point](kept)[:0],
		CellStart: hugepage.Make[int32](nc + 1),
		CellNodes: hugepage.Make[int32](4 * nc),
	}
	merged := 0
	for b, pl := range planes {
		for k, p := range pl.xy {
			g := first[b] + k
			if r := root[g]; int(r) != g {
				index[g] = index[r]
				merged++
				continue
			}
			index[g] = int32(len(in.Nodes))
			in.Nodes = append(in.Nodes, p)
		}
	}
	c := 0
	for b, pl := range planes {
		node := func(u, v int) int32 { return index[first[b]+v*pl.nu+u] }
		reversed := pl.signedArea() < 0
		if reversed {
			pl.notes = append(pl.notes, "its cells run clockwise seen from +z in the grid's index order; their node order is reversed")
		}
		for v := range pl.nv - 1 {
			for u := range pl.nu - 1 {
				q := in.CellNodes[4*c : 4*c+4]
				q[0], q[1], q[2], q[3] = node(u, v), node(u+1, v), node(u+1, v+1), node(u, v+1)
				if reversed {
					q[1], q[3] = q[3], q[1]
				}
				c++
				in.CellStart[c] = int32(4 * c)
			}
		}
	}
	m, err := mesh.Build(in)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", file, err)
	}
	return m, merged, nil
}

// signedArea is the sum of the signed areas of the plane's quads, each
// from its diagonals, (p2 − p0) × (p3 − p1) / 2: the shoelace sum of the
// quad without the roundoff of large coordinates.
func (pl *nodePlane) signedArea() float64 {
	sum := 0.0
	for v := range pl.nv - 1 {
		for u := range pl.nu - 1 {
			p0, p1 := pl.xy[v*pl.nu+u], pl.xy[v*pl.nu+u+1]
			p2, p3 := pl.xy[(v+1)*pl.nu+u+1], pl.xy[(v+1)*pl.nu+u]
			sum += 0.5 * ((p2[0]-p0[0])*(p3[1]-p1[1]) - (p2[1]-p0[1])*(p3[0]-p1[0]))
		}
	}
	return sum
}

// mergeNodes returns, for each node of the planes (plane b's nodes
// numbered from first[b]), the lowest-numbered node it is merged with,
// itself if none. Only the nodes on the planes' sides are candidates:
// there block interfaces and seams lie. Two candidates merge when their
// distance is at most mergeTolerance times the shorter of their local
// face lengths (see mergeTolerance; mesh.JoinCoincident finds them);
// merging is transitive.
func mergeNodes(planes []*nodePlane, first []int) []int32 {
	root := hugepage.Make[int32](first[len(planes)])
	for g := range root {
		root[g] = int32(g)
	}
	find := func(g int32) int32 {
		for root[g] != g {
			root[g] = root[root[g]]
			g = root[g]
		}
		return g
	}
	var sides []mesh.SideNode
	for b, pl := range planes {
		sides = mesh.SideNodes(sides, pl.xy, pl.nu, pl.nv, int32(first[b]), b, mergeTolerance)
	}
	mesh.JoinCoincident(sides, func(c, o mesh.SideNode) {
		a, b := find(c.ID), find(o.ID)
		root[max(a, b)] = min(a, b)
	})
	for g := range root {
		root[g] = find(int32(g))
	}
	return root
}
