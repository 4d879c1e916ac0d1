package deck

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"cvdeck/export/atomic"
	"cvdeck/export/cgns"
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
// applied in order (none: the default profile). Boundary faces that carry
// no tag go into DefaultTag with a warning, so that only geometry and
// connectivity decide the verdict. A failed check is a *CheckFailure
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
		if inside, err := within(path, dir); err != nil || inside {
			if err == nil {
				err = fmt.Errorf("%s lies inside %s, which the check would replace; write the check elsewhere", path, dir)
			}
			return nil, fmt.Errorf("%w: %w", ErrInput, err)
		}
	}
	var m *mesh.Mesh
	var read []string
	var err error
	switch strings.ToLower(filepath.Ext(path)) {
	case ".vtu", ".vtk", ".vtp":
		m, read, err = vtk.ReadFileNotes(path)
	case ".cgns":
		m, read, err = cgns.ReadNotes(path)
	default:
		return nil, fmt.Errorf("%w: %s: cvdeck checks .vtu, .vtk, .vtp and .cgns meshes, not %q", ErrInput, path, filepath.Ext(path))
	}
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrInput, err)
	}
	res := &CheckResult{File: path, Notes: read}
	if lo, hi := m.UntaggedRange(); hi > lo && strings.EqualFold(filepath.Ext(path), ".vtu") {
		// A cvdeck deck keeps its boundary tags in boundary.vtp beside
		// mesh.vtu: take them from there when the file is present.
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
	if lo, hi := m.UntaggedRange(); hi > lo {
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
		return res, &CheckFailure{Failed: res.Report.FailedCells}
	}
	return res, nil
}

// CheckFiles are the files CheckAndWrite writes.
var CheckFiles = []string{"mesh.vtu", "boundary.vtp", "quality.json", "preview.svg"}

// writeCheck writes CheckFiles into dir for the mesh m read from the file
// called name.
func writeCheck(dir, name string, m *mesh.Mesh, rep *quality.Report) error {
	writers := map[string]func(w io.Writer) error{
		"mesh.vtu":     func(w io.Writer) error { return vtk.WriteVTU(w, m, cellFields(rep)) },
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
// the patches when none of them names a profile, and says so.
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
	dp, err := quality.ReportPatch(side)
	if err != nil {
		return patches, nil, []string{fmt.Sprintf("%v; checking with the %q profile instead", err, quality.DefaultProfile)}
	}
	note := fmt.Sprintf("limits taken from %s (profile %q with the deck's changes)", side, dp.Profile)
	return append([]quality.Patch{dp}, patches...), []string{note}, nil
}

// tagFromLines rebuilds m with the tags of boundary lines given by their
// end points (matched to mesh nodes by exact coordinates, as a deck's
// boundary.vtp holds the very numbers its mesh.vtu does). Lines that are
// not boundary faces of m are an error; boundary faces no line covers stay
// untagged.
func tagFromLines(m *mesh.Mesh, lines []vtk.BoundaryLine) (*mesh.Mesh, string, error) {
	node := make(map[[2]float64]int32, m.NumBoundary())
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		for _, v := range m.FaceNodes[f] {
			node[m.Nodes[v]] = v
		}
	}
	rt := newRetag(m)
	used := 0
	for k, l := range lines {
		if l.Tag == "" {
			continue
		}
		a, okA := node[l.A]
		b, okB := node[l.B]
		if !okA || !okB {
			return nil, "", fmt.Errorf("line %d from (%g, %g) to (%g, %g) does not join two boundary nodes of the mesh", k, l.A[0], l.A[1], l.B[0], l.B[1])
		}
		rt.add(a, b, l.Tag)
		used++
	}
	tagged, err := mesh.Build(rt.in)
	if err != nil {
		return nil, "", err
	}
	return tagged, fmt.Sprintf("%d tagged lines, %d tags", used, len(rt.in.Tags)), nil
}

// tagUntagged returns m with its untagged boundary faces under DefaultTag
// (a new tag, or the existing one of that name).
//
// Build puts the untagged faces last, in the order a new last tag would
// give them, so when DefaultTag is new the faces stay where they are and
// only their tag is set: m's arrays are shared with the result, FaceTag
// changed in place. Otherwise the mesh is built again with the faces
// joining the existing tag.
func tagUntagged(m *mesh.Mesh) (*mesh.Mesh, error) {
	if _, _, exists := m.TagRange(DefaultTag); !exists && len(m.Tags) < math.MaxInt16 {
		out := *m
		t := int16(len(m.Tags))
		out.Tags = append(slices.Clip(m.Tags), DefaultTag)
		out.TagStart = append(slices.Clip(m.TagStart), int32(m.NumFaces()))
		lo, hi := m.UntaggedRange()
		for f := lo; f < hi; f++ {
			out.FaceTag[f] = t
		}
		return &out, nil
	}
	rt := newRetag(m)
	lo, hi := m.UntaggedRange()
	for f := lo; f < hi; f++ {
		rt.add(m.FaceNodes[f][0], m.FaceNodes[f][1], DefaultTag)
	}
	return mesh.Build(rt.in)
}

// retag collects a mesh's builder input with its tagged boundary edges,
// to which more tagged edges are added before the mesh is built again.
type retag struct {
	in    mesh.Input
	index map[string]int16
}

func newRetag(m *mesh.Mesh) *retag {
	rt := &retag{
		in:    mesh.Input{Nodes: m.Nodes, CellStart: m.CellStart, CellNodes: m.CellNodes, Tags: append([]string(nil), m.Tags...), Blocks: m.Blocks, Interfaces: m.Interfaces},
		index: map[string]int16{},
	}
	for t, name := range rt.in.Tags {
		rt.index[name] = int16(t)
	}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		if t := m.FaceTag[f]; t >= 0 {
			rt.in.Edges = append(rt.in.Edges, mesh.TaggedEdge{A: m.FaceNodes[f][0], B: m.FaceNodes[f][1], Tag: t})
		}
	}
	return rt
}

// add tags the edge a–b with tag, adding the tag if it is new.
func (rt *retag) add(a, b int32, tag string) {
	t, ok := rt.index[tag]
	if !ok {
		t = int16(len(rt.in.Tags))
		rt.index[tag] = t
		rt.in.Tags = append(rt.in.Tags, tag)
	}
	rt.in.Edges = append(rt.in.Edges, mesh.TaggedEdge{A: a, B: b, Tag: t})
}
