package bc

import (
	"fmt"
	"math"

	"cvdeck/mesh"

	"github.com/paulmach/orb"
)

// WallSpacing is the first-cell height for a target y+ and the flat-plate
// quantities it is derived from.
type WallSpacing struct {
	Height           float64 // first-cell height y, m
	ReynoldsX        float64 // Re_x = ρ V x / μ at the station x
	SkinFriction     float64 // local skin-friction coefficient C_f
	WallShear        float64 // τ_w = ½ C_f ρ V², Pa
	FrictionVelocity float64 // u_τ = √(τ_w/ρ), m/s
}

// FirstCellHeight estimates the wall-normal height of the first cell that
// gives the target y+ at a distance x (m) from the leading edge of a flat
// plate in the state s, from Schlichting's turbulent local skin-friction
// correlation
//
//	C_f = [2 log10(Re_x) − 0.65]^(−2.3),  valid for Re_x < 10⁹
//
// (H. Schlichting, Boundary-Layer Theory, McGraw-Hill, chapter on the
// turbulent flat plate; from memory), then
//
//	τ_w = ½ C_f ρ V²,  u_τ = √(τ_w/ρ),  y = y+ μ / (ρ u_τ),
//
// with the free-stream density and viscosity (an incompressible estimate,
// as is common practice for mesh spacing: compressibility and the wall
// temperature change it by a factor near one at moderate Mach numbers).
// The height is the wall distance of the first cell's centre when a solver
// takes y+ at the cell centre; cvdeck reports it as the first-cell height,
// as is common practice.
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
	rex := s.Density * s.Velocity * x / s.Viscosity
	// The correlation's bracket must stay positive: Re_x > 10^0.325.
	if rex <= 10 {
		return WallSpacing{}, fmt.Errorf("Re_x = %.3g is too small for a turbulent skin-friction correlation; give a longer length or a faster flow: %w", rex, ErrInput)
	}
	cf := math.Pow(2*math.Log10(rex)-0.65, -2.3)
	tau := 0.5 * cf * s.Density * s.Velocity * s.Velocity
	ut := math.Sqrt(tau / s.Density)
	return WallSpacing{
		Height:           yplus * s.Viscosity / (s.Density * ut),
		ReynoldsX:        rex,
		SkinFriction:     cf,
		WallShear:        tau,
		FrictionVelocity: ut,
	}, nil
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
