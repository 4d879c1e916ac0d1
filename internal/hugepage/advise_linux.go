package hugepage

import (
	"runtime"
	"syscall"
	"unsafe"
)

// hugePage is the size of an x86-64 and arm64 transparent huge page.
const hugePage = 2 << 20

// advise asks, with madvise(MADV_HUGEPAGE), for the whole huge pages that
// lie within s to be backed by huge pages. The range is aligned inwards so
// that the advice never reaches memory outside s. An error (a kernel
// without transparent huge pages) leaves the slice as it is: the advice is
// only a request.
func advise[T any](s []T) {
	var zero T
	size := uintptr(len(s)) * unsafe.Sizeof(zero)
	if size < MinBytes {
		return
	}
	start := uintptr(unsafe.Pointer(unsafe.SliceData(s)))
	lo := (start + hugePage - 1) &^ (hugePage - 1)
	hi := (start + size) &^ (hugePage - 1)
	if hi <= lo {
		return
	}
	syscall.Syscall(syscall.SYS_MADVISE, lo, hi-lo, syscall.MADV_HUGEPAGE)
	runtime.KeepAlive(s)
}
