// Package quality decides whether a mesh's control volumes are fit for a
// finite-volume solver, and names the cells that are not.
//
// Evaluate takes a *mesh.Mesh with its derived geometry (m.Geo) and a set of
// Limits and returns a Report:
//
//   - shape metrics per cell (signed area, aspect ratio, interior angles,
//     equiangle skewness, scaled Jacobian of quadrilaterals);
//   - face metrics (signed face length, non-orthogonality, skewness, growth)
//     per face and as the worst value of each cell;
//   - the conservation audit: closure error, free-stream residual and the
//     Green–Gauss gradient error of a linear field per cell, and the closure
//     of the median-dual control volume of each node;
//   - connectivity checks (faces and their cells, tags, a watertight
//     boundary whose faces do not cross, duplicate, unused and hanging
//     nodes, orientation);
//   - the boundary faces by tag: count, total length and the first-cell
//     height (the height of the tag's cells normal to its faces);
//   - a pass / warn / fail status per cell and metric and a verdict that is
//     fail if any cell fails.
//
// Node coordinates must be finite and within MaxCoordinate.
//
// The report is written as a terminal table (WriteText) or JSON
// (encoding/json, deterministic), and carries the per-cell arrays
// (Report.CellFields) for writers of VTU or CGNS cell data.
//
// All loops are split over fixed index ranges and every sum is taken in
// index order, so the report is the same bytes whatever the number of
// goroutines.
package quality
