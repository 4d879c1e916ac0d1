package quality

import (
	"fmt"
	"math"

	"cvdeck/geometry"
	"cvdeck/mesh"
)

// The connectivity checks, in the order the report lists them.
const (
	CheckFaceCells   = "face_cells"        // each face has its owner, and a neighbour exactly when interior
	CheckCellFaces   = "cell_faces"        // each cell edge is exactly one face (a missing one is a gap)
	CheckOrientation = "orientation"       // the two cells of a face traverse it in opposite directions
	CheckBoundaryTag = "boundary_tag"      // each boundary face carries a tag
	CheckWatertight  = "watertight"        // boundary loops are closed: Σ S n = 0, every node balanced
	CheckZeroFace    = "zero_length_face"  // no face of zero length
	CheckDuplicate   = "duplicate_node"    // no two boundary nodes closer than the tolerance (see below)
	CheckUnused      = "unused_node"       // every node belongs to a cell
	CheckHanging     = "hanging_node"      // no node lies inside another cell's face
	CheckCrossing    = "boundary_crossing" // no two boundary faces cross or touch away from a shared node
	CheckOverlap     = "overlap"           // no ground covered by two cells: nothing lies just beyond a boundary face
)

// Cells lying over each other without any inverted cell (a grid marched
// into itself, a patch laid over another, a node moved into a neighbouring
// cell) leave their mark on the boundary: as a crossing (boundary_crossing)
// or, where the boundary does not cross itself, as cells beyond a boundary
// face (overlap, see checkOverlap).

// Duplicate nodes are looked for among the boundary nodes: two copies of a
// node that should be one leave a crack, and the faces along a crack are
// boundary faces, so both copies are boundary nodes. Coincident nodes that
// are both interior would mean two fans of cells covering the same ground
// (as overset grids do by design); that is an overlap, not a duplicate.
// Coincident nodes of one cell show as zero-length faces or degenerate
// cells, and unreferenced copies as unused nodes.
var checkNames = []string{CheckFaceCells, CheckCellFaces, CheckOrientation, CheckBoundaryTag,
	CheckWatertight, CheckCrossing, CheckOverlap, CheckZeroFace, CheckDuplicate, CheckUnused, CheckHanging}

// Problem is one connectivity defect, located by the cell, face and node it
// concerns (-1 where it concerns none) and the position (X, Y) where to look.
type Problem struct {
	Check   string  `json:"check"`
	Cell    int     `json:"cell"`
	Face    int     `json:"face"`
	Node    int     `json:"node"`
	X       float64 `json:"x"`
	Y       float64 `json:"y"`
	Message string  `json:"message"`
}

// CheckResult is the outcome of one connectivity check: how many defects it
// found and the first ones, at most Limits.MaxProblems of them.
type CheckResult struct {
	Name     string    `json:"name"`
	Status   Status    `json:"status"`
	Count    int       `json:"count"`
	Problems []Problem `json:"problems"`
}

// connectivity gathers problems by check. Parallel loops fill one per
// chunk and merge them in chunk order, so the lists are deterministic.
type connectivity struct {
	max     int
	results []CheckResult // in checkNames order
	// cells lists the cell of every problem that names one, in order.
	cells []int32
}

func newConnectivity(maxProblems int) *connectivity {
	c := &connectivity{max: maxProblems, results: make([]CheckResult, len(checkNames))}
	for i, n := range checkNames {
		c.results[i] = CheckResult{Name: n, Problems: []Problem{}}
	}
	return c
}

func (c *connectivity) add(p Problem) {
	for i := range c.results {
		if r := &c.results[i]; r.Name == p.Check {
			r.Count++
			r.Status = Fail
			if len(r.Problems) < c.max {
				r.Problems = append(r.Problems, p)
			}
		}
	}
	if p.Cell >= 0 {
		c.cells = append(c.cells, int32(p.Cell))
	}
}

// result returns the result of the named check.
func (c *connectivity) result(name string) *CheckResult {
	for i := range c.results {
		if c.results[i].Name == name {
			return &c.results[i]
		}
	}
	panic("quality: no check " + name)
}

// merge appends the findings of o after those of c.
func (c *connectivity) merge(o *connectivity) {
	for i := range c.results {
		r, q := &c.results[i], &o.results[i]
		r.Count += q.Count
		r.Status = max(r.Status, q.Status)
		for _, p := range q.Problems {
			if len(r.Problems) < c.max {
				r.Problems = append(r.Problems, p)
			}
		}
	}
	c.cells = append(c.cells, o.cells...)
}

// inChunks runs check over [0, n) in parallel chunks, each filling its own
// connectivity, and merges them into c in chunk order.
func (c *connectivity) inChunks(n int, check func(lo, hi int, cn *connectivity)) {
	parts := make([]*connectivity, (n+chunk-1)/chunk)
	forChunks(n, func(lo, hi int) {
		p := newConnectivity(c.max)
		check(lo, hi, p)
		parts[lo/chunk] = p
	})
	for _, p := range parts {
		c.merge(p)
	}
}

// MaxCoordinate is the largest coordinate magnitude, in metres, that the
// checks take. A cell centroid sums products of three coordinate
// differences (mesh.PolygonAreaCentroid), each up to 2·MaxCoordinate, so
// at 1e90 they stay below 1e272 and a polygon of any practical number of
// nodes cannot overflow double precision (largest 1.8e308). No physical
// mesh comes near it; a file that does is in the wrong units, or corrupt.
const MaxCoordinate = 1e90

// validateArrays checks that the mesh arrays agree in length and that every
// index is in range, so that the metrics can be computed at all. It returns
// an error naming the first array or index that is wrong.
func validateArrays(m *mesh.Mesh) error {
	nc, nf, nn := m.NumCells(), m.NumFaces(), len(m.Nodes)
	if nc < 0 {
		return fmt.Errorf("quality: CellStart is empty; it needs one entry more than the cell count")
	}
	if int(m.CellStart[nc]) != len(m.CellNodes) || m.CellStart[0] != 0 {
		return fmt.Errorf("quality: CellStart runs %d..%d; it must run from 0 to len(CellNodes)=%d", m.CellStart[0], m.CellStart[nc], len(m.CellNodes))
	}
	// !(|x| <= MaxCoordinate) also holds for NaN.
	if v := firstBad(nn, func(lo, hi int) int {
		for v, p := range m.Nodes[lo:hi] {
			if !(math.Abs(p[0]) <= MaxCoordinate && math.Abs(p[1]) <= MaxCoordinate) {
				return lo + v
			}
		}
		return -1
	}); v >= 0 {
		p := m.Nodes[v]
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return fmt.Errorf("quality: node %d is at (%g, %g); coordinates must be finite", v, p[0], p[1])
		}
		return fmt.Errorf("quality: node %d is at (%g, %g); the checks take coordinates up to %g m in magnitude, beyond which the cell centroids overflow (are the coordinates in the wrong units?)", v, p[0], p[1], MaxCoordinate)
	}
	start, end := m.CellStart, m.CellStart[nc]
	if c := firstBad(nc, func(lo, hi int) int {
		for c := lo; c < hi; c++ {
			if start[c+1]-start[c] < 3 || start[c+1] > end {
				return c
			}
			for _, v := range m.CellNodes[start[c]:start[c+1]] {
				if uint32(v) >= uint32(nn) {
					return c
				}
			}
		}
		return -1
	}); c >= 0 {
		if start[c+1]-start[c] < 3 || start[c+1] > end {
			return fmt.Errorf("quality: cell %d has %d nodes; a cell needs at least 3", c, start[c+1]-start[c])
		}
		for _, v := range m.CellNodes[start[c]:start[c+1]] {
			if v < 0 || int(v) >= nn {
				return fmt.Errorf("quality: cell %d refers to node %d; nodes run from 0 to %d", c, v, nn-1)
			}
		}
	}
	if len(m.Owner) != nf || len(m.Neighbour) != nf || len(m.FaceTag) != nf {
		return fmt.Errorf("quality: %d faces but %d owners, %d neighbours and %d face tags; all four must agree", nf, len(m.Owner), len(m.Neighbour), len(m.FaceTag))
	}
	if m.NumInterior < 0 || m.NumInterior > nf {
		return fmt.Errorf("quality: NumInterior = %d; it must lie in 0..%d", m.NumInterior, nf)
	}
	faceErr := func(f int) error {
		fn := m.FaceNodes[f]
		if fn[0] < 0 || int(fn[0]) >= nn || fn[1] < 0 || int(fn[1]) >= nn {
			return fmt.Errorf("quality: face %d joins nodes %d-%d; nodes run from 0 to %d", f, fn[0], fn[1], nn-1)
		}
		if o := m.Owner[f]; o < 0 || int(o) >= nc {
			return fmt.Errorf("quality: face %d has owner %d; cells run from 0 to %d", f, o, nc-1)
		}
		if nb := m.Neighbour[f]; nb < -1 || int(nb) >= nc {
			return fmt.Errorf("quality: face %d has neighbour %d; it must be -1 (boundary) or a cell 0..%d", f, nb, nc-1)
		}
		if t := m.FaceTag[f]; t < -1 || int(t) >= len(m.Tags) {
			return fmt.Errorf("quality: face %d has tag index %d; there are %d tags", f, t, len(m.Tags))
		}
		return nil
	}
	// The unsigned comparisons test 0 ≤ i < n; adding 1 admits −1.
	if f := firstBad(nf, func(lo, hi int) int {
		faceNodes, owner, neighbour, tag := m.FaceNodes[lo:hi], m.Owner[lo:hi], m.Neighbour[lo:hi], m.FaceTag[lo:hi]
		for i, fn := range faceNodes {
			if uint32(fn[0]) >= uint32(nn) || uint32(fn[1]) >= uint32(nn) || uint32(owner[i]) >= uint32(nc) ||
				uint32(neighbour[i]+1) > uint32(nc) || uint32(int32(tag[i])+1) > uint32(len(m.Tags)) {
				return lo + i
			}
		}
		return -1
	}); f >= 0 {
		return faceErr(f)
	}
	g := &m.Geo
	if len(g.FaceLength) != nf || len(g.FaceNormal) != nf || len(g.FaceMid) != nf || len(g.CellArea) != nc || len(g.CellCentroid) != nc {
		return fmt.Errorf("quality: derived geometry does not match the mesh (%d faces, %d cells); recompute it with mesh.ComputeGeometry", nf, nc)
	}
	return nil
}

// firstBad runs scan over [0, n) in parallel chunks, each call returning
// the first bad index of its range [lo, hi) or -1, and returns the lowest
// bad index, or -1.
func firstBad(n int, scan func(lo, hi int) int) int {
	bad := make([]int, (n+chunk-1)/chunk)
	forChunks(n, func(lo, hi int) { bad[lo/chunk] = scan(lo, hi) })
	for _, i := range bad {
		if i >= 0 {
			return i
		}
	}
	return -1
}

// edgeAt returns the position k in cell nodes idx where the edge a→b
// starts (idx[k] = a, idx[k+1] = b), or -1.
func edgeAt(idx []int32, a, b int32) int {
	n := len(idx)
	for k, v := range idx {
		if v == a && idx[(k+1)%n] == b {
			return k
		}
	}
	return -1
}

// checkFaces runs the per-face checks: face_cells, orientation,
// boundary_tag, zero_length_face, and cell_faces through cf.
func checkFaces(m *mesh.Mesh, cf cellFaces, cn *connectivity) {
	cn.inChunks(m.NumFaces(), func(lo, hi int, cn *connectivity) { checkFaceRange(m, lo, hi, cn) })
	cn.inChunks(m.NumCells(), func(lo, hi int, cn *connectivity) { checkCellRange(m, cf, lo, hi, cn) })
}

// checkFaceRange checks faces [lo, hi).
func checkFaceRange(m *mesh.Mesh, lo, hi int, cn *connectivity) {
	g := &m.Geo
	// report records a defect of face f naming cell c, placed at the face
	// midpoint (read only then).
	report := func(check string, f, c int, msg string) {
		mid := g.FaceMid[f]
		cn.add(Problem{Check: check, Cell: c, Face: f, Node: -1, X: mid[0], Y: mid[1], Message: msg})
	}
	for f := lo; f < hi; f++ {
		fn := m.FaceNodes[f]
		a, b := fn[0], fn[1]
		o, nb := int(m.Owner[f]), int(m.Neighbour[f])
		interior := f < m.NumInterior
		switch {
		case interior && nb < 0:
			report(CheckFaceCells, f, o, fmt.Sprintf("face %d (nodes %d-%d) is listed among the interior faces but has only cell %d", f, a, b, o))
		case !interior && nb >= 0:
			report(CheckFaceCells, f, o, fmt.Sprintf("face %d (nodes %d-%d) is listed among the boundary faces but has two cells, %d and %d", f, a, b, o, nb))
		case nb == o:
			report(CheckFaceCells, f, o, fmt.Sprintf("face %d (nodes %d-%d) has cell %d on both sides", f, a, b, o))
		}
		if owner := m.CellNodes[m.CellStart[o]:m.CellStart[o+1]]; edgeAt(owner, a, b) < 0 {
			if edgeAt(owner, b, a) >= 0 {
				if area := m.Geo.CellArea[o]; area < 0 {
					// mesh.Build runs a clockwise cell's boundary faces
					// against it, so that they point out of the mesh.
					report(CheckOrientation, f, o, fmt.Sprintf("face %d runs %d→%d, out of the mesh, against its owner cell %d, which runs clockwise (area %.6g)", f, a, b, o, area))
				} else {
					report(CheckOrientation, f, o, fmt.Sprintf("face %d runs %d→%d but its owner, cell %d, traverses it %d→%d; the normal would point into the owner", f, a, b, o, b, a))
				}
			} else {
				report(CheckFaceCells, f, o, fmt.Sprintf("face %d (nodes %d-%d) is not an edge of its owner, cell %d", f, a, b, o))
			}
		}
		if nb >= 0 && nb != o {
			if other := m.CellNodes[m.CellStart[nb]:m.CellStart[nb+1]]; edgeAt(other, b, a) < 0 {
				if edgeAt(other, a, b) >= 0 {
					// Name the cell that is turned the wrong way, if one is.
					c := nb
					if g.CellArea[o] < 0 && g.CellArea[nb] >= 0 {
						c = o
					}
					report(CheckOrientation, f, c, fmt.Sprintf("cells %d and %d both traverse face %d as %d→%d; neighbouring cells must traverse a shared face in opposite directions (cell %d area %.6g, cell %d area %.6g)",
						o, nb, f, a, b, o, g.CellArea[o], nb, g.CellArea[nb]))
				} else {
					report(CheckFaceCells, f, nb, fmt.Sprintf("face %d (nodes %d-%d) is not an edge of its neighbour, cell %d", f, a, b, nb))
				}
			}
		}
		if !interior && nb < 0 && m.FaceTag[f] < 0 {
			report(CheckBoundaryTag, f, o, fmt.Sprintf("boundary face %d (nodes %d-%d) of cell %d has no tag; an untagged face inside the domain is a crack, a hole or a hanging node", f, a, b, o))
		}
		if g.FaceLength[f] == 0 {
			report(CheckZeroFace, f, o, fmt.Sprintf("face %d joins nodes %d and %d at the same position", f, a, b))
		}
	}
}

// checkCellRange checks that each cell of [lo, hi) has one face per edge.
func checkCellRange(m *mesh.Mesh, cf cellFaces, lo, hi int, cn *connectivity) {
	g := &m.Geo
	for c := lo; c < hi; c++ {
		have, want := int(cf.start[c+1]-cf.start[c]), len(m.Cell(c))
		if have == want {
			continue
		}
		cc := g.CellCentroid[c]
		p := Problem{Check: CheckCellFaces, Cell: c, Face: -1, Node: -1, X: cc[0], Y: cc[1]}
		if have < want {
			idx := m.Cell(c)
			missing := ""
			for k := range idx {
				a, b := idx[k], idx[(k+1)%len(idx)]
				if !cellHasFace(m, cf, c, a, b) {
					missing += fmt.Sprintf(" %d-%d", a, b)
				}
			}
			p.Message = fmt.Sprintf("cell %d has %d edges but only %d faces; no face for edge(s)%s: a gap in the mesh", c, want, have, missing)
		} else {
			p.Message = fmt.Sprintf("cell %d has %d edges but %d faces refer to it", c, want, have)
		}
		cn.add(p)
	}
}

// cellHasFace reports whether a face of cell c joins nodes a and b.
func cellHasFace(m *mesh.Mesh, cf cellFaces, c int, a, b int32) bool {
	for _, f := range cf.faces[cf.start[c]:cf.start[c+1]] {
		fn := m.FaceNodes[f]
		if (fn[0] == a && fn[1] == b) || (fn[0] == b && fn[1] == a) {
			return true
		}
	}
	return false
}

// nodeCells returns, for each node, the lowest-numbered cell that uses it,
// or -1 for an unused node. buf holds the array, kept for reuse.
func nodeCells(m *mesh.Mesh, buf *[]int32) []int32 {
	first := resize(buf, len(m.Nodes))
	for i := range first {
		first[i] = -1
	}
	for c := m.NumCells() - 1; c >= 0; c-- {
		for _, v := range m.Cell(c) {
			first[v] = int32(c)
		}
	}
	return first
}

// checkCrossing runs boundary_crossing: the first two boundary faces that
// cross or touch, other than at a node they share (the same node, or two
// copies of one at the same place, which duplicate_node reports).
func checkCrossing(m *mesh.Mesh, cn *connectivity) {
	nb := m.NumBoundary()
	pieces := make([]geometry.Piece, nb)
	for k := range pieces {
		fn := m.FaceNodes[m.NumInterior+k]
		pieces[k] = geometry.Piece{A: m.Nodes[fn[0]], B: m.Nodes[fn[1]]}
	}
	a, b, p, hit := geometry.FirstCrossing(pieces, func(i, j int) bool {
		pi, pj := pieces[i], pieces[j]
		return pi.A == pj.A || pi.A == pj.B || pi.B == pj.A || pi.B == pj.B
	})
	if !hit {
		return
	}
	fa, fb := m.NumInterior+min(a, b), m.NumInterior+max(a, b)
	cn.add(Problem{Check: CheckCrossing, Cell: int(m.Owner[fa]), Face: fa, Node: -1, X: p[0], Y: p[1],
		Message: fmt.Sprintf("boundary faces %d and %d (of cells %d and %d) meet at (%.9g, %.9g): the mesh lies over itself there, or two of its boundaries run into each other (the first such place found)", fa, fb, m.Owner[fa], m.Owner[fb], p[0], p[1])})
}

// checkNodes runs unused_node and the node balance of watertight: on a
// closed boundary every node starts as many boundary faces as it ends.
// buf holds the balance array, kept for reuse.
func checkNodes(m *mesh.Mesh, first []int32, buf *[]int32, bclosure, tol float64, cn *connectivity) {
	for v, c := range first {
		if c < 0 {
			p := m.Nodes[v]
			cn.add(Problem{Check: CheckUnused, Cell: -1, Face: -1, Node: v, X: p[0], Y: p[1],
				Message: fmt.Sprintf("node %d at (%.9g, %.9g) belongs to no cell", v, p[0], p[1])})
		}
	}
	balance := zeroed(buf, len(m.Nodes))
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		fn := m.FaceNodes[f]
		balance[fn[0]]++
		balance[fn[1]]--
	}
	for v, b := range balance {
		if b == 0 {
			continue
		}
		p := m.Nodes[v]
		dir := "starts"
		if b < 0 {
			dir, b = "ends", -b
		}
		cn.add(Problem{Check: CheckWatertight, Cell: int(first[v]), Face: -1, Node: v, X: p[0], Y: p[1],
			Message: fmt.Sprintf("the boundary is open at node %d (%.9g, %.9g): it %s %d more boundary face(s) than the other way round", v, p[0], p[1], dir, b)})
	}
	if bclosure > tol || math.IsNaN(bclosure) {
		cn.add(Problem{Check: CheckWatertight, Cell: -1, Face: -1, Node: -1,
			Message: fmt.Sprintf("the boundary faces do not close: |Σ S n| / Σ S = %.3g, above %.3g", bclosure, tol)})
	}
}
