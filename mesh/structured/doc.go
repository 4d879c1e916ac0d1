// Package structured builds structured (i, j) grids and turns them into
// cvdeck's face-based mesh while keeping their block structure.
//
// The pieces, each in its own file:
//
//   - TFI: a four-sided block from its discretised sides by transfinite
//     interpolation (Gordon and Hall 1973), with arc-length blending so that
//     interior grid lines follow the node distribution of the sides.
//   - Assemble: one or more blocks into a mesh.Mesh; sides that two blocks
//     share (or two sides of one block, as at an O-grid seam) must conform
//     node for node and are merged, the interfaces recorded for structured
//     export.
//   - Smooth and SmoothBlocks: elliptic generation (Winslow 1967; Thompson,
//     Thames and Mastin 1974) started from the TFI grid, with
//     Thomas–Middlecoff control functions (1980) and Steger–Sorenson feedback
//     (1979) that holds a first-cell height and orthogonality at chosen
//     sides; SmoothBlocks moves the nodes of shared sides as interior nodes
//     of both blocks.
//   - MarchClosed, MarchOpen, MarchCGrid: hyperbolic body-fitted grids
//     (Steger and Chaussee 1980) around a closed body (O-grid), from an open
//     wall, or around a sharp trailing edge with a wake cut (C-grid, three
//     blocks).
//   - GeometricHeights, GrowthFor, LayersFor: geometric layer heights.
//
// A Block stores node coordinates in two flat slices, node (i, j) at index
// j*NI+i, with i along the south side and j towards the north: the layout
// mesh.Block uses, and one the smoothing loops can stream through.
package structured
