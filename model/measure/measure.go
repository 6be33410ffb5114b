// Package measure imports bench measurements (I-V and C-V sweeps) from the
// CSV and TSV text that instruments and spreadsheets write, into data sets
// in SI units.
//
// Accepted input: an optional header row naming the columns, with units in
// the names ("V,I", "Voltage (V),Current (A)", "bias_V;current_mA",
// "V [V]<TAB>I [uA]", "C/pF"), comma, semicolon, tab or blank-separated
// fields (detected from the first row), '#' comment lines (a
// "# temperature: 300 K" comment is read), blank lines, CRLF line ends, a
// UTF-8 byte-order mark, quoted fields, a decimal comma when the separator
// is not a comma, and extra columns (time, temperature, compliance flags)
// besides the voltage and current or capacitance columns, which are found by
// name. Rows flagged in a compliance/status column and non-finite values are
// kept out of the data and listed as row problems. Any other defect is an
// error naming file, line and column; an error returns no data set.
//
// The importer streams: one pass, no per-row allocation beyond the growth
// of the output columns. It reads at most MaxBytes bytes and MaxRows data
// rows; a longer file is refused (ErrTooLarge, ErrTooManyRows) before it
// can take more memory or time, so an import holds at most a few tens of
// MB whatever the file.
package measure

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
)

// colPlan is how one quantity is read from a row.
type colPlan struct {
	idx           int // 0-based field, -1 = absent
	scale, offset float64
	name          string
	dst           *[]float64
}

type importer struct {
	file   string
	opt    Options
	lr     lineReader
	delim  byte
	dcomma bool // decimal comma allowed
	ds     DataSet
	plans  []colPlan
	flag   int // compliance column, -1 = none
	maxIdx int
	fields [][]byte
	header []headerCell
	row    []float64
	tempOK bool
	// sizeHint is the size in bytes of a small file read whole (0: not
	// known); it sizes the output columns (presize).
	sizeHint int
}

// presize gives the output columns room for the rows a small file can
// hold, estimated from the length of its first data line: the file's size
// over that length plus one (under 64 KiB over 2, so at most 256 KiB a
// column, and within the row cap), so that they are not grown by
// doubling.
func (im *importer) presize(first []byte) {
	if im.sizeHint <= 0 {
		return
	}
	rows := min(im.sizeHint/(len(first)+1)+1, im.rowLimit())
	for _, p := range im.plans {
		if cap(*p.dst) == 0 {
			*p.dst = make([]float64, 0, rows)
		}
	}
}

func (im *importer) optErr(field, value, detail string) error {
	return &ColumnError{File: im.file, Role: field, Err: ErrOption, Detail: fmt.Sprintf("%q: %s", value, detail)}
}

func (im *importer) checkOptions() error {
	o := im.opt
	switch o.Kind {
	case KindAuto, KindIV, KindCV:
	default:
		return im.optErr("kind", string(o.Kind), "allowed \"iv\", \"cv\" or empty (detect)")
	}
	switch o.Delimiter {
	case 0, ',', ';', '\t', ' ':
	default:
		return im.optErr("delimiter", string(o.Delimiter), "allowed ',', ';', tab or ' '")
	}
	for _, u := range []struct {
		q Quantity
		s string
	}{{QuantityVoltage, o.VoltageUnit}, {QuantityCurrent, o.CurrentUnit}, {QuantityCapacitance, o.CapacitanceUnit},
		{QuantityFrequency, o.FrequencyUnit}, {QuantityTemperature, o.TemperatureUnit}} {
		if u.s == "" {
			continue
		}
		if _, _, ok := ParseUnit(u.q, u.s); !ok {
			return im.optErr(u.q.String()+" unit", u.s, "allowed "+allowedUnits(u.q))
		}
	}
	for _, c := range []struct {
		role string
		c    Column
	}{{"voltage", o.Voltage}, {"current", o.Current}, {"capacitance", o.Capacitance},
		{"frequency", o.Frequency}, {"temperature", o.Temperature}, {"compliance", o.Compliance}} {
		if c.c.Index < 0 {
			return im.optErr(c.role+" column", strconv.Itoa(c.c.Index), "a column index counts from 1")
		}
	}
	return nil
}

func (im *importer) run() (*DataSet, error) {
	first := true
	var line []byte
	var err error
	// Preamble: comments and blank lines up to the first row.
	for {
		line, err = im.lr.next()
		if err == io.EOF {
			return nil, &ParseError{File: im.file, Line: im.lr.line, Err: ErrNoData, Expected: "a header row and data rows"}
		}
		if err != nil {
			return nil, im.readErr(err)
		}
		if first {
			first = false
			if len(line) >= 2 && (line[0] == 0xFF && line[1] == 0xFE || line[0] == 0xFE && line[1] == 0xFF) {
				return nil, &ParseError{File: im.file, Line: 1, Err: ErrEncoding, Expected: "UTF-8 text (this file is UTF-16; save it as UTF-8)"}
			}
			line = bytes.TrimPrefix(line, []byte("\xEF\xBB\xBF"))
		}
		if bytes.IndexByte(line, 0) >= 0 {
			return nil, &ParseError{File: im.file, Line: im.lr.line, Err: ErrEncoding, Expected: "text without NUL bytes"}
		}
		t := bytes.TrimSpace(line)
		if len(t) == 0 {
			continue
		}
		if t[0] == '#' {
			im.comment(t)
			continue
		}
		break
	}
	im.delim = im.opt.Delimiter
	if im.delim == 0 {
		im.delim = detectDelimiter(line)
	}
	im.dcomma = im.delim != ','
	im.ds.Delimiter = string(im.delim)
	cells := im.split(line)
	headerLine := im.lr.line
	headerless := true
	for _, c := range cells {
		if _, st := parseNum(c, im.dcomma); st == numBad {
			headerless = false
			break
		}
	}
	if headerless {
		im.header = make([]headerCell, len(cells))
		for k := range im.header {
			im.header[k] = headerCell{raw: fmt.Sprintf("column %d", k+1)}
		}
		headerLine = 0
	} else {
		im.header = make([]headerCell, len(cells))
		for k, c := range cells {
			im.header[k] = splitCell(strings.Trim(string(c), "\""))
		}
		if im.delim == ' ' {
			im.header = mergeUnitCells(im.header)
		}
	}
	// next returns the next data line (nil at the end), reading comments.
	next := func() ([]byte, error) {
		for {
			l, err := im.lr.next()
			if err == io.EOF {
				return nil, nil
			}
			if err != nil {
				return nil, im.readErr(err)
			}
			t := bytes.TrimSpace(l)
			if len(t) == 0 {
				continue
			}
			if t[0] == '#' {
				im.comment(t)
				continue
			}
			return l, nil
		}
	}
	var pending []byte
	if headerless {
		pending = append([]byte(nil), line...)
	} else {
		// A second header row holding only units ("V,mA") completes the
		// header cells that have none.
		l, err := next()
		if err != nil {
			return nil, err
		}
		if l != nil {
			isUnits, err := im.unitRow(l)
			if err != nil {
				return nil, err
			}
			if !isUnits {
				pending = append([]byte(nil), l...)
			}
		}
	}
	if err := im.plan(headerless, headerLine); err != nil {
		return nil, err
	}
	im.row = make([]float64, len(im.plans))
	sized := pending != nil
	if sized {
		im.presize(pending)
		if err := im.dataLine(pending); err != nil {
			return nil, err
		}
	}
	for {
		line, err = next()
		if err != nil {
			return nil, err
		}
		if line == nil {
			break
		}
		if !sized {
			im.presize(line)
			sized = true
		}
		if err := im.dataLine(line); err != nil {
			return nil, err
		}
	}
	if len(im.ds.VoltageV) == 0 {
		pe := &ParseError{File: im.file, Line: im.lr.line, Err: ErrNoData, Expected: "at least one data row with finite values"}
		if im.ds.ProblemRows > 0 {
			p := im.ds.Problems[0]
			pe.Expected = fmt.Sprintf("usable rows, but all %d were left out (first: line %d, column %d, %s)", im.ds.ProblemRows, p.Line, p.Column, p.Kind)
		}
		return nil, pe
	}
	now := time.Now
	if im.opt.Now != nil {
		now = im.opt.Now
	}
	ds := im.ds
	ds.SourceFile = im.file
	ds.ImportedAt = now()
	return &ds, nil
}

// rowLimit is the data-row cap of this import (Options.MaxRows, at most
// MaxRows).
func (im *importer) rowLimit() int {
	if n := im.opt.MaxRows; n > 0 && n < MaxRows {
		return n
	}
	return MaxRows
}

func (im *importer) readErr(err error) error {
	if err == ErrLineTooLong {
		return &ParseError{File: im.file, Line: im.lr.line, Err: ErrLineTooLong, Expected: fmt.Sprintf("lines of at most %d bytes", MaxLineBytes)}
	}
	if errors.Is(err, ErrTooLarge) {
		return &ParseError{File: im.file, Line: im.lr.line + 1, Err: ErrTooLarge,
			Expected: fmt.Sprintf("at most %d bytes (MaxBytes, 256 MiB) per file, to bound memory and time; split the file", MaxBytes)}
	}
	return fmt.Errorf("%s: line %d: read: %w", im.file, im.lr.line+1, err)
}

func (im *importer) problem(line, col int, name string, val []byte, k ProblemKind) {
	im.ds.ProblemRows++
	if len(im.ds.Problems) < MaxProblems {
		im.ds.Problems = append(im.ds.Problems, RowProblem{Line: line, Column: col, ColumnName: name, Value: shorten(val), Kind: k})
	}
}

// dataLine parses one data row.
func (im *importer) dataLine(line []byte) error {
	ln := im.lr.line
	if bytes.IndexByte(line, 0) >= 0 {
		return &ParseError{File: im.file, Line: ln, Err: ErrEncoding, Expected: "text without NUL bytes (is this a binary file?)"}
	}
	im.ds.DataRows++
	if lim := im.rowLimit(); im.ds.DataRows > lim {
		what := "MaxRows"
		if lim < MaxRows {
			what = "the cap of this import, lower than MaxRows"
		}
		return &ParseError{File: im.file, Line: ln, Err: ErrTooManyRows,
			Expected: fmt.Sprintf("at most %d data rows (%s) per file, to bound memory and time; split the file", lim, what)}
	}
	f := im.split(line)
	if len(f) <= im.maxIdx {
		// Name the first required column that is missing.
		for _, p := range im.plans {
			if p.idx >= len(f) {
				return &ParseError{File: im.file, Line: ln, Column: p.idx + 1, ColumnName: p.name, Err: ErrFieldCount,
					Value: shorten(line), Expected: fmt.Sprintf("at least %d fields separated by %q, found %d", im.maxIdx+1, string(im.delim), len(f))}
			}
		}
		if im.flag >= len(f) {
			return &ParseError{File: im.file, Line: ln, Column: im.flag + 1, ColumnName: im.header[im.flag].raw, Err: ErrFieldCount,
				Value: shorten(line), Expected: fmt.Sprintf("at least %d fields, found %d", im.flag+1, len(f))}
		}
	}
	bad := false
	for k, p := range im.plans {
		x, st := parseNum(f[p.idx], im.dcomma)
		switch st {
		case numOK:
			im.row[k] = p.scale*x + p.offset
			if math.IsInf(im.row[k], 0) {
				im.problem(ln, p.idx+1, p.name, f[p.idx], ProblemNonFinite)
				bad = true
			}
			continue
		case numBad:
			return &ParseError{File: im.file, Line: ln, Column: p.idx + 1, ColumnName: p.name, Err: ErrBadNumber,
				Value: shorten(bytes.TrimSpace(f[p.idx])), Expected: "a decimal number such as 0.65 or 1.2e-9 (or NaN/Inf, reported as row problems)"}
		case numEmpty:
			im.problem(ln, p.idx+1, p.name, nil, ProblemMissing)
		case numNonFinite:
			im.problem(ln, p.idx+1, p.name, f[p.idx], ProblemNonFinite)
		case numOverflow:
			im.problem(ln, p.idx+1, p.name, f[p.idx], ProblemOverflow)
		}
		bad = true
		break
	}
	if !bad && im.flag >= 0 && flagged(f[im.flag]) {
		im.problem(ln, im.flag+1, im.header[im.flag].raw, f[im.flag], ProblemCompliance)
		bad = true
	}
	if bad {
		return nil
	}
	for k, p := range im.plans {
		*p.dst = append(*p.dst, im.row[k])
	}
	return nil
}

// flagged reports whether a compliance/status field marks the row: empty,
// 0, false, no, n, ok, off, none, normal and "-" do not; anything else does.
func flagged(b []byte) bool {
	b = bytes.Trim(bytes.TrimSpace(b), "\"")
	if len(b) == 0 {
		return false
	}
	if x, err := strconv.ParseFloat(string(b), 64); err == nil {
		return x != 0
	}
	switch strings.ToLower(string(b)) {
	case "false", "no", "n", "ok", "off", "none", "normal", "-", "f":
		return false
	}
	return true
}

type numStatus int

const (
	numOK numStatus = iota
	numEmpty
	numBad
	numNonFinite
	numOverflow
)

// parseNum parses a decimal field. With dcomma a single ',' is a decimal
// separator. Instrument overflow markers (|x| >= 9.9e37, the SCPI
// convention for overflow and not-a-number; from memory) and NaN/Inf are
// classified, not returned as values.
func parseNum(b []byte, dcomma bool) (float64, numStatus) {
	b = bytes.TrimSpace(b)
	if len(b) >= 2 && b[0] == '"' && b[len(b)-1] == '"' {
		b = bytes.TrimSpace(b[1 : len(b)-1])
	}
	if len(b) == 0 {
		return 0, numEmpty
	}
	var buf [64]byte
	if dcomma && len(b) <= len(buf) {
		if k := bytes.IndexByte(b, ','); k >= 0 && bytes.IndexByte(b, '.') < 0 && bytes.IndexByte(b[k+1:], ',') < 0 {
			n := copy(buf[:], b)
			buf[k] = '.'
			b = buf[:n]
		}
	}
	if x, ok := parseDecimal(b); ok {
		if math.Abs(x) >= 9.9e37 {
			return x, numOverflow
		}
		return x, numOK
	}
	// Reject forms strconv accepts but instruments never write (hex
	// floats, digit separators) so they are not read as numbers silently.
	for _, c := range b {
		if c == '_' || c == 'x' || c == 'X' || c == 'p' || c == 'P' {
			return 0, numBad
		}
	}
	x, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			if math.IsInf(x, 0) {
				return x, numNonFinite
			}
			return x, numOK // underflow to zero or a subnormal
		}
		return 0, numBad
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return x, numNonFinite
	}
	if math.Abs(x) >= 9.9e37 {
		return x, numOverflow
	}
	return x, numOK
}
