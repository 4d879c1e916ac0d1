//go:build !linux

package hugepage

// advise does nothing where the system has no madvise(MADV_HUGEPAGE).
func advise[T any]([]T) {}
