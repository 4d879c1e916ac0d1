package quality

import (
	"fmt"
	"math"

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

// Report is the result of Evaluate.
type Report struct {
	// Verdict is fail if any cell or node fails a metric or any
	// connectivity check fails, warn if any warns, else pass.
	Verdict       Status `json:"verdict"`
	Profile       string `json:"profile"`
	Cells         int    `json:"cells"`
	Faces         int    `json:"faces"`
	BoundaryFaces int    `json:"boundary_faces"`
	Nodes         int    `json:"nodes"`
	// FailedCells and WarnedCells count cells by their worst status over
	// all metrics and connectivity checks.
	FailedCells int `json:"failed_cells"`
	WarnedCells int `json:"warned_cells"`
	FailedNodes int `json:"failed_nodes"`
	// DuplicateDistance is the absolute distance below which two nodes
	// count as duplicates (Limits.DuplicateTolerance × shortest face).
	DuplicateDistance float64         `json:"duplicate_distance"`
	Metrics           []MetricSummary `json:"metrics"`
	Audit             Audit           `json:"audit"`
	Connectivity      []CheckResult   `json:"connectivity"`

	// CellStatus is the worst status of each cell.
	CellStatus []Status `json:"-"`
	// CellFields are the per-cell arrays in report order: every cell metric
	// (MetricNames without dual_closure), then "status" (0 pass, 1 warn,
	// 2 fail) and "defects" (connectivity defects naming the cell). NaN
	// marks a metric that does not apply (scaled_jacobian off quads).
	CellFields []Field `json:"-"`
	// FaceFields are the per-face arrays: face_length (signed),
	// non_orthogonality, skewness and growth.
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

// Evaluate computes every metric, the conservation audit and the
// connectivity checks of m, grades them against lim and returns the
// report. It returns an error only when the mesh arrays are inconsistent
// (lengths or indices out of range), so that nothing can be computed; every
// defect of a well-formed mesh is a finding in the report.
func Evaluate(m *mesh.Mesh, lim Limits) (*Report, error) {
	if lim == (Limits{}) {
		return nil, errNoLimits
	}
	if err := validateArrays(m); err != nil {
		return nil, err
	}
	nc := m.NumCells()
	shape := computeShape(m)
	ff := computeFaces(m)
	cf := buildCellFaces(m)
	au := computeAudit(m, cf, ff)
	skewAbs := make([]float64, len(ff.cross))
	for f, t := range ff.cross {
		skewAbs[f] = math.Abs(t)
	}
	cellVals := map[string][]float64{
		"area":               m.Geo.CellArea,
		"face_length":        worstPerCell(cf, ff.length, true, false),
		"aspect_ratio":       shape.aspect,
		"min_angle":          shape.minAngle,
		"max_angle":          shape.maxAngle,
		"equiangle_skewness": shape.equiangle,
		"scaled_jacobian":    shape.jacobian,
		"non_orthogonality":  worstPerCell(cf, ff.nonOrth, false, false),
		"skewness":           worstPerCell(cf, skewAbs, false, false),
		"growth":             worstPerCell(cf, ff.growth, false, false),
		"closure":            au.closure,
		"free_stream":        au.freeStream,
		"gradient_error":     au.gradient,
		"dual_closure":       computeDualClosure(m),
	}

	// Connectivity.
	cn := newConnectivity(nc, lim.MaxProblems)
	checkFaces(m, cf, cn)
	first := nodeCells(m)
	bclosure := boundaryClosure(m)
	checkNodes(m, first, bclosure, lim.Closure.Fail, cn)
	hmin := math.Inf(1)
	for _, l := range m.Geo.FaceLength {
		if l > 0 {
			hmin = min(hmin, l)
		}
	}
	dupDist := 0.0
	if !math.IsInf(hmin, 0) {
		dupDist = lim.DuplicateTolerance * hmin
	}
	findDuplicates(m, first, dupDist, cn)
	findHanging(m, lim.HangingTolerance, cn)

	r := &Report{
		Profile: lim.Profile, Cells: nc, Faces: m.NumFaces(), BoundaryFaces: m.NumBoundary(), Nodes: len(m.Nodes),
		DuplicateDistance: dupDist, Connectivity: cn.list(),
		CellStatus: make([]Status, nc),
	}
	nodeStatus := make([]Status, len(m.Nodes))
	nodePos := func(i int) (float64, float64) { return m.Nodes[i][0], m.Nodes[i][1] }
	cellPos := func(i int) (float64, float64) { c := m.Geo.CellCentroid[i]; return c[0], c[1] }
	for i := range metricDefs {
		d := &metricDefs[i]
		v := cellVals[d.name]
		if d.perNode {
			s := summarize(d, v, *d.bound(&lim), lim.WorstCells, nodeStatus, nodePos)
			if s.Count > 0 {
				r.Metrics = append(r.Metrics, s)
			}
			r.NodeFields = append(r.NodeFields, Field{d.name, v})
			continue
		}
		s := summarize(d, v, *d.bound(&lim), lim.WorstCells, r.CellStatus, cellPos)
		if s.Count > 0 {
			r.Metrics = append(r.Metrics, s)
		}
		r.CellFields = append(r.CellFields, Field{d.name, v})
	}
	defects := make([]float64, nc)
	for c, k := range cn.cellBad {
		defects[c] = float64(k)
		if k > 0 {
			r.CellStatus[c] = Fail
		}
	}
	status := make([]float64, nc)
	for c, s := range r.CellStatus {
		status[c] = float64(s)
		switch s {
		case Fail:
			r.FailedCells++
		case Warn:
			r.WarnedCells++
		}
		r.Verdict = max(r.Verdict, s)
	}
	r.CellFields = append(r.CellFields, Field{"status", status}, Field{"defects", defects})
	r.FaceFields = []Field{{"face_length", ff.length}, {"non_orthogonality", ff.nonOrth}, {"skewness", skewAbs}, {"growth", ff.growth}}
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

// partial is the summary of one chunk of values.
type partial struct {
	count, warned, failed int
	min, max, sum, sumsq  float64
	worst                 []Located
}

// summarize computes the statistics of v for metric d, raises the entries
// of status to the grade of each value, and keeps the k worst entries.
// Chunks are summed in order, so the result does not depend on the number
// of goroutines.
func summarize(d *metricDef, v []float64, b Bound, k int, status []Status, pos func(int) (float64, float64)) MetricSummary {
	n := len(v)
	parts := make([]partial, (n+chunk-1)/chunk)
	forChunks(n, func(lo, hi int) {
		p := partial{min: math.Inf(1), max: math.Inf(-1)}
		for i := lo; i < hi; i++ {
			x := v[i]
			if x != x {
				continue
			}
			p.count++
			p.min, p.max = min(p.min, x), max(p.max, x)
			p.sum += x
			p.sumsq += x * x
			switch st := d.status(x, b); st {
			case Fail:
				p.failed++
				status[i] = Fail
			case Warn:
				p.warned++
				status[i] = max(status[i], Warn)
			}
			p.worst = keepWorst(d, p.worst, k, i, x)
		}
		parts[lo/chunk] = p
	})
	s := MetricSummary{Name: d.name, Unit: d.unit, Per: "cell", Worse: "higher", Limit: b, Worst: []Located{}}
	if d.perNode {
		s.Per = "node"
	}
	if d.lower {
		s.Worse = "lower"
	}
	lo, hi, sum, sumsq := math.Inf(1), math.Inf(-1), 0.0, 0.0
	var worst []Located
	for _, p := range parts {
		s.Count += p.count
		s.Warned += p.warned
		s.Failed += p.failed
		lo, hi = min(lo, p.min), max(hi, p.max)
		sum += p.sum
		sumsq += p.sumsq
		for _, w := range p.worst {
			worst = keepWorst(d, worst, k, w.Index, float64(w.Value))
		}
	}
	if s.Count == 0 {
		return s
	}
	s.Min, s.Max = Number(lo), Number(hi)
	s.Mean = Number(sum / float64(s.Count))
	s.RMS = Number(math.Sqrt(sumsq / float64(s.Count)))
	for _, w := range worst {
		w.X, w.Y = pos(w.Index)
		s.Worst = append(s.Worst, w)
	}
	return s
}

// keepWorst inserts (i, x) into the list of at most k worst entries, kept
// worst first with ties in increasing index (entries arrive in increasing
// index within a list, and lists are merged in chunk order).
func keepWorst(d *metricDef, list []Located, k, i int, x float64) []Located {
	if k == 0 {
		return list
	}
	if len(list) == k && !d.worse(x, float64(list[k-1].Value)) {
		return list
	}
	pos := len(list)
	for pos > 0 && d.worse(x, float64(list[pos-1].Value)) {
		pos--
	}
	if len(list) < k {
		list = append(list, Located{})
	}
	copy(list[pos+1:], list[pos:len(list)-1])
	list[pos] = Located{Index: i, Value: Number(x)}
	return list
}

// String gives a one-line account of the verdict.
func (r *Report) String() string {
	return fmt.Sprintf("quality %s: %d cells (%d fail, %d warn), %d nodes (%d fail)", r.Verdict, r.Cells, r.FailedCells, r.WarnedCells, r.Nodes, r.FailedNodes)
}
