package quality

import (
	"cvdeck/internal/hugepage"
	"cvdeck/mesh"
)

// An Evaluator computes quality reports and keeps the working memory of
// one for the next: the face and cell lists, the accumulators and the
// report's per-cell, per-face and per-node fields. On a large mesh the
// first writes to fresh memory cost the operating system a page fault per
// 4 KiB page, which can take longer than the metrics themselves; a sweep
// that checks many meshes with one Evaluator per worker pays that once.
//
// The Report an Evaluator returns shares its memory: its fields stay valid
// until the next call of Evaluate on the same Evaluator. An Evaluator is
// not safe for concurrent use; the zero value is ready to use.
type Evaluator struct {
	// NoFields leaves the per-cell, per-face and per-node arrays out of
	// the report (CellFields, FaceFields, NodeFields), for a caller that
	// wants the report alone, such as a check that prints it: every
	// metric is still computed for every cell, graded and summarised,
	// and CellStatus is kept, but 112 bytes per cell of memory are
	// neither taken nor written.
	NoFields bool

	faces      faceFields
	cellFaces  cellFaces
	first      []int32 // nodeCells
	balance    []int32 // checkNodes
	vals       [numCellMetrics][]float64
	dual       dualSums
	cellStatus []Status
	nodeStatus []Status
	defects    []float64
	status     []float64
}

// Evaluate computes every metric, the conservation audit and the
// connectivity checks of m, grades them against lim and returns the
// report, in fresh memory of its own. It returns an error only when the
// mesh arrays are inconsistent (lengths or indices out of range), so that
// nothing can be computed; every defect of a well-formed mesh is a finding
// in the report.
func Evaluate(m *mesh.Mesh, lim Limits) (*Report, error) {
	return new(Evaluator).Evaluate(m, lim)
}

// resize returns *s with length n, reusing its array when it is large
// enough. The contents are whatever they were: for arrays the caller
// overwrites in full.
func resize[T any](s *[]T, n int) []T {
	if cap(*s) < n {
		*s = hugepage.Make[T](n)
	}
	*s = (*s)[:n]
	return *s
}

// zeroed is resize with every element zero.
func zeroed[T any](s *[]T, n int) []T {
	if cap(*s) < n {
		*s = hugepage.Make[T](n) // zero already: not touched twice
		return *s
	}
	*s = (*s)[:n]
	clear(*s)
	return *s
}
