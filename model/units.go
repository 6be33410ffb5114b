package model

import "junco/model/units"

// The unit system lives in package units; these names keep model's
// callers and the kinds of its results in one vocabulary.

// Kind names a physical quantity that junco parses and formats (units.Kind).
type Kind = units.Kind

// UnitError is returned by ParseValue for text that is not a number with a
// known unit (units.UnitError).
type UnitError = units.UnitError

// Quantity kinds (see package units for their SI and trade units).
const (
	Density                = units.Density
	Gradient               = units.Gradient
	Temperature            = units.Temperature
	Area                   = units.Area
	Length                 = units.Length
	Time                   = units.Time
	Voltage                = units.Voltage
	Velocity               = units.Velocity
	Resistance             = units.Resistance
	Current                = units.Current
	Power                  = units.Power
	Capacitance            = units.Capacitance
	CurrentDensity         = units.CurrentDensity
	Mobility               = units.Mobility
	Diffusivity            = units.Diffusivity
	Field                  = units.Field
	Energy                 = units.Energy
	CapacitancePerArea     = units.CapacitancePerArea
	Dimensionless          = units.Dimensionless
	GenerationRate         = units.GenerationRate
	PowerDensity           = units.PowerDensity
	Absorption             = units.Absorption
	Conductance            = units.Conductance
	TemperatureCoefficient = units.TemperatureCoefficient
	Dose                   = units.Dose
	Frequency              = units.Frequency
)

// ParseValue parses text such as "1e17cm-3" or "27C" as a quantity of kind
// k and returns its SI value (units.ParseValue).
func ParseValue(k Kind, text string) (float64, error) { return units.ParseValue(k, text) }

// ParseDifference parses a difference of two values of kind k, such as a
// sweep step: a unit's offset is not added (units.ParseDifference).
func ParseDifference(k Kind, text string) (float64, error) { return units.ParseDifference(k, text) }

// Format writes an SI value of kind k in its trade unit (units.Format).
func Format(k Kind, v float64, sig int, ascii bool) string { return units.Format(k, v, sig, ascii) }

// Engineering formats v with an SI prefix and unit (units.Engineering).
func Engineering(v float64, sig int, unit string, ascii bool) string {
	return units.Engineering(v, sig, unit, ascii)
}

// DefaultUnit returns the unit a bare number of kind k is taken in.
func DefaultUnit(k Kind) string { return units.DefaultUnit(k) }

// SIUnit returns the SI unit junco uses inside for kind k.
func SIUnit(k Kind) string { return units.SIUnit(k) }

// SIUnitSymbol is the symbol used after an SI prefix for kind k.
func SIUnitSymbol(k Kind) string { return units.SIUnitSymbol(k) }

// KindName returns the kind's plain name ("density", "area", ...).
func KindName(k Kind) string { return units.KindName(k) }
