package unstructured

import (
	"slices"
	"testing"
)

// hilbertCell is the inverse of hilbertIndex, written independently from
// the usual d-to-(x, y) recursion (from memory, common practice).
func hilbertCell(d uint32) (x, y uint32) {
	const n = 1 << 16
	t := d
	for s := uint32(1); s < n; s *= 2 {
		rx := 1 & (t / 2)
		ry := 1 & (t ^ rx)
		if ry == 0 {
			if rx == 1 {
				x, y = s-1-x, s-1-y
			}
			x, y = y, x
		}
		x += s * rx
		y += s * ry
		t /= 4
	}
	return x, y
}

// TestHilbertCurve checks the defining property of Hilbert's curve
// (Hilbert 1891): consecutive indices are cells sharing a side, and the
// index is a bijection (index of the inverse gives the index back), on the
// first 2¹⁸ indices and on a stride through all 2³².
func TestHilbertCurve(t *testing.T) {
	px, py := hilbertCell(0)
	for d := uint32(0); d < 1<<18; d++ {
		x, y := hilbertCell(d)
		if got := hilbertIndex(x, y); got != d {
			t.Fatalf("hilbertIndex(%d, %d) = %d, want %d", x, y, got, d)
		}
		if d > 0 {
			dx, dy := int(x)-int(px), int(y)-int(py)
			if dx*dx+dy*dy != 1 {
				t.Fatalf("indices %d and %d are cells (%d,%d) and (%d,%d), not side neighbours", d-1, d, px, py, x, y)
			}
		}
		px, py = x, y
	}
	for d := uint64(0); d < 1<<32; d += 65521 * 7 {
		x, y := hilbertCell(uint32(d))
		if got := hilbertIndex(x, y); got != uint32(d) {
			t.Fatalf("hilbertIndex(%d, %d) = %d, want %d", x, y, got, d)
		}
	}
}

// The radix sort orders by the high 32 bits and keeps equal keys in
// input order (compared with the standard library's stable sort).
func TestRadixSortHigh32(t *testing.T) {
	pts := randomPoints(5000, 3)
	keys := make([]uint64, len(pts))
	for i, p := range pts {
		keys[i] = uint64(uint32(p[0]*64))<<32 | uint64(i)
	}
	want := slices.Clone(keys)
	slices.SortStableFunc(want, func(a, b uint64) int { return int(a>>32) - int(b>>32) })
	radixSortHigh32(keys)
	if !slices.Equal(keys, want) {
		t.Fatal("radix sort differs from the stable sort")
	}
}
