package vtk

import (
	"fmt"
	"io"
	"path/filepath"

	"cvdeck/export/atomic"
	"cvdeck/mesh"
)

// WriteVTS writes structured block b of m as an XML StructuredGrid (.vts),
// laid out as WriteVTU: WholeExtent "0 NI-1 0 NJ-1 0 0", points (x, y, 0)
// in the block's order (i fastest, which is VTK's), and as cell data the
// area and fields of the block's cells, mesh cells FirstCell onwards, also
// i fastest.
func WriteVTS(w io.Writer, m *mesh.Mesh, b int, fields []Field) error {
	if err := checkArrays(m); err != nil {
		return err
	}
	if err := checkFields(fields, m.NumCells(), -1); err != nil {
		return err
	}
	if b < 0 || b >= len(m.Blocks) {
		return fmt.Errorf("vtk: block %d does not exist; the mesh has %d structured blocks", b, len(m.Blocks))
	}
	blk := m.Blocks[b]
	if blk.NI < 2 || blk.NJ < 2 || len(blk.Node) != blk.NI*blk.NJ {
		return fmt.Errorf("vtk: block %d (%q) is %d × %d nodes with %d node indices; it needs at least 2 × 2 and NI·NJ indices", b, blk.Name, blk.NI, blk.NJ, len(blk.Node))
	}
	for k, v := range blk.Node {
		if v < 0 || int(v) >= len(m.Nodes) {
			return fmt.Errorf("vtk: block %d (%q) node (%d, %d) is mesh node %d; nodes run from 0 to %d", b, blk.Name, k%blk.NI, k/blk.NI, v, len(m.Nodes)-1)
		}
	}
	lo, n := int(blk.FirstCell), (blk.NI-1)*(blk.NJ-1)
	if lo < 0 || lo+n > m.NumCells() {
		return fmt.Errorf("vtk: block %d (%q) cells %d..%d are outside the mesh's %d cells", b, blk.Name, lo, lo+n-1, m.NumCells())
	}
	ext := fmt.Sprintf("0 %d 0 %d 0 0", blk.NI-1, blk.NJ-1)
	d := newAppendedDoc("StructuredGrid")
	d.line(1, fmt.Sprintf("<StructuredGrid WholeExtent=%q>", ext))
	d.line(2, fmt.Sprintf("<Piece Extent=%q>", ext))
	d.line(3, "<Points>")
	d.array(4, pointsArray(m.Nodes, blk.Node))
	d.line(3, "</Points>")
	sub := make([]Field, len(fields))
	for i, f := range fields {
		sub[i] = Field{Name: f.Name, Values: f.Values[lo : lo+n]}
	}
	writeCellData(d, m.Geo.CellArea[lo:lo+n], sub)
	d.line(2, "</Piece>")
	d.line(1, "</StructuredGrid>")
	if err := d.write(w); err != nil {
		return fmt.Errorf("vtk: write vts of block %d: %w", b, err)
	}
	return nil
}

// BlockFile is one entry of a multiblock index: the block's name and the
// path of its file relative to the index.
type BlockFile struct {
	Name string
	File string
}

// WriteVTM writes an XML vtkMultiBlockDataSet index (.vtm) that lists the
// given block files in order, DataSet index k for the k-th.
func WriteVTM(w io.Writer, blocks []BlockFile) error {
	e := newEncoder(w)
	e.text("<?xml version=\"1.0\"?>\n<VTKFile type=\"vtkMultiBlockDataSet\" version=\"1.0\" byte_order=\"LittleEndian\" header_type=\"UInt64\">\n  <vtkMultiBlockDataSet>\n")
	for k, b := range blocks {
		e.text(fmt.Sprintf("    <DataSet index=\"%d\" name=\"%s\" file=\"%s\"/>\n", k, attr(b.Name), attr(filepath.ToSlash(b.File))))
	}
	e.text("  </vtkMultiBlockDataSet>\n</VTKFile>\n")
	if err := e.finish(); err != nil {
		return fmt.Errorf("vtk: write vtm: %w", err)
	}
	return nil
}

// WriteStructured writes every structured block of m into dir as
// base_K.vts (K the block index) and the index base.vtm that references
// them, each file atomically. It returns the names written, relative to
// dir, index last. A block with no name is called "block K".
func WriteStructured(dir, base string, m *mesh.Mesh, fields []Field) ([]string, error) {
	if err := checkArrays(m); err != nil {
		return nil, err
	}
	if len(m.Blocks) == 0 {
		return nil, fmt.Errorf("vtk: the mesh has no structured blocks to write as .vts")
	}
	var names []string
	var index []BlockFile
	for b, blk := range m.Blocks {
		name := fmt.Sprintf("%s_%d.vts", base, b)
		if err := atomic.WriteFile(filepath.Join(dir, name), func(w io.Writer) error { return WriteVTS(w, m, b, fields) }); err != nil {
			return nil, err
		}
		label := blk.Name
		if label == "" {
			label = fmt.Sprintf("block %d", b)
		}
		names = append(names, name)
		index = append(index, BlockFile{Name: label, File: name})
	}
	vtm := base + ".vtm"
	if err := atomic.WriteFile(filepath.Join(dir, vtm), func(w io.Writer) error { return WriteVTM(w, index) }); err != nil {
		return nil, err
	}
	return append(names, vtm), nil
}
