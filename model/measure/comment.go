package measure

import (
	"strconv"
	"strings"
)

// isTemperatureKey reports whether a comment key (after normName) states
// the device temperature.
func isTemperatureKey(k string) bool {
	switch k {
	case "temperature", "temp", "t", "tsample", "tchuck", "devicetemperature", "sampletemperature":
		return true
	}
	return false
}

// comment reads a stated temperature from a comment line: a key
// (temperature, temp, T, Tsample, Tchuck, device/sample temperature; any
// case), then ":" or "=" or just a space, then a number with an optional
// temperature unit (K, or C, °C, degC; bare: K) and nothing after the unit but an
// optional remark in parentheses:
//
//	# temperature: 300 K
//	# temperature 250 K
//	# T = 250K
//	# temp=300
//	# Tchuck: 27 C (set point)
//
// The first such comment wins; a line that does not have this form (a
// "# temperature sweep at 300 K" remark) is ignored.
func (im *importer) comment(t []byte) {
	if im.tempOK {
		return
	}
	s := strings.TrimSpace(string(t[1:]))
	k := strings.IndexAny(s, ":=")
	if k < 0 {
		// No separator: the key runs up to the number.
		k = strings.IndexAny(s, "0123456789+-.")
		if k <= 0 || !strings.ContainsAny(s[k-1:k], " \t") {
			return
		}
	}
	if !isTemperatureKey(normName(s[:k])) {
		return
	}
	val := strings.TrimSpace(strings.TrimLeft(s[k:], ":="))
	if j := strings.IndexByte(val, '('); j > 0 && strings.HasSuffix(val, ")") {
		val = strings.TrimSpace(val[:j])
	}
	num, u := val, ""
	if j := strings.IndexFunc(val, func(r rune) bool {
		return !(r >= '0' && r <= '9' || r == '.' || r == '-' || r == '+' || r == 'e' || r == 'E')
	}); j >= 0 {
		num, u = strings.TrimSpace(val[:j]), strings.TrimSpace(val[j:])
	}
	x, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return
	}
	scale, offset := 1.0, 0.0
	if u != "" {
		var ok bool
		if scale, offset, ok = ParseUnit(QuantityTemperature, u); !ok {
			return
		}
	}
	kt := scale*x + offset
	if kt > 0 && kt < 5000 {
		im.ds.StatedTemperatureK = kt
		im.tempOK = true
	}
}
