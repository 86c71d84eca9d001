// Package suggest measures how far apart two names are, for the "did you
// mean" hints of every parser of user input (scenario keys and names,
// rate-law identifiers, requirement verdicts). Each caller keeps its own
// rule for when a name is close enough to suggest.
package suggest

// maxLen bounds the work of one comparison: longer inputs are not
// compared and count as far apart.
const maxLen = 64

// Distance is the optimal-string-alignment distance between a and b,
// counted in characters (runes): the number of single-character
// insertions, deletions, substitutions and transpositions of adjacent
// characters that turn a into b, no substring being edited twice (Damerau
// 1964, restricted form; the rolling-row dynamic programme of Wagner &
// Fischer 1974). Inputs longer than 64 characters give the longer length.
func Distance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	if len(ra) > maxLen || len(rb) > maxLen {
		return max(len(ra), len(rb))
	}
	prev2 := make([]int, len(rb)+1)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
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
	return prev[len(rb)]
}
