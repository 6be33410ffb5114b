package measure

import (
	"junco/model/units"
	"strings"
)

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

// unit is a known unit of a quantity: value_SI = scale*value + offset.
type unit struct {
	q             Quantity
	scale, offset float64
}

// kindOf is the unit kind (package units) of each quantity the importer
// reads.
func kindOf(q Quantity) (units.Kind, bool) {
	switch q {
	case QuantityVoltage:
		return units.Voltage, true
	case QuantityCurrent:
		return units.Current, true
	case QuantityCapacitance:
		return units.Capacitance, true
	case QuantityFrequency:
		return units.Frequency, true
	case QuantityTemperature:
		return units.Temperature, true
	}
	return 0, false
}

// allowedUnits lists the unit names for a quantity, for error messages.
func allowedUnits(q Quantity) string {
	k, ok := kindOf(q)
	if !ok {
		return ""
	}
	s := units.Names(k)
	if q == QuantityCurrent || q == QuantityVoltage || q == QuantityCapacitance || q == QuantityFrequency {
		s = append(s, "(any SI prefix; µ also as u)")
	}
	return strings.Join(s, ", ")
}

// lookupUnit resolves a unit text to the quantity it measures, by the one
// unit system (units.Symbol): the first quantity whose units accept it.
func lookupUnit(s string) (unit, bool) {
	s = strings.TrimSpace(s)
	if s == "" {
		return unit{}, false
	}
	for _, q := range []Quantity{QuantityVoltage, QuantityCurrent, QuantityCapacitance, QuantityFrequency, QuantityTemperature} {
		k, _ := kindOf(q)
		if f, off, ok := units.Symbol(k, s); ok {
			return unit{q: q, scale: f, offset: off}, true
		}
	}
	return unit{}, false
}

// ParseUnit resolves a unit symbol for quantity q (as used in Options):
// e.g. "mA" for QuantityCurrent. Micro may be written u, µ or μ; the
// Celsius scale as C, °C or degC.
func ParseUnit(q Quantity, s string) (scale, offset float64, ok bool) {
	k, known := kindOf(q)
	if !known {
		return 0, 0, false
	}
	return units.Symbol(k, s)
}
