package bc

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

// Assign checks the conditions of s against mesh m and returns the
// resolved assignment, one condition per boundary tag.
//
// Every failure is collected, not just the first, and returned joined
// (errors.Join); each is an *Error naming the tag and the case-file place
// and wraps ErrInput. It reports:
//
//   - boundary faces that carry no tag, and tags with no condition;
//   - a condition on a tag the mesh does not have (suggesting the nearest
//     tag name), and a tag given two conditions;
//   - an unknown kind, a missing, unknown or repeated value key, a vector
//     with other than two components;
//   - non-physical values: p ≤ 0, T ≤ 0, Mach < 0, γ ≤ 1, a zero flow
//     direction or a flow direction that leaves the domain on an inflow;
//   - a subsonic or supersonic choice that contradicts the Mach number the
//     values imply (an inflow-velocity at M ≥ 1, an inflow-supersonic at
//     M ≤ 1, an inflow-total whose total pressure over the reference static
//     pressure gives M ≥ 1, a supersonic outflow given a back pressure);
//   - a farfield without a reference state, and a farfield direction more
//     than FarfieldAngleTolerance from the reference flow direction
//     (Setup.Direction): a farfield imposes the free stream, so it takes
//     the reference direction, which is also its direction when none is
//     given;
//   - periodic pairs whose faces do not match one to one within tolerance,
//     and a pair declared from both sides whose two declarations disagree.
//     A pair may be declared on one tag (the partner's translation is the
//     opposite one) or on both, with opposite translations within the
//     periodic tolerance and the same tolerance if both give one; the two
//     declarations are then one pairing.
//
// A valid assignment carries Notes, which do not stop the run, where a
// boundary state disagrees with the reference state (see referenceNotes).
func Assign(m *mesh.Mesh, s Setup) (*Assignment, error) {
	gas := s.Gas
	if gas == (Gas{}) {
		gas = Air
		if s.Reference != nil {
			gas = s.Reference.Gas
		}
	}
	var errs []error
	fail := func(where, tag, format string, args ...any) {
		errs = append(errs, inputErr(where, tag, format, args...))
	}
	if err := gas.Validate(s.GasWhere); err != nil {
		errs = append(errs, err)
	}
	if s.Reference != nil && s.Reference.Gas != gas {
		fail(s.ReferenceWhere, "", "the reference state is of a gas with gamma %g, R %g but the case's gas has gamma %g, R %g",
			s.Reference.Gas.Gamma, s.Reference.Gas.R, gas.Gamma, gas.R)
	}
	ref := refFlow{state: s.Reference, dir: orb.Point{1, 0}, where: s.DirectionWhere}
	if s.Direction != (orb.Point{}) {
		// Used as given, not normalised again, so that the farfield's
		// direction is bit for bit the one the caller writes beside it.
		if n := math.Hypot(s.Direction[0], s.Direction[1]); !(math.Abs(n-1) <= unitTolerance) {
			fail(whereOr2(s.DirectionWhere, s.ReferenceWhere), "", "the reference flow direction (%g, %g) is not a unit vector (length %.6g)", s.Direction[0], s.Direction[1], n)
		} else {
			ref.dir = s.Direction
		}
	}

	if lo, hi := m.UntaggedRange(); hi > lo {
		p := m.Geo.FaceMid[lo]
		fail("", "", "%d boundary faces carry no boundary tag (faces %d to %d, the first at (%g, %g)); every boundary face needs a tag and a condition",
			hi-lo, lo, hi-1, p[0], p[1])
	}

	a := &Assignment{Gas: gas, Reference: s.Reference, Direction: ref.dir, Conditions: make([]Resolved, len(m.Tags))}
	conds, mirrorOf, mirroredBy := mutualPeriodic(m, s.Conditions, fail)
	claimed := make([]int, len(m.Tags)) // index+1 of the condition claiming each tag
	tagIndex := func(c Condition, name, role string) int {
		t := slices.Index(m.Tags, name)
		if t < 0 {
			fail(c.Where, name, "%s names a tag the mesh does not have%s; the mesh's tags are %s",
				role, nearestName(name, m.Tags), quoteList(m.Tags))
		}
		return t
	}
	claim := func(ci int, c Condition, t int) bool {
		if prev := claimed[t]; prev != 0 {
			p := conds[prev-1]
			fail(c.Where, m.Tags[t], "has two conditions: %s here and %s at %s; give each tag exactly one", c.Kind, p.Kind, whereOr(p.Where))
			return false
		}
		claimed[t] = ci + 1
		return true
	}

	for ci, c := range conds {
		if mirrorOf[ci] >= 0 {
			// The other side of a pair declared above: its values are
			// checked on their own, and its agreement with the first side
			// by mutualPeriodic; the pairing is the first side's.
			if vals, ok := checkValues(c, fail); ok {
				var r Resolved
				if err := resolve(m, gas, ref, c, vals, &r); err != nil {
					errs = append(errs, err)
				}
			}
			continue
		}
		if !c.Kind.valid() {
			fail(c.Where, c.Tag, "no valid boundary kind (got %s); give one of: %s", c.Kind, kindList())
			continue
		}
		t := tagIndex(c, c.Tag, "the condition")
		pt := -1
		if c.Kind == Periodic {
			switch {
			case c.Partner == "":
				fail(c.Where, c.Tag, "a periodic condition needs a partner tag")
			case c.Partner == c.Tag:
				fail(c.Where, c.Tag, "a periodic condition cannot pair a tag with itself")
			default:
				pt = tagIndex(c, c.Partner, "the periodic partner")
			}
		} else if c.Partner != "" {
			fail(c.Where, c.Tag, "only a periodic condition takes a partner tag, not %s", c.Kind)
		}
		vals, ok := checkValues(c, fail)
		// Claim both tags before giving up on bad values, so that a tag
		// with a faulty condition is not also reported as having none.
		ok = t >= 0 && claim(ci, c, t) && ok
		if c.Kind == Periodic {
			ok = pt >= 0 && claim(ci, c, pt) && ok
		}
		if !ok {
			continue
		}
		lo, hi := int(m.TagStart[t]), int(m.TagStart[t+1])
		r := Resolved{Tag: c.Tag, Kind: c.Kind, Where: c.Where, First: lo, Count: hi - lo, Mach: -1, Periodic: -1}
		if err := resolve(m, gas, ref, c, vals, &r); err != nil {
			errs = append(errs, err)
			continue
		}
		if c.Kind == Periodic {
			plo, phi := int(m.TagStart[pt]), int(m.TagStart[pt+1])
			tr := orb.Point{vals[KeyTranslation][0], vals[KeyTranslation][1]}
			var tol float64
			if v, ok := vals[KeyTolerance]; ok {
				tol = v[0]
			}
			pm, err := matchPeriodic(m, c.Tag, c.Partner, lo, hi, plo, phi, tr, tol)
			if err != nil {
				fail(c.Where, c.Tag, "%v", err)
				continue
			}
			r.Periodic, r.Partner = len(a.Periodic), c.Partner
			a.Periodic = append(a.Periodic, pm)
			partner := r
			partner.Tag, partner.Partner, partner.First, partner.Count = c.Partner, c.Tag, plo, phi-plo
			partner.Values = []Entry{{KeyTranslation + "_x", -tr[0] + 0, "m"}, {KeyTranslation + "_y", -tr[1] + 0, "m"}} // + 0: no negative zero
			if j := mirroredBy[ci]; j >= 0 {
				partner.Where = conds[j].Where
			}
			a.Conditions[pt] = partner
		}
		a.Conditions[t] = r
	}
	for t, name := range m.Tags {
		if claimed[t] == 0 {
			lo, hi := m.TagStart[t], m.TagStart[t+1]
			fail("", name, "has no boundary condition (%d faces); give it one of: %s", hi-lo, kindList())
		}
	}
	if len(errs) > 0 {
		return nil, errors.Join(errs...)
	}
	for _, r := range a.Conditions {
		a.Notes = append(a.Notes, referenceNotes(r, s.Reference)...)
	}
	return a, nil
}

// refFlow is the free stream the conditions are resolved against: the
// reference state (nil when the case gives none), its unit flow direction
// and the case-file place of its flow angle ("" when the angle is the
// default 0).
type refFlow struct {
	state *State
	dir   orb.Point
	where string
}

// angle is the free stream's flow angle from +x, degrees.
func (f refFlow) angle() float64 { return degrees(f.dir) }

// degrees is the angle of d from +x in degrees, in (-180, 180].
func degrees(d orb.Point) float64 { return math.Atan2(d[1], d[0]) * 180 / math.Pi }

// unitTolerance is how far from 1 the length of Setup.Direction may be:
// (cos α, sin α) computed in float64 is within a few units of 1e-16 of
// length 1.
const unitTolerance = 1e-12

// FarfieldAngleTolerance is the largest angle, in degrees, by which a
// farfield's given direction may differ from the reference flow direction.
// It lets a direction written out to four significant figures, such as
// [0.9976, 0.0698] for 4°, stand for the reference direction (common
// practice: directions are copied to a few figures), while any real
// disagreement, such as an incidence changed in one place only, is refused.
const FarfieldAngleTolerance = 0.1

// mutualPeriodic finds the periodic pairs declared from both sides: a
// periodic condition on tag B with partner A after one on A with partner
// B. For each condition k, mirrorOf[k] is the index of the earlier
// declaration that condition k repeats from the other side, or -1, and
// mirroredBy[k] the index of the later one that repeats condition k, or -1.
//
// The two declarations must agree: the translations must be opposite, t_A
// + t_B = 0, within the periodic tolerance (the one given, or
// DefaultPeriodicTolerance times the shortest face of the two tags, the
// tolerance the faces are matched with), and tolerances given on both sides
// must be equal. Each disagreement is reported through fail at the later
// declaration. A tolerance given on the later side only is added to the
// earlier one, which does the matching, so it applies whichever side
// carries it. Declarations whose values are faulty are compared no
// further; Assign reports their faults.
func mutualPeriodic(m *mesh.Mesh, in []Condition, fail func(where, tag, format string, args ...any)) (conds []Condition, mirrorOf, mirroredBy []int) {
	conds = slices.Clone(in)
	mirrorOf, mirroredBy = make([]int, len(conds)), make([]int, len(conds))
	for k := range conds {
		mirrorOf[k], mirroredBy[k] = -1, -1
	}
	quiet := func(string, string, string, ...any) {}
	for j, c := range conds {
		if c.Kind != Periodic || c.Partner == "" || c.Partner == c.Tag {
			continue
		}
		i := slices.IndexFunc(conds[:j], func(p Condition) bool {
			return p.Kind == Periodic && p.Tag == c.Partner && p.Partner == c.Tag
		})
		if i < 0 || mirrorOf[i] >= 0 || mirroredBy[i] >= 0 {
			continue
		}
		mirrorOf[j], mirroredBy[i] = i, j
		vi, okI := checkValues(conds[i], quiet)
		vj, okJ := checkValues(c, quiet)
		if !okI || !okJ {
			continue
		}
		ti, tj := vi[KeyTranslation], vj[KeyTranslation]
		tolI, hasI := vi[KeyTolerance]
		tolJ, hasJ := vj[KeyTolerance]
		var tol float64
		switch {
		case hasI && hasJ:
			tol = math.Max(tolI[0], tolJ[0])
			if tolI[0] != tolJ[0] {
				fail(valueWhere(c, KeyTolerance), c.Tag, "declares the periodic pair with %q that %q declares too (at %s), but the tolerances disagree: %g m here, %g m there; declaring the pair on one side is enough",
					c.Partner, c.Partner, whereOr(conds[i].Where), tolJ[0], tolI[0])
			}
		case hasI:
			tol = tolI[0]
		case hasJ:
			tol = tolJ[0]
			if tol > 0 {
				conds[i].Values = append(slices.Clone(conds[i].Values), Value{Key: KeyTolerance, Number: tolJ, Where: valueWhere(c, KeyTolerance)})
			}
		default:
			tol = math.Inf(1)
			for _, name := range []string{c.Tag, c.Partner} {
				lo, hi, ok := m.TagRange(name)
				for f := lo; ok && f < hi; f++ {
					tol = math.Min(tol, DefaultPeriodicTolerance*m.Geo.FaceLength[f])
				}
			}
		}
		// A tolerance that is not positive is reported with its
		// condition; nothing is compared against it.
		if d := math.Hypot(ti[0]+tj[0], ti[1]+tj[1]); tol > 0 && d > tol {
			fail(valueWhere(c, KeyTranslation), c.Tag, "declares the periodic pair with %q that %q declares too (at %s), but the translations are not opposite: (%.9g, %.9g) m here, (%.9g, %.9g) m there, %.3g m apart from opposite (tolerance %.3g m); declaring the pair on one side is enough (the partner's translation is the opposite one)",
				c.Partner, c.Partner, whereOr(conds[i].Where), tj[0], tj[1], ti[0], ti[1], d, tol)
		}
	}
	return conds, mirrorOf, mirroredBy
}

// checkValues checks the value keys of c against its kind and the number of
// components of each, and returns them by key.
func checkValues(c Condition, fail func(where, tag, format string, args ...any)) (map[string][]float64, bool) {
	ok := true
	vals := make(map[string][]float64, len(c.Values))
	allowed := append(slices.Clone(c.Kind.Required()), c.Kind.Optional()...)
	for _, v := range c.Values {
		where := whereOr2(v.Where, c.Where)
		switch {
		case !slices.Contains(allowed, v.Key):
			ok = false
			if c.Kind == OutflowSupersonic && v.Key == KeyPressure {
				fail(where, c.Tag, "a supersonic outflow takes no back pressure: every quantity there comes from the interior; for a subsonic outflow at %g Pa use kind %s", first(v.Number), OutflowPressure)
				continue
			}
			if len(allowed) == 0 {
				fail(where, c.Tag, "%s takes no values, but %q is given", c.Kind, v.Key)
				continue
			}
			fail(where, c.Tag, "%s does not take %q%s; it takes %s", c.Kind, v.Key, didYouMean(v.Key, allowed), quoteList(allowed))
		case vals[v.Key] != nil:
			ok = false
			fail(where, c.Tag, "%q is given twice", v.Key)
		default:
			n := 1
			if vectorKeys[v.Key] {
				n = 2
			}
			if len(v.Number) != n {
				ok = false
				fail(where, c.Tag, "%q needs %d number(s), got %d", v.Key, n, len(v.Number))
				continue
			}
			for _, x := range v.Number {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					ok = false
					fail(where, c.Tag, "%q is %g; it must be a finite number", v.Key, x)
				}
			}
			vals[v.Key] = v.Number
		}
	}
	for _, k := range c.Kind.Required() {
		if _, given := vals[k]; !given && !slices.ContainsFunc(c.Values, func(v Value) bool { return v.Key == k }) {
			ok = false
			fail(c.Where, c.Tag, "%s needs %q (%s)", c.Kind, k, KeyUnit(k))
		}
	}
	return vals, ok
}

// resolve checks the physics of a condition whose keys are complete and
// fills r.
func resolve(m *mesh.Mesh, gas Gas, flow refFlow, c Condition, vals map[string][]float64, r *Resolved) error {
	ref := flow.state
	var errs []error
	fail := func(format string, args ...any) {
		errs = append(errs, inputErr(c.Where, c.Tag, format, args...))
	}
	scalar := func(k string) float64 { return vals[k][0] }
	// The scalar values, positive by physics, in the kind's key order.
	for _, k := range append(slices.Clone(c.Kind.Required()), c.Kind.Optional()...) {
		v, given := vals[k]
		if !given || vectorKeys[k] {
			continue
		}
		x := v[0]
		bad := false
		switch k {
		case KeyMach:
			bad = x < 0
		default:
			bad = x <= 0
		}
		if bad {
			limit := "> 0"
			if k == KeyMach {
				limit = "≥ 0"
			}
			fail("%s = %g %s is not physical; it must be %s", k, x, KeyUnit(k), limit)
		}
		r.Values = append(r.Values, Entry{k, x, KeyUnit(k)})
	}
	if len(errs) > 0 {
		return errors.Join(errs...)
	}
	direction := func(k string) orb.Point {
		v := vals[k]
		n := math.Hypot(v[0], v[1])
		if n == 0 {
			fail("%s (0, 0) has no direction", k)
			return orb.Point{}
		}
		return orb.Point{v[0] / n, v[1] / n}
	}
	switch c.Kind {
	case InflowTotal:
		r.Direction = direction(KeyDirection)
		if ref != nil {
			p0, p := scalar(KeyTotalPressure), ref.Pressure
			if p0 <= p {
				fail("total pressure %g Pa is not above the reference static pressure %g Pa: no flow would enter", p0, p)
			} else if mach, _ := gas.MachFromPressureRatio(p / p0); mach >= 1 {
				fail("total pressure %g Pa over the reference static pressure %g Pa gives M = %.4g; a subsonic inflow needs M < 1 (use %s)", p0, p, mach, InflowSupersonic)
			} else {
				r.Mach = mach
			}
		}
	case InflowVelocity:
		v := vals[KeyVelocity]
		r.Velocity = orb.Point{v[0], v[1]}
		r.Direction = direction(KeyVelocity)
		mach := math.Hypot(v[0], v[1]) / gas.SpeedOfSound(scalar(KeyTemperature))
		if mach >= 1 {
			fail("velocity %g m/s at %g K gives M = %.4g; a subsonic inflow needs M < 1 (use %s)", math.Hypot(v[0], v[1]), scalar(KeyTemperature), mach, InflowSupersonic)
		}
		r.Mach = mach
	case InflowSupersonic:
		r.Direction = direction(KeyDirection)
		mach := scalar(KeyMach)
		if mach <= 1 {
			fail("M = %g; a supersonic inflow needs M > 1 (use %s or %s)", mach, InflowTotal, InflowVelocity)
		}
		st, err := StateFromMach(gas, mach, scalar(KeyPressure), scalar(KeyTemperature))
		if err == nil {
			r.State, r.Mach = &st, mach
		}
	case OutflowPressure:
		if ref != nil && scalar(KeyPressure) >= ref.TotalPressure {
			fail("back pressure %g Pa is not below the reference total pressure %g Pa: no flow would leave", scalar(KeyPressure), ref.TotalPressure)
		}
	case Farfield:
		if ref == nil {
			fail("a farfield needs the reference (free-stream) state, and the case gives none")
			break
		}
		// The free stream's direction, also when a direction within the
		// tolerance is given, so that the farfield and the reference
		// state written beside it agree exactly.
		r.Direction = flow.dir
		if _, given := vals[KeyDirection]; given {
			d := direction(KeyDirection)
			off := math.Atan2(d[0]*flow.dir[1]-d[1]*flow.dir[0], d[0]*flow.dir[0]+d[1]*flow.dir[1]) * 180 / math.Pi
			if d != (orb.Point{}) && math.Abs(off) > FarfieldAngleTolerance {
				refAt := "the reference state gives no flow angle, so 0°"
				if flow.where != "" {
					refAt = "given at " + flow.where
				}
				errs = append(errs, inputErr(valueWhere(c, KeyDirection), c.Tag,
					"direction (%.4g, %.4g) is at %.4g° from +x, but the reference flow angle is %.4g° (%s); a farfield imposes the free stream, so its direction is the reference state's: leave direction out, or make the two agree within %g°",
					vals[KeyDirection][0], vals[KeyDirection][1], degrees(d), flow.angle(), refAt, FarfieldAngleTolerance))
			}
		}
		st := *ref
		r.State, r.Mach = &st, ref.Mach
	case Periodic:
		r.Values = append(r.Values, Entry{KeyTranslation + "_x", vals[KeyTranslation][0], "m"}, Entry{KeyTranslation + "_y", vals[KeyTranslation][1], "m"})
	}
	// An inflow direction must enter the domain through every face.
	if (c.Kind == InflowTotal || c.Kind == InflowVelocity || c.Kind == InflowSupersonic) && r.Direction != (orb.Point{}) {
		out, firstOut := 0, -1
		for f := r.First; f < r.First+r.Count; f++ {
			n := m.Geo.FaceNormal[f]
			if r.Direction[0]*n[0]+r.Direction[1]*n[1] >= 0 {
				if out == 0 {
					firstOut = f
				}
				out++
			}
		}
		if out > 0 {
			n := m.Geo.FaceNormal[firstOut]
			fail("flow direction (%.4g, %.4g) does not enter the domain on %d of %d faces (first: face %d, outward normal (%.4g, %.4g)); an inflow direction must point into the domain",
				r.Direction[0], r.Direction[1], out, r.Count, firstOut, n[0]+0, n[1]+0)
		}
	}
	return errors.Join(errs...)
}

// StateNoteFraction is the relative difference, 2 %, by which an
// inflow-total's total pressure or total temperature may differ from the
// reference state's before Assign notes it. Common practice: an inflow that
// admits the free stream carries the free stream's total state, and at low
// subsonic speed a small total-pressure difference is a large Mach-number
// difference: at M = 0.3 (p0/p = 1.0644 for γ = 1.4, by the isentropic
// relation p0/p = [1 + (γ−1)/2 M²]^(γ/(γ−1)), NACA Report 1135) a total
// pressure 2 % low gives M = 0.246 against the reference static pressure.
const StateNoteFraction = 0.02

// UnitSlipFactor and TemperatureSlipFactor bound how far a condition's
// pressure and temperature may lie from the reference state's before
// referenceNotes asks for their units to be checked: a tenth to ten times
// the reference pressure, a third to three times its temperature. A
// total pressure ten times the static one is Mach 2.16 in air and a total
// temperature three times the static one Mach 3.2 (isentropic relations,
// NACA Report 1135), beyond what a subsonic boundary sees; a supersonic
// supply that does is then noted, which it may keep.
const (
	UnitSlipFactor        = 10
	TemperatureSlipFactor = 3
)

// referenceNotes compares the resolved condition r with the reference
// state ref and returns the notes Assign attaches; nil without a reference.
// They are notes, not errors, since a case may mean them (a heated inflow, a
// duct whose reference state is taken at another station):
//
//   - an inflow-total whose total pressure or total temperature differs
//     from the reference's by more than StateNoteFraction, with both
//     values and the Mach number its total pressure gives against the
//     reference static pressure beside the reference Mach number;
//   - a kind meant for subsonic flow at the boundary (inflow-total,
//     inflow-velocity, outflow-pressure) while the reference Mach number is
//     1 or more, and an inflow-supersonic while it is below 1. Common
//     practice: the number of quantities a boundary may impose follows
//     from the characteristics crossing it, so the kind is chosen by
//     whether the flow there is subsonic or supersonic, and the reference
//     (free-stream) Mach number is the first guess at that.
//   - a pressure or temperature of the condition (static, total or wall)
//     more than UnitSlipFactor times the reference's, or less than a
//     UnitSlipFactor-th of it: a factor of 1e5 is a pressure in bar given
//     for pascals, 1e3 one in kPa, a temperature near 0 one in degrees
//     Celsius given for kelvins (a practising engineer's common slips),
//     while no subsonic duct or wind-tunnel case differs from its
//     reference state by that much.
func referenceNotes(r Resolved, ref *State) []Note {
	if ref == nil {
		return nil
	}
	var notes []Note
	note := func(format string, args ...any) {
		notes = append(notes, Note{Where: r.Where, Tag: r.Tag, Text: fmt.Sprintf(format, args...)})
	}
	if r.Kind == InflowTotal {
		var off []string
		for _, q := range []struct {
			key, name, unit string
			ref             float64
		}{
			{KeyTotalPressure, "total pressure", "Pa", ref.TotalPressure},
			{KeyTotalTemperature, "total temperature", "K", ref.TotalTemperature},
		} {
			if v, ok := r.Value(q.key); ok && math.Abs(v-q.ref) > StateNoteFraction*q.ref {
				off = append(off, fmt.Sprintf("its %s %.6g %s differs by %+.3g %% from the reference %s %.6g %s", q.name, v, q.unit, 100*(v-q.ref)/q.ref, q.name, q.ref, q.unit))
			}
		}
		if len(off) > 0 {
			note("%s (more than %g %%); against the reference static pressure %.6g Pa its total pressure gives M = %.4g, where the reference Mach number is %.4g; keep it if this inflow is meant to differ from the free stream",
				strings.Join(off, ", and "), 100*StateNoteFraction, ref.Pressure, r.Mach, ref.Mach)
		}
	}
	for _, q := range []struct {
		key, name, unit string
		ref             float64
		factor          float64
	}{
		{KeyPressure, "pressure", "Pa", ref.Pressure, UnitSlipFactor},
		{KeyTotalPressure, "total pressure", "Pa", ref.Pressure, UnitSlipFactor},
		{KeyTemperature, "temperature", "K", ref.Temperature, TemperatureSlipFactor},
		{KeyTotalTemperature, "total temperature", "K", ref.Temperature, TemperatureSlipFactor},
	} {
		v, ok := r.Value(q.key)
		if !ok || !(q.ref > 0) || v <= q.factor*q.ref && v >= q.ref/q.factor {
			continue
		}
		note("its %s %.6g %s is %.3g times the reference static %s %.6g %s: check its unit (%s in %s)", q.name, v, q.unit, v/q.ref, strings.TrimPrefix(q.name, "total "), q.ref, q.unit, q.name, q.unit)
	}
	switch r.Kind {
	case InflowTotal, InflowVelocity, OutflowPressure:
		if ref.Mach >= 1 {
			other := InflowSupersonic
			if r.Kind == OutflowPressure {
				other = OutflowSupersonic
			}
			note("%s is a condition for subsonic flow at the boundary, but the reference Mach number is %.4g (supersonic); keep it if the flow there is subsonic (behind a shock, in a duct), otherwise use %s", r.Kind, ref.Mach, other)
		}
	case InflowSupersonic:
		if ref.Mach < 1 {
			note("%s is a condition for supersonic inflow, but the reference Mach number is %.4g (subsonic); keep it if the flow there is supersonic (a nozzle's or jet's supply), otherwise use %s or %s", r.Kind, ref.Mach, InflowTotal, InflowVelocity)
		}
	}
	return notes
}

// valueWhere is the case-file place of c's value key, or of c when the
// value carries none.
func valueWhere(c Condition, key string) string {
	for _, v := range c.Values {
		if v.Key == key {
			return whereOr2(v.Where, c.Where)
		}
	}
	return c.Where
}

func first(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	return v[0]
}

func whereOr(w string) string {
	if w == "" {
		return "an unknown place"
	}
	return w
}

func whereOr2(w, fallback string) string {
	if w == "" {
		return fallback
	}
	return w
}

func quoteList(s []string) string {
	q := make([]string, len(s))
	for i, x := range s {
		q[i] = fmt.Sprintf("%q", x)
	}
	return strings.Join(q, ", ")
}

func kindList() string {
	ks := Kinds()
	s := make([]string, len(ks))
	for i, k := range ks {
		s[i] = k.String()
	}
	return strings.Join(s, ", ")
}
