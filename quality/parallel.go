package quality

import (
	"runtime"
	"sync"
)

// chunk is the fixed size of the index ranges that loops are split into.
// Partial results are combined in chunk order, so results do not depend on
// how many goroutines ran.
const chunk = 1 << 13

// forChunks calls fn(lo, hi) for each range [lo, hi) of at most chunk
// indices covering [0, n), on up to GOMAXPROCS goroutines. fn must write
// only to its own range of outputs (or to per-chunk slots indexed lo/chunk).
func forChunks(n int, fn func(lo, hi int)) {
	nchunks := (n + chunk - 1) / chunk
	workers := min(runtime.GOMAXPROCS(0), nchunks)
	if workers <= 1 {
		for lo := 0; lo < n; lo += chunk {
			fn(lo, min(lo+chunk, n))
		}
		return
	}
	var wg sync.WaitGroup
	next := make(chan int, nchunks)
	for k := 0; k < nchunks; k++ {
		next <- k
	}
	close(next)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				lo := k * chunk
				fn(lo, min(lo+chunk, n))
			}
		}()
	}
	wg.Wait()
}
