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
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"time"
)

// Kind is the kind of sweep in a data set.
type Kind string

// Kinds of data set.
const (
	KindAuto Kind = ""   // detect from the columns (Options only)
	KindIV   Kind = "iv" // current against voltage
	KindCV   Kind = "cv" // capacitance against voltage
)

// Units records the units found for each column used, as written in the
// header or options ("mA", "uA", "C"); values in the data set are SI.
type Units struct {
	Voltage     string `json:"voltage,omitempty"`     // e.g. "V", "mV"
	Current     string `json:"current,omitempty"`     // e.g. "A", "uA", "µA"
	Capacitance string `json:"capacitance,omitempty"` // e.g. "pF"
	Frequency   string `json:"frequency,omitempty"`   // e.g. "kHz"
	Temperature string `json:"temperature,omitempty"` // "K" or "C"
	// Assumed lists the quantities whose unit appeared neither in the
	// header nor in the options and was taken as the SI base unit.
	Assumed []string `json:"assumed,omitempty"`
}

// ColumnsUsed records which source columns (1-based, 0 = none) fed the data
// set and their header text.
type ColumnsUsed struct {
	Voltage     int      `json:"voltage"`               // voltage column
	Current     int      `json:"current,omitempty"`     // current column (I-V)
	Capacitance int      `json:"capacitance,omitempty"` // capacitance column (C-V)
	Frequency   int      `json:"frequency,omitempty"`   // test-frequency column
	Temperature int      `json:"temperature,omitempty"` // temperature column
	Compliance  int      `json:"compliance,omitempty"`  // compliance/status flag column
	Header      []string `json:"header,omitempty"`      // header cells as read (nil when headerless)
}

// ProblemKind classifies a row problem.
type ProblemKind string

// Row problem kinds.
const (
	ProblemCompliance ProblemKind = "compliance" // instrument flagged the row
	ProblemNonFinite  ProblemKind = "non_finite" // NaN, Inf or out of float64 range
	ProblemOverflow   ProblemKind = "overflow"   // instrument overflow marker (|x| >= 9.9e37)
	ProblemMissing    ProblemKind = "missing"    // empty required field
)

// RowProblem is a data row left out of the data set, with the reason.
type RowProblem struct {
	Line       int         `json:"line"`                  // 1-based physical line
	Column     int         `json:"column"`                // 1-based field number
	ColumnName string      `json:"column_name,omitempty"` // header cell of that column
	Value      string      `json:"value,omitempty"`       // the field's text (shortened)
	Kind       ProblemKind `json:"kind"`                  // why the row was left out
}

// MaxProblems bounds the row problems kept in a DataSet; ProblemRows still
// counts all of them.
const MaxProblems = 10000

// MaxLineBytes is the longest line accepted.
const MaxLineBytes = 1 << 20

// DataSet is an imported sweep. Columns are in SI units (V, A, F, Hz, K)
// and of equal length (those not present are nil).
type DataSet struct {
	Kind       Kind        `json:"kind"`        // KindIV or KindCV
	SourceFile string      `json:"source_file"` // file name as given to Import
	ImportedAt time.Time   `json:"imported_at"` // when the import ran
	Units      Units       `json:"units_found"` // units as found in the header or options
	Columns    ColumnsUsed `json:"columns"`     // source columns used
	// Delimiter is the field separator used: ",", ";", "\t" or " " (runs
	// of blanks).
	Delimiter    string    `json:"delimiter"`
	VoltageV     []float64 `json:"voltage_V"`               // bias, V (forward positive as measured)
	CurrentA     []float64 `json:"current_A,omitempty"`     // current, A (I-V)
	CapacitanceF []float64 `json:"capacitance_F,omitempty"` // capacitance, F (C-V)
	FrequencyHz  []float64 `json:"frequency_Hz,omitempty"`  // test frequency per row, Hz
	TemperatureK []float64 `json:"temperature_K,omitempty"` // temperature per row, K
	// StatedTemperatureK is the temperature given in a comment line
	// ("# temperature: 300 K"), 0 if none.
	StatedTemperatureK float64 `json:"stated_temperature_K,omitempty"`
	// TemperatureTyped says StatedTemperatureK was typed by the user at
	// import because the file states none (not read from a comment).
	TemperatureTyped bool `json:"temperature_typed,omitempty"`
	// DataRows counts all data rows read, kept or not.
	DataRows int `json:"data_rows"`
	// Problems lists rows left out (at most MaxProblems); ProblemRows
	// counts them all.
	Problems    []RowProblem `json:"row_problems,omitempty"` // first MaxProblems problems
	ProblemRows int          `json:"problem_rows"`           // all rows left out
}

// Len returns the number of data points.
func (d *DataSet) Len() int { return len(d.VoltageV) }

// Temperature returns the device temperature in K: the mean of the
// temperature column when there is one, else the temperature stated in a
// comment; ok is false when the file gives none.
func (d *DataSet) Temperature() (t float64, ok bool) {
	if len(d.TemperatureK) > 0 {
		s := 0.0
		for _, v := range d.TemperatureK {
			s += v
		}
		return s / float64(len(d.TemperatureK)), true
	}
	if d.StatedTemperatureK > 0 {
		return d.StatedTemperatureK, true
	}
	return 0, false
}

// Column selects a source column by header name (case-insensitive, either
// the whole header cell or its name without the unit) or by 1-based index.
// The zero value means "detect".
type Column struct {
	Name  string // header name, case-insensitive
	Index int    // 1-based column number
}

// Options controls an import. The zero value detects everything.
type Options struct {
	// Kind forces I-V or C-V; KindAuto decides from the columns found.
	Kind Kind
	// Columns to use instead of detection.
	Voltage, Current, Capacitance, Frequency, Temperature, Compliance Column
	// Units for columns whose header gives none (e.g. "mA"); an error if
	// the header states a different one.
	VoltageUnit, CurrentUnit, CapacitanceUnit, FrequencyUnit, TemperatureUnit string
	// Delimiter forces the separator (',', ';', '\t' or ' '); 0 detects.
	Delimiter byte
	// Now supplies the import time (default time.Now).
	Now func() time.Time
}

// ImportFile opens path and imports it; see Import.
func ImportFile(path string, opt Options) (*DataSet, error) {
	return ImportFileContext(context.Background(), path, opt)
}

// ImportFileContext is ImportFile with cancellation (see ImportContext).
func ImportFileContext(ctx context.Context, path string, opt Options) (*DataSet, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ImportContext(ctx, f, path, opt)
}

// Import reads a delimited text sweep from r; name is used in errors and
// recorded as the source file. On error it returns no data set.
func Import(r io.Reader, name string, opt Options) (*DataSet, error) {
	return ImportContext(context.Background(), r, name, opt)
}

// ImportContext is Import with cancellation: ctx is checked before every
// read from r (every 64 KiB), and a cancelled import returns an error
// wrapping ctx.Err().
func ImportContext(ctx context.Context, r io.Reader, name string, opt Options) (*DataSet, error) {
	im := importer{file: name, opt: opt}
	if err := im.checkOptions(); err != nil {
		return nil, err
	}
	im.lr.br = bufio.NewReaderSize(&capReader{r: r, max: MaxBytes, ctx: ctx}, 64<<10)
	ds, err := im.run()
	if err != nil {
		return nil, err
	}
	return ds, nil
}

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
	if pending != nil {
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
			im.header[k].unit = u
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
			un, ok := lookupUnit(u)
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
	if im.ds.DataRows > MaxRows {
		return &ParseError{File: im.file, Line: ln, Err: ErrTooManyRows,
			Expected: fmt.Sprintf("at most %d data rows (MaxRows) per file, to bound memory and time; split the file", MaxRows)}
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
