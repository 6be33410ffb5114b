// Package units is junco's one unit system: the kinds of quantity it
// parses and prints, their SI units (used inside) and trade units (typed
// and shown), parsing with SI prefixes and Celsius offsets (ParseValue,
// ParseDifference, Symbol for a column header's unit) and formatting
// (Format). Every front end and importer converts units here.
package units

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
)

// Kind names a physical quantity that junco parses and formats.
type Kind int

// Quantity kinds. Each has an SI unit (used inside) and a trade default unit
// (taken by a bare number on input).
const (
	Density                Kind = iota // SI m^-3, default cm^-3
	Gradient                           // SI m^-4, default cm^-4
	Temperature                        // SI K, default K
	Area                               // SI m^2, default cm^2
	Length                             // SI m, default um
	Time                               // SI s, default s
	Voltage                            // SI V, default V
	Velocity                           // SI m/s, default cm/s
	Resistance                         // SI ohm, default ohm
	Current                            // SI A, default A
	Power                              // SI W, default W
	Capacitance                        // SI F, default F
	CurrentDensity                     // SI A/m^2, default A/cm^2
	Mobility                           // SI m^2/(V s), shown in cm^2/(V s)
	Diffusivity                        // SI m^2/s, shown in cm^2/s
	Field                              // SI V/m, shown in V/cm
	Energy                             // eV
	CapacitancePerArea                 // SI F/m^2, shown in nF/cm^2
	Dimensionless                      // plain number
	GenerationRate                     // SI m^-3 s^-1, default cm^-3 s^-1
	PowerDensity                       // SI W/m^2, default mW/cm^2 (irradiance)
	Absorption                         // SI 1/m, default 1/cm (absorption coefficient)
	Conductance                        // SI S, shown with an SI prefix (mS, µS)
	TemperatureCoefficient             // SI V/K, shown in mV/K
	Dose                               // SI m^-2, default cm^-2 (an areal density: implant dose)
	Frequency                          // SI Hz, shown with an SI prefix
)

type unitDef struct {
	// names are the accepted spellings; the first, in its proper case,
	// is the one error messages list.
	names  []string
	factor float64 // SI value of one unit
	offset float64 // added after scaling (degrees Celsius)
}

// kindInfo describes a kind: its name, SI unit, default unit and accepted
// units. Built on demand (no package state).
func kindInfo(k Kind) (name, si, def string, units []unitDef) {
	switch k {
	case Density:
		return "density", "m^-3", "cm^-3", []unitDef{
			{[]string{"cm-3", "cm^-3", "/cm3", "/cm^3", "cm⁻³", "percm3"}, 1e6, 0},
			{[]string{"m-3", "m^-3", "/m3", "/m^3", "m⁻³"}, 1, 0}}
	case Gradient:
		return "gradient", "m^-4", "cm^-4", []unitDef{
			{[]string{"cm-4", "cm^-4", "/cm4", "/cm^4"}, 1e8, 0},
			{[]string{"um-4", "um^-4"}, 1e24, 0},
			{[]string{"m-4", "m^-4", "/m4", "/m^4"}, 1, 0}}
	case Temperature:
		return "temperature", "K", "K", []unitDef{
			{[]string{"K"}, 1, 0},
			{[]string{"degC", "c", "°c", "celsius"}, 1, 273.15}}
	case Area:
		return "area", "m^2", "cm^2", []unitDef{
			{[]string{"cm2", "cm^2", "cm²"}, 1e-4, 0},
			{[]string{"mm2", "mm^2", "mm²"}, 1e-6, 0},
			{[]string{"um2", "um^2", "µm2", "µm^2", "μm2", "μm^2", "um²", "µm²"}, 1e-12, 0},
			{[]string{"nm2", "nm^2"}, 1e-18, 0},
			{[]string{"m2", "m^2", "m²"}, 1, 0}}
	case Length:
		return "length", "m", "um", []unitDef{
			{[]string{"um", "µm", "μm", "micron", "microns"}, 1e-6, 0},
			{[]string{"nm"}, 1e-9, 0},
			{[]string{"mm"}, 1e-3, 0},
			{[]string{"cm"}, 1e-2, 0},
			{[]string{"m"}, 1, 0}}
	case Time:
		return "time", "s", "s", []unitDef{
			{[]string{"s"}, 1, 0}, {[]string{"ms"}, 1e-3, 0},
			{[]string{"us", "µs", "μs"}, 1e-6, 0}, {[]string{"ns"}, 1e-9, 0},
			{[]string{"ps"}, 1e-12, 0}}
	case Voltage:
		return "voltage", "V", "V", []unitDef{
			{[]string{"V"}, 1, 0}, {[]string{"mV"}, 1e-3, 0}, {[]string{"kV"}, 1e3, 0}}
	case Velocity:
		return "velocity", "m/s", "cm/s", []unitDef{
			{[]string{"cm/s"}, 1e-2, 0}, {[]string{"m/s"}, 1, 0}}
	case Resistance:
		return "resistance", "ohm", "ohm", []unitDef{
			{[]string{"ohm", "ohms", "Ω", "r"}, 1, 0}, {[]string{"mohm", "mΩ"}, 1e-3, 0},
			{[]string{"kohm", "kΩ", "k"}, 1e3, 0}, {[]string{"megohm", "MΩ", "Mohm"}, 1e6, 0}}
	case Current:
		return "current", "A", "A", []unitDef{
			{[]string{"A"}, 1, 0}, {[]string{"mA"}, 1e-3, 0}, {[]string{"uA", "µa", "μa"}, 1e-6, 0},
			{[]string{"nA"}, 1e-9, 0}, {[]string{"pA"}, 1e-12, 0}}
	case Power:
		return "power", "W", "W", []unitDef{
			{[]string{"W"}, 1, 0}, {[]string{"mW"}, 1e-3, 0}, {[]string{"uW", "µw"}, 1e-6, 0}, {[]string{"kW"}, 1e3, 0}}
	case Capacitance:
		return "capacitance", "F", "F", []unitDef{
			{[]string{"F"}, 1, 0}, {[]string{"uF", "µf"}, 1e-6, 0}, {[]string{"nF"}, 1e-9, 0},
			{[]string{"pF"}, 1e-12, 0}, {[]string{"fF"}, 1e-15, 0}}
	case CurrentDensity:
		return "current density", "A/m^2", "A/cm^2", []unitDef{
			{[]string{"A/cm2", "a/cm^2"}, 1e4, 0}, {[]string{"A/m2", "a/m^2"}, 1, 0},
			{[]string{"mA/cm2", "ma/cm^2"}, 10, 0}}
	case Mobility:
		return "mobility", "m^2/(V s)", "cm^2/Vs", []unitDef{{[]string{"cm2/Vs", "cm^2/vs", "cm^2/(v s)"}, 1e-4, 0}, {[]string{"m2/Vs", "m^2/vs"}, 1, 0}}
	case Diffusivity:
		return "diffusivity", "m^2/s", "cm^2/s", []unitDef{{[]string{"cm2/s", "cm^2/s"}, 1e-4, 0}, {[]string{"m2/s", "m^2/s"}, 1, 0}}
	case Field:
		return "field", "V/m", "V/cm", []unitDef{{[]string{"V/cm"}, 100, 0}, {[]string{"kV/cm"}, 1e5, 0}, {[]string{"MV/cm"}, 1e8, 0}, {[]string{"V/m"}, 1, 0}}
	case Energy:
		return "energy", "eV", "eV", []unitDef{{[]string{"eV"}, 1, 0}, {[]string{"meV"}, 1e-3, 0}}
	case CapacitancePerArea:
		return "capacitance per area", "F/m^2", "nF/cm^2", []unitDef{{[]string{"nF/cm2", "nf/cm^2"}, 1e-5, 0}, {[]string{"F/m2", "f/m^2"}, 1, 0}}
	case Dimensionless:
		return "number", "", "", []unitDef{{[]string{""}, 1, 0}}
	case GenerationRate:
		return "generation rate", "m^-3 s^-1", "cm^-3s^-1", []unitDef{
			{[]string{"cm-3s-1", "cm^-3s^-1", "cm-3/s", "/cm3/s", "/cm^3/s", "cm^-3/s"}, 1e6, 0},
			{[]string{"m-3s-1", "m^-3s^-1", "m-3/s", "/m3/s", "/m^3/s", "m^-3/s"}, 1, 0}}
	case PowerDensity:
		return "power density", "W/m^2", "mW/cm^2", []unitDef{
			{[]string{"mW/cm2", "mw/cm^2"}, 10, 0}, {[]string{"W/cm2", "w/cm^2"}, 1e4, 0},
			{[]string{"W/m2", "w/m^2"}, 1, 0}, {[]string{"kW/m2", "kw/m^2"}, 1e3, 0}}
	case Absorption:
		return "absorption coefficient", "1/m", "1/cm", []unitDef{
			{[]string{"1/cm", "cm-1", "cm^-1", "/cm"}, 100, 0}, {[]string{"1/um", "um-1", "um^-1", "/um"}, 1e6, 0},
			{[]string{"1/m", "m-1", "m^-1", "/m"}, 1, 0}}
	case Conductance:
		return "conductance", "S", "S", []unitDef{{[]string{"S"}, 1, 0}, {[]string{"mS"}, 1e-3, 0},
			{[]string{"uS", "µS", "μS"}, 1e-6, 0}, {[]string{"nS"}, 1e-9, 0}}
	case TemperatureCoefficient:
		return "temperature coefficient", "V/K", "mV/K", []unitDef{{[]string{"mV/K"}, 1e-3, 0},
			{[]string{"V/K"}, 1, 0}, {[]string{"uV/K", "µV/K"}, 1e-6, 0}}
	}
	if k == Dose {
		return "dose", "m^-2", "cm^-2", []unitDef{
			{[]string{"cm-2", "cm^-2", "/cm2", "/cm^2", "cm⁻²"}, 1e4, 0},
			{[]string{"m-2", "m^-2", "/m2", "/m^2", "m⁻²"}, 1, 0}}
	}
	if k == Frequency {
		return "frequency", "Hz", "Hz", []unitDef{
			{[]string{"hz", "hertz"}, 1, 0}, {[]string{"khz"}, 1e3, 0}, {[]string{"Mhz", "MHz"}, 1e6, 0}, {[]string{"ghz"}, 1e9, 0}}
	}
	return "quantity", "", "", nil
}

// DefaultUnit returns the unit a bare number of kind k is taken in.
func DefaultUnit(k Kind) string { _, _, d, _ := kindInfo(k); return d }

// SIUnit returns the SI unit junco uses inside for kind k.
func SIUnit(k Kind) string { _, si, _, _ := kindInfo(k); return si }

// Names lists the unit names of kind k, one per unit (for messages; SI
// prefixes are accepted besides, where ParseValue says so).
func Names(k Kind) []string {
	_, _, _, defs := kindInfo(k)
	out := make([]string, 0, len(defs))
	for _, d := range defs {
		out = append(out, d.names[0])
	}
	return out
}

// KindName returns the kind's plain name ("density", "area", ...).
func KindName(k Kind) string { n, _, _, _ := kindInfo(k); return n }

// UnitError is returned by ParseValue for text that is not a number with a
// known unit.
type UnitError struct {
	Text string
	Kind Kind
	Why  string
}

func (e *UnitError) Error() string {
	name, _, def, units := kindInfo(e.Kind)
	var acc []string
	for _, u := range units {
		acc = append(acc, u.names[0])
	}
	return fmt.Sprintf("%q is not a valid %s: %s (units: %s; a bare number is in %s)",
		e.Text, name, e.Why, strings.Join(acc, ", "), def)
}

// ParseValue parses text such as "1e17cm-3", "1e23 m^-3", "27C", "100um2"
// or "-5V" as a quantity of kind k and returns its SI value. A bare number
// takes the kind's default unit. NaN and infinities are rejected.
// Range checks are the caller's (see Spec.Validate).
func ParseValue(k Kind, text string) (float64, error) { return parseValue(k, text, false) }

// ParseDifference parses a difference of two values of kind k, such as a
// sweep step: like ParseValue, but a unit's offset is not added, so
// "10C" is a difference of 10 K (not the temperature 283.15 K).
func ParseDifference(k Kind, text string) (float64, error) { return parseValue(k, text, true) }

func parseValue(k Kind, text string, difference bool) (float64, error) {
	s := strings.TrimSpace(text)
	if s == "" {
		return 0, &UnitError{Text: text, Kind: k, Why: "empty"}
	}
	// Split the longest numeric prefix.
	end := NumberPrefix(s)
	if end == 0 {
		return 0, &UnitError{Text: text, Kind: k, Why: "no number"}
	}
	num, err := strconv.ParseFloat(s[:end], 64)
	if err != nil {
		return 0, &UnitError{Text: text, Kind: k, Why: "no number"}
	}
	if math.IsNaN(num) || math.IsInf(num, 0) {
		return 0, &UnitError{Text: text, Kind: k, Why: "not a finite number"}
	}
	unit := strings.TrimSpace(s[end:])
	if unit == "" {
		unit = DefaultUnit(k)
	}
	factor, offset, ok := Symbol(k, unit)
	if !ok {
		return 0, &UnitError{Text: text, Kind: k, Why: fmt.Sprintf("unknown unit %q", unit)}
	}
	v := num * factor
	if !difference {
		v += offset
	}
	if math.IsInf(v, 0) {
		return 0, &UnitError{Text: text, Kind: k, Why: "too large"}
	}
	return v, nil
}

// Symbol resolves a unit written after a number or in a column header for
// kind k: value_SI = factor * value + offset. It accepts the kind's unit
// names (case-insensitive, except that m and M, milli and mega, differ),
// any SI prefix before the base symbol of the kinds printed with prefixes,
// micro as u, µ or μ, and spelled-out names (volts, amperes, farads,
// hertz, kelvin, degrees Celsius as °C, degC, deg C or celsius).
func Symbol(k Kind, unit string) (factor, offset float64, ok bool) {
	u := strings.TrimSpace(unit)
	if w := unitWord(strings.ToLower(u)); w != "" {
		u = w
	}
	_, _, _, defs := kindInfo(k)
	for _, d := range defs {
		for _, n := range d.names {
			if unitEqual(n, u) {
				return d.factor, d.offset, true
			}
		}
	}
	if f, ok := prefixed(k, 1, u); ok {
		return f, 0, true
	}
	return 0, 0, false
}

// unitWord maps spelled-out unit names (lower case) to symbols.
func unitWord(s string) string {
	switch strings.Join(strings.Fields(s), " ") {
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
	case "celsius", "degc", "deg c", "°c", "℃", "oc", "degrees c", "degree c":
		return "degC"
	}
	return ""
}

// prefixed accepts any SI prefix (f p n u µ m k M G) before the base symbol
// of the kinds that Format writes with prefixes, so that everything junco
// prints can be typed back. The prefix case is significant (m vs M).
func prefixed(k Kind, num float64, unit string) (float64, bool) {
	var base string
	switch k {
	case Length, Time, Voltage, Current, Capacitance, Power, Conductance, Frequency:
		base = SIUnitSymbol(k)
	case Resistance:
		base = "ohm"
	default:
		return 0, false
	}
	if !strings.HasSuffix(strings.ToLower(unit), strings.ToLower(base)) || len(unit) == len(base) {
		return 0, false
	}
	p := unit[:len(unit)-len(base)]
	factors := map[string]float64{"a": 1e-18, "f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6,
		"m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9}
	f, ok := factors[p]
	if !ok {
		return 0, false
	}
	v := num * f
	if math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}

// unitEqual compares unit spellings case-insensitively, except that a
// leading m and M (milli and mega) must match exactly.
func unitEqual(a, b string) bool {
	b = strings.ReplaceAll(b, " ", "")
	if a == b {
		return true
	}
	if a != "" && b != "" && (a[0] == 'm' || a[0] == 'M') && (b[0] == 'm' || b[0] == 'M') && a[0] != b[0] {
		return false
	}
	return strings.EqualFold(a, b)
}

// NumberPrefix returns the length of the leading floating-point literal of
// s (0 when s does not start with a number).
func NumberPrefix(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && unicode.IsDigit(rune(s[i])) {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && unicode.IsDigit(rune(s[i])) {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && unicode.IsDigit(rune(s[k])) {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}
