package vtk

import (
	"bufio"
	"encoding/binary"
	"io"
	"math"
)

// bufferSize is the size of the writers' output buffer.
const bufferSize = 1 << 20

// encoder appends binary values to a scratch buffer that it hands to a
// bufio.Writer when full: no allocation per value, few calls per array.
// The first write error sticks and later writes are dropped.
type encoder struct {
	w   *bufio.Writer
	buf []byte
	err error
}

func newEncoder(w io.Writer) *encoder {
	return &encoder{w: bufio.NewWriterSize(w, bufferSize), buf: make([]byte, 0, 1<<16)}
}

// room makes sure n more bytes fit in the scratch buffer.
func (e *encoder) room(n int) {
	if len(e.buf)+n > cap(e.buf) {
		e.flushScratch()
	}
}

func (e *encoder) flushScratch() {
	if e.err == nil && len(e.buf) > 0 {
		_, e.err = e.w.Write(e.buf)
	}
	e.buf = e.buf[:0]
}

// text writes s as it is.
func (e *encoder) text(s string) {
	e.flushScratch()
	if e.err == nil {
		_, e.err = e.w.WriteString(s)
	}
}

// bytes writes b as it is.
func (e *encoder) bytes(b []byte) {
	e.flushScratch()
	if e.err == nil {
		_, e.err = e.w.Write(b)
	}
}

// flush writes everything out and returns the first error.
func (e *encoder) flush() error {
	e.flushScratch()
	if e.err == nil {
		e.err = e.w.Flush()
	}
	return e.err
}

// Little-endian values, for the XML formats' binary data.

func (e *encoder) f64(v float64) {
	e.room(8)
	e.buf = binary.LittleEndian.AppendUint64(e.buf, math.Float64bits(v))
}

func (e *encoder) u64(v uint64) {
	e.room(8)
	e.buf = binary.LittleEndian.AppendUint64(e.buf, v)
}

func (e *encoder) i32(v int32) {
	e.room(4)
	e.buf = binary.LittleEndian.AppendUint32(e.buf, uint32(v))
}

func (e *encoder) u8(v uint8) {
	e.room(1)
	e.buf = append(e.buf, v)
}

// Big-endian values, for the legacy format's binary data.

func (e *encoder) f64BE(v float64) {
	e.room(8)
	e.buf = binary.BigEndian.AppendUint64(e.buf, math.Float64bits(v))
}

func (e *encoder) i32BE(v int32) {
	e.room(4)
	e.buf = binary.BigEndian.AppendUint32(e.buf, uint32(v))
}
