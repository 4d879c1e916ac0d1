package deck

import (
	"cmp"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"cvdeck/export/atomic"
	"cvdeck/export/cgns"
	"cvdeck/export/manifest"
	"cvdeck/export/preview"
	"cvdeck/export/vtk"
	"cvdeck/mesh"
	"cvdeck/quality"
)

// DefaultTag is the tag given to the boundary faces of a checked mesh that
// carries none.
const DefaultTag = "boundary"

// CheckResult is the outcome of checking an existing mesh file.
type CheckResult struct {
	File   string
	Mesh   *mesh.Mesh
	Report *quality.Report
	// Notes say how the file was read (a slab taken as its lower plane and
	// what was left out of it, where its tags came from, whose limits
	// graded it); Warnings say what was assumed (untagged boundary faces put
	// into DefaultTag).
	Notes    []string
	Warnings []string
}

// Check reads a mesh that cvdeck may not have made (a VTK unstructured
// grid, .vtu or legacy .vtk, a VTK polygon mesh, .vtp or legacy POLYDATA
// .vtk, or CGNS .cgns) and checks it against the limits of the patches,
// applied in order (none: the default profile). When no boundary face
// carries a tag, they all go into DefaultTag with a warning, so that only
// geometry and connectivity decide the verdict; in a mesh tagged in part,
// the untagged faces fail boundary_tag. A failed check is a *CheckFailure
// together with the result. The report carries no per-cell arrays (see
// quality.Evaluator.NoFields): a check prints its summary.
//
// A mesh inside a deck is checked with the deck's own limits, as recorded
// in the quality.json beside it, so that the check gives the deck's
// verdict: those limits come first and the patches apply on top of them,
// unless a patch names a profile, which starts afresh from that profile. A
// quality.json that cannot be read as a report gives a warning and the
// default profile.
func Check(path string, patches ...quality.Patch) (*CheckResult, error) {
	return CheckAndWrite(path, "", patches...)
}

// CheckAndWrite is Check that also writes, when dir is not "", the folder
// dir as a whole (replacing it, as a deck folder is replaced) so that the
// cells can be seen: CheckFiles, the mesh as read with every per-cell
// metric, its status and defects as cell data, its boundary tags, the
// report and a preview picture zoomed on the worst cells. It is written
// whatever the verdict, and refused if the mesh file lies inside dir.
// Checking dir's mesh.vtu again gives the same report: its tags and limits
// come from the files beside it.
func CheckAndWrite(path, dir string, patches ...quality.Patch) (*CheckResult, error) {
	if dir != "" {
		if err := checkOutDir(dir, []string{path}, "check"); err != nil {
			return nil, err
		}
	}
	var m *mesh.Mesh
	var read []string
	var err error
	switch strings.ToLower(filepath.Ext(path)) {
	case ".vtu", ".vtk", ".vtp", ".vts", ".vtm":
		m, read, err = vtk.ReadFileNotes(path)
	case ".cgns":
		m, read, err = cgns.ReadNotes(path)
	default:
		return nil, fmt.Errorf("%w: %s: cvdeck checks .vtu, .vtk, .vtp, .vts, .vtm and .cgns meshes, not %q", ErrInput, path, filepath.Ext(path))
	}
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrInput, err)
	}
	res := &CheckResult{File: path, Notes: read}
	if lo, hi := m.UntaggedRange(); hi > lo && slices.Contains([]string{".vtu", ".vtk", ".vtm"}, strings.ToLower(filepath.Ext(path))) {
		// A cvdeck deck keeps its boundary tags in boundary.vtp beside
		// mesh.vtu, mesh.vtk and blocks.vtm: take them from there when the file is
		// present.
		side := filepath.Join(filepath.Dir(path), "boundary.vtp")
		if data, err := os.ReadFile(side); err == nil {
			lines, err := vtk.ReadBoundaryVTP(data, side)
			if err != nil {
				return nil, fmt.Errorf("%w: %w", ErrInput, err)
			}
			tagged, note, err := tagFromLines(m, lines)
			if err != nil {
				return nil, fmt.Errorf("%w: %s: %w", ErrInput, side, err)
			}
			m = tagged
			res.Notes = append(res.Notes, fmt.Sprintf("boundary tags taken from %s (%s)", side, note))
		}
	}
	// Only a mesh that carries no tags at all is checked with its boundary
	// as one tag; in a mesh tagged in part, the faces left out are defects
	// of its tagging, which boundary_tag reports.
	if lo, hi := m.UntaggedRange(); hi > lo && hi-lo == m.NumBoundary() {
		if m, err = tagUntagged(m); err != nil {
			return nil, err
		}
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d boundary faces carry no tag; they are checked as one tag %q", hi-lo, DefaultTag))
	}
	res.Mesh = m
	patches, notes, warns := withDeckLimits(path, patches)
	res.Notes = append(res.Notes, notes...)
	res.Warnings = append(res.Warnings, warns...)
	lim, err := quality.Resolve(patches...)
	if err != nil {
		return nil, fmt.Errorf("%w: limits: %w", ErrInput, err)
	}
	ev := quality.Evaluator{NoFields: dir == ""}
	if res.Report, err = ev.Evaluate(m, lim); err != nil {
		return nil, fmt.Errorf("%w: %s: %w", ErrInput, path, err)
	}
	if dir != "" {
		if err := atomic.ReplaceDir(dir, func(tmp string) error { return writeCheck(tmp, filepath.Base(path), m, res.Report) }); err != nil {
			return nil, fmt.Errorf("writing the check: %w", err)
		}
		res.Notes = append(res.Notes, fmt.Sprintf("the mesh with its per-cell metrics is in %s (%s)", dir, strings.Join(CheckFiles, ", ")))
	}
	if res.Report.Verdict == quality.Fail {
		return res, &CheckFailure{Failed: res.Report.FailedCells, Failures: res.Report.Failures()}
	}
	return res, nil
}

// CheckFiles are the files CheckAndWrite writes.
var CheckFiles = []string{"mesh.vtu", "boundary.vtp", "quality.json", "preview.svg"}

// writeCheck writes CheckFiles into dir for the mesh m read from the file
// called name.
func writeCheck(dir, name string, m *mesh.Mesh, rep *quality.Report) error {
	writers := map[string]func(w io.Writer) error{
		"mesh.vtu":     func(w io.Writer) error { return vtk.WriteVTU(w, m, vtuFields(rep)) },
		"boundary.vtp": func(w io.Writer) error { return vtk.WriteBoundaryVTP(w, m, nil) },
		"quality.json": func(w io.Writer) error { return quality.WriteJSON(w, rep) },
		"preview.svg":  func(w io.Writer) error { return preview.SVG(w, previewInput(name, m, nil, rep)) },
	}
	for _, f := range CheckFiles {
		if err := atomic.WriteFile(filepath.Join(dir, f), writers[f]); err != nil {
			return err
		}
	}
	return nil
}

// within reports whether the file path lies inside the folder dir (or is
// dir), comparing absolute paths with symbolic links resolved as far as
// they exist.
func within(path, dir string) (bool, error) {
	abs := func(p string) (string, error) {
		a, err := filepath.Abs(p)
		if err != nil {
			return "", err
		}
		if r, err := filepath.EvalSymlinks(a); err == nil {
			return r, nil
		}
		return a, nil
	}
	p, err := abs(path)
	if err != nil {
		return false, err
	}
	d, err := abs(dir)
	if err != nil {
		return false, err
	}
	rel, err := filepath.Rel(d, p)
	if err != nil {
		return false, nil
	}
	return rel == "." || rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)), nil
}

// withDeckLimits puts the limits of the quality.json beside path before
// the patches when none of them names a profile and the report belongs to
// the mesh (see ownReport), and says so. A quality.json beside a mesh of
// anything else (a copy of a report dropped into a folder of meshes) is
// not taken: it would grade every mesh there by one run's limits.
func withDeckLimits(path string, patches []quality.Patch) ([]quality.Patch, []string, []string) {
	for _, p := range patches {
		if p.Profile != "" {
			return patches, nil, nil
		}
	}
	side := filepath.Join(filepath.Dir(path), "quality.json")
	if _, err := os.Stat(side); err != nil {
		return patches, nil, nil
	}
	whose := ownReport(path)
	if whose == "" {
		return patches, []string{fmt.Sprintf("%s is not taken for the limits: no deck.yaml beside it lists %s, nor is the folder one that cvdeck check -o wrote", side, filepath.Base(path))}, nil
	}
	dp, err := quality.ReportPatch(side)
	if err != nil {
		return patches, nil, []string{fmt.Sprintf("%v; checking with the %q profile instead", err, quality.DefaultProfile)}
	}
	changes := "no limit changed"
	if data, err := os.ReadFile(side); err == nil {
		var rec struct {
			Changed []string `json:"changed_limits"`
		}
		if json.Unmarshal(data, &rec) == nil && len(rec.Changed) > 0 {
			changes = "with the " + whose + "'s changed limits: " + strings.Join(rec.Changed, ", ")
		}
	}
	note := fmt.Sprintf("limits taken from %s, the %s's report (profile %q, %s)", side, whose, dp.Profile, changes)
	return append([]quality.Patch{dp}, patches...), []string{note}, nil
}

// ownReport says whose report the quality.json beside the mesh file path
// is: "deck" when a deck.yaml beside it lists the file among the deck's
// files, "check" when the file is the mesh.vtu of a folder CheckAndWrite
// wrote (every one of CheckFiles is there), "" otherwise.
func ownReport(path string) string {
	dir, name := filepath.Dir(path), filepath.Base(path)
	if man, err := manifest.Read(dir); err == nil {
		for _, f := range man.Files {
			if filepath.Base(filepath.FromSlash(f.Path)) == name {
				return "deck"
			}
		}
		return ""
	}
	if name != CheckFiles[0] {
		return ""
	}
	for _, f := range CheckFiles[1:] {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			return ""
		}
	}
	return "check"
}

// tagFromLines returns m with the tags of boundary lines (see withTags),
// each line placed on the boundary face of m it lies on, and a note on
// how; lines that are no boundary face of m are an error, and boundary
// faces no line covers stay untagged.
//
// The lines' end points are matched to m's boundary nodes by exact
// coordinates, as a deck's boundary.vtp holds the very numbers its
// mesh.vtu does; but coordinates alone do not tell coincident nodes
// apart, such as the two sides of a thin plate or the two lips of a
// crack, whose boundary faces lie on one another and run opposite ways.
// So a point of the file (by its number, shared by the lines that meet
// there) is the one node among those at its coordinates that makes every
// line through it a boundary face of m running as the line runs:
// forward, as WriteBoundaryVTP writes each face from its first node to
// its second, where every line whose nodes are plain says so; backward
// where they all run backward; either way otherwise. The candidates are
// narrowed line by line until none changes; a point left with none is no
// boundary node, and one left with several lies where the lines cannot
// tell coincident nodes apart, and is refused, naming it, rather than
// tagged by a guess.
//
// The face numbers the file gives (vtk.FaceArray, when it has them) must
// number m's boundary faces, each once: a file that lists a different
// boundary is an error, as it was written for another mesh. Whether they
// also number the faces as the tagged mesh does (they do for a file
// written with the mesh.vtu beside it, whose cells are numbered alike) is
// said in the note.
func tagFromLines(m *mesh.Mesh, lines []vtk.BoundaryLine) (*mesh.Mesh, string, error) {
	lo, hi := m.NumInterior, m.NumFaces()
	numbered := len(lines) > 0
	for _, l := range lines {
		numbered = numbered && l.Face >= 0
	}
	if numbered {
		if len(lines) != hi-lo {
			return nil, "", fmt.Errorf("the file lists %d boundary faces (the face numbers of its lines) but the mesh has %d: it was written for another mesh", len(lines), hi-lo)
		}
		seen := make([]bool, hi-lo)
		for k, l := range lines {
			switch {
			case l.Face < lo || l.Face >= hi:
				return nil, "", fmt.Errorf("line %d gives face number %d, but the mesh's boundary faces are numbered %d to %d: the file was written for another mesh", k, l.Face, lo, hi-1)
			case seen[l.Face-lo]:
				return nil, "", fmt.Errorf("line %d gives face number %d, which an earlier line gives too: each boundary face is listed once", k, l.Face)
			}
			seen[l.Face-lo] = true
		}
	}
	// The boundary nodes at each position, and the boundary faces by their
	// nodes in the order the faces run.
	at := make(map[[2]float64][]int32, hi-lo)
	face := make(map[[2]int32]bool, hi-lo)
	onBoundary := make([]bool, len(m.Nodes))
	for f := lo; f < hi; f++ {
		fn := m.FaceNodes[f]
		face[fn] = true
		for _, v := range fn {
			if !onBoundary[v] {
				onBoundary[v] = true
				at[m.Nodes[v]] = append(at[m.Nodes[v]], v)
			}
		}
	}
	cand := make(map[int][]int32)
	for k, l := range lines {
		for _, e := range [2]struct {
			p  int
			xy [2]float64
		}{{l.P, l.A}, {l.Q, l.B}} {
			if _, ok := cand[e.p]; ok {
				continue
			}
			c := at[e.xy]
			if len(c) == 0 {
				return nil, "", fmt.Errorf("line %d from (%g, %g) to (%g, %g): its point %d at (%g, %g) is no boundary node of the mesh", k, l.A[0], l.A[1], l.B[0], l.B[1], e.p, e.xy[0], e.xy[1])
			}
			cand[e.p] = slices.Clone(c)
		}
	}
	// Which way the lines run, from those whose ends are plain nodes.
	fwd, bwd := 0, 0
	for k, l := range lines {
		a, b := cand[l.P], cand[l.Q]
		if len(a) != 1 || len(b) != 1 {
			continue
		}
		switch {
		case face[[2]int32{a[0], b[0]}]:
			fwd++
		case face[[2]int32{b[0], a[0]}]:
			bwd++
		default:
			return nil, "", fmt.Errorf("line %d from (%g, %g) to (%g, %g), between nodes %d and %d, is not a boundary face of the mesh", k, l.A[0], l.A[1], l.B[0], l.B[1], a[0], b[0])
		}
	}
	forward, backward := fwd > 0 || bwd == 0, bwd > 0 || fwd == 0
	joins := func(a, b int32) bool {
		return forward && face[[2]int32{a, b}] || backward && face[[2]int32{b, a}]
	}
	for changed := true; changed; {
		changed = false
		for k, l := range lines {
			ca, cb := cand[l.P], cand[l.Q]
			if len(ca) == 1 && len(cb) == 1 {
				continue
			}
			na := slices.DeleteFunc(slices.Clone(ca), func(a int32) bool {
				return !slices.ContainsFunc(cb, func(b int32) bool { return joins(a, b) })
			})
			nb := slices.DeleteFunc(slices.Clone(cb), func(b int32) bool {
				return !slices.ContainsFunc(na, func(a int32) bool { return joins(a, b) })
			})
			if len(na) == 0 || len(nb) == 0 {
				return nil, "", fmt.Errorf("line %d from (%g, %g) to (%g, %g) is not a boundary face of the mesh: no boundary face joins the nodes there (%v and %v) as the line runs", k, l.A[0], l.A[1], l.B[0], l.B[1], ca, cb)
			}
			if len(na) < len(ca) || len(nb) < len(cb) {
				cand[l.P], cand[l.Q], changed = na, nb, true
			}
		}
	}
	var adds []namedEdge
	node := func(p int) int32 { return cand[p][0] }
	for k, l := range lines {
		for _, e := range [2]struct {
			p  int
			xy [2]float64
		}{{l.P, l.A}, {l.Q, l.B}} {
			if c := cand[e.p]; len(c) > 1 {
				return nil, "", fmt.Errorf("point %d at (%g, %g), an end of line %d (tag %q), could be any of the mesh's nodes %v, which lie there together, and the lines through it do not tell which: its tags cannot be placed without a guess (move the file away to check the mesh untagged)", e.p, e.xy[0], e.xy[1], k, l.Tag, c)
			}
		}
		if !joins(node(l.P), node(l.Q)) {
			return nil, "", fmt.Errorf("line %d from (%g, %g) to (%g, %g), between nodes %d and %d, is not a boundary face of the mesh running as the other lines run", k, l.A[0], l.A[1], l.B[0], l.B[1], node(l.P), node(l.Q))
		}
		if l.Tag != "" {
			adds = append(adds, namedEdge{node(l.P), node(l.Q), l.Tag})
		}
	}
	tagged, err := withTags(m, adds)
	if err != nil {
		return nil, "", err
	}
	tags := "tags"
	if len(tagged.Tags) == 1 {
		tags = "tag"
	}
	note := fmt.Sprintf("%d tagged lines, %d %s", len(adds), len(tagged.Tags), tags)
	if numbered {
		moved := 0
		for _, l := range lines {
			fn := tagged.FaceNodes[l.Face]
			if a, b := node(l.P), node(l.Q); fn != [2]int32{a, b} && fn != [2]int32{b, a} {
				moved++
			}
		}
		if moved == 0 {
			note += "; its face numbers are the tagged mesh's"
		} else {
			note += fmt.Sprintf("; %d of its %d face numbers are not the tagged mesh's (the mesh it was written from numbered its cells otherwise), the tags placed by their nodes", moved, len(lines))
		}
	}
	return tagged, note, nil
}

// tagUntagged returns m with its untagged boundary faces under DefaultTag
// (a new tag, or the existing one of that name); see withTags.
func tagUntagged(m *mesh.Mesh) (*mesh.Mesh, error) {
	lo, hi := m.UntaggedRange()
	adds := make([]namedEdge, 0, hi-lo)
	for f := lo; f < hi; f++ {
		adds = append(adds, namedEdge{m.FaceNodes[f][0], m.FaceNodes[f][1], DefaultTag})
	}
	return withTags(m, adds)
}

// boundaryEntry is a boundary face of withTags with what orders it: its
// group (tag, or one past the last tag for none), owner and place in the
// owner's node list.
type boundaryEntry struct {
	group        int16
	owner, place int32
	face         int32
}

// permuteBoundary puts a[lo+i] = a[order[i].face] for the boundary range
// [lo, len(a)) of a per-face array.
func permuteBoundary[T any](a []T, lo int, order []boundaryEntry) {
	old := slices.Clone(a[lo:])
	for i, e := range order {
		a[lo+i] = old[int(e.face)-lo]
	}
}

// namedEdge tags the boundary face between nodes a and b.
type namedEdge struct {
	a, b int32
	tag  string
}

// withTags returns m with more boundary faces tagged, each of adds naming
// a face by its two nodes (either way round) and its tag, new tags
// appended to m's. The result is what mesh.Build gives for m's cells with
// m's tagged edges and adds — boundary faces grouped by tag in tag order,
// each group in the order of its faces' owners and their places in them,
// untagged faces last — but faces and their geometry are moved within the
// boundary range of m's arrays, which the result shares, rather than
// derived again: m is spent. Faces given two different tags, and adds
// that are not boundary faces, are errors, as they are to mesh.Build.
func withTags(m *mesh.Mesh, adds []namedEdge) (*mesh.Mesh, error) {
	nb := m.NumBoundary()
	key := func(a, b int32) [2]int32 { return [2]int32{min(a, b), max(a, b)} }
	faceOf := make(map[[2]int32]int32, nb)
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		faceOf[key(m.FaceNodes[f][0], m.FaceNodes[f][1])] = int32(f)
	}
	out := *m
	out.Tags = slices.Clone(m.Tags)
	index := make(map[string]int16, len(out.Tags))
	for t, name := range out.Tags {
		index[name] = int16(t)
	}
	tag := slices.Clone(m.FaceTag[m.NumInterior:])
	for _, e := range adds {
		f, ok := faceOf[key(e.a, e.b)]
		if !ok {
			return nil, fmt.Errorf("edge %d-%d tagged %q is not a boundary face of the mesh", e.a, e.b, e.tag)
		}
		t, ok := index[e.tag]
		if !ok {
			if len(out.Tags) == math.MaxInt16 {
				return nil, fmt.Errorf("more than %d boundary tags", math.MaxInt16)
			}
			t = int16(len(out.Tags))
			index[e.tag] = t
			out.Tags = append(out.Tags, e.tag)
		}
		if old := tag[int(f)-m.NumInterior]; old >= 0 && old != t {
			return nil, fmt.Errorf("boundary edge %d-%d is tagged both %q and %q", e.a, e.b, out.Tags[old], e.tag)
		}
		tag[int(f)-m.NumInterior] = t
	}
	// Build's order: by group (the tags in order, then untagged), then by
	// owner, then by the face's place in its owner's node list (where the
	// owner traverses it either way: Build turns the boundary faces of a
	// cell of negative area against its node order).
	place := func(f int) int {
		cell, fn := m.Cell(int(m.Owner[f])), m.FaceNodes[f]
		for k, v := range cell {
			if w := cell[(k+1)%len(cell)]; v == fn[0] && w == fn[1] || v == fn[1] && w == fn[0] {
				return k
			}
		}
		return 0
	}
	order := make([]boundaryEntry, nb)
	untagged := int16(len(out.Tags))
	for i := range order {
		f := m.NumInterior + i
		g := tag[i]
		if g < 0 {
			g = untagged
		}
		order[i] = boundaryEntry{g, m.Owner[f], int32(place(f)), int32(f)}
	}
	slices.SortFunc(order, func(x, y boundaryEntry) int {
		return cmp.Or(cmp.Compare(x.group, y.group), cmp.Compare(x.owner, y.owner), cmp.Compare(x.place, y.place))
	})
	lo := m.NumInterior
	permuteBoundary(out.FaceNodes, lo, order)
	permuteBoundary(out.Owner, lo, order)
	permuteBoundary(out.Neighbour, lo, order)
	permuteBoundary(out.Geo.FaceLength, lo, order)
	permuteBoundary(out.Geo.FaceNormal, lo, order)
	permuteBoundary(out.Geo.FaceMid, lo, order)
	out.TagStart = make([]int32, len(out.Tags)+1)
	for i, e := range order {
		out.FaceTag[lo+i] = -1
		if e.group < untagged {
			out.FaceTag[lo+i] = e.group
		}
	}
	// TagStart[t] is where tag t's faces begin; empty tags start where the
	// next one does.
	next := lo
	for t := range out.Tags {
		out.TagStart[t] = int32(next)
		for next < m.NumFaces() && out.FaceTag[next] == int16(t) {
			next++
		}
	}
	out.TagStart[len(out.Tags)] = int32(next)
	return &out, nil
}
