package vtk_test

import (
	"bytes"
	"fmt"
	"strings"

	"github.com/paulmach/orb"

	"cvdeck/export/vtk"
	"cvdeck/mesh"
)

// A unit square split into two triangles, written as a VTU with one extra
// cell field; the XML head lists every array and its offset in the raw
// appended block (8-byte UInt64 count, then the data).
func ExampleWriteVTU() {
	m, err := mesh.Build(mesh.Input{
		Nodes:     []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}},
		CellStart: []int32{0, 3, 6},
		CellNodes: []int32{0, 1, 2, 0, 2, 3},
	})
	if err != nil {
		panic(err)
	}
	var b bytes.Buffer
	if err := vtk.WriteVTU(&b, m, []vtk.Field{{Name: "skewness", Values: []float64{0.25, 0.25}}}); err != nil {
		panic(err)
	}
	head, _, _ := strings.Cut(b.String(), "<AppendedData")
	fmt.Print(head)
	// Output:
	// <?xml version="1.0"?>
	// <VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">
	//   <UnstructuredGrid>
	//     <Piece NumberOfPoints="4" NumberOfCells="2">
	//       <Points>
	//         <DataArray type="Float64" Name="Points" NumberOfComponents="3" format="appended" offset="0"/>
	//       </Points>
	//       <Cells>
	//         <DataArray type="Int32" Name="connectivity" format="appended" offset="104"/>
	//         <DataArray type="Int32" Name="offsets" format="appended" offset="136"/>
	//         <DataArray type="UInt8" Name="types" format="appended" offset="152"/>
	//       </Cells>
	//       <CellData Scalars="area">
	//         <DataArray type="Float64" Name="area" format="appended" offset="162"/>
	//         <DataArray type="Float64" Name="skewness" format="appended" offset="186"/>
	//       </CellData>
	//     </Piece>
	//   </UnstructuredGrid>
	//
}
