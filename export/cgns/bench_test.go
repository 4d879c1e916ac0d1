package cgns

import (
	"os"
	"path/filepath"
	"testing"
)

// BenchmarkWrite1M writes a 1-million-cell deck (mesh, BCs,
// flow state, two cell fields) to CGNS/HDF5: quadrilaterals (1000 × 1000)
// and triangles (500 × 1000 squares, split) as one unstructured zone, and
// the quadrilaterals as two structured zones of 500 × 1000 cells.
func BenchmarkWrite1M(b *testing.B) {
	for _, c := range []struct {
		name string
		deck func() *Deck
	}{
		{"quad", func() *Deck { return testDeck(quadMesh(b, 1000, 1000)) }},
		{"tri", func() *Deck { return testDeck(triMesh(b, 500, 1000)) }},
		{"structured", func() *Deck { return testDeck(splitRectangle(b, 1000, 1000, true)) }},
	} {
		b.Run(c.name, func(b *testing.B) {
			d := c.deck()
			path := filepath.Join(b.TempDir(), "deck.cgns")
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if _, err := Write(path, d); err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			st, err := os.Stat(path)
			if err != nil {
				b.Fatal(err)
			}
			b.ReportMetric(float64(st.Size())/1e6, "MB/file")
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(d.Mesh.NumCells()), "ns/cell")
		})
	}
}

// BenchmarkRead1M reads the 1-million-cell quadrilateral deck back.
func BenchmarkRead1M(b *testing.B) {
	d := testDeck(quadMesh(b, 1000, 1000))
	path := filepath.Join(b.TempDir(), "deck.cgns")
	if _, err := Write(path, d); err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Read(path); err != nil {
			b.Fatal(err)
		}
	}
}
