// Package bc holds cvdeck's boundary conditions and the reference flow state.
//
// A mesh is not a deck until every boundary tag carries exactly one
// physically valid condition and the reference state is consistent. This
// package provides:
//
//   - the boundary kinds (wall, inflow, outflow, farfield, symmetry,
//     periodic), named after the CGNS standard's BCType values, with keys of
//     cvdeck's own for their values (Kind, Condition);
//   - their assignment to the tags of a mesh.Mesh and the validation of the
//     whole set, every error naming the tag and the case-file place (Assign);
//   - the reference state of an ideal gas: isentropic static/total relations,
//     normal-shock relations, the U.S. Standard Atmosphere 1976, Sutherland's
//     viscosity law, Reynolds number (Gas, State and its constructors);
//   - derived mesh advice: the first-cell height for a target y+ and the
//     largest stable explicit time step for a CFL number (FirstCellHeight,
//     MaxTimeStep);
//   - a record of the resolved conditions and the state, with units beside
//     every value, for the deck manifest (Record, Entries).
//
// All quantities are SI: pascals, kelvins, kilograms per cubic metre, metres
// per second, metres, seconds, pascal-seconds.
package bc
