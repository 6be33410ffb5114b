package measure

import (
	"fmt"
	"strings"
)

// headerCell is one parsed header cell.
type headerCell struct {
	raw  string // as read (quotes removed, trimmed)
	name string // normalised name: lower case, no spaces, '_', '-', '.'
	unit string // unit text as written, "" if none
	// known is lookupUnit(unit), found once (withUnit): a header cell's
	// unit is asked for by every column choice.
	known    unit
	hasKnown bool
}

// withUnit returns c with unit u and its lookup.
func (c headerCell) withUnit(u string) headerCell {
	c.unit = u
	c.known, c.hasKnown = lookupUnit(u)
	return c
}

func normName(s string) string {
	s = strings.ToLower(strings.TrimSpace(s))
	var b strings.Builder
	for _, r := range s {
		switch r {
		case ' ', '_', '-', '.', '\t', ':':
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// splitCell separates a header cell into name and unit. Accepted forms:
// "Voltage (V)", "I [uA]", "C {pF}", "I/A", "bias_V", "current mA",
// "Temp degC". When the part before the unit names a quantity the unit
// contradicts (e.g. "V_F", forward voltage, not farad), the cell is kept
// whole as a name.
func splitCell(raw string) headerCell {
	raw = strings.TrimSpace(raw)
	c := headerCell{raw: raw, name: normName(raw)}
	if raw == "" {
		return c
	}
	// Trailing bracketed unit.
	if last := raw[len(raw)-1]; last == ')' || last == ']' || last == '}' {
		open := byte('(')
		switch last {
		case ']':
			open = '['
		case '}':
			open = '{'
		}
		if k := strings.LastIndexByte(raw, open); k >= 0 {
			c.name = normName(raw[:k])
			return c.withUnit(strings.TrimSpace(raw[k+1 : len(raw)-1]))
		}
	}
	// "name/unit", "name_unit", "name unit", "name-unit".
	if k := strings.LastIndexAny(raw, "/_ -"); k > 0 && k < len(raw)-1 {
		name, u := raw[:k], strings.TrimSpace(raw[k+1:])
		if unit, ok := lookupUnit(u); ok {
			role, _ := nameRole(normName(name))
			if role == QuantityNone || role == unit.q {
				return headerCell{raw: raw, name: normName(name), unit: u, known: unit, hasKnown: true}
			}
		}
	}
	return c
}

// exactName classifies the normalised column names used by instruments and
// spreadsheets for each quantity (common practice; the list is this
// package's own).
func exactName(n string) Quantity {
	switch n {
	case "v", "u", "voltage", "volt", "volts", "bias", "vbias", "biasvoltage", "appliedvoltage",
		"vapplied", "vappl", "va", "vd", "vf", "vr", "vdiode", "diodevoltage", "forwardvoltage", "reversevoltage",
		"vsource", "vsrc", "vforce", "vmeas", "vmeasured", "vanode", "vak", "vsweep", "sweepvoltage", "vin", "vdut",
		"vset", "v1":
		return QuantityVoltage
	case "i", "current", "curr", "id", "if", "ir", "idiode", "diodecurrent", "ia", "isrc",
		"imeas", "imeasured", "ianode", "ik", "idut", "i1", "iout", "anodecurrent", "forwardcurrent", "reversecurrent":
		return QuantityCurrent
	case "c", "cap", "capacitance", "cp", "cs", "cj", "cmeas", "cdut":
		return QuantityCapacitance
	case "f", "freq", "frequency", "ftest", "fmeas":
		return QuantityFrequency
	case "temp", "temperature", "tsample", "tchuck", "tdut", "tstage":
		return QuantityTemperature
	}
	return QuantityNone
}

// nameRole classifies a normalised name; score 30 for an exact name, 20
// for a name containing a telling word.
func nameRole(n string) (Quantity, int) {
	if q := exactName(n); q != QuantityNone {
		return q, 30
	}
	switch {
	case strings.Contains(n, "volt") || strings.Contains(n, "bias"):
		return QuantityVoltage, 20
	case strings.Contains(n, "curr") || strings.Contains(n, "amp"):
		return QuantityCurrent, 20
	case strings.Contains(n, "capac"):
		return QuantityCapacitance, 20
	case strings.Contains(n, "freq"):
		return QuantityFrequency, 20
	case strings.Contains(n, "temp"):
		return QuantityTemperature, 20
	}
	return QuantityNone, 0
}

// isFlagName reports whether a column holds an instrument's compliance or
// status flag.
func isFlagName(n string) bool {
	for _, w := range []string{"compl", "status", "flag", "limit", "overload", "overflow"} {
		if strings.Contains(n, w) {
			return true
		}
	}
	return false
}

// candidate scoring with tie-breaks: measured values beat set points.
func score(c headerCell) (Quantity, int) {
	if isFlagName(c.name) {
		return QuantityNone, 0
	}
	q, s := nameRole(c.name)
	if q == QuantityNone {
		if c.hasKnown {
			q, s = c.known.q, 10
		} else if c.name == "t" && c.unit == "" {
			return QuantityNone, 0 // "t" alone is as often time as temperature
		}
	}
	if q == QuantityNone {
		return q, 0
	}
	if strings.Contains(c.name, "meas") {
		s += 2
	}
	for _, w := range []string{"set", "force", "src", "source", "prog", "compl"} {
		if strings.Contains(c.name, w) {
			s -= 2
			break
		}
	}
	return q, s
}

// pickColumn chooses the column for quantity q: by the option (name or
// index) or by the best score among the columns not yet taken. It returns
// -1 when none fits.
func pickColumn(cells []headerCell, q Quantity, opt Column, file string, line int, taken []bool) (int, error) {
	header := func() []string { return rawCells(cells) } // for errors only
	if opt.Index != 0 || opt.Name != "" {
		idx := -1
		if opt.Index != 0 {
			if opt.Index < 1 || opt.Index > len(cells) {
				return -1, &ColumnError{File: file, Line: line, Role: q.String(), Header: header(), Err: ErrOption,
					Detail: fmt.Sprintf("column index %d outside 1..%d", opt.Index, len(cells))}
			}
			idx = opt.Index - 1
		}
		if opt.Name != "" {
			byName := -1
			want := strings.TrimSpace(opt.Name)
			for k, c := range cells {
				if strings.EqualFold(c.raw, want) || (byName < 0 && c.name == normName(want) && c.name != "") {
					byName = k
					if strings.EqualFold(c.raw, want) {
						break
					}
				}
			}
			if byName < 0 {
				return -1, &ColumnError{File: file, Line: line, Role: q.String(), Header: header(), Err: ErrOption,
					Detail: fmt.Sprintf("no column named %q", opt.Name)}
			}
			if idx >= 0 && idx != byName {
				return -1, &ColumnError{File: file, Line: line, Role: q.String(), Header: header(), Err: ErrOption,
					Detail: fmt.Sprintf("column name %q is column %d, not the index %d also given", opt.Name, byName+1, opt.Index)}
			}
			idx = byName
		}
		return idx, nil
	}
	best, bestScore, tie := -1, 0, -1
	for k, c := range cells {
		if taken[k] {
			continue
		}
		cq, s := score(c)
		if cq != q || s == 0 {
			continue
		}
		switch {
		case s > bestScore:
			best, bestScore, tie = k, s, -1
		case s == bestScore:
			tie = k
		}
	}
	if tie >= 0 {
		return -1, &ColumnError{File: file, Line: line, Column: tie + 1, Role: q.String(), Header: header(), Err: ErrAmbiguousColumn,
			Detail: fmt.Sprintf("columns %d and %d both look like %s; choose one in the import options",
				best+1, tie+1, q)}
	}
	return best, nil
}

func rawCells(cells []headerCell) []string {
	out := make([]string, len(cells))
	for k, c := range cells {
		out[k] = c.raw
	}
	return out
}
