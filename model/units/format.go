package units

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Format writes an SI value of kind k in its trade unit with sig
// significant figures: densities as 1.00e17 cm^-3, lengths in um or nm,
// capacitances in pF or fF, currents with an SI prefix, current densities
// in A/cm^2, temperatures in K. ascii selects "u" for micro; otherwise "µ".
// NaN prints as "n/a"; infinities as "inf".
func Format(k Kind, v float64, sig int, ascii bool) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if math.IsInf(v, 0) {
		if v > 0 {
			return "inf"
		}
		return "-inf"
	}
	switch k {
	case Density:
		return sci(v/1e6, sig) + " cm^-3"
	case Gradient:
		return sci(v/1e8, sig) + " cm^-4"
	case Temperature:
		return fixed(v, sig) + " K"
	case Area:
		switch a := math.Abs(v); {
		case a >= 1e-6:
			return fixed(v*1e4, sig) + " cm^2"
		case a >= 1e-8:
			return sci(v*1e4, sig) + " cm^2"
		default:
			return fixed(v*1e12, sig) + " " + micro(ascii) + "m^2"
		}
	case Length:
		return Engineering(v, sig, "m", ascii)
	case Resistance, Conductance:
		return Engineering(v, sig, SIUnitSymbol(k), ascii)
	case Time, Voltage, Current, Power, Capacitance:
		// Mega and above read like milli beside them (MA, mA) and are not
		// trade units for these: powers of ten instead.
		if r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', max(sig, 1), 64), 64); math.Abs(r) >= 1e6 {
			return sci(v, sig) + " " + SIUnitSymbol(k)
		}
		return Engineering(v, sig, SIUnitSymbol(k), ascii)
	case TemperatureCoefficient:
		return fixed(v*1e3, sig) + " mV/K"
	case Velocity:
		return sci(v*100, sig) + " cm/s"
	case CurrentDensity:
		return sci(v/1e4, sig) + " A/cm^2"
	case Mobility:
		return fixed(v*1e4, sig) + " cm^2/Vs"
	case Diffusivity:
		return fixed(v*1e4, sig) + " cm^2/s"
	case Field:
		return sci(v/100, sig) + " V/cm"
	case Energy:
		return fixed(v, sig) + " eV"
	case CapacitancePerArea:
		return fixed(v*1e5, sig) + " nF/cm^2"
	case Dose:
		return sci(v/1e4, sig) + " cm^-2"
	case Frequency:
		return Engineering(v, sig, "Hz", ascii)
	case Dimensionless:
		return fixed(v, sig)
	case GenerationRate:
		return sci(v/1e6, sig) + " cm^-3 s^-1"
	case PowerDensity:
		return fixed(v/10, sig) + " mW/cm^2"
	case Absorption:
		return sci(v/100, sig) + " 1/cm"
	}
	return strconv.FormatFloat(v, 'g', sig, 64)
}

// SIUnitSymbol is the symbol used after an SI prefix for kind k.
func SIUnitSymbol(k Kind) string {
	switch k {
	case Time:
		return "s"
	case Voltage:
		return "V"
	case Resistance:
		return "ohm"
	case Current:
		return "A"
	case Power:
		return "W"
	case Capacitance:
		return "F"
	case Length:
		return "m"
	}
	return SIUnit(k)
}

func micro(ascii bool) string {
	if ascii {
		return "u"
	}
	return "µ"
}

// Engineering formats v with an SI prefix (f ... G) so that the mantissa
// lies in [1, 1000), with sig significant figures, followed by unit.
func Engineering(v float64, sig int, unit string, ascii bool) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if v == 0 {
		return "0 " + unit
	}
	prefixes := []string{"a", "f", "p", "n", micro(ascii), "m", "", "k", "M", "G", "T"}
	e := int(math.Floor(math.Log10(math.Abs(v)) / 3))
	// Round first so that 999.96 becomes 1.000 of the next prefix.
	m := v / math.Pow(1000, float64(e))
	r, _ := strconv.ParseFloat(strconv.FormatFloat(m, 'g', sig, 64), 64)
	if math.Abs(r) >= 1000 {
		e++
		m = r / 1000
	}
	idx := e + 6
	if idx < 0 || idx >= len(prefixes) {
		return sci(v, sig) + " " + unit
	}
	return fixed(m, sig) + " " + prefixes[idx] + unit
}

// fixed prints v with sig significant figures in plain decimal notation.
func fixed(v float64, sig int) string {
	if v == 0 {
		return "0"
	}
	mag := int(math.Floor(math.Log10(math.Abs(v))))
	dec := sig - 1 - mag
	if dec < 0 {
		dec = 0
	}
	if mag >= 6 || mag < -4 {
		return sci(v, sig)
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}

// sci prints v as mantissa e exponent with sig significant figures
// (1.23e17).
func sci(v float64, sig int) string {
	if sig < 1 {
		sig = 1
	}
	s := strconv.FormatFloat(v, 'e', sig-1, 64)
	// Go prints e+17; trade notation drops the plus and leading zeros.
	mant, exp, ok := strings.Cut(s, "e")
	if !ok {
		return s
	}
	n, err := strconv.Atoi(exp)
	if err != nil {
		return s
	}
	if n == 0 {
		return mant // "-5.00", not "-5.00e0"
	}
	return fmt.Sprintf("%se%d", mant, n)
}

// TradeUnit returns the unit a value of kind k is typed and shown in by
// default (DefaultUnit) and the SI value of one such unit, so that a chart
// can plot v/si in that unit. The factor comes from ParseValue, the one
// place that knows the units.
func TradeUnit(k Kind) (unit string, si float64) {
	unit = DefaultUnit(k)
	v, err := ParseValue(k, "1 "+unit)
	if err != nil || v == 0 {
		return SIUnit(k), 1
	}
	return unit, v
}

// EditText writes an SI value as the text a user would type to give it
// again: the number in the kind's trade unit (TradeUnit) with up to ten
// significant digits and a plain exponent ("1e17 cm^-3", "5e-6 s"); "?"
// for a value that is not finite.
func EditText(k Kind, v float64) string {
	unit, si := TradeUnit(k)
	x := v / si
	if math.IsNaN(x) || math.IsInf(x, 0) {
		x = math.NaN()
	}
	s := strconv.FormatFloat(x, 'g', 10, 64)
	if mant, exp, ok := strings.Cut(s, "e"); ok {
		if n, err := strconv.Atoi(exp); err == nil {
			s = mant + "e" + strconv.Itoa(n)
		}
	}
	if math.IsNaN(x) {
		s = "?"
	}
	if unit == "" {
		return s
	}
	return s + " " + unit
}
