package measure

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// parseDecimal gives, wherever it takes a number, the same double as
// strconv.ParseFloat (the standard library's correctly rounded reader),
// bit for bit: random values written in the forms instruments use (%g, %e
// and %f at several precisions, signs, leading zeros, a trailing point,
// 19 and 20 digits), and edge forms. Forms outside its fast path (more
// digits, large exponents, anything not plain decimal) it leaves to strconv.
func TestParseDecimalMatchesStrconv(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 16))
	var forms []string
	for k := 0; k < 200000; k++ {
		x := math.Exp(rng.NormFloat64()*20) * float64(1-2*rng.IntN(2))
		prec := rng.IntN(18)
		switch k % 6 {
		case 0:
			forms = append(forms, strconv.FormatFloat(x, 'g', prec+1, 64))
		case 1:
			forms = append(forms, strconv.FormatFloat(x, 'e', prec, 64))
		case 2:
			forms = append(forms, strconv.FormatFloat(x, 'f', prec, 64))
		case 3:
			forms = append(forms, strconv.FormatFloat(x, 'g', -1, 64))
		case 4:
			forms = append(forms, fmt.Sprintf("%+.*E", prec, x))
		default:
			forms = append(forms, fmt.Sprintf("%019d", rng.Uint64()>>uint(rng.IntN(64))), fmt.Sprintf("%d.%de%d", rng.IntN(1000), rng.Uint64(), rng.IntN(60)-30))
		}
	}
	forms = append(forms, "0", "-0", "+0", "0.", ".5", "5.", "-.5e-3", "00012.5000", "1e22", "1e23", "1e-22", "1e-23",
		"9007199254740992", "9007199254740993", "9999999999999999999", "99999999999999999999", "1.", "1e", "1e+", "e5", ".", "-",
		"+-1", "1..2", "1.2.3", "0x10", "1_000", "inf", "NaN", "1e400", "123456789012345678e-40", "0.000000000000000000000001")
	taken := 0
	for _, s := range forms {
		got, ok := parseDecimal([]byte(s))
		if !ok {
			continue
		}
		taken++
		want, err := strconv.ParseFloat(s, 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("parseDecimal(%q) = %v, strconv gives %v (%v)", s, got, want, err)
		}
	}
	if taken < len(forms)/2 {
		t.Errorf("the fast path took only %d of %d forms", taken, len(forms))
	}
	for _, s := range []string{"1e", "1e+", "e5", ".", "-", "+-1", "1..2", "1.2.3", "0x10", "1_000", "inf", "NaN", "1e23", "99999999999999999999"} {
		if _, ok := parseDecimal([]byte(s)); ok {
			t.Errorf("parseDecimal took %q", s)
		}
	}
	t.Logf("fast path: %d of %d forms", taken, len(forms))
}

func BenchmarkParseNum(b *testing.B) {
	fields := [][]byte{[]byte("0.0585859"), []byte("1.8004064e-07"), []byte("-12.5"), []byte("3.3e-3")}
	for b.Loop() {
		for _, f := range fields {
			if _, st := parseNum(f, false); st != numOK {
				b.Fatal(st)
			}
		}
	}
}
