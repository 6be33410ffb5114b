package measure

import (
	"bufio"
	"context"
	"io"
	"io/fs"
	"os"
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
	// MaxRows lowers the data-row cap of this import below MaxRows (0 or
	// more than MaxRows: MaxRows), e.g. for a served user, whose imports
	// share the server's memory.
	MaxRows int
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
// read from r (every 64 KiB, or the whole file when r is a smaller regular
// file), and a cancelled import returns an error wrapping ctx.Err().
func ImportContext(ctx context.Context, r io.Reader, name string, opt Options) (*DataSet, error) {
	im := importer{file: name, opt: opt}
	if err := im.checkOptions(); err != nil {
		return nil, err
	}
	size, small := readBufferSize(r)
	if small {
		im.sizeHint = size
	}
	im.lr.br = bufio.NewReaderSize(&capReader{r: r, max: MaxBytes, ctx: ctx}, size)
	ds, err := im.run()
	if err != nil {
		return nil, err
	}
	return ds, nil
}

// readBufferSize is the read buffer for r: 64 KiB, or the size of a smaller
// regular file plus one byte (at least 512), so that a batch of small files
// does not allocate and clear 64 KiB for each; small reports the latter
// (the whole file fits the buffer, and its size bounds the rows).
// An *io.LimitedReader is looked through to the file it limits.
func readBufferSize(r io.Reader) (size int, small bool) {
	const big = 64 << 10
	if lr, ok := r.(*io.LimitedReader); ok {
		r = lr.R
	}
	st, ok := r.(interface{ Stat() (fs.FileInfo, error) })
	if !ok {
		return big, false
	}
	fi, err := st.Stat()
	if err != nil || !fi.Mode().IsRegular() || fi.Size() >= big {
		return big, false
	}
	return max(int(fi.Size())+1, 512), true
}
