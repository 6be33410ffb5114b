package extract

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// CardParams are the diode parameters written into a SPICE-style model
// card. A zero or NaN field is left out of the card, so the simulator's
// default applies (the SPICE defaults for these are IS = 1e-14 A, N = 1,
// RS = 0, CJO = 0, VJ = 1 V, M = 0.5, FC = 0.5, TT = 0, EG = 1.11 eV,
// XTI = 3, BV = infinite, IBV = 1e-3 A, TNOM = 27 C; ISR = 0 and NR = 2 in
// simulators that have the recombination term; from memory, Nagel, SPICE2,
// UC Berkeley ERL-M520 (1975), and the ngspice manual).
type CardParams struct {
	IS   float64 // saturation current, A (> 0)
	N    float64 // emission (ideality) coefficient (> 0)
	RS   float64 // series resistance, ohm (>= 0)
	ISR  float64 // recombination saturation current, A (> 0)
	NR   float64 // emission coefficient of ISR (> 0)
	CJO  float64 // zero-bias junction capacitance, F (> 0)
	VJ   float64 // junction potential, V (> 0)
	M    float64 // grading coefficient (> 0)
	FC   float64 // forward-bias depletion capacitance coefficient (> 0, < 1)
	TT   float64 // transit time, s (> 0)
	EG   float64 // activation energy of IS, eV (> 0)
	XTI  float64 // saturation-current temperature exponent (any finite)
	BV   float64 // reverse breakdown voltage, V (> 0, magnitude)
	IBV  float64 // current at the breakdown voltage, A (> 0, magnitude)
	TNOM float64 // temperature at which the parameters hold, degrees C
}

// ModelCard returns the one-line SPICE-style diode model card
//
//	.model NAME D(IS=... N=... RS=... ISR=... NR=... CJO=... VJ=... M=...
//	+ FC=... TT=... EG=... XTI=... BV=... IBV=... TNOM=...)
//
// with only the parameters actually given (non-zero, non-NaN) in that
// order, each printed with 4 significant digits in exponent form when
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
	type kv struct {
		k        string
		v        float64
		positive bool // must be > 0 (else >= 0)
		signed   bool // any finite value
	}
	list := []kv{{"IS", p.IS, true, false}, {"N", p.N, true, false}, {"RS", p.RS, false, false},
		{"ISR", p.ISR, true, false}, {"NR", p.NR, true, false},
		{"CJO", p.CJO, true, false}, {"VJ", p.VJ, true, false}, {"M", p.M, true, false},
		{"FC", p.FC, true, false}, {"TT", p.TT, true, false}, {"EG", p.EG, true, false}, {"XTI", p.XTI, false, true},
		{"BV", p.BV, true, false}, {"IBV", p.IBV, true, false},
		{"TNOM", p.TNOM, false, true}}
	var b strings.Builder
	b.WriteString(".model ")
	b.WriteString(name)
	b.WriteString(" D(")
	first := true
	for _, e := range list {
		if e.v == 0 || math.IsNaN(e.v) {
			continue
		}
		if math.IsInf(e.v, 0) || (!e.signed && e.v < 0) {
			return "", inputErr(e.k, e.v, "finite and positive", "a model-card parameter must be a finite physical value")
		}
		if e.k == "FC" && e.v >= 1 {
			return "", inputErr(e.k, e.v, "0 < FC < 1", "the depletion-capacitance formula is linearised from FC*VJ, below VJ")
		}
		if e.k == "TNOM" && e.v < -273.15 {
			return "", inputErr(e.k, e.v, ">= -273.15 C", "below absolute zero")
		}
		if !first {
			b.WriteByte(' ')
		}
		first = false
		b.WriteString(e.k)
		b.WriteByte('=')
		b.WriteString(strconv.FormatFloat(e.v, 'g', 4, 64))
	}
	b.WriteByte(')')
	return b.String(), nil
}
