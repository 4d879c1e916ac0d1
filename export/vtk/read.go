package vtk

import (
	"bytes"
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/internal/hugepage"
	"cvdeck/mesh"
)

// Tag arrays the readers look for among the cell data, in this order. An
// integer array gives each line's tag number: negative means untagged, and
// a number k names the tag TagNamesArray[k] when the file's FieldData has
// that String array (as WriteBoundaryVTP writes it), else the decimal
// number. A String array gives the tag name itself ("" is untagged).
var tagArrayNames = []string{"boundary_tag", TagArray}

// ReadFile reads an unstructured grid from a .vtu (XML) or .vtk (legacy)
// file, or a polygon mesh from a .vtp (XML PolyData, see ReadVTP) or a
// legacy POLYDATA .vtk, chosen by the extension, and builds a mesh from
// it: triangles, quads, pixels and polygons become cells; lines and
// polylines become boundary faces tagged from the cell-data array named
// as tagArrayNames says; vertex cells are skipped, with a note (see
// ReadFileNotes). Boundary faces without a tag (no tag array, no lines,
// or lines that leave part of the boundary out) stay untagged: see
// mesh.Mesh.UntaggedRange. The nodes must lie in one plane z = c (z is
// dropped), or x = c or y = c (see mapPlane), to within rounding (see
// planeOf3); a file whose cells mostly run clockwise is read turned round
// (see turnRound), and a
// legacy file named .vtu or .vtp, or an XML one named .vtk, is read as
// what it holds; each with a note.
//
// A 2D case stored the way 3D solvers take one, a slab one cell thick, is
// read too: points on two planes z = z0 < z1, cells that are hexahedra,
// voxels or wedges standing between the planes (each top node straight
// above its bottom node). The mesh is the lower plane: each cell becomes
// its face there, oriented counter-clockwise seen from +z when the 3D
// cell has positive volume. Quads and pixels spanning the planes are the
// side boundary faces (tagged like lines), lines on the lower plane are
// boundary faces too, and cells lying in either plane (the front and back
// patches) and lines on the upper plane are left out.
//
// A .vts (XML StructuredGrid) is read by ReadVTS, and a .vtm (XML
// multiblock index of .vts blocks) by ReadVTM, which joins its blocks
// into one mesh; neither names boundary tags.
func ReadFile(path string) (*mesh.Mesh, error) {
	m, _, err := ReadFileNotes(path)
	return m, err
}

// ReadFileNotes is ReadFile that also returns notes on how the file was
// read where the mesh does not show it, for a user who did not write the
// file: the z of a plane mesh that does not lie on z = 0, the vertex cells
// skipped, and for a slab its planes and what was left out (front and back
// patches and lines on the upper plane, with their tags).
func ReadFileNotes(path string) (*mesh.Mesh, []string, error) {
	data, err := hugepage.ReadFile(path)
	if err != nil {
		return nil, nil, err
	}
	var g *grid
	ext := strings.ToLower(filepath.Ext(path))
	var renamed string // how the file was read when its content belies its extension
	switch kind := sniff(data); {
	case kind == "legacy" && (ext == ".vtu" || ext == ".vtp"):
		renamed, ext = fmt.Sprintf("a legacy VTK file (first line \"# vtk DataFile Version ...\"), not VTK XML as its %s extension says; read as legacy VTK", ext), ".vtk"
	case ext == ".vtk" && kind != "" && kind != "legacy":
		// VTK XML under a legacy name: read by its VTKFile type.
		to := map[string]string{"UnstructuredGrid": ".vtu", "PolyData": ".vtp", "StructuredGrid": ".vts"}[kind]
		if to == "" {
			return nil, nil, fmt.Errorf("%s: a VTK XML file of type %q, not a legacy VTK file as its .vtk extension says; cvdeck reads XML UnstructuredGrid, PolyData and StructuredGrid files", path, kind)
		}
		renamed, ext = fmt.Sprintf("a VTK XML %s file, not legacy VTK as its .vtk extension says; read as %s", kind, to), to
	}
	switch ext {
	case ".vts":
		m, notes, err := readVTS(data, path)
		if renamed != "" && err == nil {
			notes = append([]string{renamed}, notes...)
		}
		return m, notes, err
	case ".vtm":
		return readVTM(data, path)
	case ".vtu":
		g, err = parseVTU(data, path)
	case ".vtk":
		g, err = (&legacyReader{data: data, file: path}).read()
	case ".vtp":
		g, err = parseVTP(data, path)
	default:
		return nil, nil, fmt.Errorf("%s: unknown extension %q; cvdeck reads VTK unstructured grids as .vtu or .vtk, polygon meshes as .vtp, and structured grids as .vts or as the .vtm index of .vts blocks", path, filepath.Ext(path))
	}
	if err != nil {
		return nil, nil, err
	}
	if renamed != "" {
		g.notes = append(g.notes, renamed)
	}
	m, err := g.toMesh()
	if err != nil {
		return nil, nil, err
	}
	return m, g.notes, nil
}

// sniff tells what a VTK file holds by its first bytes: "legacy" for the
// legacy header line "# vtk DataFile Version", the VTKFile type attribute
// (such as "UnstructuredGrid") for VTK XML, "" when it is neither or the
// type cannot be found in the first 4 KiB.
func sniff(data []byte) string {
	head := bytes.TrimLeft(data[:min(len(data), 4096)], " \t\r\n\ufeff")
	if bytes.HasPrefix(head, []byte("# vtk DataFile Version")) {
		return "legacy"
	}
	i := bytes.Index(head, []byte("<VTKFile"))
	if i < 0 {
		return ""
	}
	tag := head[i:]
	if e := bytes.IndexByte(tag, '>'); e >= 0 {
		tag = tag[:e]
	}
	if m := xmlType.FindSubmatch(tag); m != nil {
		return string(m[1])
	}
	return ""
}

// xmlType finds the type attribute of a VTKFile start tag.
var xmlType = regexp.MustCompile(`\stype\s*=\s*["']([A-Za-z]+)["']`)

// array is one data array as read from a file, before interpretation.
type array struct {
	name  string
	comps int
	// Exactly one of these is set, by the array's type.
	ints   []int64
	floats []float64
	strs   []string
}

// length is the number of values (tuples × components, or strings).
func (a *array) length() int {
	switch {
	case a.strs != nil:
		return len(a.strs)
	case a.floats != nil:
		return len(a.floats)
	}
	return len(a.ints)
}

// asFloats returns the values as float64s.
func (a *array) asFloats() []float64 {
	if a.floats != nil {
		return a.floats
	}
	f := make([]float64, len(a.ints))
	for i, v := range a.ints {
		f[i] = float64(v)
	}
	return f
}

// grid is an unstructured grid as read from a file.
type grid struct {
	file      string
	points    []float64 // x, y, z per point
	offsets   []int64   // end of each cell's nodes in conn
	conn      []int64
	types     []int64
	cellData  []*array
	fieldData []*array
	// cellArrays names every cell-data array of the file, decoded or not,
	// for the note on a file whose tags are under another name.
	cellArrays []string
	// notes say how the grid was read where the mesh does not show it.
	notes []string
}

// find returns the array called name, or nil.
func find(arrays []*array, name string) *array {
	for _, a := range arrays {
		if a.name == name {
			return a
		}
	}
	return nil
}

// cellTypeName names the VTK cell types (vtkCellType.h) for error messages.
var cellTypeName = map[int64]string{
	1: "vertex", 2: "poly-vertex", 3: "line", 4: "poly-line", 5: "triangle", 6: "triangle strip",
	7: "polygon", 8: "pixel", 9: "quad", 10: "tetra", 11: "voxel", 12: "hexahedron", 13: "wedge", 14: "pyramid",
}

// toMesh turns the grid into a mesh.
func (g *grid) toMesh() (*mesh.Mesh, error) {
	np := len(g.points) / 3
	nc := len(g.types)
	if len(g.offsets) != nc {
		return nil, fmt.Errorf("%s: %d cell offsets for %d cell types; they must match", g.file, len(g.offsets), nc)
	}
	if np > math.MaxInt32 {
		return nil, fmt.Errorf("%s: %d points; cvdeck meshes hold at most %d", g.file, np, math.MaxInt32)
	}
	if np == 0 {
		return nil, fmt.Errorf("%s: no points; nothing to check", g.file)
	}
	if err := g.checkCells(); err != nil {
		return nil, err
	}
	if err := finitePoints(g.file, g.points); err != nil {
		return nil, err
	}
	if sl, ok, err := g.slab(); err != nil || ok {
		if err != nil {
			return nil, err
		}
		return g.slabMesh(sl)
	}
	in := mesh.Input{Nodes: hugepage.Make[orb.Point](np)}
	view := "+z"
	pl := planeOf3(g.points)
	switch pl.axis {
	case -1:
		return nil, fmt.Errorf("%s: %s; cvdeck reads plane 2D meshes lying in a plane x, y or z = constant, or slabs one cell thick of hexahedra, voxels or wedges", g.file, pl.refusal())
	case 2:
		if pl.at != 0 || pl.spread > 0 {
			g.notes = append(g.notes, fmt.Sprintf("a plane mesh on z = %s%s, read as 2D (z dropped)", pl.atText(), pl.spreadNote()))
		}
	default:
		var note string
		note, view = mapPlane(g.points, pl)
		g.notes = append(g.notes, note)
	}
	inRanges(np, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			in.Nodes[i] = orb.Point{g.points[3*i], g.points[3*i+1]}
		}
	})
	if err := g.planeCells(&in); err != nil {
		return nil, err
	}
	g.orient(&in, "run clockwise seen from "+view+" (negative signed area)")
	m, err := mesh.Build(in)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", g.file, err)
	}
	return m, nil
}

// plane3 is the coordinate plane that points in 3D lie on (see planeOf3):
// the axis whose coordinate is constant (0 for x, 1 for y, 2 for z; −1
// for none), the plane's coordinate at (the mean of the points'), and
// spread, how far apart the points' coordinates on that axis are (0 when
// they are equal). tol is the largest spread taken as one plane, and for
// axis −1, lo and hi name the points (0-based) of least and greatest z.
type plane3 struct {
	axis       int
	at, spread float64
	tol        float64
	lo, hi     int
	zlo, zhi   float64
}

// finitePoints returns an error naming the first point of pts (x, y, z
// each) with a coordinate that is NaN or infinite (file names the file),
// nil if there is none: no plane, area or check means anything there.
func finitePoints(file string, pts []float64) error {
	for i, v := range pts {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			k := i / 3
			return fmt.Errorf("%s: point %d is at (%g, %g, %g); coordinates must be finite", file, k, pts[3*k], pts[3*k+1], pts[3*k+2])
		}
	}
	return nil
}

// planeOf3 finds the coordinate plane that pts (x, y, z each) lie on,
// trying z, then y, then x: the first axis whose coordinates spread over
// at most mesh.PlaneTolerance times the largest coordinate magnitude of
// any point, and sets every point's coordinate on that axis to their mean,
// so that the readers after it see one plane exactly.
//
// The tolerance is relative to the largest magnitude, not to the mesh's
// extent, because rounding is: a coordinate computed near c (by a
// rotation, a change of units) is off by a few units in the last place of
// the values it came from, about 2.2e-16 of them, so 1e-12 allows some
// 4500 such units while a tilt or a curve any real surface has, 1e-12 of
// its size, is far beyond it. A spread within it is rounding, not shape.
// The CGNS reader makes the same test with the same constant.
func planeOf3(pts []float64) plane3 {
	extent := 0.0
	for _, v := range pts {
		extent = max(extent, math.Abs(v))
	}
	n := len(pts) / 3
	pl := plane3{axis: -1, tol: mesh.PlaneTolerance * extent}
	for _, a := range []int{2, 1, 0} {
		lo, hi := 0, 0
		for i := 1; i < n; i++ {
			if v := pts[3*i+a]; v < pts[3*lo+a] {
				lo = i
			} else if v > pts[3*hi+a] {
				hi = i
			}
		}
		spread := pts[3*hi+a] - pts[3*lo+a]
		if a == 2 {
			pl.lo, pl.hi, pl.zlo, pl.zhi = lo, hi, pts[3*lo+a], pts[3*hi+a]
		}
		if !(spread <= pl.tol) {
			continue
		}
		pl.axis, pl.spread, pl.at = a, spread, pts[a]
		if spread > 0 {
			// The mean, summed about the first point's value so that
			// large coordinates lose nothing to the sum.
			c, sum := pts[a], 0.0
			for i := range n {
				sum += pts[3*i+a] - c
			}
			pl.at = c + sum/float64(n)
			inRanges(n, func(_, lo, hi int) {
				for i := lo; i < hi; i++ {
					pts[3*i+a] = pl.at
				}
			})
		}
		return pl
	}
	return pl
}

// atText is the plane's coordinate as a note gives it: in full when the
// points all had it, else their mean as far as the spread lets it be
// known (see shownAt), to 9 digits.
func (pl plane3) atText() string {
	if pl.spread > 0 {
		return strconv.FormatFloat(shownAt(pl.at, pl.spread), 'g', 9, 64)
	}
	return strconv.FormatFloat(pl.at, 'g', -1, 64)
}

// shownAt is the mean at of coordinates that spread over spread > 0,
// rounded to the decade of the spread, below which its digits are the
// sum's rounding (the mean of ±1e-16 is 0, not 2.5e-32): what a note
// gives. The CGNS reader's notes round it alike.
func shownAt(at, spread float64) float64 {
	q := math.Pow(10, math.Floor(math.Log10(spread)))
	return math.Round(at/q)*q + 0 // + 0 turns −0 into 0
}

// shown is the plane's coordinate as a note gives it: see shownAt.
func (pl plane3) shown() float64 {
	if pl.spread > 0 {
		return shownAt(pl.at, pl.spread)
	}
	return pl.at
}

// spreadNote is the phrase a note on the plane adds when the points'
// coordinates on its axis were not all equal: how far they spread and
// that the plane was taken at their mean; "" when they were equal.
func (pl plane3) spreadNote() string {
	if pl.spread == 0 {
		return ""
	}
	return fmt.Sprintf(" (the points' %s spread over %.3g, within the %.3g that rounding gives: taken as one plane at their mean)", [3]string{"x", "y", "z"}[pl.axis], pl.spread, pl.tol)
}

// refusal says why points on no coordinate plane (axis −1) are not read:
// their z spread, by the points of least and greatest z, and that x and
// y spread as far.
func (pl plane3) refusal() string {
	return fmt.Sprintf("the points' z runs from %g (point %d) to %g (point %d), a spread of %.3g, more than the %.3g that rounding gives, and their x and y spread as far: they lie on no plane x, y or z = constant (a tilted plane, or a 3D surface)", pl.zlo, pl.lo, pl.zhi, pl.hi, pl.zhi-pl.zlo, pl.tol)
}

// mapPlane rewrites pts (x, y, z each), whose points lie on the plane pl
// of axis 0 (x = c) or 1 (y = c), so that the two coordinates that vary
// come first and the constant one last: (y, z, x) for x = c, seen from
// +x, and (x, z, y) for y = c, seen from −y, both right-handed
// (x̂ × ẑ = −ŷ, ŷ × ẑ = x̂), so that a cell counter-clockwise in the new
// (x, y) is counter-clockwise seen from that side. It returns the note
// saying so and the side the mesh is seen from.
func mapPlane(pts []float64, pl plane3) (note, view string) {
	axis := pl.axis
	u, v, name, view := 1, 2, "x", "+x"
	if axis == 1 {
		u, v, name, view = 0, 2, "y", "−y"
	}
	uv := [3]string{"x", "y", "z"}
	inRanges(len(pts)/3, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			p := pts[3*i : 3*i+3]
			p[0], p[1], p[2] = p[u], p[v], p[axis]
		}
	})
	return fmt.Sprintf("a plane mesh on %s = %.9g%s, read as 2D with (%s, %s) taken as (x, y), seen from %s (%s dropped; files written from it, such as check -o's, are in that (x, y) plane)", name, pl.shown(), pl.spreadNote(), uv[u], uv[v], view, name), view
}

// orient turns the cells of in round (see mesh.TurnRound) when most of them,
// by count, run clockwise (sense says how, as a phrase such as "run
// clockwise seen from +z (negative signed area)"), with a note that says
// so and how many ran the other way.
func (g *grid) orient(in *mesh.Input, sense string) {
	if note := mesh.TurnRound(in, sense); note != "" {
		g.notes = append(g.notes, note)
	}
}

// planeCells turns the cells of a plane grid into the cells and tagged
// boundary edges of in: triangles, quads, pixels and polygons become
// cells, lines and polylines tagged edges, vertex cells are skipped (with
// a note). The cells are sized and checked in ranges side by side, then
// copied into place side by side; the lines go through the edge tagger in
// cell order. The first error in cell order is the one returned, as one
// loop over the cells would return it.
func (g *grid) planeCells(in *mesh.Input) error {
	nc := len(g.types)
	b := rangeBounds(nc)
	type part struct {
		cells, nodes, vertices int
		lines                  []int
		bad                    int // the first bad cell, nc when none
		err                    error
	}
	parts := make([]part, len(b)-1)
	inRanges(nc, func(k, lo, hi int) {
		p := &parts[k]
		p.bad = nc
		for c := lo; c < hi; c++ {
			nodes := g.cell(c)
			t := g.types[c]
			want := fixedPoints(t)
			if want > 0 && len(nodes) != want || (t == cellPolygon && len(nodes) < 3) || (t == cellPolyLine && len(nodes) < 2) {
				p.bad, p.err = c, fmt.Errorf("%s: cell %d is a %s with %d points", g.file, c, cellTypeName[t], len(nodes))
				return
			}
			switch t {
			case cellVertex, cellPolyVertex:
				p.vertices++
			case cellTriangle, cellQuad, cellPolygon, cellPixel:
				p.cells++
				p.nodes += len(nodes)
			case cellLine, cellPolyLine:
				p.lines = append(p.lines, c)
			default:
				p.bad, p.err = c, fmt.Errorf("%s: cell %d has VTK type %d (%s); cvdeck reads triangles (5), quads (9), pixels (8), polygons (7) and boundary lines (3, 4)", g.file, c, t, typeName(t))
				return
			}
		}
	})
	tags, err := g.newEdgeTagger(in)
	if err != nil {
		return err
	}
	// Where each range's cells and cell nodes go, and the first error.
	cellAt, nodeAt := make([]int, len(parts)+1), make([]int, len(parts)+1)
	bad, badErr, vertices := nc, error(nil), 0
	for k, p := range parts {
		cellAt[k+1], nodeAt[k+1] = cellAt[k]+p.cells, nodeAt[k]+p.nodes
		vertices += p.vertices
		if p.err != nil && bad == nc {
			bad, badErr = p.bad, p.err
		}
	}
	for _, p := range parts {
		for _, c := range p.lines {
			if c > bad {
				break
			}
			if err := tags.chain(c, g.cell(c), func(v int64) int32 { return int32(v) }); err != nil {
				return err
			}
		}
	}
	if badErr != nil {
		return badErr
	}
	total := nodeAt[len(parts)]
	if total > math.MaxInt32 {
		return fmt.Errorf("%s: more than %d cell nodes", g.file, math.MaxInt32)
	}
	if cellAt[len(parts)] == 0 {
		return fmt.Errorf("%s: no triangle, quad, pixel or polygon cells; nothing to check", g.file)
	}
	in.CellStart = hugepage.Make[int32](cellAt[len(parts)] + 1)
	in.CellNodes = hugepage.Make[int32](total)
	inRanges(nc, func(k, lo, hi int) {
		cell, at := cellAt[k], nodeAt[k]
		for c := lo; c < hi; c++ {
			nodes := g.cell(c)
			switch g.types[c] {
			case cellTriangle, cellQuad, cellPolygon:
				for i, v := range nodes {
					in.CellNodes[at+i] = int32(v)
				}
			case cellPixel:
				// A pixel's points run in (i, j) order; as a polygon its
				// third and fourth swap (VTK file-format document, figure
				// of linear cell types).
				copy(in.CellNodes[at:], []int32{int32(nodes[0]), int32(nodes[1]), int32(nodes[3]), int32(nodes[2])})
			default:
				continue
			}
			at += len(nodes)
			cell++
			in.CellStart[cell] = int32(at)
		}
	})
	g.numberingNote(func(t int64) bool {
		return t == cellTriangle || t == cellQuad || t == cellPolygon || t == cellPixel
	}, "line and vertex", "area")
	if vertices > 0 {
		what := "vertex cells"
		if vertices == 1 {
			what = "vertex cell"
		}
		g.notes = append(g.notes, fmt.Sprintf("%d %s skipped", vertices, what))
	}
	return nil
}

// numberingNote adds a note when the file numbers other cells (of the
// kinds others names) before or among the cells that become the mesh's
// (isCell, of the kind kind), so that a cell number in the report, which counts the mesh's
// cells only, can be found in the file: when the others all come first,
// by the offset; otherwise by the rule.
func (g *grid) numberingNote(isCell func(t int64) bool, others, kind string) {
	first, last, cells, before := -1, -1, 0, 0
	for c, t := range g.types {
		if isCell(t) {
			if first < 0 {
				first = c
			}
			last = c
			cells++
		}
	}
	if first < 0 {
		return
	}
	before = last + 1 - cells // other cells before the last mesh cell
	switch {
	case before == 0:
	case last-first+1 == cells:
		g.notes = append(g.notes, fmt.Sprintf("the file lists %d %s cells before its %d %s cells: cell k of this report is the file's cell k + %d", first, others, cells, kind, first))
	default:
		g.notes = append(g.notes, fmt.Sprintf("the file lists %d %s cells among its %d %s cells: the cell numbers of this report count the %s cells only, from 0 in file order", before, others, cells, kind, kind))
	}
}

// fixedPoints is the number of points a cell of VTK type t has when that
// number is fixed, among the types cvdeck reads, and 0 otherwise.
func fixedPoints(t int64) int {
	switch t {
	case cellLine:
		return 2
	case cellTriangle:
		return 3
	case cellQuad, cellPixel:
		return 4
	case cellWedge:
		return 6
	case cellHex, cellVoxel:
		return 8
	}
	return 0
}

// checkCells checks that the cell offsets run in order within the
// connectivity and that every point number is a point of the grid, in
// ranges of cells side by side; the first bad cell is the one named.
func (g *grid) checkCells() error {
	np := int64(len(g.points) / 3)
	return firstRangeError(len(g.offsets), func(lo, hi int) error {
		start := int64(0)
		if lo > 0 {
			start = g.offsets[lo-1]
		}
		for c := lo; c < hi; c++ {
			end := g.offsets[c]
			if end < start || end > int64(len(g.conn)) {
				return fmt.Errorf("%s: cell %d: offset %d is out of order or past the %d connectivity entries", g.file, c, end, len(g.conn))
			}
			for _, v := range g.conn[start:end] {
				if v < 0 || v >= np {
					return fmt.Errorf("%s: cell %d refers to point %d; points run from 0 to %d", g.file, c, v, np-1)
				}
			}
			start = end
		}
		return nil
	})
}

// cell returns the point numbers of cell c (after checkCells).
func (g *grid) cell(c int) []int64 {
	start := int64(0)
	if c > 0 {
		start = g.offsets[c-1]
	}
	return g.conn[start:g.offsets[c]]
}

// edgeTagger adds tagged boundary edges to a mesh input, numbering the tag
// names in the order they first appear.
type edgeTagger struct {
	file  string
	in    *mesh.Input
	tagOf func(c int) string
	index map[string]int16
}

func (g *grid) newEdgeTagger(in *mesh.Input) (*edgeTagger, error) {
	tagOf, err := g.lineTags()
	if err != nil {
		return nil, err
	}
	return &edgeTagger{file: g.file, in: in, tagOf: tagOf, index: map[string]int16{}}, nil
}

// add records the edge a–b (mesh node numbers) of file cell c with the
// cell's tag; an untagged cell adds nothing.
func (e *edgeTagger) add(c int, a, b int32) error {
	name := e.tagOf(c)
	if name == "" {
		return nil
	}
	t, ok := e.index[name]
	if !ok {
		if len(e.in.Tags) == math.MaxInt16 {
			return fmt.Errorf("%s: cell %d: more than %d boundary tags", e.file, c, math.MaxInt16)
		}
		t = int16(len(e.in.Tags))
		e.index[name] = t
		e.in.Tags = append(e.in.Tags, name)
	}
	e.in.Edges = append(e.in.Edges, mesh.TaggedEdge{A: a, B: b, Tag: t})
	return nil
}

// chain adds the edges between consecutive points of file cell c (a line
// or polyline), numbered in the mesh by num.
func (e *edgeTagger) chain(c int, nodes []int64, num func(int64) int32) error {
	for k := 1; k < len(nodes); k++ {
		if err := e.add(c, num(nodes[k-1]), num(nodes[k])); err != nil {
			return err
		}
	}
	return nil
}

// typeName names VTK cell type t, "unknown" if it is not a linear type.
func typeName(t int64) string {
	if name, ok := cellTypeName[t]; ok {
		return name
	}
	return "unknown"
}

// lineTags returns the function that gives the tag name of file cell c, ""
// for untagged, from the first tag array present.
func (g *grid) lineTags() (func(c int) string, error) {
	var a *array
	for _, name := range tagArrayNames {
		if a = find(g.cellData, name); a != nil {
			break
		}
	}
	if a == nil {
		if slices.ContainsFunc(g.types, func(t int64) bool { return t == cellLine || t == cellPolyLine || t == cellQuad && g.has3D() }) {
			found := "it has no cell data"
			if len(g.cellArrays) > 0 {
				found = "its cell-data arrays are " + strings.Join(g.cellArrays, ", ")
			}
			g.notes = append(g.notes, fmt.Sprintf("the boundary lines and faces carry no tags: cvdeck takes them from a cell-data array named %s, and %s", strings.Join(tagArrayNames, " or "), found))
		}
		return func(int) string { return "" }, nil
	}
	if a.comps > 1 || a.length() != len(g.types) {
		return nil, fmt.Errorf("%s: tag array %q has %d values in %d components for %d cells; it needs one value per cell", g.file, a.name, a.length(), max(a.comps, 1), len(g.types))
	}
	switch {
	case a.strs != nil:
		return func(c int) string { return a.strs[c] }, nil
	case a.floats != nil:
		return nil, fmt.Errorf("%s: tag array %q holds floating-point values; it must be an integer or a string array", g.file, a.name)
	}
	var names []string
	if n := find(g.fieldData, TagNamesArray); n != nil && n.strs != nil {
		names = n.strs
	}
	return func(c int) string {
		v := a.ints[c]
		switch {
		case v < 0:
			return ""
		case v < int64(len(names)) && names[v] != "":
			return names[v]
		}
		return strconv.FormatInt(v, 10)
	}, nil
}
