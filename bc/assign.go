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
//   - a farfield without a reference state;
//   - periodic pairs whose faces do not match one to one within tolerance.
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

	if lo, hi := m.UntaggedRange(); hi > lo {
		p := m.Geo.FaceMid[lo]
		fail("", "", "%d boundary faces carry no boundary tag (faces %d to %d, the first at (%g, %g)); every boundary face needs a tag and a condition",
			hi-lo, lo, hi-1, p[0], p[1])
	}

	a := &Assignment{Gas: gas, Reference: s.Reference, Conditions: make([]Resolved, len(m.Tags))}
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
			p := s.Conditions[prev-1]
			fail(c.Where, m.Tags[t], "has two conditions: %s here and %s at %s; give each tag exactly one", c.Kind, p.Kind, whereOr(p.Where))
			return false
		}
		claimed[t] = ci + 1
		return true
	}

	for ci, c := range s.Conditions {
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
		if err := resolve(m, gas, s.Reference, c, vals, &r); err != nil {
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
			partner.Values = []Entry{{KeyTranslation + "_x", -tr[0], "m"}, {KeyTranslation + "_y", -tr[1], "m"}}
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
	return a, nil
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
func resolve(m *mesh.Mesh, gas Gas, ref *State, c Condition, vals map[string][]float64, r *Resolved) error {
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
		r.Direction = orb.Point{1, 0}
		if _, given := vals[KeyDirection]; given {
			r.Direction = direction(KeyDirection)
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
