package quality

import "math"

// metricDef describes one metric of the report.
type metricDef struct {
	name string
	unit string
	// perNode is true for the one metric reported per node (dual_closure).
	perNode bool
	// lower is true when smaller values are worse.
	lower bool
	// positive is true when a non-positive value always fails (an inverted
	// or degenerate cell or face), whatever the limits say.
	positive bool
	bound    func(*Limits) *Bound
	about    string
}

// metricDefs lists the metrics in report order.
var metricDefs = []metricDef{
	{name: "area", unit: "m²", lower: true, positive: true, bound: func(l *Limits) *Bound { return &l.Area }, about: "signed cell area"},
	{name: "face_length", unit: "m", lower: true, positive: true, bound: func(l *Limits) *Bound { return &l.FaceLength }, about: "shortest signed face length of the cell"},
	{name: "aspect_ratio", bound: func(l *Limits) *Bound { return &l.AspectRatio }, about: "elongation, 1 for a regular cell"},
	{name: "min_angle", unit: "°", lower: true, bound: func(l *Limits) *Bound { return &l.MinAngle }, about: "smallest interior angle"},
	{name: "max_angle", unit: "°", bound: func(l *Limits) *Bound { return &l.MaxAngle }, about: "largest interior angle"},
	{name: "equiangle_skewness", bound: func(l *Limits) *Bound { return &l.EquiangleSkewness }, about: "departure of the angles from the regular cell's"},
	{name: "scaled_jacobian", lower: true, bound: func(l *Limits) *Bound { return &l.ScaledJacobian }, about: "smallest corner sine of a quadrilateral"},
	{name: "non_orthogonality", unit: "°", bound: func(l *Limits) *Bound { return &l.NonOrthogonality }, about: "worst face: normal against the centroid line"},
	{name: "skewness", bound: func(l *Limits) *Bound { return &l.Skewness }, about: "worst face: centroid line crossing off the midpoint"},
	{name: "growth", bound: func(l *Limits) *Bound { return &l.Growth }, about: "largest area ratio to a neighbour"},
	{name: "closure", bound: func(l *Limits) *Bound { return &l.Closure }, about: "|Σ S n| / Σ |S| of the cell"},
	{name: "free_stream", bound: func(l *Limits) *Bound { return &l.FreeStream }, about: "uniform-flux residual / Σ |S|"},
	{name: "gradient_error", bound: func(l *Limits) *Bound { return &l.GradientError }, about: "Green–Gauss error on a linear field"},
	{name: "dual_closure", perNode: true, bound: func(l *Limits) *Bound { return &l.DualClosure }, about: "|Σ S n| / Σ |S| of the node's median dual"},
}

// MetricNames returns the metric names in report order; they are also the
// keys of a limits Patch and the names of the per-cell (and, for
// dual_closure, per-node) fields.
func MetricNames() []string {
	out := make([]string, len(metricDefs))
	for i, d := range metricDefs {
		out[i] = d.name
	}
	return out
}

// MetricUnit returns the unit of the named metric: "m²", "m", "°", or ""
// for a dimensionless metric and for a name that is not a metric.
func MetricUnit(name string) string {
	if d := metricByName(name); d != nil {
		return d.unit
	}
	return ""
}

func metricByName(name string) *metricDef {
	for i := range metricDefs {
		if metricDefs[i].name == name {
			return &metricDefs[i]
		}
	}
	return nil
}

// status grades value v of metric d against bound b. NaN (not applicable,
// such as the scaled Jacobian of a triangle) passes.
func (d *metricDef) status(v float64, b Bound) Status {
	switch {
	case v != v:
		return Pass
	case d.positive && v <= 0:
		return Fail
	case d.lower && v < b.Fail, !d.lower && v > b.Fail:
		return Fail
	case d.lower && v < b.Warn, !d.lower && v > b.Warn:
		return Warn
	}
	return Pass
}

// worse reports whether value a is worse than b for metric d.
func (d *metricDef) worse(a, b float64) bool {
	if d.lower {
		return a < b
	}
	return a > b
}

// span returns the least and the largest value metric d can take, by its
// definition: a threshold beyond them on the graded side would grade
// every cell (common practice; the angles are those of simple polygons,
// up to 360° at a reflex corner).
func (d *metricDef) span() (lo, hi float64) {
	inf := math.Inf(1)
	switch d.name {
	case "aspect_ratio", "growth":
		return 1, inf
	case "min_angle", "max_angle":
		return 0, 360
	case "non_orthogonality":
		return 0, 180
	case "scaled_jacobian":
		return -1, 1
	case "area", "face_length":
		return -inf, inf
	}
	return 0, inf // skewnesses, closures, residuals, errors
}
