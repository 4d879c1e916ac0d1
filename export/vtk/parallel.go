package vtk

// This file holds what the readers do side by side: zlib blocks inflated
// in parallel, and index ranges of large arrays converted in parallel.

import (
	"bytes"
	"compress/zlib"
	"io"
	"runtime"
	"sync"
	"sync/atomic"
)

// zlibReader is one worker's zlib decompressor, reset for each block so
// that its window and tables are allocated once per worker, not per block.
type zlibReader struct {
	src bytes.Reader
	r   io.ReadCloser
}

// reset points the decompressor at the zlib stream data.
func (z *zlibReader) reset(data []byte) error {
	z.src.Reset(data)
	if z.r == nil {
		r, err := zlib.NewReader(&z.src)
		if err != nil {
			return err
		}
		z.r = r
		return nil
	}
	return z.r.(zlib.Resetter).Reset(&z.src, nil)
}

// inflateSideBySide calls fn(k, zr) for k = 0 … n−1 on up to GOMAXPROCS
// goroutines, each with a zlibReader of its own, taking the blocks in
// order. It returns the error of the lowest-numbered block that failed, as
// a loop in order would (blocks after a failure may or may not have run).
func inflateSideBySide(n int, fn func(k int, zr *zlibReader) error) error {
	errs := make([]error, n)
	var next atomic.Int64
	var failed atomic.Bool
	work := func() {
		var zr zlibReader
		for !failed.Load() {
			k := int(next.Add(1) - 1)
			if k >= n {
				return
			}
			if errs[k] = fn(k, &zr); errs[k] != nil {
				failed.Store(true)
			}
		}
	}
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), n) - 1 {
		wg.Go(work)
	}
	work()
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// minRange is the fewest values rangeBounds gives a range of their own:
// below it, starting a goroutine costs more than it saves.
const minRange = 1 << 16

// rangeBounds splits [0, n) into up to GOMAXPROCS consecutive ranges, range
// k being [b[k], b[k+1]).
func rangeBounds(n int) []int {
	parts := max(1, min(runtime.GOMAXPROCS(0), n/minRange))
	b := make([]int, parts+1)
	for k := range b {
		b[k] = k * n / parts
	}
	return b
}

// inRanges calls fn(k, lo, hi) for the ranges of rangeBounds(n), side by
// side when there are several, and waits for them.
func inRanges(n int, fn func(k, lo, hi int)) {
	b := rangeBounds(n)
	var wg sync.WaitGroup
	for k := range len(b) - 2 {
		wg.Go(func() { fn(k+1, b[k+1], b[k+2]) })
	}
	fn(0, b[0], b[1])
	wg.Wait()
}

// firstRangeError calls fn on the ranges of rangeBounds(n) side by side
// and returns the error of the first range, in order, that failed.
func firstRangeError(n int, fn func(lo, hi int) error) error {
	errs := make([]error, len(rangeBounds(n))-1)
	inRanges(n, func(k, lo, hi int) { errs[k] = fn(lo, hi) })
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}
