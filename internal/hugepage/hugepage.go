// Package hugepage allocates the large arrays of a big mesh so that the
// operating system can back them with huge pages.
//
// The first write to fresh memory costs the kernel a page fault for each
// page. With 4 KiB pages a mesh of 2 million cells takes some 140 000 of
// them, a quarter of the CPU time of a check of that mesh on a machine
// measured here. Linux can back memory with 2 MiB transparent huge pages
// instead, 512 times fewer faults, but where its policy is "madvise" (the
// setting in /sys/kernel/mm/transparent_hugepage/enabled) it does so only
// for memory a program has asked for with madvise(MADV_HUGEPAGE), which
// the Go runtime does not do for its heap. Make asks for it, for slices
// large enough that the rounding to 2 MiB is a small part of them.
//
// The request changes nothing but how the pages are backed: the slice is
// an ordinary Go slice, garbage-collected as any other. Under the "always"
// policy it is already the case, under "never" (or on another system) the
// request is refused or not made, and Make is plain make.
package hugepage

import (
	"io"
	"os"
)

// MinBytes is the smallest slice, in bytes, for which Make asks for huge
// pages: four huge pages, so that at most a quarter is rounding.
const MinBytes = 8 << 20

// Make returns make([]T, n), asking the operating system to back it with
// huge pages when it takes at least MinBytes.
func Make[T any](n int) []T {
	s := make([]T, n)
	advise(s)
	return s
}

// ReadFile is os.ReadFile into a slice from Make: the whole file, for a
// reader that parses a large mesh file in memory.
func ReadFile(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil, err
	}
	// One byte more than the size, so that a file that has grown since
	// is still read whole (by append below) and one of the stated size
	// ends with io.EOF at once.
	data := Make[byte](int(st.Size()) + 1)[:0]
	for {
		n, err := f.Read(data[len(data):cap(data)])
		data = data[:len(data)+n]
		if err == io.EOF {
			return data, nil
		}
		if err != nil {
			return nil, err
		}
		if len(data) == cap(data) {
			data = append(data, 0)[:len(data)]
		}
	}
}

// Grow is slices.Grow with the new array, when one is needed, from Make:
// it returns s with room for at least n more elements.
func Grow[T any](s []T, n int) []T {
	if cap(s)-len(s) >= n {
		return s
	}
	g := Make[T](len(s) + n)[:len(s)]
	copy(g, s)
	return g
}
