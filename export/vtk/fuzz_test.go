package vtk

import (
	"bytes"
	"testing"
)

// The readers take files from anywhere: whatever the bytes, they return a
// mesh or an error, never a panic.

func FuzzReadVTU(f *testing.F) {
	var b bytes.Buffer
	m := mixedMesh(f, 2, 3, 0)
	if err := WriteVTU(&b, m, nil); err != nil {
		f.Fatal(err)
	}
	f.Add(b.Bytes())
	// As the VTK library writes by default (zlib, base64 appended), and
	// in ascii, from its output for one triangle and one line.
	f.Add([]byte(`<?xml version="1.0"?>
<VTKFile type="UnstructuredGrid" version="0.1" byte_order="LittleEndian" header_type="UInt32" compressor="vtkZLibDataCompressor">
  <UnstructuredGrid>
    <Piece NumberOfPoints="3" NumberOfCells="1">
      <Points>
        <DataArray type="Float32" Name="Points" NumberOfComponents="3" format="appended" offset="0"/>
      </Points>
      <Cells>
        <DataArray type="Int64" Name="connectivity" format="appended" offset="52"/>
        <DataArray type="Int64" Name="offsets" format="appended" offset="104"/>
        <DataArray type="UInt8" Name="types" format="appended" offset="148"/>
      </Cells>
    </Piece>
  </UnstructuredGrid>
  <AppendedData encoding="base64">
   _AQAAAACAAAAwAAAAEwAAAA==eJxjYEAGDfaobHQ+AwMAOuQC/Q==AQAAAACAAAAoAAAAEwAAAA==eJxjYIAARijNxIAKYOIAAIAABQ==AQAAAACAAAAQAAAADgAAAA==eJxjZoAAVigNAABoAAk=
  </AppendedData>
</VTKFile>`))
	f.Add([]byte(`<VTKFile type="UnstructuredGrid"><UnstructuredGrid><Piece NumberOfPoints="3" NumberOfCells="2"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0 1 0 0 1 1 0</DataArray></Points><Cells><DataArray type="Int32" Name="connectivity" format="ascii">0 1 2 0 1</DataArray><DataArray type="Int32" Name="offsets" format="ascii">3 5</DataArray><DataArray type="UInt8" Name="types" format="ascii">5 3</DataArray></Cells><CellData><Array type="String" Name="tag" format="ascii">0 119 97 108 108 0</Array></CellData></Piece></UnstructuredGrid></VTKFile>`))
	f.Fuzz(func(t *testing.T, data []byte) {
		ReadVTU(data, "fuzz.vtu")
	})
}

func FuzzReadLegacy(f *testing.F) {
	m := mixedMesh(f, 2, 3, 0)
	for _, binary := range []bool{false, true} {
		var b bytes.Buffer
		if err := WriteLegacy(&b, m, []Field{squareField(m.NumCells())}, binary); err != nil {
			f.Fatal(err)
		}
		f.Add(b.Bytes())
	}
	// The VTK library's 5.1 layout, from its output.
	f.Add([]byte("# vtk DataFile Version 5.1\nvtk output\nASCII\nDATASET UNSTRUCTURED_GRID\nFIELD FieldData 1\nnames 1 2 string\nx\nyz\n\nPOINTS 4 float\n0 0 0 1 0 0 1 1 0 \n0 1 0 \nMETADATA\nINFORMATION 1\nNAME L2_NORM_RANGE LOCATION vtkDataArray\nDATA 2 0 1.41421 \n\nCELLS 3 5\nOFFSETS vtktypeint64\n0 3 5 \nCONNECTIVITY vtktypeint64\n0 1 2 0 1 \nCELL_TYPES 2\n5\n3\n\nCELL_DATA 2\nFIELD FieldData 1\ntag 1 2 string\nab\nwall\n\n"))
	// A slab one cell thick: a hexahedron, a wedge, a tagged side quad, a
	// front patch and an upper line.
	f.Add([]byte("# vtk DataFile Version 3.0\nslab\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 12 double\n" +
		"0 0 0 1 0 0 2 0 0 0 1 0 1 1 0 2 1 0 0 0 1 1 0 1 2 0 1 0 1 1 1 1 1 2 1 1\n" +
		"CELLS 5 29\n8 0 1 4 3 6 7 10 9\n6 1 4 5 7 10 11\n4 0 1 7 6\n4 0 1 4 3\n2 6 7\n" +
		"CELL_TYPES 5\n12\n13\n9\n9\n3\nCELL_DATA 5\nSCALARS tag int 1\nLOOKUP_TABLE default\n-1 -1 0 1 0\n"))
	// A POLYDATA in the 4.2 layout, its sections out of order.
	f.Add([]byte("# vtk DataFile Version 4.2\nt\nASCII\nDATASET POLYDATA\nPOINTS 3 float\n0 0 0 1 0 0 0 1 0\n" +
		"POLYGONS 1 4\n3 0 1 2\nLINES 1 3\n2 0 1\nVERTICES 1 2\n1 2\nCELL_DATA 3\nSCALARS tag int 1\nLOOKUP_TABLE default\n-1 0 -1\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		ReadLegacy(data, "fuzz.vtk")
	})
}

func FuzzReadVTP(f *testing.F) {
	// A vertex, a tagged line and two polys (a triangle and a quad), as
	// the VTK library numbers PolyData cells.
	f.Add([]byte(`<VTKFile type="PolyData"><PolyData><Piece NumberOfPoints="5" NumberOfVerts="1" NumberOfLines="1" NumberOfPolys="2"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0 1 0 0 1 1 0 0 1 0 2 0 0</DataArray></Points>` +
		`<Verts><DataArray type="Int32" Name="connectivity" format="ascii">0</DataArray><DataArray type="Int32" Name="offsets" format="ascii">1</DataArray></Verts>` +
		`<Lines><DataArray type="Int32" Name="connectivity" format="ascii">0 1</DataArray><DataArray type="Int32" Name="offsets" format="ascii">2</DataArray></Lines>` +
		`<Polys><DataArray type="Int32" Name="connectivity" format="ascii">1 4 2 0 1 2 3</DataArray><DataArray type="Int32" Name="offsets" format="ascii">3 7</DataArray></Polys>` +
		`<CellData><Array type="String" Name="tag" format="ascii">0 119 97 108 108 0 0 0</Array></CellData></Piece></PolyData></VTKFile>`))
	var b bytes.Buffer
	if err := WriteBoundaryVTP(&b, mixedMesh(f, 2, 3, 0), nil); err != nil {
		f.Fatal(err)
	}
	f.Add(b.Bytes())
	f.Fuzz(func(t *testing.T, data []byte) {
		ReadVTP(data, "fuzz.vtp")
	})
}

func FuzzReadVTS(f *testing.F) {
	m := twoBlocks(f)
	var b bytes.Buffer
	if err := WriteVTS(&b, m, 0, []Field{squareField(m.NumCells())}); err != nil {
		f.Fatal(err)
	}
	f.Add(b.Bytes())
	// A slab one cell thick in ascii: 2 × 2 × 2 nodes.
	f.Add([]byte(`<VTKFile type="StructuredGrid"><StructuredGrid WholeExtent="0 1 0 1 0 1"><Piece Extent="0 1 0 1 0 1"><Points><DataArray type="Float64" NumberOfComponents="3" format="ascii">0 0 0 1 0 0 0 1 0 1 1 0 0 0 1 1 0 1 0 1 1 1 1 1</DataArray></Points></Piece></StructuredGrid></VTKFile>`))
	f.Fuzz(func(t *testing.T, data []byte) {
		ReadVTS(data, "fuzz.vts")
	})
}
