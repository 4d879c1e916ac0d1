package vtk

import (
	"encoding/binary"
	"io"
	"math"

	"github.com/paulmach/orb"
)

// bufferSize is the size of the writers' output buffer.
const bufferSize = 1 << 20

// encoder encodes binary values into large buffers and hands each full one
// to a writer goroutine, so that encoding the next megabyte overlaps the
// system call writing the last (double buffering; the bytes and their order
// are the same as a plain sequential write). No allocation per value. The
// bulk methods fill the buffer in tight loops of binary.LittleEndian.Put*
// (one store each on little-endian machines). The first write error is
// returned by finish; later writes are dropped.
type encoder struct {
	buf  []byte
	full chan []byte // buffers to write, in order
	free chan []byte // written buffers, back for reuse
	done chan error  // the writer's first error, once full is closed
}

// buffersInFlight is how many buffers circulate between the encoder and
// the writer goroutine.
const buffersInFlight = 3

func newEncoder(w io.Writer) *encoder {
	e := &encoder{
		buf:  make([]byte, 0, bufferSize),
		full: make(chan []byte, buffersInFlight),
		free: make(chan []byte, buffersInFlight),
		done: make(chan error, 1),
	}
	for i := 1; i < buffersInFlight; i++ {
		e.free <- make([]byte, 0, bufferSize)
	}
	go func() {
		var err error
		for b := range e.full {
			if err == nil {
				_, err = w.Write(b)
			}
			e.free <- b[:0]
		}
		e.done <- err
	}()
	return e
}

// room makes sure n more bytes fit in the buffer.
func (e *encoder) room(n int) {
	if len(e.buf)+n > cap(e.buf) {
		e.flush()
	}
}

// space returns a slice of the free buffer, at least size bytes and a
// multiple of size long, to be filled and then committed with grow.
func (e *encoder) space(size int) []byte {
	e.room(size)
	free := e.buf[len(e.buf):cap(e.buf)]
	return free[:len(free)/size*size]
}

// grow commits n bytes written into the slice space returned.
func (e *encoder) grow(n int) { e.buf = e.buf[:len(e.buf)+n] }

// flush hands the buffer to the writer and takes a free one.
func (e *encoder) flush() {
	if len(e.buf) == 0 {
		return
	}
	e.full <- e.buf
	e.buf = <-e.free
}

// finish writes out what is left, stops the writer and returns its first
// error. The encoder must not be used afterwards.
func (e *encoder) finish() error {
	e.flush()
	close(e.full)
	return <-e.done
}

// text writes s as it is.
func (e *encoder) text(s string) {
	for len(s) > 0 {
		e.room(1)
		n := min(len(s), cap(e.buf)-len(e.buf))
		e.buf = append(e.buf, s[:n]...)
		s = s[n:]
	}
}

func (e *encoder) u8(v uint8) {
	e.room(1)
	e.buf = append(e.buf, v)
}

// Little-endian values, for the XML formats' binary data.

func (e *encoder) u64(v uint64) {
	e.room(8)
	e.buf = binary.LittleEndian.AppendUint64(e.buf, v)
}

func (e *encoder) i32(v int32) {
	e.room(4)
	e.buf = binary.LittleEndian.AppendUint32(e.buf, uint32(v))
}

// f64s writes v as little-endian Float64s.
func (e *encoder) f64s(v []float64) {
	for len(v) > 0 {
		b := e.space(8)
		n := min(len(v), len(b)/8)
		for i, x := range v[:n] {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(x))
		}
		e.grow(8 * n)
		v = v[n:]
	}
}

// i32s writes v as little-endian Int32s.
func (e *encoder) i32s(v []int32) {
	for len(v) > 0 {
		b := e.space(4)
		n := min(len(v), len(b)/4)
		for i, x := range v[:n] {
			binary.LittleEndian.PutUint32(b[4*i:], uint32(x))
		}
		e.grow(4 * n)
		v = v[n:]
	}
}

// xyz writes the points p[sel[k]] (all of p when sel is nil) as
// little-endian Float64 triples (x, y, 0).
func (e *encoder) xyz(p []orb.Point, sel []int32) {
	n := len(p)
	if sel != nil {
		n = len(sel)
	}
	for k := 0; k < n; {
		b := e.space(24)
		m := min(n-k, len(b)/24)
		for i := 0; i < m; i++ {
			var q orb.Point
			if sel != nil {
				q = p[sel[k+i]]
			} else {
				q = p[k+i]
			}
			o := b[24*i : 24*i+24]
			binary.LittleEndian.PutUint64(o[0:], math.Float64bits(q[0]))
			binary.LittleEndian.PutUint64(o[8:], math.Float64bits(q[1]))
			binary.LittleEndian.PutUint64(o[16:], 0)
		}
		e.grow(24 * m)
		k += m
	}
}

// cellTypes writes the VTK cell type of every cell of the CSR offsets
// start, one byte each.
func (e *encoder) cellTypes(start []int32) {
	nc := len(start) - 1
	for c := 0; c < nc; {
		b := e.space(1)
		n := min(nc-c, len(b))
		for i := range b[:n] {
			b[i] = cellType(start[c+i+1] - start[c+i])
		}
		e.grow(n)
		c += n
	}
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
