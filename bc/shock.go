package bc

import (
	"fmt"
	"math"
)

// Shock holds the ratios across a stationary normal shock in a perfect gas,
// downstream (2) over upstream (1).
type Shock struct {
	// M2 is the downstream Mach number.
	M2 float64
	// PressureRatio is p2/p1, DensityRatio ρ2/ρ1, TemperatureRatio T2/T1.
	PressureRatio, DensityRatio, TemperatureRatio float64
	// TotalPressureRatio is p02/p01, the loss of total pressure; the total
	// temperature does not change across the shock.
	TotalPressureRatio float64
}

// NormalShock returns the normal-shock relations for upstream Mach number
// m1 ≥ 1 (NACA Report 1135):
//
//	M2²    = [(γ−1)M1² + 2] / [2γM1² − (γ−1)]
//	p2/p1  = [2γM1² − (γ−1)] / (γ+1)
//	ρ2/ρ1  = (γ+1)M1² / [(γ−1)M1² + 2]
//	T2/T1  = (p2/p1) / (ρ2/ρ1)
//	p02/p01 = (ρ2/ρ1)^(γ/(γ−1)) · (p2/p1)^(−1/(γ−1))
func (g Gas) NormalShock(m1 float64) (Shock, error) {
	if !(m1 >= 1) || math.IsInf(m1, 0) {
		return Shock{}, fmt.Errorf("normal shock needs a supersonic upstream Mach number (M ≥ 1), got M = %g: %w", m1, ErrInput)
	}
	gm := g.Gamma
	m2sq := m1 * m1
	pr := (2*gm*m2sq - (gm - 1)) / (gm + 1)
	rr := (gm + 1) * m2sq / ((gm-1)*m2sq + 2)
	return Shock{
		M2:                 math.Sqrt(((gm-1)*m2sq + 2) / (2*gm*m2sq - (gm - 1))),
		PressureRatio:      pr,
		DensityRatio:       rr,
		TemperatureRatio:   pr / rr,
		TotalPressureRatio: math.Pow(rr, gm/(gm-1)) * math.Pow(pr, -1/(gm-1)),
	}, nil
}
