package deck

import (
	"cvdeck/bc"
	"cvdeck/export/manifest"
	"cvdeck/quality"
)

// WallResolution is what a deck says of one no-slip wall's first cells:
// their height normal to the wall, from the quality report, and, when the
// case asks for a target y+, the y+ those heights give.
type WallResolution struct {
	Tag    string
	Height quality.Spread
	// TargetYplus and TargetHeight are the case's target y+ and the
	// first-cell height advised for it (mesh_advice); 0 when the case
	// sets no target.
	TargetYplus, TargetHeight float64
	// TargetNotes are the advice's remarks on that height
	// (bc.WallSpacing.Notes: a laminar station, a Reynolds number past
	// the correlation's range, a wall past air's Sutherland range), the
	// same on every wall since the advice is made at the reference
	// length; nil when the case sets no target.
	TargetNotes []string
	// Yplus spreads TargetYplus × h / TargetHeight over the heights h. In
	// the viscous sublayer y+ = y u_τ / ν grows in proportion to the wall
	// distance y (common practice), and u_τ is the flat-plate estimate's
	// (bc.FirstCellHeight): a first guess, which the solution's own wall
	// shear replaces.
	Yplus quality.Spread
}

// wallResolution returns the resolution of each no-slip wall tag with
// faces, in tag order. rep's boundary list is in the mesh's tag order.
func (c *Case) wallResolution(rep *quality.Report, assign *bc.Assignment) []WallResolution {
	if assign == nil {
		return nil
	}
	yplus, ws := c.targetSpacing()
	target := ws.Height
	var out []WallResolution
	for t, cond := range assign.Conditions {
		if !cond.Kind.FrictionWall() || t >= len(rep.Boundary) || rep.Boundary[t].Faces == 0 {
			continue
		}
		h := rep.Boundary[t].FirstCellHeight
		w := WallResolution{Tag: cond.Tag, Height: h, TargetYplus: yplus, TargetHeight: target, TargetNotes: ws.Notes}
		if target > 0 {
			k := quality.Number(yplus / target)
			w.Yplus = quality.Spread{Min: h.Min * k, Mean: h.Mean * k, Max: h.Max * k}
		}
		out = append(out, w)
	}
	return out
}

// targetHeight returns the case's target y+ and the first-cell height
// advised for it (bc.FirstCellHeight at the reference length), both 0 when
// the case sets no target or the estimate cannot be made.
func (c *Case) targetHeight() (yplus, height float64) {
	yplus, ws := c.targetSpacing()
	return yplus, ws.Height
}

// targetSpacing returns the case's target y+ and the advice for it
// (bc.FirstCellHeight at the reference length), zero when the case sets
// no target or the estimate cannot be made.
func (c *Case) targetSpacing() (float64, bc.WallSpacing) {
	r := c.Reference
	if r == nil || r.yplus <= 0 {
		return 0, bc.WallSpacing{}
	}
	ws, err := bc.FirstCellHeight(r.state, r.length, r.yplus)
	if err != nil {
		return 0, bc.WallSpacing{}
	}
	return r.yplus, ws
}

// manifestSpread turns a report's spread into the manifest's, nil when it
// is empty.
func manifestSpread(s quality.Spread, unit string) *manifest.Spread {
	if s.Min != s.Min {
		return nil
	}
	return &manifest.Spread{Min: float64(s.Min), Mean: float64(s.Mean), Max: float64(s.Max), Unit: unit}
}
