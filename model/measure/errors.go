package measure

import (
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors wrapped by *ParseError and *ColumnError; test with
// errors.Is.
var (
	// ErrNoData means the file holds no data rows, or none usable.
	ErrNoData = errors.New("no usable data rows")
	// ErrBadNumber means a required field is not a number.
	ErrBadNumber = errors.New("not a number")
	// ErrFieldCount means a row has fewer fields than a required column
	// needs.
	ErrFieldCount = errors.New("too few fields")
	// ErrMissingColumn means a required column (voltage, current or
	// capacitance) was not found in the header.
	ErrMissingColumn = errors.New("missing column")
	// ErrAmbiguousColumn means two or more columns fit a role equally well.
	ErrAmbiguousColumn = errors.New("ambiguous column")
	// ErrUnknownUnit means a header unit is not one the importer knows for
	// that quantity.
	ErrUnknownUnit = errors.New("unknown unit")
	// ErrUnitMismatch means a unit contradicts the column's quantity or a
	// unit stated in the options.
	ErrUnitMismatch = errors.New("unit mismatch")
	// ErrOption means an import option is invalid (bad unit, column index
	// beyond the header, unknown column name).
	ErrOption = errors.New("invalid option")
	// ErrEncoding means the file is not UTF-8 text (e.g. UTF-16, binary).
	ErrEncoding = errors.New("unsupported encoding")
	// ErrLineTooLong means a line exceeds MaxLineBytes.
	ErrLineTooLong = errors.New("line too long")
	// ErrTooManyRows means the file holds more than MaxRows data rows.
	ErrTooManyRows = errors.New("too many data rows")
	// ErrTooLarge means the file is longer than MaxBytes.
	ErrTooLarge = errors.New("file too large")
)

// ParseError reports a problem at one place of the file: the file name,
// 1-based line and column (field) number, the field's header name and
// value, and what was expected. Its message gives the place and never the
// file's text (ColumnName and Value are for callers that choose to show
// them): a file that is not a measurement, read by mistake or on purpose,
// must not have its contents printed.
type ParseError struct {
	File       string // source file name as given to Import
	Line       int    // 1-based physical line
	Column     int    // 1-based field number; 0 when the whole line is meant
	ColumnName string // header cell of the column, if any
	Value      string // offending text (shortened to 40 bytes)
	Expected   string // what would have been accepted
	Err        error  // sentinel
}

// Error formats the error as "file:line:column: what; expected ...".
func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	fmt.Fprintf(&b, ":%d", e.Line)
	if e.Column > 0 {
		fmt.Fprintf(&b, ":%d", e.Column)
	}
	b.WriteString(": ")
	if e.Err != nil {
		b.WriteString(e.Err.Error())
	}
	if e.Expected != "" {
		b.WriteString("; expected ")
		b.WriteString(e.Expected)
	}
	return b.String()
}

// Unwrap returns the sentinel.
func (e *ParseError) Unwrap() error { return e.Err }

// ColumnError reports a header problem: a required column missing or
// ambiguous, or a unit that is unknown or contradicts the column. Like
// ParseError, its message names columns by number and never prints the
// header's text (Header holds it for callers).
type ColumnError struct {
	File   string   // source file name as given to Import
	Line   int      // line of the header (0 for a headerless file)
	Column int      // 1-based column concerned, 0 if none
	Role   string   // "voltage", "current", "capacitance", "temperature", "frequency"
	Header []string // header cells as read
	Detail string   // what is wrong and how to fix it
	Err    error    // sentinel
}

// Error formats the error as "file:line:column: role column: what:
// detail (header of N columns)".
func (e *ColumnError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Column > 0 {
		fmt.Fprintf(&b, ":%d", e.Column)
	}
	fmt.Fprintf(&b, ": %s column: %v", e.Role, e.Err)
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	if n := len(e.Header); n > 0 {
		fmt.Fprintf(&b, " (header of %d column%s)", n, map[bool]string{true: "s"}[n != 1])
	}
	return b.String()
}

// Unwrap returns the sentinel.
func (e *ColumnError) Unwrap() error { return e.Err }

func shorten(b []byte) string {
	if len(b) > 40 {
		return string(b[:40]) + "..."
	}
	return string(b)
}
