package sweep

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// Shard is the K-th of N slices of a sweep, 1-based so that it matches a
// scheduler's array task index (Slurm's SLURM_ARRAY_TASK_ID with
// --array=1-N). The zero Shard means the whole sweep.
type Shard struct {
	K, N int
}

// Whole reports whether s is the whole sweep.
func (s Shard) Whole() bool { return s.N <= 1 }

func (s Shard) String() string {
	if s.Whole() {
		return ""
	}
	return fmt.Sprintf("%d/%d", s.K, s.N)
}

// ParseShard reads "K/N" with 1 <= K <= N.
func ParseShard(text string) (Shard, error) {
	k, n, ok := strings.Cut(strings.TrimSpace(text), "/")
	if !ok {
		return Shard{}, fmt.Errorf("shard %q: want K/N, e.g. 2/8 for the second of eight slices", text)
	}
	K, err1 := strconv.Atoi(strings.TrimSpace(k))
	N, err2 := strconv.Atoi(strings.TrimSpace(n))
	if err1 != nil || err2 != nil {
		return Shard{}, fmt.Errorf("shard %q: K and N must be whole numbers, e.g. 2/8", text)
	}
	if N < 1 || K < 1 || K > N {
		return Shard{}, fmt.Errorf("shard %q: need 1 <= K <= N (K counts from 1, as array task ids with --array=1-N do)", text)
	}
	return Shard{K: K, N: N}, nil
}

// cost estimates a variant's work: the cell count of a 2D mesh grows with
// the square of the refinement factor.
func cost(v Variant) float64 { return v.Refine * v.Refine }

// Assign returns the 1-based shard of every variant for n shards. It is
// deterministic and balanced by estimated cost: variants are taken from
// the dearest down (ties in sweep order) and each goes to the least loaded
// shard (ties to the lowest number), the longest-processing-time rule
// (Graham 1969). With equal costs this is a plain round robin, so shard
// sizes differ by at most one.
func Assign(vs []Variant, n int) []int {
	out := make([]int, len(vs))
	if n <= 1 {
		for i := range out {
			out[i] = 1
		}
		return out
	}
	order := make([]int, len(vs))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return cost(vs[order[a]]) > cost(vs[order[b]]) })
	load := make([]float64, n)
	for _, i := range order {
		best := 0
		for k := 1; k < n; k++ {
			if load[k] < load[best] {
				best = k
			}
		}
		load[best] += cost(vs[i])
		out[i] = best + 1
	}
	return out
}

// Select returns the variants of shard s, in sweep order.
func Select(vs []Variant, s Shard) []Variant {
	if s.Whole() {
		return vs
	}
	assign := Assign(vs, s.N)
	var out []Variant
	for i, v := range vs {
		if assign[i] == s.K {
			out = append(out, v)
		}
	}
	return out
}
