package deck

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/paulmach/orb"
	"gopkg.in/yaml.v3"

	"cvdeck/bc"
)

// boundarySpec is the decoded boundaries section: one condition per tag.
type boundarySpec struct {
	conditions []bc.Condition
	at         value
	// tagAt is the first place in the case file that gives each boundary
	// tag (Case.tagAt), where an error about a tag without a condition
	// points.
	tagAt map[string]value
}

// where formats a value's place for the bc package's messages.
func (v value) where() string { return fmt.Sprintf("%s:%d:%d", v.d.file, v.n.Line, v.n.Column) }

// decodeBoundaries reads the boundaries section, a mapping from boundary tag
// to its condition:
//
//	boundaries:
//	  floor:  {kind: wall-adiabatic}
//	  inlet:  {kind: inflow-total, total_pressure: 1.05e5, total_temperature: 300, direction: [1, 0]}
//	  outlet: {kind: outflow-pressure, pressure: 1e5}
//	  top:    {kind: periodic, partner: bottom, translation: [0, -0.2]}
//
// Pressures are in Pa, temperatures in K, velocities in m/s whatever the
// case units; a periodic translation and tolerance are lengths in case
// units. Which values a kind takes is listed in the README. The case's
// geometry and mesh sections come first, so that c.tagAt knows where each
// tag is given.
func decodeBoundaries(c *Case, v value) (*boundarySpec, error) {
	o, err := v.object()
	if err != nil {
		return nil, err
	}
	bs := &boundarySpec{at: v, tagAt: c.tagAt}
	for _, tag := range o.keys {
		cv, _ := o.get(tag)
		co, err := cv.object()
		if err != nil {
			return nil, err
		}
		kv, err := co.need("kind")
		if err != nil {
			return nil, err
		}
		ks, err := kv.str()
		if err != nil {
			return nil, err
		}
		kind, err := bc.ParseKind(ks)
		if err != nil {
			return nil, kv.wrap(err)
		}
		cond := bc.Condition{Tag: tag, Kind: kind, Where: cv.where()}
		if kind == bc.Periodic {
			pv, err := co.need("partner")
			if err != nil {
				return nil, err
			}
			if cond.Partner, err = pv.str(); err != nil {
				return nil, err
			}
		}
		keys := append(append([]string{}, kind.Required()...), kind.Optional()...)
		for _, key := range keys {
			x, ok := co.get(key)
			if !ok {
				continue // a missing required value is reported by bc.Assign, with the others
			}
			val := bc.Value{Key: key, Where: x.where()}
			scale := 1.0
			if key == bc.KeyTranslation || key == bc.KeyTolerance {
				scale = v.d.scale
			}
			switch key {
			case bc.KeyDirection, bc.KeyVelocity, bc.KeyTranslation:
				if n := x.n; n.Kind != yaml.SequenceNode && (n.Kind != yaml.AliasNode || n.Alias.Kind != yaml.SequenceNode) {
					return nil, x.errf("%s is a vector %s, found %s", key, vectorForm[key], kindName(n))
				}
				items, err := x.list()
				if err != nil {
					return nil, err
				}
				if len(items) != 2 {
					return nil, x.errf("%s is a vector %s; found %d values", key, vectorForm[key], len(items))
				}
				for _, it := range items {
					f, err := it.number()
					if err != nil {
						return nil, err
					}
					val.Number = append(val.Number, f*scale)
				}
			default:
				f, err := x.number()
				if err != nil {
					return nil, err
				}
				val.Number = []float64{f * scale}
			}
			cond.Values = append(cond.Values, val)
		}
		if err := co.done(); err != nil {
			return nil, err
		}
		bs.conditions = append(bs.conditions, cond)
	}
	return bs, nil
}

// vectorForm says how each vector value of a condition is written and in
// what units.
var vectorForm = map[string]string{
	bc.KeyVelocity:    "[vx, vy] in m/s (whatever the case units)",
	bc.KeyDirection:   "[x, y], the flow direction (its length does not matter)",
	bc.KeyTranslation: "[dx, dy] in case units, from this tag to its partner",
}

// referenceSpec is the decoded reference section.
type referenceSpec struct {
	gas   bc.Gas
	state bc.State
	// angle is the free-stream flow angle from +x, radians.
	angle float64
	// angleAt is the case-file place of the angle ("" when the case gives
	// none, and the angle is 0), for the errors of a farfield direction
	// that disagrees with it.
	angleAt string
	// length is the reference length for the Reynolds number, metres (0:
	// none given).
	length float64
	// yplus is the target y+ for the first-cell-height advice (0: none).
	yplus float64
	// cfl is the CFL number for the time-step advice.
	cfl float64
	// regime is the flow regime the case states for its viscous walls,
	// "laminar" or "turbulent", or "" to take it from the Reynolds number
	// (see governingEquations); regimeAt is its case-file place.
	regime   string
	regimeAt value
	at       value
}

// hasNoSlipWall reports whether any condition is a no-slip wall (false
// for a case without boundaries).
func (bs *boundarySpec) hasNoSlipWall() bool {
	if bs == nil {
		return false
	}
	for _, c := range bs.conditions {
		if c.Kind.FrictionWall() {
			return true
		}
	}
	return false
}

// direction is the free-stream unit vector.
func (r *referenceSpec) direction() orb.Point {
	return orb.Point{math.Cos(r.angle), math.Sin(r.angle)}
}

// decodeReference reads the reference (free-stream) state:
//
//	reference:
//	  gas: air                 # or {gamma: 1.3, gas_constant: 290, sutherland: {mu_ref: 1.8e-5, t_ref: 300, s: 120}}
//	                           # (Pa s, K, K; without sutherland, air's viscosity is used, and a note says so)
//	  mach: 0.6
//	  pressure: 101325         # Pa, static
//	  temperature: 288.15      # K, static
//	  # or: mach, total_pressure, total_temperature
//	  # or: velocity (m/s), density (kg/m³), temperature
//	  # or: mach, altitude (m), altitude_kind: geometric | geopotential
//	  angle: 2                 # flow angle from +x, degrees
//	  length: 1                # reference length (case units) for the Reynolds number
//	  yplus: 1                 # target y+ for the first-cell height advice
//	  cfl: 1                   # CFL number for the explicit time-step estimate
//	  regime: turbulent        # or laminar: the equations of a case with no-slip walls
//	                           # (default: turbulent from a reference Reynolds number of 5e5)
func decodeReference(v value) (*referenceSpec, error) {
	o, err := v.object()
	if err != nil {
		return nil, err
	}
	r := &referenceSpec{gas: bc.Air, cfl: 1, at: v}
	if gv, ok := o.get("gas"); ok {
		if s, err := gv.scalar(); err == nil {
			if s != "air" {
				return nil, gv.errf("gas is air or {gamma: γ, gas_constant: R, sutherland: {mu_ref, t_ref, s}}; found %q", s)
			}
		} else {
			go_, err := gv.object()
			if err != nil {
				return nil, err
			}
			r.gas = bc.Gas{}
			gm, err := go_.need("gamma")
			if err != nil {
				return nil, err
			}
			if r.gas.Gamma, err = gm.number(); err != nil {
				return nil, err
			}
			gr, err := go_.need("gas_constant")
			if err != nil {
				return nil, err
			}
			if r.gas.R, err = gr.number(); err != nil {
				return nil, err
			}
			if sv, ok := go_.get("sutherland"); ok {
				so, err := sv.object()
				if err != nil {
					return nil, err
				}
				for _, k := range []struct {
					key string
					v   *float64
				}{{"mu_ref", &r.gas.Sutherland.MuRef}, {"t_ref", &r.gas.Sutherland.TRef}, {"s", &r.gas.Sutherland.S}} {
					kv, err := so.need(k.key)
					if err != nil {
						return nil, err
					}
					if *k.v, err = kv.positive(); err != nil {
						return nil, err
					}
				}
				if err := so.done(); err != nil {
					return nil, err
				}
			}
			if err := go_.done(); err != nil {
				return nil, err
			}
			if err := r.gas.Validate(gv.where()); err != nil {
				return nil, gv.wrap(err)
			}
		}
	}
	num := func(key string) (float64, bool, error) {
		x, ok := o.get(key)
		if !ok {
			return 0, false, nil
		}
		f, err := x.number()
		return f, true, err
	}
	var vals [7]float64
	var has [7]bool
	for i, k := range []string{"mach", "pressure", "temperature", "total_pressure", "total_temperature", "velocity", "density"} {
		if vals[i], has[i], err = num(k); err != nil {
			return nil, err
		}
	}
	mach, p, t, p0, t0, vel, rho := vals[0], vals[1], vals[2], vals[3], vals[4], vals[5], vals[6]
	hM, hp, hT, hp0, hT0, hV, hrho := has[0], has[1], has[2], has[3], has[4], has[5], has[6]
	altV, hAlt := o.get("altitude")
	kind := bc.Geometric
	if kv, ok := o.get("altitude_kind"); ok {
		s, err := kv.str()
		if err != nil {
			return nil, err
		}
		if kind, err = bc.ParseAltitudeKind(s); err != nil {
			return nil, kv.wrap(err)
		}
	}
	switch {
	case hM && hp && hT && !hp0 && !hT0 && !hV && !hrho && !hAlt:
		r.state, err = bc.StateFromMach(r.gas, mach, p, t)
	case hM && hp0 && hT0 && !hp && !hT && !hV && !hrho && !hAlt:
		r.state, err = bc.StateFromTotal(r.gas, mach, p0, t0)
	case hV && hrho && hT && !hM && !hp && !hp0 && !hT0 && !hAlt:
		r.state, err = bc.StateFromVelocity(r.gas, vel, rho, t)
	case hM && hAlt && !hp && !hT && !hp0 && !hT0 && !hV && !hrho:
		var alt float64
		if alt, err = altV.number(); err != nil {
			return nil, err
		}
		r.state, err = bc.StateFromAltitude(r.gas, bc.Altitude{Metres: alt, Kind: kind}, mach)
	default:
		return nil, v.errf("the reference state is one consistent set: {mach, pressure, temperature}, {mach, total_pressure, total_temperature}, {velocity, density, temperature} or {mach, altitude}")
	}
	if err != nil {
		return nil, v.wrap(err)
	}
	if av, ok := o.get("angle"); ok {
		deg, err := av.number()
		if err != nil {
			return nil, err
		}
		r.angle = deg * math.Pi / 180
		r.angleAt = av.where()
	}
	if lv, ok := o.get("length"); ok {
		if r.length, err = lv.positiveLength(); err != nil {
			return nil, err
		}
	}
	if yv, ok := o.get("yplus"); ok {
		if r.yplus, err = yv.positive(); err != nil {
			return nil, err
		}
		if r.length == 0 {
			return nil, yv.errf("the first-cell height for a y+ needs a reference length (length: ...) to set the Reynolds number")
		}
	}
	if cv, ok := o.get("cfl"); ok {
		if r.cfl, err = cv.positive(); err != nil {
			return nil, err
		}
	}
	if rv, ok := o.get("regime"); ok {
		if r.regime, err = rv.oneOf("laminar", "turbulent"); err != nil {
			return nil, err
		}
		r.regimeAt = rv
	}
	o.known("altitude")
	return r, o.done()
}

// ConditionErrors are the boundary-condition errors of a case, one located
// line each.
type ConditionErrors []error

func (e ConditionErrors) Error() string {
	lines := make([]string, len(e))
	for i, err := range e {
		lines[i] = err.Error()
	}
	return strings.Join(lines, "\n")
}

// Unwrap gives the single errors, ErrInput among them.
func (e ConditionErrors) Unwrap() []error { return append([]error{ErrInput}, e...) }

// locate gives every error of bc.Assign a case-file place: errors about a
// condition carry their own; an error about a tag that has no condition
// is placed where the case first gives the tag (tagAt: a segment, a loop,
// a grown grid's boundary or a sketch file), so that a misspelt or
// forgotten name can be seen there, and says to add it under boundaries;
// other errors without a place (untagged faces) are placed at the
// boundaries section.
func (bs *boundarySpec) locate(err error) error {
	var list []error
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		list = j.Unwrap()
	} else {
		list = []error{err}
	}
	out := make(ConditionErrors, 0, len(list))
	for _, e := range list {
		var be *bc.Error
		if errors.As(e, &be) && be.Where == "" {
			c := *be
			c.Where = bs.at.where()
			if at, ok := bs.tagAt[be.Tag]; ok && be.Tag != "" {
				c.Where = at.where()
				c.Msg += fmt.Sprintf(" (under boundaries, %s: {kind: ...})", be.Tag)
			}
			e = &c
		}
		out = append(out, e)
	}
	return out
}
