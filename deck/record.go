package deck

import (
	"fmt"
	"path/filepath"
	"slices"
	"strings"

	"cvdeck/bc"
	"cvdeck/export/manifest"
	"cvdeck/mesh"
	"cvdeck/quality"
)

// manifest assembles deck.yaml's content (the file list is added by
// writeDeck as the files are written).
func (c *Case) manifest(m *mesh.Mesh, kind string, assign *bc.Assignment, rep *quality.Report, walls []WallResolution) *manifest.Manifest {
	man := &manifest.Manifest{
		Schema:    manifest.Schema,
		Caution:   manifest.Caution,
		Cvdeck:    Build,
		Case:      manifest.Case{Name: c.Name, File: c.Inputs[0].Path, Units: c.Units, Refine: c.Refine},
		InputHash: c.InputHash,
	}
	for _, f := range c.Inputs {
		man.Inputs = append(man.Inputs, manifest.File{Path: f.Path, SHA256: f.SHA256})
	}
	for _, k := range c.ParamOrder {
		man.Parameters = append(man.Parameters, manifest.Parameter{Name: k, Value: c.Params[k]})
	}
	man.Mesh = meshSummary(m, kind)
	for t, tag := range m.Tags {
		e := manifest.Tag{Tag: tag, FirstFace: int(m.TagStart[t]), Faces: int(m.TagStart[t+1] - m.TagStart[t])}
		if t < len(rep.Boundary) {
			e.FirstCellHeight = manifestSpread(rep.Boundary[t].FirstCellHeight, "m")
		}
		man.Tags = append(man.Tags, e)
	}
	for _, w := range walls {
		k := slices.IndexFunc(man.Tags, func(e manifest.Tag) bool { return e.Tag == w.Tag })
		if w.TargetHeight > 0 && k >= 0 {
			man.Tags[k].Yplus = manifestSpread(w.Yplus, "1")
		}
	}
	if assign != nil {
		rec := assign.Record()
		// A condition's place in the case file is given from the case's
		// folder, as the inputs are, so that the same case run from
		// another working folder writes the same manifest.
		for i := range rec.Boundaries {
			if rest, ok := strings.CutPrefix(rec.Boundaries[i].Where, c.File+":"); ok {
				rec.Boundaries[i].Where = filepath.Base(c.File) + ":" + rest
			}
		}
		eq := governingEquations(c, assign)
		rec.Equations = &bc.EquationsRecord{Name: eq.name, Basis: eq.basis}
		man.Conditions = &rec
	} else {
		man.Mesh.Notes = append(man.Mesh.Notes, "no boundary conditions are assigned: the deck carries boundary tags only")
	}
	if c.Reference != nil && c.Reference.gas.BorrowsAirViscosity() {
		man.Mesh.Notes = append(man.Mesh.Notes, fmt.Sprintf("the gas (gamma %g, R %g J/(kg K)) has no viscosity law of its own, so air's Sutherland constants (%s) give its viscosity, Reynolds number and first-cell heights; give reference.gas.sutherland for this gas", c.Reference.gas.Gamma, c.Reference.gas.R, bc.AirSutherland))
	}
	if c.Reference != nil {
		// Where the reference state stretches the gas models
		// (bc.State.Notes); those on the viscosity law only when a wall
		// is viscous, since an inviscid solve takes no viscosity.
		for _, n := range c.Reference.state.Notes() {
			if viscous(assign) || !strings.HasPrefix(n, bc.ViscosityNote) {
				man.Mesh.Notes = append(man.Mesh.Notes, n)
			}
		}
	}
	// The estimate's remarks on first-cell heights (each begins
	// "first-cell height:"), once whether they come from the advice or
	// from heights the case sets by y+: both are made at the reference
	// length and give the same remarks.
	var heightNotes []string
	if len(walls) > 0 {
		heightNotes = slices.Clone(walls[0].TargetNotes)
	}
	for _, n := range c.yplusNotes {
		if !slices.Contains(heightNotes, n) {
			heightNotes = append(heightNotes, n)
		}
	}
	man.Mesh.Notes = append(man.Mesh.Notes, heightNotes...)
	man.Advice = c.advice(m)
	man.Checks = checkSummary(rep)
	return man
}

// meshSummary counts the mesh for the manifest.
func meshSummary(m *mesh.Mesh, kind string) manifest.Mesh {
	s := manifest.Mesh{
		Kind: kind, Nodes: len(m.Nodes), Cells: m.NumCells(), Faces: m.NumFaces(),
		InteriorFaces: m.NumInterior, BoundaryFaces: m.NumBoundary(),
		CellShapes: map[string]int{},
	}
	area := 0.0
	for c := 0; c < m.NumCells(); c++ {
		area += m.Geo.CellArea[c]
		switch n := m.CellStart[c+1] - m.CellStart[c]; n {
		case 3:
			s.CellShapes["triangle"]++
		case 4:
			s.CellShapes["quadrilateral"]++
		default:
			s.CellShapes[fmt.Sprintf("polygon%d", n)]++
		}
	}
	s.Area = manifest.Quantity{Value: area, Unit: "m^2"}
	for _, b := range m.Blocks {
		s.Blocks = append(s.Blocks, manifest.Block{Name: b.Name, NI: b.NI, NJ: b.NJ})
	}
	return s
}

// advice derives the first-cell height for the target y+ and the explicit
// time-step estimate from the reference state.
func (c *Case) advice(m *mesh.Mesh) bc.Entries {
	r := c.Reference
	if r == nil {
		return nil
	}
	var out bc.Entries
	if r.length > 0 {
		out = append(out, bc.Entry{Key: "reynolds", Value: r.state.Reynolds(r.length), Unit: "1"},
			bc.Entry{Key: "reference_length", Value: r.length, Unit: "m"})
	}
	if yplus, h := c.targetHeight(); h > 0 {
		out = append(out, bc.Entry{Key: "target_yplus", Value: yplus, Unit: "1"},
			bc.Entry{Key: "first_cell_height", Value: h, Unit: "m"})
	}
	if r.state.Velocity > 0 {
		u := r.direction()
		u[0] *= r.state.Velocity
		u[1] *= r.state.Velocity
		if ts, err := bc.MaxTimeStep(m, u, r.state.SpeedOfSound, r.cfl); err == nil {
			out = append(out, bc.Entry{Key: "cfl", Value: r.cfl, Unit: "1"},
				bc.Entry{Key: "max_explicit_time_step", Value: ts.Dt, Unit: "s"},
				bc.Entry{Key: "time_step_limiting_cell", Value: float64(ts.Cell), Unit: "1"})
		}
	}
	return out
}
