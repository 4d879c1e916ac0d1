// Package vtk writes cvdeck meshes in the VTK file formats and reads
// unstructured, polygon and structured grids back for checking.
//
// Writers (the XML formats are those of the VTK file-format document, "VTK
// File Formats", Kitware; the legacy one its "Simple Legacy Formats"
// section):
//
//   - WriteVTU: XML UnstructuredGrid, binary appended raw data, no
//     compression, header_type UInt64; points Float64 (x, y, 0); cells as
//     VTK_TRIANGLE (5), VTK_QUAD (9) or VTK_POLYGON (7) with Int32
//     connectivity and offsets; cell data "area" plus the given fields.
//   - WriteBoundaryVTP: XML PolyData of the boundary faces as line cells
//     with the tag index, condition index and face index per line, the tag
//     and condition names as String arrays in FieldData.
//   - WriteLegacy: legacy .vtk UNSTRUCTURED_GRID, version 4.2 layout, ASCII
//     or binary (big-endian, as the legacy format requires).
//   - WriteVTS and WriteVTM: one XML StructuredGrid per structured block
//     and the multiblock index that lists them.
//
// Readers (ReadFile, ReadVTU, ReadLegacy, ReadVTP, ReadVTS, ReadVTM)
// accept what the VTK library writes, including its defaults
// (zlib-compressed, base64 appended data), and return a mesh.Mesh whose
// line cells became tagged boundary faces. ReadVTS reads a 2D XML
// StructuredGrid (one node plane, or a slab one cell thick), and ReadVTM
// the multiblock index of such grids, joined into one mesh with the nodes
// of block interfaces merged; their boundary faces are untagged.
package vtk
