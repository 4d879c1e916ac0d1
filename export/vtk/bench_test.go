package vtk

import (
	"os"
	"path/filepath"
	"sync"
	"testing"

	"github.com/paulmach/orb"

	"cvdeck/mesh"
)

var (
	benchOnce sync.Once
	benchMesh *mesh.Mesh
)

// gridMesh is an n × n grid of unit-square quads, its four sides tagged.
func gridMesh(tb testing.TB, n int) *mesh.Mesh {
	in := mesh.Input{CellStart: make([]int32, 1, n*n+1), CellNodes: make([]int32, 0, 4*n*n), Nodes: make([]orb.Point, 0, (n+1)*(n+1))}
	for j := 0; j <= n; j++ {
		for i := 0; i <= n; i++ {
			in.Nodes = append(in.Nodes, orb.Point{float64(i) * 1e-3, float64(j) * 1e-3})
		}
	}
	id := func(i, j int) int32 { return int32(j*(n+1) + i) }
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			in.CellNodes = append(in.CellNodes, id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1))
			in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		}
	}
	m, err := mesh.Build(in)
	if err != nil {
		tb.Fatal(err)
	}
	return m
}

// vtkWriterScript reads a .vtu and times the VTK library's own XML writer
// writing it uncompressed with raw appended data, the mean of five writes
// (as the benchmark's ns/op is a mean), printing {"seconds": s, "bytes": n}.
const vtkWriterScript = `
import sys, json, time, os, vtk
r = vtk.vtkXMLUnstructuredGridReader(); r.SetFileName(sys.argv[1]); r.Update()
g = r.GetOutput()
w = vtk.vtkXMLUnstructuredGridWriter()
w.SetInputData(g); w.SetFileName(sys.argv[2])
w.SetCompressorTypeToNone(); w.SetDataModeToAppended(); w.EncodeAppendedDataOff()
total = 0.0
for _ in range(5):
    t = time.perf_counter(); ok = w.Write(); total += time.perf_counter() - t
    if not ok: raise SystemExit('vtk writer failed')
print(json.dumps({'seconds': total / 5, 'bytes': os.path.getsize(sys.argv[2]), 'cells': g.GetNumberOfCells()}))
`

// BenchmarkWriteVTU writes a 1-million-cell VTU to a file and, in the same
// run, times the VTK library's XML writer (uncompressed, appended raw) on
// the same mesh, which it reads from our file. Metrics: vtk-ns/op (the
// library's mean) and ratio (ours / the library's; the target is ≤ 1).
func BenchmarkWriteVTU(b *testing.B) {
	benchOnce.Do(func() { benchMesh = gridMesh(b, 1000) })
	m := benchMesh
	dir := b.TempDir()
	ours := filepath.Join(dir, "cvdeck.vtu")
	write := func() {
		f, err := os.Create(ours)
		if err != nil {
			b.Fatal(err)
		}
		if err := WriteVTU(f, m, nil); err != nil {
			b.Fatal(err)
		}
		if err := f.Close(); err != nil {
			b.Fatal(err)
		}
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		write()
	}
	b.StopTimer()
	perOp := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
	fi, _ := os.Stat(ours)
	b.SetBytes(fi.Size())
	var lib struct {
		Seconds float64 `json:"seconds"`
		Bytes   int64   `json:"bytes"`
		Cells   int     `json:"cells"`
	}
	runPython(b, vtkWriterScript, &lib, ours, filepath.Join(dir, "vtk.vtu"))
	if lib.Cells != m.NumCells() {
		b.Fatalf("VTK read %d cells, want %d", lib.Cells, m.NumCells())
	}
	b.ReportMetric(lib.Seconds*1e9, "vtk-ns/op")
	b.ReportMetric(perOp/(lib.Seconds*1e9), "ratio")
	b.ReportMetric(float64(lib.Bytes), "vtk-bytes")
}

// vtkRewriteScript reads a .vtu with the VTK library and writes it again
// as the library writes by default: appended data, base64, zlib.
const vtkRewriteScript = `
import sys, json, vtk
r = vtk.vtkXMLUnstructuredGridReader(); r.SetFileName(sys.argv[1]); r.Update()
w = vtk.vtkXMLUnstructuredGridWriter(); w.SetInputData(r.GetOutput()); w.SetFileName(sys.argv[2])
w.SetDataModeToAppended(); w.EncodeAppendedDataOn(); w.SetCompressorTypeToZLib()
print(json.dumps({'ok': w.Write()}))
`

// BenchmarkReadVTU reads a 1-million-cell VTU from memory, with three
// cell-data arrays the reader does not need beside the area: parse reads
// the arrays only (parseVTU), read builds the mesh too (ReadVTU). The
// cvdeck file is raw appended; base64-zlib is the same grid as the VTK
// library writes it by default.
func BenchmarkReadVTU(b *testing.B) {
	benchOnce.Do(func() { benchMesh = gridMesh(b, 1000) })
	m := benchMesh
	nc := m.NumCells()
	fields := []Field{squareField(nc), {Name: "skewness", Values: make([]float64, nc)}, {Name: "growth", Values: m.Geo.CellArea}}
	dir := b.TempDir()
	raw := filepath.Join(dir, "cvdeck.vtu")
	f, err := os.Create(raw)
	if err != nil {
		b.Fatal(err)
	}
	if err := WriteVTU(f, m, fields); err != nil {
		b.Fatal(err)
	}
	if err := f.Close(); err != nil {
		b.Fatal(err)
	}
	files := map[string]string{"raw": raw}
	var ok struct{ OK int }
	z := filepath.Join(dir, "vtk.vtu")
	runPython(b, vtkRewriteScript, &ok, raw, z)
	files["base64-zlib"] = z
	for _, kind := range []string{"raw", "base64-zlib"} {
		data, err := os.ReadFile(files[kind])
		if err != nil {
			b.Fatal(err)
		}
		b.Run("parse/"+kind, func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				if _, err := parseVTU(data, kind+".vtu"); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run("read/"+kind, func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				if _, err := ReadVTU(data, kind+".vtu"); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
