package bc_test

import (
	"fmt"

	"cvdeck/bc"
)

// The free stream of an airliner in cruise: M = 0.78 at 11 km geopotential
// altitude in the U.S. Standard Atmosphere 1976.
func ExampleStateFromAltitude() {
	s, err := bc.StateFromAltitude(bc.Air, bc.Altitude{Metres: 11000, Kind: bc.Geopotential}, 0.78)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("p = %.0f Pa, T = %.2f K, rho = %.5f kg/m^3\n", s.Pressure, s.Temperature, s.Density)
	fmt.Printf("V = %.1f m/s, p0 = %.0f Pa, Re per metre = %.3g\n", s.Velocity, s.TotalPressure, s.ReynoldsPerMetre)
	// Output:
	// p = 22632 Pa, T = 216.65 K, rho = 0.36392 kg/m^3
	// V = 230.2 m/s, p0 = 33827 Pa, Re per metre = 5.89e+06
}

// The state behind the normal shock of a Mach 2 stream (NACA Report 1135:
// M2 = 0.57735, p2/p1 = 4.5).
func ExampleState_PostNormalShock() {
	s, _ := bc.StateFromMach(bc.Air, 2, 20000, 220)
	post, _ := s.PostNormalShock()
	fmt.Printf("M2 = %.5f, p2 = %.0f Pa\n", post.Mach, post.Pressure)
	// Output:
	// M2 = 0.57735, p2 = 90000 Pa
}

// The first-cell height for y+ = 1 one metre behind the leading edge of a
// plate in a 50 m/s sea-level stream.
func ExampleFirstCellHeight() {
	s, _ := bc.StateFromAltitude(bc.Air, bc.Altitude{}, 50/340.294)
	w, _ := bc.FirstCellHeight(s, 1, 1)
	fmt.Printf("Re_x = %.3g, C_f = %.4f, y = %.2g m\n", w.ReynoldsX, w.SkinFriction, w.Height)
	// Output:
	// Re_x = 3.42e+06, C_f = 0.0030, y = 7.5e-06 m
}
