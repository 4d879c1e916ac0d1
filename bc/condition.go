package bc

import "github.com/paulmach/orb"

// Value is one given value of a condition: a scalar (one number) or a
// vector (two numbers), in SI units, with its case-file place.
type Value struct {
	Key    string
	Number []float64
	Where  string
}

// Condition is one boundary condition as the case file states it: a kind on
// a boundary tag with its values. The case-file loader fills Where with the
// place of the condition (for example "case.yaml:12:5"); every error about
// the condition names it.
type Condition struct {
	Tag   string
	Kind  Kind
	Where string
	// Values are the given values, in case-file order; which keys a kind
	// takes is Kind.Required and Kind.Optional.
	Values []Value
	// Partner is the tag a Periodic condition joins Tag to; the faces of
	// Tag moved by the translation value must land on the faces of Partner.
	Partner string
}

// Setup is everything Assign needs besides the mesh.
type Setup struct {
	// Gas is the working gas; the zero value means the reference state's
	// gas, or Air without a reference.
	Gas Gas
	// GasWhere is the case-file place of the gas, for errors.
	GasWhere string
	// Reference is the free-stream state, or nil. A farfield needs it; the
	// subsonic/supersonic checks of inflow-total and outflow-pressure use it
	// when it is given.
	Reference *State
	// ReferenceWhere is the case-file place of the reference state.
	ReferenceWhere string
	// Direction is the free stream's unit flow direction, the reference
	// state's flow angle α as (cos α, sin α); the zero value means +x,
	// (1, 0), as for α = 0. A farfield takes it as its direction, as given.
	// Any other vector whose length is not 1 within 1e-12 is an input
	// error.
	Direction orb.Point
	// DirectionWhere is the case-file place of the flow angle, for errors;
	// empty when the case gives none (α = 0 by default).
	DirectionWhere string
	Conditions     []Condition
}

// Note is a remark on a valid assignment that the user should read but that
// does not stop the run, such as a boundary state far from the reference
// state: the case may intend it. Where and Tag are as in Error.
type Note struct {
	Where string
	Tag   string
	Text  string
}

// String formats the note as "where: boundary tag "t": text", as Error does.
func (n Note) String() string {
	return (&Error{Where: n.Where, Tag: n.Tag, Msg: n.Text}).Error()
}

// Resolved is a validated condition on one boundary tag, with its face
// range and its values in SI units.
type Resolved struct {
	Tag   string
	Kind  Kind
	Where string
	// First and Count give the tag's faces: [First, First+Count).
	First, Count int
	// Values are the condition's scalar values by key, in the order of the
	// kind's keys (vectors are in Direction, Velocity, Translation).
	Values []Entry
	// Direction is the unit flow direction for inflow-total,
	// inflow-supersonic, inflow-velocity and farfield (the reference flow
	// direction, Setup.Direction); zero otherwise.
	Direction orb.Point
	// Velocity is the velocity vector of an inflow-velocity, m/s.
	Velocity orb.Point
	// Mach is the Mach number the condition implies, when it can be
	// computed (inflow-velocity from V and T, inflow-supersonic as given,
	// farfield from the reference, inflow-total from the reference static
	// pressure); -1 when it cannot.
	Mach float64
	// State is the full state imposed by an inflow-supersonic or a
	// farfield; nil otherwise.
	State *State
	// Partner is the other tag of a periodic pair.
	Partner string
	// Periodic is the index into Assignment.Periodic of the pairing this
	// tag belongs to, or -1.
	Periodic int
}

// Value returns the scalar value of key, and false if the condition has
// none.
func (r Resolved) Value(key string) (float64, bool) {
	for _, e := range r.Values {
		if e.Key == key {
			return e.Value, true
		}
	}
	return 0, false
}

// Assignment is a complete, validated set of boundary conditions for one
// mesh: exactly one Resolved per boundary tag, in the mesh's tag order.
type Assignment struct {
	Gas       Gas
	Reference *State
	// Direction is the free stream's unit flow direction (Setup.Direction;
	// (1, 0) when the setup gives none).
	Direction orb.Point
	// Conditions[t] is the condition of mesh tag t (m.Tags[t]).
	Conditions []Resolved
	// Periodic lists the verified periodic pairings in case-file order.
	Periodic []PeriodicMatch
	// Notes are the remarks on boundary states against the reference state
	// (see Assign), in mesh tag order.
	Notes []Note
}
