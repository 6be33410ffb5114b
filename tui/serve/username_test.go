package serve

import (
	"math/rand/v2"
	"regexp"
	"testing"
)

// ValidUserName accepts exactly what the regular expression
// ^[A-Za-z0-9_][A-Za-z0-9._-]{0,63}$ accepts (Go's regexp package as the
// outside reference), on hand-picked names and 20,000 random strings over
// an alphabet of allowed and refused bytes, lengths 0 to 70.
func TestValidUserNameMatchesPattern(t *testing.T) {
	re := regexp.MustCompile(`^[A-Za-z0-9_][A-Za-z0-9._-]{0,63}$`)
	names := []string{"", ".", "..", "-a", ".a", "_", "a", "ann.lee", "a-b_c.9", "A\n", "a/b", "é", "a b",
		"abcdefghijklmnopqrstuvwxyzabcdefghijklmnopqrstuvwxyzabcdefghijkl",
		"abcdefghijklmnopqrstuvwxyzabcdefghijklmnopqrstuvwxyzabcdefghijklm"}
	const alphabet = "aZ09_.-/ \x00é+"
	rng := rand.New(rand.NewPCG(1, 2))
	for k := 0; k < 20000; k++ {
		b := make([]byte, rng.IntN(71))
		for j := range b {
			b[j] = alphabet[rng.IntN(len(alphabet))]
		}
		names = append(names, string(b))
	}
	for _, n := range names {
		if got, want := ValidUserName(n), re.MatchString(n); got != want {
			t.Errorf("ValidUserName(%q) = %v, the pattern says %v", n, got, want)
		}
	}
}
