package cgns

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"hash"
	"math"
)

// contentHash is the SHA-256 of the arrays a writer stores, in the order it
// stores them. Each array is fed as its node path, its length and its values
// in little-endian order, so the hash depends only on the deck's content
// and not on the time stamps HDF5 puts into the file.
type contentHash struct {
	h   hash.Hash
	buf []byte
}

func newContentHash() *contentHash {
	return &contentHash{h: sha256.New(), buf: make([]byte, 0, 1<<16)}
}

func (c *contentHash) header(path string, n int) {
	c.buf = binary.LittleEndian.AppendUint32(c.buf[:0], uint32(len(path)))
	c.buf = append(c.buf, path...)
	c.buf = binary.LittleEndian.AppendUint64(c.buf, uint64(n))
	c.h.Write(c.buf)
	c.buf = c.buf[:0]
}

func (c *contentHash) flush(force bool) {
	if force || len(c.buf) >= cap(c.buf)-8 {
		c.h.Write(c.buf)
		c.buf = c.buf[:0]
	}
}

// floats feeds a float64 array stored at path.
func (c *contentHash) floats(path string, v []float64) {
	c.header(path, len(v))
	for _, x := range v {
		c.buf = binary.LittleEndian.AppendUint64(c.buf, math.Float64bits(x))
		c.flush(false)
	}
	c.flush(true)
}

// ints feeds an integer array stored at path.
func (c *contentHash) ints(path string, v []int32) {
	c.header(path, len(v))
	for _, x := range v {
		c.buf = binary.LittleEndian.AppendUint32(c.buf, uint32(x))
		c.flush(false)
	}
	c.flush(true)
}

// text feeds a string value stored at path (names, enumerated values).
func (c *contentHash) text(path, s string) {
	c.header(path, len(s))
	c.h.Write([]byte(s))
}

func (c *contentHash) sum() string { return hex.EncodeToString(c.h.Sum(nil)) }
