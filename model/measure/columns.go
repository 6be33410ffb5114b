package measure

import (
	"bytes"
	"fmt"
	"strings"
)

// The column plan of an import: the delimiter, the unit row, the header
// cells and which column holds which quantity.

// unitRow reports whether line is a row of units under the header (every
// cell empty or a known unit, at least one unit, no more cells than the
// header) and, if so, gives those units to the header cells without one;
// a unit contradicting one already in the header cell is an error.
func (im *importer) unitRow(line []byte) (bool, error) {
	cells := im.split(line)
	if len(cells) > len(im.header) {
		return false, nil
	}
	units := make([]string, len(cells))
	n := 0
	for k, c := range cells {
		if _, st := parseNum(c, im.dcomma); st == numOK {
			return false, nil // a number: a data row (no unit is a number)
		}
		u := strings.TrimSpace(strings.Trim(strings.TrimSpace(string(c)), "\""))
		u = strings.TrimSuffix(strings.TrimPrefix(strings.TrimPrefix(u, "("), "["), ")")
		u = strings.TrimSuffix(u, "]")
		if u == "" {
			continue
		}
		if _, ok := lookupUnit(u); !ok {
			return false, nil
		}
		units[k] = u
		n++
	}
	if n == 0 {
		return false, nil
	}
	for k, u := range units {
		switch h := im.header[k]; {
		case u == "":
		case h.unit == "":
			im.header[k] = im.header[k].withUnit(u)
			im.header[k].raw += " (" + u + ")"
		case h.unit != u:
			a, _ := lookupUnit(h.unit)
			b, _ := lookupUnit(u)
			if a != b {
				return false, &ColumnError{File: im.file, Line: im.lr.line, Column: k + 1, Role: "unit row", Header: rawCells(im.header), Err: ErrUnitMismatch,
					Detail: "the header cell and the unit row below it name different units"}
			}
		}
	}
	return true, nil
}

// detectDelimiter picks tab, then semicolon, then comma (outside quotes),
// else runs of blanks.
func detectDelimiter(line []byte) byte {
	var tab, semi, comma int
	inq := false
	for _, c := range line {
		switch c {
		case '"':
			inq = !inq
		case '\t':
			if !inq {
				tab++
			}
		case ';':
			if !inq {
				semi++
			}
		case ',':
			if !inq {
				comma++
			}
		}
	}
	switch {
	case tab > 0:
		return '\t'
	case semi > 0:
		return ';'
	case comma > 0:
		return ','
	}
	return ' '
}

// split cuts a line into fields (reusing im.fields). Quoted fields may
// hold the delimiter; quotes are kept and stripped by parseNum/splitCell.
func (im *importer) split(line []byte) [][]byte {
	f := im.fields[:0]
	if im.delim == ' ' {
		for {
			line = bytes.TrimLeft(line, " \t")
			if len(line) == 0 {
				break
			}
			k := bytes.IndexAny(line, " \t")
			if k < 0 {
				f = append(f, line)
				break
			}
			f = append(f, line[:k])
			line = line[k:]
		}
		im.fields = f
		return f
	}
	if bytes.IndexByte(line, '"') < 0 {
		for {
			k := bytes.IndexByte(line, im.delim)
			if k < 0 {
				f = append(f, line)
				break
			}
			f = append(f, line[:k])
			line = line[k+1:]
		}
		im.fields = f
		return f
	}
	start, inq := 0, false
	for k := 0; k < len(line); k++ {
		switch c := line[k]; {
		case c == '"':
			inq = !inq
		case c == im.delim && !inq:
			f = append(f, line[start:k])
			start = k + 1
		}
	}
	f = append(f, line[start:])
	im.fields = f
	return f
}

// mergeUnitCells joins blank-separated header tokens that are only a unit,
// "(V)" or "[uA]", to the token before.
func mergeUnitCells(h []headerCell) []headerCell {
	var out []headerCell
	for _, c := range h {
		r := c.raw
		if len(out) > 0 && len(r) >= 2 && (r[0] == '(' || r[0] == '[' || r[0] == '{') {
			prev := out[len(out)-1].raw
			out[len(out)-1] = splitCell(prev + " " + r)
			continue
		}
		out = append(out, c)
	}
	return out
}

// plan resolves the columns and units.
func (im *importer) plan(headerless bool, line int) error {
	o := im.opt
	h := im.header
	raw := rawCells(h)
	cu := &im.ds.Columns
	if !headerless {
		cu.Header = raw
	}
	taken := make([]bool, len(h))
	for _, c := range []Column{o.Voltage, o.Current, o.Capacitance, o.Frequency, o.Temperature, o.Compliance} {
		if c.Index > 0 && c.Index <= len(h) {
			taken[c.Index-1] = true
		}
		if c.Name != "" && !headerless {
			if k, err := pickColumn(h, QuantityNone, c, im.file, line, taken); err == nil && k >= 0 {
				taken[k] = true
			}
		}
	}
	pick := func(q Quantity, c Column, def int) (int, error) {
		if headerless {
			if c.Name != "" {
				return -1, &ColumnError{File: im.file, Role: q.String(), Err: ErrOption, Detail: fmt.Sprintf("column name %q given, but the file has no header row; use an index", c.Name)}
			}
			if c.Index != 0 {
				if c.Index > len(h) {
					return -1, &ColumnError{File: im.file, Role: q.String(), Err: ErrOption, Detail: fmt.Sprintf("column index %d outside 1..%d", c.Index, len(h))}
				}
				return c.Index - 1, nil
			}
			return def, nil
		}
		k, err := pickColumn(h, q, c, im.file, line, taken)
		if k >= 0 {
			taken[k] = true
		}
		return k, err
	}
	vi, err := pick(QuantityVoltage, o.Voltage, 0)
	if err != nil {
		return err
	}
	if vi < 0 {
		return &ColumnError{File: im.file, Line: line, Role: "voltage", Header: raw, Err: ErrMissingColumn,
			Detail: "no column is named like a voltage (V, voltage, bias, ...) or has a voltage unit; choose one in the import options"}
	}
	second := 1
	if len(h) < 2 {
		second = -1
	}
	kind := o.Kind
	if headerless && kind == KindAuto {
		kind = KindIV
		if o.Capacitance != (Column{}) {
			kind = KindCV
		}
	}
	ii, ci := -1, -1
	if kind != KindCV {
		def := -1
		if kind == KindIV || headerless {
			def = second
		}
		if ii, err = pick(QuantityCurrent, o.Current, def); err != nil {
			return err
		}
	}
	if kind != KindIV {
		def := -1
		if kind == KindCV {
			def = second
		}
		if ci, err = pick(QuantityCapacitance, o.Capacitance, def); err != nil {
			return err
		}
	}
	switch {
	case ii >= 0 && ci >= 0:
		return &ColumnError{File: im.file, Line: line, Role: "current", Header: raw, Err: ErrAmbiguousColumn,
			Detail: fmt.Sprintf("both a current (column %d) and a capacitance (column %d) were found; set the kind (iv or cv)", ii+1, ci+1)}
	case ii >= 0:
		kind = KindIV
	case ci >= 0:
		kind = KindCV
	default:
		role := "current"
		if kind == KindCV {
			role = "capacitance"
		}
		return &ColumnError{File: im.file, Line: line, Role: role, Header: raw, Err: ErrMissingColumn,
			Detail: "no column is named like a current (I, current, ...) or a capacitance (C, capacitance, ...), nor has such a unit"}
	}
	if ii == vi || ci == vi {
		return &ColumnError{File: im.file, Line: line, Column: vi + 1, Role: "voltage", Header: raw, Err: ErrOption,
			Detail: "the same column cannot be both the voltage and the " + map[Kind]string{KindIV: "current", KindCV: "capacitance"}[kind]}
	}
	im.ds.Kind = kind
	fi, ti := -1, -1
	if !headerless || o.Frequency != (Column{}) {
		if fi, err = pick(QuantityFrequency, o.Frequency, -1); err != nil {
			return err
		}
	}
	if !headerless || o.Temperature != (Column{}) {
		if ti, err = pick(QuantityTemperature, o.Temperature, -1); err != nil {
			return err
		}
	}
	im.flag = -1
	if o.Compliance != (Column{}) {
		if im.flag, err = pick(QuantityNone, o.Compliance, -1); err != nil {
			return err
		}
	} else if !headerless {
		for k, c := range h {
			if isFlagName(c.name) {
				im.flag = k
				break
			}
		}
	}
	add := func(q Quantity, idx int, optUnit string, dst *[]float64, found *string, col *int) error {
		if idx < 0 {
			return nil
		}
		c := h[idx]
		*col = idx + 1
		u := c.unit
		if u != "" {
			un, ok := c.known, c.hasKnown
			if !ok || un.q != q {
				what := ErrUnknownUnit
				detail := fmt.Sprintf("the unit of column %d is not a %s unit; allowed %s", idx+1, q, allowedUnits(q))
				if ok {
					what = ErrUnitMismatch
					detail = fmt.Sprintf("the unit of column %d is a %s unit, but the column is used as %s", idx+1, un.q, q)
				}
				return &ColumnError{File: im.file, Line: line, Column: idx + 1, Role: q.String(), Header: raw, Err: what, Detail: detail}
			}
			if optUnit != "" {
				if s1, o1, _ := ParseUnit(q, optUnit); s1 != un.scale || o1 != un.offset {
					return &ColumnError{File: im.file, Line: line, Column: idx + 1, Role: q.String(), Header: raw, Err: ErrUnitMismatch,
						Detail: fmt.Sprintf("the header's unit differs from the options' %q", optUnit)}
				}
			}
			*found = u
			im.plans = append(im.plans, colPlan{idx, un.scale, un.offset, c.raw, dst})
		} else {
			if optUnit == "" {
				optUnit = map[Quantity]string{QuantityVoltage: "V", QuantityCurrent: "A", QuantityCapacitance: "F", QuantityFrequency: "Hz", QuantityTemperature: "K"}[q]
				im.ds.Units.Assumed = append(im.ds.Units.Assumed, q.String())
			}
			s, off, _ := ParseUnit(q, optUnit)
			*found = optUnit
			im.plans = append(im.plans, colPlan{idx, s, off, c.raw, dst})
		}
		im.maxIdx = max(im.maxIdx, idx)
		return nil
	}
	us := &im.ds.Units
	ds := &im.ds
	if err := add(QuantityVoltage, vi, o.VoltageUnit, &ds.VoltageV, &us.Voltage, &cu.Voltage); err != nil {
		return err
	}
	if err := add(QuantityCurrent, ii, o.CurrentUnit, &ds.CurrentA, &us.Current, &cu.Current); err != nil {
		return err
	}
	if err := add(QuantityCapacitance, ci, o.CapacitanceUnit, &ds.CapacitanceF, &us.Capacitance, &cu.Capacitance); err != nil {
		return err
	}
	if err := add(QuantityFrequency, fi, o.FrequencyUnit, &ds.FrequencyHz, &us.Frequency, &cu.Frequency); err != nil {
		return err
	}
	if err := add(QuantityTemperature, ti, o.TemperatureUnit, &ds.TemperatureK, &us.Temperature, &cu.Temperature); err != nil {
		return err
	}
	if im.flag >= 0 {
		cu.Compliance = im.flag + 1
		im.maxIdx = max(im.maxIdx, im.flag)
	}
	return nil
}
