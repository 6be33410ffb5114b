package extract

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"junco/physics"
)

// CardValue is one parameter of a model card: written when Set, whatever
// its value (0 included); left out when not Set, so the simulator's
// default applies. Given makes a set value.
type CardValue struct {
	Value float64
	Set   bool
}

// Given returns v as a card value that is written (CardValue.Set).
func Given(v float64) CardValue { return CardValue{Value: v, Set: true} }

// CelsiusOffsetK is the kelvin temperature of 0 degC (273.15 K, exact by
// the definition of the Celsius scale: BIPM, The International System of
// Units, 9th ed., 2019, sec. 2.3.1).
const CelsiusOffsetK = 273.15

// tnomStepsPerC is the inverse of the step TNOM is rounded to (1e-9
// degC): far below any measured temperature's precision, far above the
// rounding error of the kelvin-to-Celsius subtraction (about 6e-14 degC
// near 273 K). Dividing the rounded count by it gives the float64 nearest
// the decimal value (26.85, not 26.850000000000023).
const tnomStepsPerC = 1e9

// TNOMCelsius returns the card's TNOM (degC) for a temperature tK in
// kelvin: TNOM = tK - 273.15, rounded to 1e-9 degC so that a temperature
// stated as 0 degC or 273.15 K gives 0 exactly (the subtraction alone
// leaves a rounding residue such as 5.7e-14). Valid for any finite tK;
// NaN stays NaN.
func TNOMCelsius(tK float64) float64 {
	c := math.Round((tK-CelsiusOffsetK)*tnomStepsPerC) / tnomStepsPerC
	if c == 0 {
		return 0 // no -0
	}
	return c
}

// TNOMKelvin returns the temperature in kelvin of a card's TNOM in degC:
// T = TNOM + 273.15 (the inverse of TNOMCelsius up to its rounding).
func TNOMKelvin(tnomC float64) float64 { return tnomC + CelsiusOffsetK }

// CardParams are the diode parameters written into a SPICE-style model
// card. A field is written when it is Set (Given), whatever its value: a
// TNOM of 0 degC or an XTI of 0 is a value, not an absence. A field not
// Set is left out of the card, so the simulator's default applies (the
// SPICE defaults for these are IS = 1e-14 A, N = 1, RS = 0, CJO = 0, VJ =
// 1 V, M = 0.5, FC = 0.5, TT = 0, EG = 1.11 eV, XTI = 3, BV = infinite,
// IBV = 1e-3 A, TNOM = 27 C; ISR = 0 and NR = 2 in simulators that have
// the recombination term; from memory, Nagel, SPICE2, UC Berkeley
// ERL-M520 (1975), the Berkeley SPICE 3 diode model, and the ngspice
// manual).
type CardParams struct {
	IS   CardValue // saturation current, A (> 0)
	N    CardValue // emission (ideality) coefficient (> 0)
	RS   CardValue // series resistance, ohm (>= 0)
	ISR  CardValue // recombination saturation current, A (> 0)
	NR   CardValue // emission coefficient of ISR (> 0)
	CJO  CardValue // zero-bias junction capacitance, F (>= 0)
	VJ   CardValue // junction potential, V (> 0)
	M    CardValue // grading coefficient (>= 0)
	FC   CardValue // forward-bias depletion capacitance coefficient (>= 0, < 1)
	TT   CardValue // transit time, s (>= 0)
	EG   CardValue // activation energy of IS, eV (> 0)
	XTI  CardValue // saturation-current temperature exponent (any finite)
	BV   CardValue // reverse breakdown voltage, V (> 0, magnitude)
	IBV  CardValue // current at the breakdown voltage, A (> 0, magnitude)
	TNOM CardValue // temperature at which the parameters hold, degrees C (>= -273.15)
}

// ModelCard returns the one-line SPICE-style diode model card
//
//	.model NAME D(IS=... N=... RS=... ISR=... NR=... CJO=... VJ=... M=...
//	+ FC=... TT=... EG=... XTI=... BV=... IBV=... TNOM=...)
//
// with only the parameters Set, whatever their value, in that order, each printed with 4 significant digits in exponent form when
// needed. The name must start with a letter and hold only letters, digits,
// '_', '-', '.' or '+' (at most 64 characters), so the card parses as one
// token. Source: Nagel, SPICE2: A Computer Program to Simulate
// Semiconductor Circuits, UC Berkeley ERL-M520 (1975), diode model
// parameters (the card syntax is common practice across simulators).
func ModelCard(name string, p CardParams) (string, error) {
	if name == "" || len(name) > 64 {
		return "", inputErr("name", fmt.Sprintf("%q", name), "1..64 characters", "the model card needs a name")
	}
	for k, r := range name {
		ok := r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || (k > 0 && (r >= '0' && r <= '9' || strings.ContainsRune("_-.+", r)))
		if !ok {
			return "", inputErr("name", fmt.Sprintf("%q", name), "a letter first, then letters, digits, _ - . +", fmt.Sprintf("character %q at position %d would break the card", r, k+1))
		}
	}
	// limit: the allowed values of each parameter, by its meaning.
	const (
		positive    = iota // > 0
		nonNegative        // >= 0 (0 is meaningful: no resistance, no charge)
		signed             // any finite value
	)
	type kv struct {
		k     string
		v     CardValue
		limit int
	}
	list := []kv{{"IS", p.IS, positive}, {"N", p.N, positive}, {"RS", p.RS, nonNegative},
		{"ISR", p.ISR, positive}, {"NR", p.NR, positive},
		{"CJO", p.CJO, nonNegative}, {"VJ", p.VJ, positive}, {"M", p.M, nonNegative},
		{"FC", p.FC, nonNegative}, {"TT", p.TT, nonNegative}, {"EG", p.EG, positive}, {"XTI", p.XTI, signed},
		{"BV", p.BV, positive}, {"IBV", p.IBV, positive},
		{"TNOM", p.TNOM, signed}}
	var b strings.Builder
	b.WriteString(".model ")
	b.WriteString(name)
	b.WriteString(" D(")
	first := true
	for _, e := range list {
		if !e.v.Set {
			continue
		}
		v := e.v.Value
		switch {
		case !physics.Finite(v):
			return "", inputErr(e.k, v, "a finite number", "a model-card parameter that is given must be a finite physical value")
		case e.limit == positive && !(v > 0):
			return "", inputErr(e.k, v, "> 0", "a model-card parameter must be a physical value")
		case e.limit == nonNegative && v < 0:
			return "", inputErr(e.k, v, ">= 0", "a model-card parameter must be a physical value")
		}
		if e.k == "FC" && v >= 1 {
			return "", inputErr(e.k, v, "0 <= FC < 1", "the depletion-capacitance formula is linearised from FC*VJ, below VJ")
		}
		if e.k == "TNOM" && v < -CelsiusOffsetK {
			return "", inputErr(e.k, v, ">= -273.15 C", "below absolute zero")
		}
		if !first {
			b.WriteByte(' ')
		}
		first = false
		b.WriteString(e.k)
		b.WriteByte('=')
		prec := 4 // fitted values: four significant digits
		if e.k == "TNOM" {
			prec = -1 // a condition, already rounded (TNOMCelsius): 126.85, not 126.8
		}
		b.WriteString(strconv.FormatFloat(v, 'g', prec, 64))
	}
	b.WriteByte(')')
	return b.String(), nil
}
