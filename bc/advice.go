package bc

import (
	"fmt"
	"math"
	"strings"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

// WallSpacing is the first-cell height for a target y+ and the flat-plate
// quantities it is derived from.
type WallSpacing struct {
	Height       float64 // first-cell height y, m
	ReynoldsX    float64 // Re_x = ρ_e V x / μ_e at the station x, free stream
	SkinFriction float64 // local skin-friction coefficient C_f = τ_w / (½ ρ_e V²)
	WallShear    float64 // τ_w, Pa
	// FrictionVelocity is u_τ = √(τ_w/ρ_w), m/s, with the wall's density.
	FrictionVelocity float64
	// WallTemperature is the adiabatic wall temperature T_aw, K, and
	// ReferenceTemperature Eckert's reference temperature T*, K.
	WallTemperature, ReferenceTemperature float64
	// ReferenceReynoldsX is Re*_x = ρ* V x / μ*, the Reynolds number the
	// correlation is evaluated at.
	ReferenceReynoldsX float64
	// Notes are remarks on where the estimate is stretched (a laminar
	// station, a Reynolds number past the correlation's range, a wall
	// temperature past Sutherland's); they do not stop a run.
	Notes []string
}

// Constants of FirstCellHeight.
const (
	// airPrandtl is the Prandtl number of air, 0.72 (common practice).
	airPrandtl = 0.72
	// TransitionReynolds is the Reynolds number Re_x below which a flat
	// plate's boundary layer is usually laminar, 5e5 (common practice;
	// it moves with free-stream turbulence, roughness and Mach number).
	TransitionReynolds = 5e5
	// schlichtingMaxReynolds is the top of the range in which
	// Schlichting's correlation is quoted, Re_x < 1e9.
	schlichtingMaxReynolds = 1e9
)

// FirstCellHeight estimates the wall-normal height of the first cell that
// gives the target y+ at a distance x (m) from the leading edge of an
// adiabatic flat plate in the state s. It is a first guess for spacing a
// mesh: the solution's own wall shear decides the y+ a mesh reaches.
//
// The wall is at the adiabatic wall temperature, with the recovery factor
// r = Pr^(1/3) of a turbulent boundary layer and Pr = 0.72 for air
// (common practice),
//
//	T_aw = T_e [1 + r (γ−1)/2 M_e²],
//
// and the skin friction is Schlichting's turbulent local correlation
//
//	C_f* = [2 log10(Re*_x) − 0.65]^(−2.3),  valid for Re_x < 10⁹
//
// (H. Schlichting, Boundary-Layer Theory, McGraw-Hill, chapter on the
// turbulent flat plate; from memory), evaluated at Eckert's reference
// temperature (E. R. G. Eckert, J. Aeronaut. Sci. 22, 1955; from memory)
//
//	T*/T_e = 1 + 0.032 M_e² + 0.58 (T_aw/T_e − 1),
//
// with ρ* = ρ_e T_e/T* (the pressure is the same across the layer),
// μ* = μ(T*) and Re*_x = ρ* V x / μ*; then
//
//	τ_w = ½ C_f* ρ* V²,  u_τ = √(τ_w/ρ_w),  y = y+ μ_w / (ρ_w u_τ),
//
// y+ in wall units, with ρ_w = ρ_e T_e/T_aw and μ_w = μ(T_aw) by the gas's
// Sutherland's law. As M_e → 0, T_aw and T* tend to T_e and this is the
// incompressible estimate with free-stream properties. The reference
// temperature's constants were fitted for air; for another gas the
// correction is rougher, and a note says so from M_e 0.3 up.
//
// The height is the wall distance of the first cell's centre when a solver
// takes y+ at the cell centre; cvdeck reports it as the first-cell height,
// as is common practice. Notes say where Re_x is below the transition
// value 5e5 (the layer would be laminar there, unless tripped; a laminar
// wall shear is lower, so the turbulent height is the smaller, safer
// one), where Re*_x is above the correlation's 10⁹, and where the wall
// temperature is outside the range of air's Sutherland constants.
func FirstCellHeight(s State, x, yplus float64) (WallSpacing, error) {
	if err := positive("distance from the leading edge x", "m", x); err != nil {
		return WallSpacing{}, err
	}
	if err := positive("target y+", "", yplus); err != nil {
		return WallSpacing{}, err
	}
	if err := positive("speed", "m/s", s.Velocity); err != nil {
		return WallSpacing{}, fmt.Errorf("first-cell height needs a moving flow: %w", err)
	}
	law := s.Gas.ViscosityLaw()
	te, rhoe, v, m2 := s.Temperature, s.Density, s.Velocity, s.Mach*s.Mach
	taw := te * (1 + math.Cbrt(airPrandtl)*0.5*(s.Gas.Gamma-1)*m2)
	tref := te * (1 + 0.032*m2 + 0.58*(taw/te-1))
	rhoRef, muRef := rhoe*te/tref, law.Viscosity(tref)
	reRef := rhoRef * v * x / muRef
	// The correlation's bracket must stay positive: Re_x > 10^0.325.
	if reRef <= 10 {
		return WallSpacing{}, fmt.Errorf("Re_x = %.3g (at the reference temperature %.4g K) is too small for a turbulent skin-friction correlation; give a longer length or a faster flow: %w", reRef, tref, ErrInput)
	}
	cfRef := math.Pow(2*math.Log10(reRef)-0.65, -2.3)
	tau := 0.5 * cfRef * rhoRef * v * v
	rhow, muw := rhoe*te/taw, law.Viscosity(taw)
	ut := math.Sqrt(tau / rhow)
	w := WallSpacing{
		Height:               yplus * muw / (rhow * ut),
		ReynoldsX:            rhoe * v * x / s.Viscosity,
		SkinFriction:         tau / (0.5 * rhoe * v * v),
		WallShear:            tau,
		FrictionVelocity:     ut,
		WallTemperature:      taw,
		ReferenceTemperature: tref,
		ReferenceReynoldsX:   reRef,
	}
	if w.ReynoldsX < TransitionReynolds {
		w.Notes = append(w.Notes, fmt.Sprintf("first-cell height: Re_x = %.3g at x = %g m is below about %g, where a flat plate's boundary layer turns turbulent (common practice): it would be laminar there unless tripped, with a lower wall shear, so the turbulent estimate gives a smaller height than a laminar wall needs", w.ReynoldsX, x, TransitionReynolds))
	}
	if reRef > schlichtingMaxReynolds {
		w.Notes = append(w.Notes, fmt.Sprintf("first-cell height: Re_x = %.3g at x = %g m (at the reference temperature) is above %g, the range of Schlichting's skin-friction correlation: the height is extrapolated", reRef, x, schlichtingMaxReynolds))
	}
	if s.Gas.Gamma != Air.Gamma && s.Mach >= 0.3 {
		w.Notes = append(w.Notes, fmt.Sprintf("first-cell height: Eckert's reference temperature was fitted for air (gamma 1.4); for gamma %.4g its compressibility correction at M %.3g is rougher", s.Gas.Gamma, s.Mach))
	}
	if n := sutherlandNote(s.Gas, "the adiabatic wall temperature", taw, "the wall viscosity, and the first-cell height from it, are extrapolated"); n != "" {
		w.Notes = append(w.Notes, "first-cell height: "+strings.TrimPrefix(n, ViscosityNote))
	}
	return w, nil
}

// TimeStep is the largest stable explicit time step of a mesh and the cell
// that limits it.
type TimeStep struct {
	Dt   float64 // s
	Cell int     // the cell with the smallest Δt
}

// MaxTimeStep estimates the largest stable explicit time step for the
// Courant number cfl on mesh m for a uniform flow of velocity u (m/s) and
// speed of sound c (m/s), by the per-cell spectral-radius form used for
// cell-centred finite-volume schemes,
//
//	Δt_i = CFL · A_i / Σ_f (|u·n_f| + c) S_f,
//
// with A_i the cell area and the sum over the cell's faces of unit normal
// n_f and length S_f (J. Blazek, Computational Fluid Dynamics: Principles
// and Applications, Elsevier, the local time step of the explicit schemes;
// from memory). The mesh's time step is the smallest Δt_i. Summing over
// every face counts each direction twice on a quadrilateral, so on a
// uniform grid of squares of side h this gives CFL h / (2(|u| + 2c)), half
// the form that sums one averaged face per direction: the same time step
// needs twice that form's CFL number here. A cell of zero
// or negative area is an error naming the cell: its time step means
// nothing.
func MaxTimeStep(m *mesh.Mesh, u orb.Point, c, cfl float64) (TimeStep, error) {
	if err := positive("CFL number", "", cfl); err != nil {
		return TimeStep{}, err
	}
	if err := positive("speed of sound", "m/s", c); err != nil {
		return TimeStep{}, err
	}
	if math.IsNaN(u[0]) || math.IsNaN(u[1]) || math.IsInf(u[0], 0) || math.IsInf(u[1], 0) {
		return TimeStep{}, fmt.Errorf("velocity (%g, %g) m/s is not finite: %w", u[0], u[1], ErrInput)
	}
	nc := m.NumCells()
	if nc == 0 {
		return TimeStep{}, fmt.Errorf("the mesh has no cells: %w", ErrInput)
	}
	lambda := make([]float64, nc)
	for f := range m.FaceNodes {
		n := m.Geo.FaceNormal[f]
		l := (math.Abs(u[0]*n[0]+u[1]*n[1]) + c) * m.Geo.FaceLength[f]
		lambda[m.Owner[f]] += l
		if nb := m.Neighbour[f]; nb >= 0 {
			lambda[nb] += l
		}
	}
	best := TimeStep{Dt: math.Inf(1), Cell: -1}
	for i := 0; i < nc; i++ {
		a := m.Geo.CellArea[i]
		if !(a > 0) {
			return TimeStep{}, fmt.Errorf("cell %d has area %g m²; a time step needs cells of positive area (is it inverted?): %w", i, a, ErrInput)
		}
		if dt := cfl * a / lambda[i]; dt < best.Dt {
			best = TimeStep{Dt: dt, Cell: i}
		}
	}
	return best, nil
}
