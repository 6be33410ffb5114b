package measure

// pow10 holds the powers of ten that are exact in float64 (10^0..10^22).
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// parseDecimal reads the plain decimal forms instruments write
// ([sign] digits [. digits] [e|E [sign] digits], at least one digit before
// the exponent) when the value is exact by one operation: the significant
// digits make an integer m below 2^53 and the decimal exponent k is within
// +-22, so m and 10^k are exact doubles and m*10^k or m/10^-k is rounded
// once, correctly. It reports false for anything else, which
// strconv.ParseFloat then reads: the result, where it reports true, is
// the same double (the correctly rounded value; strconv takes the same
// path for these forms). Source: W. D. Clinger, "How to read floating
// point numbers accurately", PLDI 1990 (the fast path).
func parseDecimal(b []byte) (float64, bool) {
	i, n := 0, len(b)
	neg := false
	if i < n && (b[i] == '+' || b[i] == '-') {
		neg = b[i] == '-'
		i++
	}
	var m uint64
	digits, exp := 0, 0
	sawDigit, sawDot := false, false
	for ; i < n; i++ {
		c := b[i]
		switch {
		case c >= '0' && c <= '9':
			sawDigit = true
			if sawDot {
				exp--
			}
			if m == 0 && c == '0' {
				continue // a leading zero adds no digit
			}
			if digits == 19 {
				return 0, false // m could overflow: strconv rounds it
			}
			m = m*10 + uint64(c-'0')
			digits++
			continue
		case c == '.' && !sawDot:
			sawDot = true
			continue
		}
		break
	}
	if !sawDigit {
		return 0, false
	}
	if i < n && (b[i] == 'e' || b[i] == 'E') {
		i++
		eneg := false
		if i < n && (b[i] == '+' || b[i] == '-') {
			eneg = b[i] == '-'
			i++
		}
		if i == n {
			return 0, false
		}
		e := 0
		for ; i < n; i++ {
			c := b[i]
			if c < '0' || c > '9' {
				return 0, false
			}
			if e < 1000 {
				e = e*10 + int(c-'0')
			}
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	if i != n || m>>53 != 0 {
		return 0, false
	}
	f := float64(m)
	if neg {
		f = -f
	}
	switch {
	case m == 0 || exp == 0:
		return f, true
	case exp > 0 && exp <= 22:
		return f * pow10[exp], true
	case exp < 0 && exp >= -22:
		return f / pow10[-exp], true
	}
	return 0, false
}
