package suggest

import "testing"

func TestDistance(t *testing.T) {
	// Textbook values: kitten/sitting = 3 (Levenshtein 1966, the standard
	// example); a transposition costs 1 in the restricted Damerau distance,
	// and "ca"/"abc" is 3 there (it may not edit a substring twice; common
	// practice, no source).
	cases := []struct {
		a, b string
		d    int
	}{
		{"kitten", "sitting", 3}, {"", "abc", 3}, {"abc", "abc", 0},
		{"ab", "ba", 1}, {"ca", "abc", 3}, {"stabel", "stable", 1}, {"µx", "mx", 1},
	}
	for _, c := range cases {
		if got := Distance(c.a, c.b); got != c.d {
			t.Errorf("Distance(%q, %q) = %d, want %d", c.a, c.b, got, c.d)
		}
		if got := Distance(c.b, c.a); got != c.d {
			t.Errorf("Distance(%q, %q) = %d, want %d (symmetry)", c.b, c.a, got, c.d)
		}
	}
}
