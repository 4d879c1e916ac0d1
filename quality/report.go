package quality

import (
	"fmt"
	"math"
	"sync"

	"cvdeck/mesh"
)

// Field is one named array of per-cell, per-face or per-node values, for
// writers of cell and point data.
type Field struct {
	Name   string
	Values []float64
}

// Located is one entry of a worst list: a cell (or node) index, its
// centroid (or position) and its value.
type Located struct {
	Index int     `json:"index"`
	X     float64 `json:"x"`
	Y     float64 `json:"y"`
	Value Number  `json:"value"`
}

// MetricSummary gives the statistics of one metric over the cells (or, for
// dual_closure, the nodes) where it applies.
type MetricSummary struct {
	Name string `json:"name"`
	Unit string `json:"unit"`
	// Per is "cell" or "node".
	Per string `json:"per"`
	// Worse is "higher" or "lower": which way a value gets worse.
	Worse string `json:"worse"`
	Limit Bound  `json:"limit"`
	// Count is the number of cells (nodes) where the metric applies.
	Count int    `json:"count"`
	Min   Number `json:"min"`
	Mean  Number `json:"mean"`
	RMS   Number `json:"rms"`
	Max   Number `json:"max"`
	// Warned and Failed count the cells (nodes) past the warn threshold
	// but not the fail one, and past the fail threshold.
	Warned int `json:"warned"`
	Failed int `json:"failed"`
	// FailedThin counts, for the metrics measured from the cell centroids
	// across faces (non_orthogonality, skewness, gradient_error), the
	// failed cells whose aspect ratio is ThinAspect or more and whose
	// largest angle passes (see WriteText's note on them); 0 for the
	// other metrics.
	FailedThin int `json:"failed_thin,omitempty"`
	// Worst lists the worst cells (nodes), worst first, ties by index.
	Worst []Located `json:"worst"`
}

// Audit sums up the conservation audit.
type Audit struct {
	// BoundaryClosure is |Σ S n| / Σ |S| over all boundary faces, zero when
	// the boundary is watertight.
	BoundaryClosure Number `json:"boundary_closure"`
	ClosureMax      Number `json:"closure_max"`
	FreeStreamMax   Number `json:"free_stream_max"`
	FreeStreamRMS   Number `json:"free_stream_rms"`
	GradientMax     Number `json:"gradient_error_max"`
	DualClosureMax  Number `json:"dual_closure_max"`
}

// BoundaryTag sums up the boundary faces of one tag.
type BoundaryTag struct {
	// Tag is the tag's name, "" for the faces that carry none.
	Tag   string `json:"tag"`
	Faces int    `json:"faces"`
	// Length is the faces' total length in metres (their area per unit
	// depth).
	Length Number `json:"length"`
	// FirstCellHeight spreads, over the faces, the height of each face's
	// cell normal to the face (cellHeight), in metres: on a wall, the
	// first-cell height its boundary layer is resolved with.
	FirstCellHeight Spread `json:"first_cell_height"`
	// QuadLayers spreads, over the faces, the number of quadrilaterals
	// stacked on each face (see quadStack): on a wall of a hybrid mesh the
	// boundary layers it carries, on a structured grid its cells across
	// where its first cell is no thicker than the face is long; zero on
	// triangles and where the first cell is entered through its short
	// side.
	QuadLayers Spread `json:"quad_layers"`
}

// maxStack bounds the quadrilaterals quadStack counts on one face.
const maxStack = 1000

// quadStack counts the quadrilaterals stacked on boundary face f: its
// cell, the cell across that cell's opposite face (the one sharing no
// node with the face it was entered by), and so on while the cells are
// quadrilaterals of four faces, up to maxStack. Layer cells on a wall
// are such a stack; the count is what a user checks a wall's layers by.
// A stack starts only where the face's own cell is no thicker across (from
// the face's midpoint to its opposite face's) than the face is long: a
// layer's first cell is thin on its wall, while the face at the end of a
// row of layers (an inlet beside a layered floor) enters its first cell
// through the cell's short side, and the row along the wall is no stack
// on it.
func quadStack(m *mesh.Mesh, cf *cellFaces, f int) int {
	c, cur, n := int(m.Owner[f]), f, 0
	for n < maxStack {
		faces := cf.faces[cf.start[c]:cf.start[c+1]]
		if m.CellStart[c+1]-m.CellStart[c] != 4 || len(faces) != 4 {
			break
		}
		n++
		a, b := m.FaceNodes[cur][0], m.FaceNodes[cur][1]
		opp := -1
		for _, g := range faces {
			if fn := m.FaceNodes[g]; fn[0] != a && fn[0] != b && fn[1] != a && fn[1] != b {
				opp = int(g)
				break
			}
		}
		if opp < 0 {
			break
		}
		if n == 1 {
			a, b := m.Geo.FaceMid[f], m.Geo.FaceMid[opp]
			if math.Hypot(b[0]-a[0], b[1]-a[1]) > m.Geo.FaceLength[f]*(1+1e-9) {
				return 0
			}
		}
		next := int(m.Owner[opp])
		if next == c {
			next = int(m.Neighbour[opp])
		}
		if next < 0 || next == c {
			break
		}
		c, cur = next, opp
	}
	return n
}

// Spread is the smallest, mean and largest of a set of values; all three
// are null (NaN) for an empty set.
type Spread struct {
	Min  Number `json:"min"`
	Mean Number `json:"mean"`
	Max  Number `json:"max"`
}

// spreadOf accumulates a Spread.
type spreadOf struct {
	n             int
	min, max, sum float64
}

func (s *spreadOf) add(x float64) {
	if s.n == 0 {
		s.min, s.max = x, x
	}
	s.n++
	s.min, s.max, s.sum = min(s.min, x), max(s.max, x), s.sum+x
}

func (s *spreadOf) spread() Spread {
	if s.n == 0 {
		nan := Number(math.NaN())
		return Spread{nan, nan, nan}
	}
	return Spread{Number(s.min), Number(s.sum / float64(s.n)), Number(s.max)}
}

// boundaryTags sums up the boundary faces of m by their FaceTag (their
// length, first-cell heights and stacked quadrilaterals, the latter from
// the cell-face lists cf): every
// tag, with no faces too, then the untagged faces if there are any. It
// reads FaceTag rather than TagStart, which validateArrays does not check.
func boundaryTags(m *mesh.Mesh, cf *cellFaces) []BoundaryTag {
	out := make([]BoundaryTag, len(m.Tags)+1)
	heights := make([]spreadOf, len(out))
	stacks := make([]spreadOf, len(out))
	for t, name := range m.Tags {
		out[t].Tag = name
	}
	untagged := len(m.Tags)
	for f := m.NumInterior; f < m.NumFaces(); f++ {
		t := untagged
		if ft := m.FaceTag[f]; ft >= 0 {
			t = int(ft)
		}
		out[t].Faces++
		out[t].Length += Number(m.Geo.FaceLength[f])
		heights[t].add(cellHeight(m, f))
		stacks[t].add(float64(quadStack(m, cf, f)))
	}
	for t := range out {
		out[t].FirstCellHeight = heights[t].spread()
		out[t].QuadLayers = stacks[t].spread()
	}
	if out[untagged].Faces == 0 {
		out = out[:untagged]
	}
	return out
}

// cellHeight returns the height of face f's owner normal to the face: the
// largest distance of the cell's nodes from the face's line on the cell's
// side, max_p (a − p) · n_f, with a the face's first node and n_f its
// outward unit normal. For a quadrilateral in a layer on a wall it is the
// layer's thickness, for a triangle its height over the face, 2A/S_f
// (elementary geometry). A face of zero length, which has no normal,
// gives 0.
func cellHeight(m *mesh.Mesh, f int) float64 {
	a, n := m.Nodes[m.FaceNodes[f][0]], m.Geo.FaceNormal[f]
	h := 0.0
	for _, v := range m.Cell(int(m.Owner[f])) {
		p := m.Nodes[v]
		h = max(h, (a[0]-p[0])*n[0]+(a[1]-p[1])*n[1])
	}
	return h
}

// Report is the result of Evaluate.
type Report struct {
	// Verdict is fail if any cell or node fails a metric or any
	// connectivity check fails, warn if any warns, else pass.
	Verdict Status `json:"verdict"`
	Profile string `json:"profile"`
	// ChangedLimits names the limits that differ from the profile's (see
	// Limits.changed), none when the profile is used as it is.
	ChangedLimits []string `json:"changed_limits,omitempty"`
	Cells         int      `json:"cells"`
	Faces         int      `json:"faces"`
	BoundaryFaces int      `json:"boundary_faces"`
	Nodes         int      `json:"nodes"`
	// FailedCells and WarnedCells count cells by their worst status over
	// all metrics and connectivity checks.
	FailedCells int `json:"failed_cells"`
	WarnedCells int `json:"warned_cells"`
	FailedNodes int `json:"failed_nodes"`
	// DuplicateDistance is the absolute distance below which two nodes
	// count as duplicates (Limits.DuplicateTolerance × shortest face).
	DuplicateDistance float64 `json:"duplicate_distance"`
	// DuplicateTolerance and HangingTolerance are the limits' relative
	// tolerances of those two checks, kept so that the report records
	// every limit it was graded with (see ReportPatch).
	DuplicateTolerance float64         `json:"duplicate_tolerance"`
	HangingTolerance   float64         `json:"hanging_tolerance"`
	Metrics            []MetricSummary `json:"metrics"`
	Audit              Audit           `json:"audit"`
	Connectivity       []CheckResult   `json:"connectivity"`
	// Boundary lists the boundary faces by tag, in the mesh's tag order,
	// the untagged ones last, so that a reader can see which tags a mesh
	// from elsewhere brought with it.
	Boundary []BoundaryTag `json:"boundary"`

	// CellStatus is the worst status of each cell.
	CellStatus []Status `json:"-"`
	// CellFields are the per-cell arrays in report order: every cell metric
	// (MetricNames without dual_closure), then "status" (0 pass, 1 warn,
	// 2 fail) and "defects" (connectivity defects naming the cell). NaN
	// marks a metric that does not apply (scaled_jacobian off quads).
	CellFields []Field `json:"-"`
	// FaceFields are the per-face arrays: face_length (signed),
	// non_orthogonality and skewness.
	FaceFields []Field `json:"-"`
	// NodeFields are the per-node arrays: dual_closure.
	NodeFields []Field `json:"-"`
}

// Field returns the per-cell, per-face or per-node field named name from
// CellFields, FaceFields or NodeFields, searched in that order.
func (r *Report) Field(name string) ([]float64, bool) {
	for _, list := range [][]Field{r.CellFields, r.FaceFields, r.NodeFields} {
		for _, f := range list {
			if f.Name == name {
				return f.Values, true
			}
		}
	}
	return nil, false
}

// Metric returns the summary of the named metric.
func (r *Report) Metric(name string) (MetricSummary, bool) {
	for _, s := range r.Metrics {
		if s.Name == name {
			return s, true
		}
	}
	return MetricSummary{}, false
}

// Failures lists what fails, for a one-line verdict: each metric with
// failing cells or nodes ("skewness: 12 cells") and each failed
// connectivity check ("unused_node: 1 defect"), in report order.
func (r *Report) Failures() []string {
	var out []string
	plural := func(n int, what string) string {
		if n == 1 {
			return "1 " + what
		}
		return fmt.Sprintf("%d %ss", n, what)
	}
	for _, s := range r.Metrics {
		if s.Failed > 0 {
			out = append(out, s.Name+": "+plural(s.Failed, s.Per))
		}
	}
	for _, c := range r.Connectivity {
		if c.Status == Fail {
			out = append(out, c.Name+": "+plural(c.Count, "defect"))
		}
	}
	return out
}

// Evaluate is the package's Evaluate in e's memory; see Evaluator.
func (e *Evaluator) Evaluate(m *mesh.Mesh, lim Limits) (*Report, error) {
	if lim == (Limits{}) {
		return nil, errNoLimits
	}
	if err := validateArrays(m); err != nil {
		return nil, err
	}
	nc, nn := m.NumCells(), len(m.Nodes)

	// The face metrics, the cell-to-face lists and the node-to-cell map
	// are independent; build them side by side.
	var first []int32
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		buildCellFaces(m, &e.cellFaces)
		first = nodeCells(m, &e.first)
	}()
	ff := &e.faces
	computeFaces(m, ff)
	wg.Wait()

	r := &Report{
		Profile: lim.Profile, ChangedLimits: lim.changed(), Cells: nc, Faces: m.NumFaces(), BoundaryFaces: m.NumBoundary(), Nodes: nn,
		DuplicateTolerance: lim.DuplicateTolerance, HangingTolerance: lim.HangingTolerance,
		CellStatus: zeroed(&e.cellStatus, nc),
	}
	// Three independent sweeps run side by side: the cell metrics, the node
	// metric and the connectivity checks with the boundary summary. Each
	// writes only its own results.
	var vals [numCellMetrics][]float64
	var parts [numCellMetrics][]partial
	var dual []float64
	nodeStatus := zeroed(&e.nodeStatus, nn)
	dd := &metricDefs[numCellMetrics]
	nodeParts := make([]partial, (nn+chunk-1)/chunk)
	cn := newConnectivity(lim.MaxProblems)
	var bclosure float64
	wg.Add(3)
	go func() {
		defer wg.Done()
		vals, parts = cellPass(m, &e.cellFaces, ff, &lim, r.CellStatus, !e.NoFields, &e.vals)
	}()
	go func() {
		defer wg.Done()
		dual = computeDualClosure(m, &e.dual)
		forChunks(nn, func(lo, hi int) {
			p := &nodeParts[lo/chunk]
			p.start()
			p.scan(dd, lim.DualClosure, lim.WorstCells, dual[lo:hi], lo, nodeStatus)
		})
	}()
	go func() {
		defer wg.Done()
		r.Boundary = boundaryTags(m, &e.cellFaces)
		checkFaces(m, e.cellFaces, cn)
		bclosure = boundaryClosure(m)
		checkNodes(m, first, &e.balance, bclosure, lim.Closure.Fail, cn)
		checkCrossing(m, cn)
		if cn.result(CheckCrossing).Count == 0 {
			checkOverlap(m, cn) // a crossing is an overlap already said
		}
		if hmin := ff.shortest(); !math.IsInf(hmin, 0) {
			r.DuplicateDistance = lim.DuplicateTolerance * hmin
		}
		bnodes := boundaryNodes(m)
		findDuplicates(m, bnodes, first, r.DuplicateDistance, cn)
		findHanging(m, bnodes, lim.HangingTolerance, cn)
	}()
	wg.Wait()

	cellPos := func(i int) (float64, float64) { c := m.Geo.CellCentroid[i]; return c[0], c[1] }
	for k := 0; k < numCellMetrics; k++ {
		d := &metricDefs[k]
		if s := summary(d, *d.bound(&lim), lim.WorstCells, parts[k], cellPos); s.Count > 0 {
			r.Metrics = append(r.Metrics, s)
		}
		if !e.NoFields {
			r.CellFields = append(r.CellFields, Field{d.name, vals[k]})
		}
	}
	nodePos := func(i int) (float64, float64) { return m.Nodes[i][0], m.Nodes[i][1] }
	if s := summary(dd, lim.DualClosure, lim.WorstCells, nodeParts, nodePos); s.Count > 0 {
		r.Metrics = append(r.Metrics, s)
	}
	r.Connectivity = cn.results

	for _, c := range cn.cells {
		r.CellStatus[c] = Fail
	}
	for _, s := range r.CellStatus {
		switch s {
		case Fail:
			r.FailedCells++
		case Warn:
			r.WarnedCells++
		}
		r.Verdict = max(r.Verdict, s)
	}
	if !e.NoFields {
		defects := zeroed(&e.defects, nc)
		for _, c := range cn.cells {
			defects[c]++
		}
		status := resize(&e.status, nc)
		for c, s := range r.CellStatus {
			status[c] = float64(s)
		}
		r.CellFields = append(r.CellFields, Field{"status", status}, Field{"defects", defects})
		r.FaceFields = []Field{{"face_length", ff.length}, {"non_orthogonality", ff.nonOrth}, {"skewness", ff.skewness()}}
		r.NodeFields = []Field{{dd.name, dual}}
	}
	for _, s := range nodeStatus {
		if s == Fail {
			r.FailedNodes++
		}
		r.Verdict = max(r.Verdict, s)
	}
	for _, c := range r.Connectivity {
		r.Verdict = max(r.Verdict, c.Status)
	}

	r.Audit.BoundaryClosure = Number(bclosure)
	get := func(name string) MetricSummary { s, _ := r.Metric(name); return s }
	r.Audit.ClosureMax = get("closure").Max
	r.Audit.FreeStreamMax = get("free_stream").Max
	r.Audit.FreeStreamRMS = get("free_stream").RMS
	r.Audit.GradientMax = get("gradient_error").Max
	r.Audit.DualClosureMax = get("dual_closure").Max
	return r, nil
}

// String gives a one-line account of the verdict.
func (r *Report) String() string {
	return fmt.Sprintf("quality %s: %d cells (%d fail, %d warn), %d nodes (%d fail)", r.Verdict, r.Cells, r.FailedCells, r.WarnedCells, r.Nodes, r.FailedNodes)
}
