package measure

import "strings"

// Quantity is the physical quantity of a column.
type Quantity int

// Quantities the importer recognises.
const (
	QuantityNone Quantity = iota
	QuantityVoltage
	QuantityCurrent
	QuantityCapacitance
	QuantityFrequency
	QuantityTemperature
)

// String returns the lower-case name of the quantity ("" for none).
func (q Quantity) String() string {
	switch q {
	case QuantityNone:
		return ""
	case QuantityVoltage:
		return "voltage"
	case QuantityCurrent:
		return "current"
	case QuantityCapacitance:
		return "capacitance"
	case QuantityFrequency:
		return "frequency"
	case QuantityTemperature:
		return "temperature"
	}
	return "unknown"
}

// unit is a known unit: value_SI = scale*value + offset.
type unit struct {
	symbol        string
	q             Quantity
	scale, offset float64
}

// unitTable lists the accepted unit spellings (SI prefixes as used on
// instruments; micro as u, the micro sign or Greek mu, normalised to u).
func unitTable() []unit {
	return []unit{
		{"V", QuantityVoltage, 1, 0}, {"mV", QuantityVoltage, 1e-3, 0}, {"uV", QuantityVoltage, 1e-6, 0}, {"kV", QuantityVoltage, 1e3, 0},
		{"A", QuantityCurrent, 1, 0}, {"mA", QuantityCurrent, 1e-3, 0}, {"uA", QuantityCurrent, 1e-6, 0},
		{"nA", QuantityCurrent, 1e-9, 0}, {"pA", QuantityCurrent, 1e-12, 0}, {"fA", QuantityCurrent, 1e-15, 0},
		{"F", QuantityCapacitance, 1, 0}, {"mF", QuantityCapacitance, 1e-3, 0}, {"uF", QuantityCapacitance, 1e-6, 0},
		{"nF", QuantityCapacitance, 1e-9, 0}, {"pF", QuantityCapacitance, 1e-12, 0}, {"fF", QuantityCapacitance, 1e-15, 0},
		{"Hz", QuantityFrequency, 1, 0}, {"kHz", QuantityFrequency, 1e3, 0}, {"MHz", QuantityFrequency, 1e6, 0}, {"GHz", QuantityFrequency, 1e9, 0},
		// 273.15 K offset of the Celsius scale (SI Brochure, 9th ed., 2019).
		{"K", QuantityTemperature, 1, 0}, {"C", QuantityTemperature, 1, 273.15},
	}
}

// unitWord maps spelled-out unit names to symbols.
func unitWord(s string) string {
	switch s {
	case "volt", "volts":
		return "V"
	case "amp", "amps", "ampere", "amperes":
		return "A"
	case "farad", "farads":
		return "F"
	case "hertz":
		return "Hz"
	case "kelvin":
		return "K"
	case "celsius", "degc", "deg c", "°c", "℃", "oc":
		return "C"
	}
	return ""
}

// allowedUnits lists the symbols for a quantity, for error messages.
func allowedUnits(q Quantity) string {
	var s []string
	for _, u := range unitTable() {
		if u.q == q {
			s = append(s, u.symbol)
		}
	}
	if q == QuantityCurrent || q == QuantityVoltage || q == QuantityCapacitance {
		s = append(s, "(µ also as u)")
	}
	return strings.Join(s, ", ")
}

// lookupUnit resolves a unit text: exact symbol first, then a
// case-insensitive match when it is unique, then unit words.
func lookupUnit(s string) (unit, bool) {
	s = strings.TrimSpace(s)
	s = strings.ReplaceAll(s, "µ", "u") // micro sign U+00B5
	s = strings.ReplaceAll(s, "μ", "u") // Greek mu U+03BC
	if s == "" {
		return unit{}, false
	}
	table := unitTable()
	for _, u := range table {
		if u.symbol == s {
			return u, true
		}
	}
	var found unit
	n := 0
	for _, u := range table {
		if strings.EqualFold(u.symbol, s) {
			found = u
			n++
		}
	}
	if n == 1 {
		return found, true
	}
	if w := unitWord(strings.ToLower(s)); w != "" {
		return lookupUnit(w)
	}
	if strings.HasPrefix(s, "°") || strings.HasPrefix(s, "deg") {
		t := strings.TrimSpace(strings.TrimPrefix(strings.TrimPrefix(s, "°"), "deg"))
		if strings.EqualFold(t, "C") {
			return lookupUnit("C")
		}
		if strings.EqualFold(t, "K") {
			return lookupUnit("K")
		}
	}
	return unit{}, false
}

// ParseUnit resolves a unit symbol for quantity q (as used in Options):
// e.g. "mA" for QuantityCurrent. Micro may be written u, µ or μ; the
// Celsius scale as C, °C or degC.
func ParseUnit(q Quantity, s string) (scale, offset float64, ok bool) {
	u, found := lookupUnit(s)
	if !found || u.q != q {
		return 0, 0, false
	}
	return u.scale, u.offset, true
}
