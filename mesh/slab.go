package mesh

// The cells of a 2D case stored the 3D way, a slab one cell thick, as the
// VTK and CGNS readers take them. A hexahedron's nodes, by position in its
// node list, are 0–3 on one face and 4–7 on the opposite one, node k+4
// joined to node k, in both formats (VTK file-format document, figure of
// linear cell types; CGNS SIDS, unstructured element figures; from
// memory); a prism's 0–2 and 3–5 likewise, the two formats differing only
// in which way its first triangle turns.
var (
	// HexFaces are a hexahedron's faces, each listed so that its
	// right-hand normal points into the cell when the cell has positive
	// volume: any of them may be the one on the lower plane.
	HexFaces = [][]int{{0, 1, 2, 3}, {7, 6, 5, 4}, {0, 4, 5, 1}, {1, 5, 6, 2}, {2, 6, 7, 3}, {3, 7, 4, 0}}
	// HexEdges and PrismEdges are the cells' edges.
	HexEdges   = [][2]int{{0, 1}, {1, 2}, {2, 3}, {3, 0}, {4, 5}, {5, 6}, {6, 7}, {7, 4}, {0, 4}, {1, 5}, {2, 6}, {3, 7}}
	PrismEdges = [][2]int{{0, 1}, {1, 2}, {2, 0}, {3, 4}, {4, 5}, {5, 3}, {0, 3}, {1, 4}, {2, 5}}
)

// LowerFace returns the first of faces (positions in a cell's node list)
// whose every node lies on the slab's lower plane, as onLower says of the
// node at a position; nil when none does.
func LowerFace(faces [][]int, onLower func(pos int) bool) []int {
	for _, f := range faces {
		on := true
		for _, k := range f {
			on = on && onLower(k)
		}
		if on {
			return f
		}
	}
	return nil
}
