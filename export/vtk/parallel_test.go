package vtk

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"math"
	"slices"
	"strings"
	"testing"

	"cvdeck/mesh"
)

// zlibBlob is an array's compressed data as the VTK XML writer lays it out
// (VTK file-format document, "Binary data"): the UInt32 header [number of
// blocks, block size, size of the last block, compressed size of each
// block], then each block as a zlib stream of its own. spoil, if not nil,
// may change each block's stream.
func zlibBlob(t *testing.T, data []byte, blockSize int, spoil func(k int, stream []byte)) []byte {
	t.Helper()
	var blocks [][]byte
	for lo := 0; lo < len(data); lo += blockSize {
		var b bytes.Buffer
		w := zlib.NewWriter(&b)
		w.Write(data[lo:min(lo+blockSize, len(data))])
		w.Close()
		blocks = append(blocks, b.Bytes())
	}
	if spoil != nil {
		for k, b := range blocks {
			spoil(k, b)
		}
	}
	last := len(data) % blockSize
	head := []uint32{uint32(len(blocks)), uint32(blockSize), uint32(last)}
	for _, b := range blocks {
		head = append(head, uint32(len(b)))
	}
	out := binary.LittleEndian.AppendUint32(nil, 0)[:0]
	for _, h := range head {
		out = binary.LittleEndian.AppendUint32(out, h)
	}
	for _, b := range blocks {
		out = append(out, b...)
	}
	return out
}

// Blocks inflated side by side come back whole and in order, and of
// several bad blocks the first is the one named, as reading them in order
// would name it.
func TestBlobBlocksSideBySide(t *testing.T) {
	data := make([]byte, 1<<20+12345)
	for i := range data {
		data[i] = byte(i*7 + i/1000)
	}
	x := &xmlFile{name: "t.vtu", compressed: true, headerSize: 4, order: binary.LittleEndian}
	got, err := x.blob(&rawSource{data: zlibBlob(t, data, 4096, nil)})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, data) {
		t.Fatalf("inflated %d bytes, not the %d written", len(got), len(data))
	}
	for _, bad := range [][]int{{1, 3}, {200, 5, 100}, {256}} {
		// A flipped byte in the stream body.
		_, err := x.blob(&rawSource{data: zlibBlob(t, data, 4096, func(k int, b []byte) {
			if slices.Contains(bad, k) {
				b[3] ^= 0xff
			}
		})})
		want := "block " + itoa(slices.Min(bad)) + ": zlib"
		if err == nil || !strings.HasPrefix(err.Error(), want) {
			t.Errorf("corrupt blocks %v: error %v, want it to start %q", bad, err, want)
		}
	}
	// A flipped bit in the Adler-32 checksum, the stream's last four
	// bytes (RFC 1950): the data inflates to the declared size, and only
	// the checksum tells.
	_, err = x.blob(&rawSource{data: zlibBlob(t, data, 4096, func(k int, b []byte) {
		if k == 7 {
			b[len(b)-1] ^= 1
		}
	})})
	if want := "block 7: zlib: zlib: invalid checksum"; err == nil || err.Error() != want {
		t.Errorf("bad checksum: error %v, want %q", err, want)
	}
}

// A UInt64 value beyond int64 is refused by its index, the first of them
// even when ranges of the array are converted side by side.
func TestDecodeUInt64TooLarge(t *testing.T) {
	n := 4 * minRange
	b := make([]byte, 8*n)
	for i := range n {
		binary.LittleEndian.PutUint64(b[8*i:], uint64(i))
	}
	var a array
	if err := a.decodeBinary(b, "UInt64", binary.LittleEndian); err != nil || a.ints[n-1] != int64(n-1) {
		t.Fatalf("error %v, last value %d", err, a.ints[n-1])
	}
	for _, i := range []int{3 * minRange, minRange + 5} {
		binary.LittleEndian.PutUint64(b[8*i:], math.MaxUint64)
	}
	err := a.decodeBinary(b, "UInt64", binary.LittleEndian)
	if want := "value " + itoa(minRange+5) + " (18446744073709551615) is too large"; err == nil || err.Error() != want {
		t.Fatalf("error %v, want %q", err, want)
	}
}

// bigGrid is a grid of n triangles, each on the points 0, 1, 2 of a unit
// right triangle, all the same cell repeated.
func bigGrid(n int) *grid {
	g := &grid{file: "big.vtu", points: []float64{0, 0, 0, 1, 0, 0, 0, 1, 0}}
	for c := range n {
		g.conn = append(g.conn, 0, 1, 2)
		g.offsets = append(g.offsets, int64(3*c+3))
		g.types = append(g.types, cellTriangle)
	}
	return g
}

// Cells checked and converted in ranges side by side: of two bad cells in
// different ranges the first is named, as one loop over the cells would
// name it, and a sound grid converts whole.
func TestGridRangesFirstError(t *testing.T) {
	n := 3 * minRange
	for _, tc := range []struct {
		spoil func(g *grid, c int)
		want  string
	}{
		{func(g *grid, c int) { g.types[c] = 10 }, "has VTK type 10 (tetra)"},
		{func(g *grid, c int) { g.conn[3*c+1] = 7 }, "refers to point 7"},
		{func(g *grid, c int) { g.offsets[c]-- }, "is a triangle with 2 points"},
	} {
		g := bigGrid(n)
		tc.spoil(g, 2*minRange+3)
		tc.spoil(g, minRange+1)
		_, err := g.toMesh()
		if want := "big.vtu: cell " + itoa(minRange+1) + " "; err == nil || !strings.HasPrefix(err.Error(), want) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want %q … %q", err, want, tc.want)
		}
	}
	g := bigGrid(n)
	var in mesh.Input
	if err := g.planeCells(&in); err != nil {
		t.Fatal(err)
	}
	if len(in.CellStart) != n+1 || in.CellStart[n] != int32(3*n) || !slices.Equal(in.CellNodes[3*n-3:], []int32{0, 1, 2}) {
		t.Fatalf("%d cell starts, last %d, last cell %v", len(in.CellStart), in.CellStart[len(in.CellStart)-1], in.CellNodes[len(in.CellNodes)-3:])
	}
}
