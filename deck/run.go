package deck

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"hash"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"

	"cvdeck/bc"
	"cvdeck/export/atomic"
	"cvdeck/export/cgns"
	"cvdeck/export/manifest"
	"cvdeck/export/preview"
	"cvdeck/export/vtk"
	"cvdeck/mesh"
	"cvdeck/quality"
)

// RunOptions change how a case is run.
type RunOptions struct {
	// Formats replaces the case's output formats when not nil.
	Formats []string
	// MaxCells replaces the case's cell limit when positive.
	MaxCells int
	// Limits are extra limit overrides (from --limits FILE), applied after
	// the case's own.
	Limits *quality.Patch
	// Stage, if set, is told the name of each pipeline stage as it starts
	// (for progress display).
	Stage func(name string)
	// Evaluator, if set, runs the quality checks in memory kept from its
	// earlier runs (see quality.Evaluator); the Result's Report then lasts
	// until its next use. Nil checks in fresh memory.
	Evaluator *quality.Evaluator
}

// Result is what a run made.
type Result struct {
	Case      string
	Dir       string
	InputHash string
	Mesh      *mesh.Mesh
	Report    *quality.Report
	// Walls are the first-cell heights, and y+ estimates, of the no-slip
	// walls.
	Walls []WallResolution
	// Notes are the deck manifest's notes on the mesh and the case (the
	// smoothing's sweeps and residual, the boundary layers built, a case
	// without boundary conditions), then the boundary conditions' notes on
	// their states against the reference state (bc.Assignment.Notes, each
	// with its case-file place; deck.yaml keeps them with their tag), for
	// the command line to print.
	Notes []string
}

// CheckFailure is returned, together with a Result, when the deck was
// written but a quality check failed: the command line exits 1.
type CheckFailure struct {
	Dir string
	// Failed is the number of failed cells, Failures what fails
	// (quality.Report.Failures).
	Failed   int
	Failures []string
}

func (e *CheckFailure) Error() string {
	what := strings.Join(e.Failures, ", ")
	if e.Dir == "" {
		return fmt.Sprintf("the mesh fails its checks (%s): see the report", what)
	}
	return fmt.Sprintf("the deck is written to %s, but the mesh fails its checks (%s): see the report or the deck's quality.json", e.Dir, what)
}

// Run meshes a loaded case, assigns its boundary conditions, checks the
// mesh and writes the deck folder outDir as a whole. Bad input returns an
// error wrapping ErrInput and writes nothing; a failed check writes the
// deck and returns it with a *CheckFailure.
func Run(c *Case, outDir string, opts RunOptions) (res *Result, err error) {
	defer func() { err = c.fromSketch(err) }()
	stage := opts.Stage
	if stage == nil {
		stage = func(string) {}
	}
	formats := c.Outputs.formats
	if opts.Formats != nil {
		formats = opts.Formats
	}
	if opts.MaxCells > 0 {
		c.Mesh.maxCells = opts.MaxCells
	}
	// The case's own formats are checked against its mesh as it is read
	// (decodeOutputs), at the entry; those given to the run are here.
	if hasFormat(formats, "vts") && c.Mesh.unstructured != nil {
		return nil, fmt.Errorf("%w: --format vts: %s", ErrInput, vtsUnstructured)
	}
	if err := checkOutDir(outDir, c.inputPaths(), "deck"); err != nil {
		return nil, err
	}

	stage("mesh")
	m, kind, notes, err := c.buildMesh()
	if err != nil {
		return nil, err
	}

	stage("conditions")
	var assign *bc.Assignment
	if c.Boundaries != nil {
		setup := bc.Setup{Conditions: c.Boundaries.conditions}
		if c.Reference != nil {
			setup.Gas = c.Reference.gas
			setup.Reference = &c.Reference.state
			setup.ReferenceWhere = c.Reference.at.where()
			setup.Direction = c.Reference.direction()
			setup.DirectionWhere = c.Reference.angleAt
		}
		if assign, err = bc.Assign(m, setup); err != nil {
			return nil, c.Boundaries.locate(err)
		}
	}

	stage("checks")
	lim, err := c.limits(opts.Limits)
	if err != nil {
		return nil, err
	}
	ev := opts.Evaluator
	if ev == nil {
		ev = new(quality.Evaluator)
	}
	rep, err := ev.Evaluate(m, lim)
	if err != nil {
		return nil, fmt.Errorf("quality checks: %w", err)
	}

	stage("export")
	walls := c.wallResolution(rep, assign)
	man := c.manifest(m, kind, assign, rep, walls)
	man.Mesh.Notes = append(notes, man.Mesh.Notes...)
	if err := atomic.ReplaceDir(outDir, func(tmp string) error {
		return writeDeck(tmp, c, m, assign, rep, man, formats)
	}); err != nil {
		return nil, fmt.Errorf("writing the deck: %w", err)
	}
	res = &Result{Case: c.Name, Dir: outDir, InputHash: c.InputHash, Mesh: m, Report: rep, Walls: walls, Notes: append([]string(nil), man.Mesh.Notes...)}
	if assign != nil {
		for _, n := range assign.Notes {
			res.Notes = append(res.Notes, n.String())
		}
	}
	if rep.Verdict == quality.Fail {
		return res, &CheckFailure{Dir: outDir, Failed: rep.FailedCells, Failures: rep.Failures()}
	}
	return res, nil
}

// buildMesh runs the case's mesher; the notes it returns go into the
// manifest's mesh notes.
func (c *Case) buildMesh() (*mesh.Mesh, string, []string, error) {
	if c.Mesh.unstructured != nil {
		m, notes, err := c.buildUnstructured()
		return m, "unstructured", notes, err
	}
	m, notes, err := c.buildStructured()
	return m, "structured", notes, err
}

// limits resolves the case's limit profile and overrides, then extra.
func (c *Case) limits(extra *quality.Patch) (quality.Limits, error) {
	var patches []quality.Patch
	if c.Checks != nil {
		patches = append(patches, c.Checks.patch)
	}
	if extra != nil {
		patches = append(patches, *extra)
	}
	lim, err := quality.Resolve(patches...)
	if err != nil {
		return lim, fmt.Errorf("%w: limits: %w", ErrInput, err)
	}
	return lim, nil
}

// writeDeck writes every output into the (temporary) deck folder dir, then
// the manifest with the hashes of all of them. The outputs are written
// side by side, by up to GOMAXPROCS workers, since each reads the mesh and
// the report alone (the CGNS file, whose library takes one call at a time
// within a process, is one of them); a file's bytes do not depend on what
// else is being written. The first error in output order is returned, so
// that the same input fails the same way.
func writeDeck(dir string, c *Case, m *mesh.Mesh, assign *bc.Assignment, rep *quality.Report, man *manifest.Manifest, formats []string) error {
	fields := cellFields(rep)
	conds := conditionNames(m, assign)
	// An output writes its files and returns their manifest records.
	var outs []func() ([]manifest.File, error)
	file := func(name, format string, write func(w io.Writer) error) {
		outs = append(outs, func() ([]manifest.File, error) {
			f, err := writeRecorded(dir, name, format, write)
			return []manifest.File{f}, err
		})
	}
	// The workers take the outputs in list order, so the largest come
	// first: the CGNS file, then the VTK mesh.
	if hasFormat(formats, "cgns") {
		outs = append(outs, func() ([]manifest.File, error) {
			sum, err := cgns.Write(filepath.Join(dir, "mesh.cgns"), cgnsDeck(c, m, assign, fields))
			if err != nil {
				return nil, err
			}
			st, err := os.Stat(filepath.Join(dir, "mesh.cgns"))
			if err != nil {
				return nil, err
			}
			return []manifest.File{{Path: "mesh.cgns", Format: "cgns-hdf5", Bytes: st.Size(), ContentSHA256: sum}}, nil
		})
	}
	if hasFormat(formats, "vtu") {
		file("mesh.vtu", "vtk-xml-unstructured", func(w io.Writer) error { return vtk.WriteVTU(w, m, vtuFields(rep)) })
		file("boundary.vtp", "vtk-xml-polydata", func(w io.Writer) error { return vtk.WriteBoundaryVTP(w, m, conds) })
	}
	if hasFormat(formats, "vtk") {
		file("mesh.vtk", "vtk-legacy-ascii", func(w io.Writer) error { return vtk.WriteLegacy(w, m, fields, false) })
	}
	if hasFormat(formats, "vtk-binary") {
		file("mesh-binary.vtk", "vtk-legacy-binary", func(w io.Writer) error { return vtk.WriteLegacy(w, m, fields, true) })
	}
	if hasFormat(formats, "preview") || hasFormat(formats, "png") {
		pin := previewInput(c.Name, m, conds, rep)
		if hasFormat(formats, "preview") {
			file("preview.svg", "svg", func(w io.Writer) error { return preview.SVG(w, pin) })
		}
		if hasFormat(formats, "png") {
			file("preview.png", "png", func(w io.Writer) error { return preview.PNG(w, pin) })
		}
	}
	file("quality.json", "json", func(w io.Writer) error { return quality.WriteJSON(w, rep) })
	if hasFormat(formats, "vts") && len(m.Blocks) > 0 {
		outs = append(outs, func() ([]manifest.File, error) {
			names, err := vtk.WriteStructured(dir, "blocks", m, fields)
			if err != nil {
				return nil, err
			}
			var recs []manifest.File
			for _, n := range names {
				format := "vtk-xml-structured"
				if filepath.Ext(n) == ".vtm" {
					format = "vtk-xml-multiblock"
				}
				f, err := fileRecord(dir, n, format)
				if err != nil {
					return nil, err
				}
				recs = append(recs, f)
			}
			return recs, nil
		})
	}
	recs := make([][]manifest.File, len(outs))
	errs := make([]error, len(outs))
	next := make(chan int, len(outs))
	for i := range outs {
		next <- i
	}
	close(next)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(outs)) {
		wg.Go(func() {
			for i := range next {
				recs[i], errs[i] = outs[i]()
			}
		})
	}
	wg.Wait()
	for i := range outs {
		if errs[i] != nil {
			return errs[i]
		}
		man.Files = append(man.Files, recs[i]...)
	}
	sort.Slice(man.Files, func(i, j int) bool { return man.Files[i].Path < man.Files[j].Path })
	// deck.yaml is written whatever the formats: it carries the caution
	// statement, the inputs and the limits the deck was graded with, and
	// without it a check of the deck's files could not tell the deck's
	// verdict.
	return atomic.WriteFile(filepath.Join(dir, manifest.FileName), func(w io.Writer) error { return manifest.Encode(w, man) })
}

// previewInput gathers what the preview pictures of the mesh called name
// show: the mesh, the boundary tags with their conditions (conds, nil
// when there are none), cells by their worst status, and each cell metric
// with its unit, the way it worsens, its limits and, where the report has
// them, its values per face.
func previewInput(name string, m *mesh.Mesh, conds []string, rep *quality.Report) preview.Input {
	in := preview.Input{
		Title:      fmt.Sprintf("%s: %d cells, checks %s", name, m.NumCells(), rep.Verdict),
		Mesh:       m,
		Conditions: conds,
		Status:     make([]preview.Status, len(rep.CellStatus)),
	}
	for i, s := range rep.CellStatus {
		in.Status[i] = preview.Status(s)
	}
	// Zoom in on the worst cells of the metrics that fail, then of those
	// that warn.
	seen := map[int]bool{}
	for _, pass := range []func(quality.MetricSummary) bool{
		func(ms quality.MetricSummary) bool { return ms.Failed > 0 },
		func(ms quality.MetricSummary) bool { return ms.Failed == 0 && ms.Warned > 0 },
	} {
		for _, ms := range rep.Metrics {
			if ms.Per != "cell" || !pass(ms) || len(ms.Worst) == 0 {
				continue
			}
			if c := ms.Worst[0].Index; !seen[c] && c < m.NumCells() {
				seen[c] = true
				in.Worst = append(in.Worst, int32(c))
			}
		}
	}
	for _, ms := range rep.Metrics {
		vals, ok := rep.Field(ms.Name)
		if !ok || ms.Per != "cell" || len(vals) != m.NumCells() {
			continue
		}
		// Face values, where the cell value is its worst face's, let a
		// zoom on a thin cell centre on that face.
		var faceVals []float64
		for _, f := range rep.FaceFields {
			if f.Name == ms.Name && len(f.Values) == m.NumFaces() {
				faceVals = f.Values
			}
		}
		in.Metrics = append(in.Metrics, preview.Metric{Name: ms.Name, Unit: ms.Unit, Lower: ms.Worse == "lower",
			Values: vals, FaceValues: faceVals, Limits: []preview.Limit{
				{Value: ms.Limit.Warn, Status: preview.Warn}, {Value: ms.Limit.Fail, Status: preview.Fail}}})
	}
	return in
}

// writeRecorded writes the file name in dir through atomic.WriteFile and
// returns its manifest record, hashing the bytes as they are written
// rather than reading the file back.
func writeRecorded(dir, name, format string, write func(w io.Writer) error) (manifest.File, error) {
	h := &countingHash{Hash: sha256.New()}
	if err := atomic.WriteFile(filepath.Join(dir, name), func(w io.Writer) error { return write(io.MultiWriter(w, h)) }); err != nil {
		return manifest.File{}, err
	}
	return manifest.File{Path: name, Format: format, Bytes: h.n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

// countingHash is a hash that also counts the bytes written to it.
type countingHash struct {
	hash.Hash
	n int64
}

func (c *countingHash) Write(p []byte) (int, error) {
	c.n += int64(len(p))
	return c.Hash.Write(p)
}

// fileRecord hashes a file written elsewhere for the manifest, reading it
// in pieces: a large deck's files run to hundreds of megabytes, which need
// not be held in memory at once.
func fileRecord(dir, name, format string) (manifest.File, error) {
	f, err := os.Open(filepath.Join(dir, name))
	if err != nil {
		return manifest.File{}, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.CopyBuffer(h, f, make([]byte, 1<<20))
	if err != nil {
		return manifest.File{}, err
	}
	return manifest.File{Path: name, Format: format, Bytes: n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

// cellFields are the per-cell arrays written with the mesh: the quality
// metrics (the area comes with every VTK file anyway).
func cellFields(rep *quality.Report) []vtk.Field {
	var out []vtk.Field
	for _, f := range rep.CellFields {
		if f.Name == vtk.AreaName {
			continue
		}
		out = append(out, vtk.Field{Name: f.Name, Values: f.Values})
	}
	return out
}

// vtuFields are cellFields and, as point data, the per-node metrics
// (dual_closure, the closure of each node's median-dual control volume),
// for mesh.vtu: the one file where failing nodes can be seen as well as
// failing cells.
func vtuFields(rep *quality.Report) []vtk.Field {
	out := cellFields(rep)
	for _, f := range rep.NodeFields {
		out = append(out, vtk.Field{Name: f.Name, Values: f.Values, Point: true})
	}
	return out
}

// conditionNames gives each tag's boundary kind, or nil without conditions.
func conditionNames(m *mesh.Mesh, assign *bc.Assignment) []string {
	if assign == nil {
		return nil
	}
	out := make([]string, len(m.Tags))
	for t, r := range assign.Conditions {
		out[t] = r.Kind.String()
	}
	return out
}

// cgnsDeck fills the CGNS writer's input: the mesh, each tag's BCType and
// the values its condition imposes (cgnsBCValues), the periodic pairs, the
// flow equation set and reference state (cgnsFlow) and the cell fields.
func cgnsDeck(c *Case, m *mesh.Mesh, assign *bc.Assignment, fields []vtk.Field) *cgns.Deck {
	d := &cgns.Deck{Mesh: m, Name: cgnsName(c.Name)}
	for t, tag := range m.Tags {
		typ := "BCTypeUserDefined"
		if assign != nil {
			if assign.Conditions[t].Kind == bc.Periodic {
				continue // written as connectivity below
			}
			if ct := assign.Conditions[t].Kind.CGNSType(); ct != "" {
				typ = ct
			}
			if vals := cgnsBCValues(assign.Conditions[t]); len(vals) > 0 {
				d.BCData = append(d.BCData, cgns.BCData{Tag: tag, Values: vals})
			}
		}
		d.BCs = append(d.BCs, cgns.BC{Tag: tag, BCType: typ})
	}
	if assign != nil {
		for _, p := range assign.Periodic {
			d.Periodic = append(d.Periodic, cgns.Periodic{A: p.A, B: p.B, Translation: [2]float64{p.Translation[0], p.Translation[1]}, Pairs: p.Pairs})
		}
	}
	d.Flow = cgnsFlow(c, assign)
	for _, f := range fields {
		cf := cgns.Field{Name: f.Name, Values: f.Values}
		switch quality.MetricUnit(f.Name) {
		case "m":
			cf.Exponents = [5]float64{0, 1, 0, 0, 0}
		case "m²":
			cf.Exponents = [5]float64{0, 2, 0, 0, 0}
		case "°":
			cf.Exponents, cf.Degrees = [5]float64{0, 0, 0, 0, 1}, true
		}
		d.CellFields = append(d.CellFields, cf)
	}
	return d
}

// cgnsPrandtl is the Prandtl number written as the ThermalConductivityModel
// ConstantPrandtl of a viscous deck: 0.72, air's near room temperature
// (common practice). bc.Gas carries no Prandtl number, so a gas other than
// air is given air's too.
const cgnsPrandtl = 0.72

// cgnsFlow is the flow equation set and reference state of the CGNS file,
// or nil when the case states nothing of its gas (no reference state and
// no boundary conditions). The gas is the assignment's (the reference
// state's, or air without one). Without a reference state only the
// equation set is written. The governing equations are governingEquations';
// a viscous deck gets the gas's Sutherland law and a constant Prandtl
// number (cgnsPrandtl).
func cgnsFlow(c *Case, assign *bc.Assignment) *cgns.FlowState {
	var gas bc.Gas
	switch {
	case assign != nil:
		gas = assign.Gas
	case c.Reference != nil:
		gas = c.Reference.gas
	default:
		return nil
	}
	fs := &cgns.FlowState{Gamma: gas.Gamma, GasConstant: gas.R, Viscous: viscous(assign), EquationsOnly: c.Reference == nil}
	if r := c.Reference; r != nil {
		s := r.state
		dir := r.direction()
		fs.Mach, fs.Pressure, fs.Temperature, fs.Density, fs.SpeedOfSound = s.Mach, s.Pressure, s.Temperature, s.Density, s.SpeedOfSound
		fs.Velocity = [2]float64{s.Velocity * dir[0], s.Velocity * dir[1]}
		fs.Viscosity, fs.ReynoldsLength, fs.Reynolds = s.Viscosity, r.length, s.Reynolds(r.length)
	}
	if fs.Viscous {
		v := gas.ViscosityLaw()
		fs.Sutherland = &cgns.Sutherland{ViscosityRef: v.MuRef, TemperatureRef: v.TRef, Constant: v.S}
		fs.Prandtl = cgnsPrandtl
		fs.Turbulent = governingEquations(c, assign).name == "NSTurbulent"
	}
	return fs
}

// equations are the governing equations a deck states (the CGNS
// GoverningEquationsType names, SIDS §10.2) and why.
type equations struct {
	name, basis string
}

// governingEquations decides the equations the deck states: Euler without
// a no-slip wall; with one, the regime the case gives (reference.regime),
// or else NSTurbulent when the reference Reynolds number at the reference
// length reaches bc.TransitionReynolds (5e5, where a flat plate's boundary
// layer turns turbulent; common practice), the regime the first-cell
// height advice assumes and in which a solver reading GoverningEquations
// would be run with a turbulence model, and NSLaminar below it or without
// a reference length. It is a first statement of intent, written to the
// CGNS file and to deck.yaml with its basis; the solver's own settings
// decide.
func governingEquations(c *Case, assign *bc.Assignment) equations {
	r := c.Reference
	switch {
	case !viscous(assign):
		return equations{"Euler", "no no-slip wall"}
	case r != nil && r.regime == "turbulent":
		return equations{"NSTurbulent", "regime: turbulent in the case"}
	case r != nil && r.regime == "laminar":
		return equations{"NSLaminar", "regime: laminar in the case"}
	case r == nil || r.length == 0:
		return equations{"NSLaminar", "no reference length to set a Reynolds number; give reference.regime to state it"}
	}
	re := r.state.Reynolds(r.length)
	if re >= bc.TransitionReynolds {
		return equations{"NSTurbulent", fmt.Sprintf("reference Reynolds number %.3g at the reference length reaches %.0e (flat-plate transition); give reference.regime to state it", re, bc.TransitionReynolds)}
	}
	return equations{"NSLaminar", fmt.Sprintf("reference Reynolds number %.3g at the reference length is below %.0e (flat-plate transition); give reference.regime to state it", re, bc.TransitionReynolds)}
}

// cgnsBCValues are the values a condition imposes, under the SIDS
// data-name identifiers (SIDS, "Conventions for Data-Name Identifiers"):
// an isothermal wall's Temperature; an inflow-total's PressureStagnation,
// TemperatureStagnation and flow direction VelocityUnitVectorX and
// VelocityUnitVectorY; an inflow-velocity's VelocityX, VelocityY and
// Temperature; an outflow-pressure's Pressure; and the full state (Mach,
// Pressure, Temperature, Density, VelocityX, VelocityY) of a supersonic
// inflow and of a farfield (the reference state, in the free stream's
// direction as bc.Assign resolves it). Other kinds impose no value (an
// adiabatic wall's zero heat flux is its BCType).
func cgnsBCValues(r bc.Resolved) []cgns.BCValue {
	val := func(key string) float64 { v, _ := r.Value(key); return v }
	switch r.Kind {
	case bc.WallIsothermal:
		return []cgns.BCValue{{Name: "Temperature", Value: val(bc.KeyTemperature)}}
	case bc.InflowTotal:
		return []cgns.BCValue{
			{Name: "PressureStagnation", Value: val(bc.KeyTotalPressure)},
			{Name: "TemperatureStagnation", Value: val(bc.KeyTotalTemperature)},
			{Name: "VelocityUnitVectorX", Value: r.Direction[0]},
			{Name: "VelocityUnitVectorY", Value: r.Direction[1]},
		}
	case bc.InflowVelocity:
		return []cgns.BCValue{
			{Name: "VelocityX", Value: r.Velocity[0]},
			{Name: "VelocityY", Value: r.Velocity[1]},
			{Name: "Temperature", Value: val(bc.KeyTemperature)},
		}
	case bc.OutflowPressure:
		return []cgns.BCValue{{Name: "Pressure", Value: val(bc.KeyPressure)}}
	case bc.InflowSupersonic, bc.Farfield:
		if r.State == nil {
			return nil
		}
		s, dir := r.State, r.Direction
		return []cgns.BCValue{
			{Name: "Mach", Value: s.Mach},
			{Name: "Pressure", Value: s.Pressure},
			{Name: "Temperature", Value: s.Temperature},
			{Name: "Density", Value: s.Density},
			{Name: "VelocityX", Value: s.Velocity * dir[0]},
			{Name: "VelocityY", Value: s.Velocity * dir[1]},
		}
	}
	return nil
}

// cgnsName makes a CGNS base name: at most 32 characters, no '/'.
func cgnsName(s string) string {
	out := []rune{}
	for _, r := range s {
		if r == '/' {
			r = '_'
		}
		out = append(out, r)
		if len(out) == 32 {
			break
		}
	}
	return string(out)
}

// viscous reports whether any condition is a no-slip wall, which makes the
// deck a viscous (Navier–Stokes) case.
func viscous(assign *bc.Assignment) bool {
	if assign == nil {
		return false
	}
	for _, r := range assign.Conditions {
		if r.Kind.FrictionWall() {
			return true
		}
	}
	return false
}
