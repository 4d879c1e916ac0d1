package vtk

import (
	"fmt"
	"strings"

	"cvdeck/mesh"
)

// Field is one data array: one value per cell of the mesh (cell data), or,
// with Point set, one value per node (point data, such as a metric of the
// nodes' median-dual control volumes). Only WriteVTU takes point fields.
type Field struct {
	Name   string
	Values []float64
	Point  bool
}

// AreaName is the name of the cell-area array every mesh file carries.
const AreaName = "area"

// VTK cell type codes (vtkCellType.h, VTK file-format document).
const (
	cellVertex     = 1
	cellPolyVertex = 2
	cellLine       = 3
	cellPolyLine   = 4
	cellTriangle   = 5
	cellStrip      = 6
	cellPolygon    = 7
	cellPixel      = 8
	cellQuad       = 9
	cellVoxel      = 11
	cellHex        = 12
	cellWedge      = 13
)

// cellType returns the VTK type of a cell with n nodes.
func cellType(n int32) uint8 {
	switch n {
	case 3:
		return cellTriangle
	case 4:
		return cellQuad
	}
	return cellPolygon
}

// checkFields checks that every field has one value per cell of a mesh of
// nc cells (per node, of nn nodes, for a point field; nn < 0 when the
// writer takes no point fields) and a usable name, unique among the fields
// of its kind.
func checkFields(fields []Field, nc, nn int) error {
	seen := map[string]bool{AreaName: true}
	seenPoint := map[string]bool{}
	for i, f := range fields {
		if f.Point {
			switch {
			case nn < 0:
				return fmt.Errorf("vtk: field %q is point data, which only the VTU writer takes", f.Name)
			case f.Name == "" || seenPoint[f.Name] || strings.ContainsAny(f.Name, "\x00\"<>&"):
				return fmt.Errorf("vtk: point field %d name %q is empty, used twice or contains a NUL, quote, <, > or &", i, f.Name)
			case len(f.Values) != nn:
				return fmt.Errorf("vtk: point field %q has %d values; the mesh has %d nodes", f.Name, len(f.Values), nn)
			}
			seenPoint[f.Name] = true
			continue
		}
		switch {
		case f.Name == "":
			return fmt.Errorf("vtk: field %d has no name", i)
		case seen[f.Name]:
			return fmt.Errorf("vtk: field %d name %q is used twice (%q is reserved for the cell area)", i, f.Name, AreaName)
		case strings.ContainsAny(f.Name, "\x00\"<>&"):
			return fmt.Errorf("vtk: field %d name %q contains a NUL, quote, <, > or &", i, f.Name)
		case len(f.Values) != nc:
			return fmt.Errorf("vtk: field %q has %d values; the mesh has %d cells", f.Name, len(f.Values), nc)
		}
		seen[f.Name] = true
	}
	return nil
}

// checkArrays rejects a mesh whose arrays disagree, so writers never index
// out of range.
func checkArrays(m *mesh.Mesh) error {
	if m == nil {
		return fmt.Errorf("vtk: no mesh")
	}
	nc := m.NumCells()
	if nc < 0 || len(m.Geo.CellArea) != nc {
		return fmt.Errorf("vtk: mesh has %d cells but %d cell areas; build it with mesh.Build", nc, len(m.Geo.CellArea))
	}
	return nil
}
