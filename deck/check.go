package deck

import (
	"fmt"
	"path/filepath"
	"strings"

	"cvdeck/export/cgns"
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
	// Warnings are notes on how the file was read (for example untagged
	// boundary faces put into DefaultTag).
	Warnings []string
}

// Check reads a mesh that cvdeck may not have made (VTK .vtu or legacy
// .vtk unstructured grid, or CGNS .cgns) and checks it against the limits
// of the patches, applied in order (none: the default profile). Boundary
// faces that carry no tag go into DefaultTag with a warning, so that only
// geometry and connectivity decide the verdict. A failed check is a
// *CheckFailure together with the result.
func Check(path string, patches ...quality.Patch) (*CheckResult, error) {
	var m *mesh.Mesh
	var err error
	switch strings.ToLower(filepath.Ext(path)) {
	case ".vtu", ".vtk":
		m, err = vtk.ReadFile(path)
	case ".cgns":
		m, err = cgns.Read(path)
	default:
		return nil, fmt.Errorf("%w: %s: cvdeck checks .vtu, .vtk and .cgns meshes, not %q", ErrInput, path, filepath.Ext(path))
	}
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrInput, err)
	}
	res := &CheckResult{File: path}
	if lo, hi := m.UntaggedRange(); hi > lo {
		if m, err = tagUntagged(m); err != nil {
			return nil, err
		}
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d boundary faces carry no tag; they are checked as one tag %q", hi-lo, DefaultTag))
	}
	res.Mesh = m
	lim, err := quality.Resolve(patches...)
	if err != nil {
		return nil, fmt.Errorf("%w: limits: %w", ErrInput, err)
	}
	if res.Report, err = quality.Evaluate(m, lim); err != nil {
		return nil, fmt.Errorf("%w: %s: %w", ErrInput, path, err)
	}
	if res.Report.Verdict == quality.Fail {
		return res, &CheckFailure{Failed: res.Report.FailedCells}
	}
	return res, nil
}

// tagUntagged rebuilds m with its untagged boundary faces under DefaultTag
// (a new tag, or the existing one of that name).
func tagUntagged(m *mesh.Mesh) (*mesh.Mesh, error) {
	in := mesh.Input{Nodes: m.Nodes, CellStart: m.CellStart, CellNodes: m.CellNodes, Tags: append([]string(nil), m.Tags...), Blocks: m.Blocks, Interfaces: m.Interfaces}
	def := int16(-1)
	for t, name := range in.Tags {
		if name == DefaultTag {
			def = int16(t)
		}
	}
	if def < 0 {
		def = int16(len(in.Tags))
		in.Tags = append(in.Tags, DefaultTag)
	}
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		t := m.FaceTag[f]
		if t < 0 {
			t = def
		}
		in.Edges = append(in.Edges, mesh.TaggedEdge{A: m.FaceNodes[f][0], B: m.FaceNodes[f][1], Tag: t})
	}
	return mesh.Build(in)
}
