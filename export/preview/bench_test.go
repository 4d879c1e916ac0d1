package preview

import (
	"io"
	"testing"
)

// BenchmarkPreviewMillion draws the SVG and the PNG preview of a
// million-cell mesh with 6 % of its cells flagged.
func BenchmarkPreviewMillion(b *testing.B) {
	in := testInput(bumpChannel(b, 2000, 500))
	b.Run("svg", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if err := SVG(io.Discard, in); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("png", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if err := PNG(io.Discard, in); err != nil {
				b.Fatal(err)
			}
		}
	})
}
