package bc

import (
	"fmt"
	"strings"
)

// didYouMean returns ` (did you mean "x"?)` for the candidate nearest to s,
// if it is a plausible slip: within an edit distance of a third of the
// longer word (at least 1), or containing s or contained in it (a
// "pressure" meant as "total_pressure"). Otherwise it returns "".
func didYouMean(s string, candidates []string) string {
	best, d := nearest(s, candidates)
	if best == "" {
		return ""
	}
	limit := max(1, max(len([]rune(s)), len([]rune(best)))/3)
	if d > limit && !strings.Contains(best, s) && !strings.Contains(s, best) {
		return ""
	}
	return fmt.Sprintf(" (did you mean %q?)", best)
}

// nearestName returns ` (nearest: "x")` for the candidate nearest to s,
// however far, or "" if there are none.
func nearestName(s string, candidates []string) string {
	if best, _ := nearest(s, candidates); best != "" {
		if didYouMean(s, candidates) != "" {
			return fmt.Sprintf(" (did you mean %q?)", best)
		}
		return fmt.Sprintf(" (nearest: %q)", best)
	}
	return ""
}

// nearest returns the first candidate at the smallest edit distance from s,
// with the distance, or "" and -1 if there are no candidates.
func nearest(s string, candidates []string) (string, int) {
	best, bestD := "", -1
	for _, c := range candidates {
		if d := editDistance(s, c); bestD < 0 || d < bestD {
			best, bestD = c, d
		}
	}
	return best, bestD
}

// editDistance is the optimal-string-alignment distance between a and b:
// the Levenshtein distance (insertions, deletions, substitutions of runes,
// each costing 1) with a swap of two adjacent runes also costing 1, the
// commonest typing slip. It is computed by the usual dynamic programme
// over three rows.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	n := len(rb)
	prev2 := make([]int, n+1)
	prev := make([]int, n+1)
	cur := make([]int, n+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= n; j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			if i > 1 && j > 1 && ra[i-1] == rb[j-2] && ra[i-2] == rb[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[n]
}
