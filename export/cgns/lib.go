// Package cgns writes and reads CGNS files (CFD General Notation System,
// HDF5 storage) through the CGNS mid-level library, so that solvers get the
// deck in the standard's own layout and `cvdeck check` can read back files
// written by cvdeck or by other programs.
//
// This is the only cgo package of cvdeck. It links the Debian libcgns-dev
// build of the library (version 3.4, HDF5-backed, 32-bit cgsize_t); the
// library keeps global state (open files, the cg_goto position), so every
// call into it is serialised by one package mutex.
package cgns

/*
#cgo LDFLAGS: -lcgns
#include <stdlib.h>
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"sync"
	"unsafe"
)

// libMu serialises every use of the CGNS library, whose mid-level interface
// is not safe for concurrent use.
var libMu sync.Mutex

// LibraryVersion is the CGNS library version this package was built with,
// times 1000 (3400 for 3.4.0).
const LibraryVersion = int(C.CGNS_VERSION)

// maxNameLen is the longest CGNS node name (SIDS: 32 characters).
const maxNameLen = 32

// libError turns a non-zero return code of a library call into an error
// carrying the library's own message.
func libError(rc C.int, what string) error {
	if rc == 0 {
		return nil
	}
	return fmt.Errorf("cgns: %s: %s", what, C.GoString(C.cg_get_error()))
}

// cstr is a C copy of s; the caller frees it with free.
func cstr(s string) *C.char { return C.CString(s) }

func free(p *C.char) { C.free(unsafe.Pointer(p)) }

// gopath moves the library's current node to path (cg_gopath).
func gopath(fn C.int, path string) error {
	p := cstr(path)
	defer free(p)
	return libError(C.cg_gopath(fn, p), "go to "+path)
}

// bcTypeByName returns the BCType_t value whose standard name is name, using
// the library's own name table so every SIDS BCType is accepted. The
// user-defined type is stored as "UserDefined"; its C enumerator name
// "BCTypeUserDefined" is accepted too.
func bcTypeByName(name string) (C.BCType_t, error) {
	if name == "BCTypeUserDefined" {
		return C.BCTypeUserDefined, nil
	}
	names := unsafe.Slice(&C.BCTypeName[0], C.NofValidBCTypes)
	for i, p := range names {
		if i >= 1 && C.GoString(p) == name {
			return C.BCType_t(i), nil
		}
	}
	valid := make([]string, 0, len(names))
	for _, p := range names[1:] {
		valid = append(valid, C.GoString(p))
	}
	return 0, fmt.Errorf("BCType %q is not a CGNS BCType; valid names: %v", name, valid)
}

// bcTypeName is the standard name of a BCType_t value.
func bcTypeName(t C.BCType_t) string { return C.GoString(C.cg_BCTypeName(t)) }

// elementTypeName is the standard name of an ElementType_t value.
func elementTypeName(t C.ElementType_t) string { return C.GoString(C.cg_ElementTypeName(t)) }
