package units

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// EditText is the text a user types to give a value again: read back by
// ParseValue it is the same value to ten significant digits (an identity),
// for every kind and values over thirty decades, negative ones included;
// it carries the kind's trade unit, and a value that is not finite is "?".
func TestEditTextRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 3))
	for k := Density; k <= Frequency; k++ {
		unit, _ := TradeUnit(k)
		for range 200 {
			v := math.Pow(10, rng.Float64()*30-15) * (1 + rng.Float64())
			if k != Temperature && rng.IntN(4) == 0 {
				v = -v
			}
			text := EditText(k, v)
			if unit != "" && !strings.HasSuffix(text, " "+unit) {
				t.Fatalf("%s: %q does not end in its trade unit %q", KindName(k), text, unit)
			}
			got, err := ParseValue(k, text)
			if err != nil {
				t.Fatalf("%s: %q not read back: %v", KindName(k), text, err)
			}
			if math.Abs(got-v) > 1e-9*math.Abs(v) {
				t.Fatalf("%s: %g written %q, read back %g", KindName(k), v, text, got)
			}
		}
		for _, bad := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
			if got := EditText(k, bad); !strings.HasPrefix(got, "?") {
				t.Errorf("%s: %g written %q, want ?", KindName(k), bad, got)
			}
		}
	}
}
