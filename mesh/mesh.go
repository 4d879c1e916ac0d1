// Package mesh holds cvdeck's face-based 2D mesh: the form in which
// finite-volume codes consume a grid of control volumes.
//
// Cells are stored in CSR form with counter-clockwise nodes; faces (edges in
// 2D) carry an owner and a neighbour cell, the normal pointing from owner to
// neighbour and outward on the boundary. Interior faces come first, then the
// boundary faces grouped by tag, each group one contiguous range, so solvers
// and writers can take ranges instead of searching.
package mesh

import (
	"fmt"

	"github.com/paulmach/orb"
)

// Mesh is a 2D mesh of control volumes. Build one with Build; the derived
// geometry in Geo is computed there and shared by every later stage.
type Mesh struct {
	// Nodes are the node positions in metres.
	Nodes []orb.Point

	// CellStart and CellNodes hold the cells in CSR form: the nodes of cell c
	// are CellNodes[CellStart[c]:CellStart[c+1]], counter-clockwise for a
	// valid cell. len(CellStart) is NumCells()+1.
	CellStart []int32
	CellNodes []int32

	// FaceNodes are the two end nodes of each face, in the order the owner
	// cell traverses them, so that the normal (dy, -dx) points out of the
	// owner.
	FaceNodes [][2]int32
	// Owner is the cell on the inner side of each face's normal.
	Owner []int32
	// Neighbour is the cell the normal points into, or -1 on the boundary.
	Neighbour []int32

	// NumInterior is the count of interior faces; they are faces
	// [0, NumInterior). Boundary faces follow.
	NumInterior int

	// Tags are the boundary tag names, in the order their face groups appear.
	Tags []string
	// FaceTag is the index into Tags of each face: -1 for interior faces and
	// for boundary faces that carry no tag (those come last, after every
	// tagged group).
	FaceTag []int16
	// TagStart gives the face range of each tag: faces of Tags[t] are
	// [TagStart[t], TagStart[t+1]). len(TagStart) is len(Tags)+1; faces from
	// TagStart[len(Tags)] to NumFaces() are untagged boundary faces.
	TagStart []int32

	// Blocks is the optional structured view: one entry per structured
	// block, empty for unstructured meshes.
	Blocks []Block
	// Interfaces lists the conforming block-to-block joins of a multi-block
	// mesh.
	Interfaces []BlockInterface

	// Geo is the derived geometry, computed by Build.
	Geo Geometry
}

// NumCells returns the number of cells.
func (m *Mesh) NumCells() int { return len(m.CellStart) - 1 }

// NumFaces returns the number of faces, interior and boundary.
func (m *Mesh) NumFaces() int { return len(m.FaceNodes) }

// NumBoundary returns the number of boundary faces.
func (m *Mesh) NumBoundary() int { return len(m.FaceNodes) - m.NumInterior }

// Cell returns the node indices of cell c (a view into CellNodes).
func (m *Mesh) Cell(c int) []int32 { return m.CellNodes[m.CellStart[c]:m.CellStart[c+1]] }

// TagRange returns the face range [lo, hi) of the boundary tag named name,
// and false if the mesh has no such tag.
func (m *Mesh) TagRange(name string) (lo, hi int, ok bool) {
	for t, n := range m.Tags {
		if n == name {
			return int(m.TagStart[t]), int(m.TagStart[t+1]), true
		}
	}
	return 0, 0, false
}

// UntaggedRange returns the face range [lo, hi) of boundary faces that carry
// no tag; it is empty for a fully tagged mesh.
func (m *Mesh) UntaggedRange() (lo, hi int) {
	return int(m.TagStart[len(m.Tags)]), m.NumFaces()
}

// Block is one structured block of the mesh's structured view. Node (i, j)
// of the block, 0 ≤ i < NI, 0 ≤ j < NJ, is mesh node Node[j*NI+i]; its cells
// are mesh cells FirstCell + j*(NI-1) + i, i fastest.
type Block struct {
	Name      string
	NI, NJ    int
	Node      []int32
	FirstCell int32
}

// SideNodes returns the mesh nodes along one side of the block, in
// increasing i (south, north) or j (east, west).
func (b Block) SideNodes(s Side) []int32 {
	var out []int32
	switch s {
	case South, North:
		j := 0
		if s == North {
			j = b.NJ - 1
		}
		out = append(out, b.Node[j*b.NI:(j+1)*b.NI]...)
	default:
		i := 0
		if s == East {
			i = b.NI - 1
		}
		for j := range b.NJ {
			out = append(out, b.Node[j*b.NI+i])
		}
	}
	return out
}

// Side names one side of a structured block: the line of nodes with j = 0
// (South), i = NI-1 (East), j = NJ-1 (North) or i = 0 (West).
type Side uint8

// The four block sides.
const (
	South Side = iota
	East
	North
	West
)

var sideNames = [...]string{"south", "east", "north", "west"}

func (s Side) String() string {
	if int(s) < len(sideNames) {
		return sideNames[s]
	}
	return fmt.Sprintf("side(%d)", s)
}

// BlockInterface records that side SideA of block A and side SideB of block
// B share their nodes. Reversed is true when the nodes run in opposite
// directions along the two sides (each side listed in its block's
// increasing i or j).
type BlockInterface struct {
	A, B         int
	SideA, SideB Side
	Reversed     bool
}
