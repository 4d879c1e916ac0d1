package bc

import (
	"fmt"
	"strings"
)

// Kind is a boundary kind. The kinds follow the CGNS standard's boundary
// types (BCWall family, BCInflow, BCOutflow, BCFarfield, BCSymmetryPlane);
// periodic is a connectivity between two tags, not a CGNS BCType. The key of
// each kind (its String) is cvdeck's own name, used in the case file.
type Kind uint8

// The boundary kinds.
const (
	// WallAdiabatic is a no-slip wall with zero heat flux.
	WallAdiabatic Kind = iota + 1
	// WallIsothermal is a no-slip wall at a given temperature.
	WallIsothermal
	// WallSlip is a slip (inviscid) wall: zero normal velocity only.
	WallSlip
	// InflowTotal is a subsonic inflow given total pressure, total
	// temperature and flow direction.
	InflowTotal
	// InflowVelocity is a subsonic inflow given the velocity vector and the
	// static temperature.
	InflowVelocity
	// InflowSupersonic is a supersonic inflow given the full state: Mach
	// number, static pressure, static temperature and flow direction.
	InflowSupersonic
	// OutflowPressure is a subsonic outflow given the static (back)
	// pressure.
	OutflowPressure
	// OutflowSupersonic is a supersonic outflow: every quantity comes from
	// the interior, so it takes no values.
	OutflowSupersonic
	// Farfield is a far-field boundary at the free-stream (reference) state.
	Farfield
	// Symmetry is a symmetry plane.
	Symmetry
	// Periodic joins two tags whose faces match one to one under a
	// translation.
	Periodic
)

// kindSpec describes a kind: its case-file key, its CGNS BCType name, and
// the values it requires and allows.
type kindSpec struct {
	key      string
	cgns     string
	required []string
	optional []string
	what     string
}

var kindSpecs = [...]kindSpec{
	WallAdiabatic:     {key: "wall-adiabatic", cgns: "BCWallViscousHeatFlux", what: "no-slip adiabatic wall"},
	WallIsothermal:    {key: "wall-isothermal", cgns: "BCWallViscousIsothermal", required: []string{KeyTemperature}, what: "no-slip isothermal wall"},
	WallSlip:          {key: "wall-slip", cgns: "BCWallInviscid", what: "slip (inviscid) wall"},
	InflowTotal:       {key: "inflow-total", cgns: "BCInflowSubsonic", required: []string{KeyTotalPressure, KeyTotalTemperature, KeyDirection}, what: "subsonic inflow from total conditions"},
	InflowVelocity:    {key: "inflow-velocity", cgns: "BCInflowSubsonic", required: []string{KeyVelocity, KeyTemperature}, what: "subsonic inflow from velocity"},
	InflowSupersonic:  {key: "inflow-supersonic", cgns: "BCInflowSupersonic", required: []string{KeyMach, KeyPressure, KeyTemperature, KeyDirection}, what: "supersonic inflow"},
	OutflowPressure:   {key: "outflow-pressure", cgns: "BCOutflowSubsonic", required: []string{KeyPressure}, what: "subsonic outflow at a back pressure"},
	OutflowSupersonic: {key: "outflow-supersonic", cgns: "BCOutflowSupersonic", what: "supersonic outflow"},
	Farfield:          {key: "farfield", cgns: "BCFarfield", optional: []string{KeyDirection}, what: "far field at the reference state"},
	Symmetry:          {key: "symmetry", cgns: "BCSymmetryPlane", what: "symmetry plane"},
	Periodic:          {key: "periodic", required: []string{KeyTranslation}, optional: []string{KeyTolerance}, what: "periodic pair"},
}

// The value keys of the conditions, with their units. Vectors (direction,
// velocity, translation) have two components.
const (
	KeyTemperature      = "temperature"       // static (or wall) temperature, K
	KeyPressure         = "pressure"          // static pressure, Pa
	KeyTotalPressure    = "total_pressure"    // Pa
	KeyTotalTemperature = "total_temperature" // K
	KeyMach             = "mach"              // Mach number, 1
	KeyDirection        = "direction"         // flow direction (normalised on assignment), 1
	KeyVelocity         = "velocity"          // velocity vector, m/s
	KeyTranslation      = "translation"       // periodic translation from a tag to its partner, m
	KeyTolerance        = "tolerance"         // periodic face-matching tolerance, m
)

var keyUnits = map[string]string{
	KeyTemperature: "K", KeyPressure: "Pa", KeyTotalPressure: "Pa", KeyTotalTemperature: "K",
	KeyMach: "1", KeyDirection: "1", KeyVelocity: "m/s", KeyTranslation: "m", KeyTolerance: "m",
}

var vectorKeys = map[string]bool{KeyDirection: true, KeyVelocity: true, KeyTranslation: true}

// Kinds lists every kind in declaration order.
func Kinds() []Kind {
	ks := make([]Kind, 0, len(kindSpecs)-1)
	for k := WallAdiabatic; k <= Periodic; k++ {
		ks = append(ks, k)
	}
	return ks
}

func (k Kind) valid() bool { return k >= WallAdiabatic && k <= Periodic }

// FrictionWall reports whether the kind is a wall the flow sticks to
// (zero velocity there), where a boundary layer forms and the first-cell
// height sets y+.
func (k Kind) FrictionWall() bool { return k == WallAdiabatic || k == WallIsothermal }

// String returns the kind's case-file key, such as "wall-adiabatic".
func (k Kind) String() string {
	if k.valid() {
		return kindSpecs[k].key
	}
	return fmt.Sprintf("kind(%d)", uint8(k))
}

// Describe returns a few plain words on the kind.
func (k Kind) Describe() string {
	if k.valid() {
		return kindSpecs[k].what
	}
	return k.String()
}

// CGNSType returns the CGNS BCType name of the kind (for example
// "BCWallViscousIsothermal"), or "" for Periodic, which CGNS records as a
// grid connectivity rather than a boundary condition.
func (k Kind) CGNSType() string {
	if k.valid() {
		return kindSpecs[k].cgns
	}
	return ""
}

// Required and Optional return the value keys the kind requires and allows.
func (k Kind) Required() []string {
	if k.valid() {
		return kindSpecs[k].required
	}
	return nil
}

// Optional returns the value keys the kind allows but does not require.
func (k Kind) Optional() []string {
	if k.valid() {
		return kindSpecs[k].optional
	}
	return nil
}

// KeyUnit returns the SI unit of a value key ("1" for dimensionless), or ""
// for an unknown key.
func KeyUnit(key string) string { return keyUnits[key] }

// ParseKind returns the kind whose key is s. An unknown key gets an error
// that suggests the nearest key and lists the valid ones.
func ParseKind(s string) (Kind, error) {
	keys := make([]string, 0, len(kindSpecs)-1)
	for _, k := range Kinds() {
		if k.String() == s {
			return k, nil
		}
		keys = append(keys, k.String())
	}
	return 0, fmt.Errorf("unknown boundary kind %q%s; valid kinds: %s: %w", s, didYouMean(s, keys), strings.Join(keys, ", "), ErrInput)
}
