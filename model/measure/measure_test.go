package measure

import (
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// The sample files below are invented for the tests; each imitates a
// dialect of delimited text described in the package documentation (not
// any particular instrument's format). The expected SI values follow from
// the sample text and the SI prefixes m, u, n, p, f, k, M (SI Brochure,
// 9th ed., 2019).

func imp(t *testing.T, text string, opt Options) *DataSet {
	t.Helper()
	ds, err := Import(strings.NewReader(text), "sample.csv", opt)
	if err != nil {
		t.Fatalf("import: %v", err)
	}
	return ds
}

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b)) }

func wantCols(t *testing.T, got, want []float64, what string) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d values %v, want %d %v", what, len(got), got, len(want), want)
	}
	for k := range got {
		if !near(got[k], want[k]) {
			t.Errorf("%s[%d] = %g, want %g", what, k, got[k], want[k])
		}
	}
}

func TestDialects(t *testing.T) {
	cases := []struct {
		name    string
		text    string
		opt     Options
		kind    Kind
		v, y    []float64 // y = current or capacitance, SI
		units   Units
		delim   string
		statedT float64
	}{
		{"plain comma, no units", "V,I\n0.1,1e-9\n0.2,1e-8\n", Options{}, KindIV,
			[]float64{0.1, 0.2}, []float64{1e-9, 1e-8}, Units{Voltage: "V", Current: "A", Assumed: []string{"voltage", "current"}}, ",", 0},
		{"words with parenthesised units", "Voltage (V),Current (A)\n0.5,2.5e-6\n", Options{}, KindIV,
			[]float64{0.5}, []float64{2.5e-6}, Units{Voltage: "V", Current: "A"}, ",", 0},
		{"semicolon, underscore units, decimal comma", "bias_V;current_mA\n0,5;1,25\n0,6;12,5\n", Options{}, KindIV,
			[]float64{0.5, 0.6}, []float64{1.25e-3, 12.5e-3}, Units{Voltage: "V", Current: "mA"}, ";", 0},
		{"tab, bracket units, micro as u", "V [V]\tI [uA]\n-1\t-0.002\n0.4\t3.5\n", Options{}, KindIV,
			[]float64{-1, 0.4}, []float64{-2e-9, 3.5e-6}, Units{Voltage: "V", Current: "uA"}, "\t", 0},
		{"micro sign, millivolts", "U (mV),I (µA)\n500,1\n", Options{}, KindIV,
			[]float64{0.5}, []float64{1e-6}, Units{Voltage: "mV", Current: "µA"}, ",", 0},
		{"greek mu, nA, pA", "V/V,I/μA\n1,2\n", Options{}, KindIV,
			[]float64{1}, []float64{2e-6}, Units{Voltage: "V", Current: "μA"}, ",", 0},
		{"BOM, CRLF, comments, blank lines, stated temperature",
			"\xEF\xBB\xBF# sweep 1\r\n# temperature: 27 C\r\n\r\nV,I (nA)\r\n0.1,1\r\n\r\n# mid comment\r\n0.2,10\r\n", Options{}, KindIV,
			[]float64{0.1, 0.2}, []float64{1e-9, 1e-8}, Units{Voltage: "V", Current: "nA", Assumed: []string{"voltage"}}, ",", 300.15},
		{"extra columns ignored", "time_s,Vmeas (V),Imeas (pA),Ch3 (s)\n0,0.1,5,1\n1,0.2,50,2\n", Options{}, KindIV,
			[]float64{0.1, 0.2}, []float64{5e-12, 50e-12}, Units{Voltage: "V", Current: "pA"}, ",", 0},
		{"set and measured voltage: measured wins", "Vset (V),Vmeas (V),I (A)\n0.1,0.099,1e-6\n", Options{}, KindIV,
			[]float64{0.099}, []float64{1e-6}, Units{Voltage: "V", Current: "A"}, ",", 0},
		{"forward-voltage names V_F, I_F", "V_F,I_F\n0.6,1e-3\n", Options{}, KindIV,
			[]float64{0.6}, []float64{1e-3}, Units{Voltage: "V", Current: "A", Assumed: []string{"voltage", "current"}}, ",", 0},
		{"quoted header and fields", "\"Voltage (V)\",\"Current, forward (mA)\"\n\"0.5\",\"2\"\n", Options{}, KindIV,
			[]float64{0.5}, []float64{2e-3}, Units{Voltage: "V", Current: "mA"}, ",", 0},
		{"blank separated with unit tokens", "Voltage (V)   Current (A)\n 0.1   1e-9\n0.2\t2e-9\n", Options{}, KindIV,
			[]float64{0.1, 0.2}, []float64{1e-9, 2e-9}, Units{Voltage: "V", Current: "A"}, " ", 0},
		{"C-V with frequency", "V (V),C (pF),f (kHz)\n-2,10,100\n0,20,100\n", Options{}, KindCV,
			[]float64{-2, 0}, []float64{10e-12, 20e-12}, Units{Voltage: "V", Capacitance: "pF", Frequency: "kHz"}, ",", 0},
		{"C-V femtofarad, spelled capacitance", "bias (V);Capacitance (fF)\n-1;150\n", Options{}, KindCV,
			[]float64{-1}, []float64{150e-15}, Units{Voltage: "V", Capacitance: "fF"}, ";", 0},
		{"units from options", "V,I\n500,2\n", Options{VoltageUnit: "mV", CurrentUnit: "uA"}, KindIV,
			[]float64{0.5}, []float64{2e-6}, Units{Voltage: "mV", Current: "uA"}, ",", 0},
		{"columns by name and index", "a,b,c\n1,2,3\n", Options{Voltage: Column{Name: "C"}, Current: Column{Index: 1}}, KindIV,
			[]float64{3}, []float64{1}, Units{Voltage: "V", Current: "A", Assumed: []string{"voltage", "current"}}, ",", 0},
		{"headerless with defaults", "# temp = 310\n0.1 1e-9\n0.2 2e-9\n", Options{}, KindIV,
			[]float64{0.1, 0.2}, []float64{1e-9, 2e-9}, Units{Voltage: "V", Current: "A", Assumed: []string{"voltage", "current"}}, " ", 310},
		{"headerless C-V by option", "0.1;5\n", Options{Capacitance: Column{Index: 2}, CapacitanceUnit: "pF"}, KindCV,
			[]float64{0.1}, []float64{5e-12}, Units{Voltage: "V", Capacitance: "pF", Assumed: []string{"voltage"}}, ";", 0},
		{"trailing delimiter", "V,I,\n0.1,1e-9,\n", Options{}, KindIV,
			[]float64{0.1}, []float64{1e-9}, Units{Voltage: "V", Current: "A", Assumed: []string{"voltage", "current"}}, ",", 0},
		{"units in a second header row", "V;I;T\nV;mA;\n0,5;2;300\n", Options{}, KindIV,
			[]float64{0.5}, []float64{2e-3}, Units{Voltage: "V", Current: "mA"}, ";", 0},
		{"bracketed unit row", "Bias,Current\n[mV],[nA]\n600,5\n", Options{}, KindIV,
			[]float64{0.6}, []float64{5e-9}, Units{Voltage: "mV", Current: "nA"}, ",", 0},
		{"no final newline", "V,I\n0.1,1e-9", Options{}, KindIV,
			[]float64{0.1}, []float64{1e-9}, Units{Voltage: "V", Current: "A", Assumed: []string{"voltage", "current"}}, ",", 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ds := imp(t, c.text, c.opt)
			if ds.Kind != c.kind {
				t.Errorf("kind %q, want %q", ds.Kind, c.kind)
			}
			wantCols(t, ds.VoltageV, c.v, "voltage")
			if c.kind == KindIV {
				wantCols(t, ds.CurrentA, c.y, "current")
			} else {
				wantCols(t, ds.CapacitanceF, c.y, "capacitance")
			}
			u := ds.Units
			if u.Voltage != c.units.Voltage || u.Current != c.units.Current || u.Capacitance != c.units.Capacitance ||
				u.Frequency != c.units.Frequency || strings.Join(u.Assumed, ",") != strings.Join(c.units.Assumed, ",") {
				t.Errorf("units %+v, want %+v", u, c.units)
			}
			if ds.Delimiter != c.delim {
				t.Errorf("delimiter %q, want %q", ds.Delimiter, c.delim)
			}
			if !near(ds.StatedTemperatureK, c.statedT) {
				t.Errorf("stated temperature %g, want %g", ds.StatedTemperatureK, c.statedT)
			}
			if ds.SourceFile != "sample.csv" || ds.ImportedAt.IsZero() {
				t.Errorf("source %q time %v", ds.SourceFile, ds.ImportedAt)
			}
		})
	}
}

func TestTemperatureColumnAndFrequency(t *testing.T) {
	ds := imp(t, "V (V),I (A),T (C)\n0.1,1e-9,25\n0.2,1e-8,27\n", Options{})
	// 0 C = 273.15 K (SI Brochure, 9th ed., 2019).
	wantCols(t, ds.TemperatureK, []float64{298.15, 300.15}, "temperature")
	if tk, ok := ds.Temperature(); !ok || !near(tk, 299.15) {
		t.Errorf("Temperature() = %g %v", tk, ok)
	}
	if ds.Columns.Temperature != 3 || ds.Units.Temperature != "C" {
		t.Errorf("columns %+v units %+v", ds.Columns, ds.Units)
	}
	ds = imp(t, "V,I\n0.1,1\n", Options{})
	if _, ok := ds.Temperature(); ok {
		t.Error("no temperature expected")
	}
	// "t" without a unit is not a temperature (often time).
	ds = imp(t, "t,V,I\n5,0.1,1\n", Options{})
	if ds.TemperatureK != nil {
		t.Errorf("t taken as temperature: %v", ds.TemperatureK)
	}
	ds = imp(t, "t (K),V,I\n5,0.1,1\n", Options{})
	wantCols(t, ds.TemperatureK, []float64{5}, "temperature")
}

func TestRowProblems(t *testing.T) {
	text := "V (V),I (A),compliance\n" +
		"0.1,1e-9,0\n" + // line 2 ok
		"0.2,NaN,0\n" + // line 3 non-finite
		"0.3,1e-7,1\n" + // line 4 flagged
		"0.4,,0\n" + // line 5 missing
		"0.5,9.91e37,0\n" + // line 6 overflow marker
		"0.6,1e400,0\n" + // line 7 out of range
		"inf,1e-5,false\n" + // line 8 non-finite voltage
		"0.8,1e-4,no\n" // line 9 ok
	ds := imp(t, text, Options{})
	wantCols(t, ds.VoltageV, []float64{0.1, 0.8}, "voltage")
	want := []RowProblem{
		{3, 2, "I (A)", "NaN", ProblemNonFinite},
		{4, 3, "compliance", "1", ProblemCompliance},
		{5, 2, "I (A)", "", ProblemMissing},
		{6, 2, "I (A)", "9.91e37", ProblemOverflow},
		{7, 2, "I (A)", "1e400", ProblemNonFinite},
		{8, 1, "V (V)", "inf", ProblemNonFinite},
	}
	if len(ds.Problems) != len(want) || ds.ProblemRows != len(want) || ds.DataRows != 8 {
		t.Fatalf("problems %+v (rows %d, data rows %d)", ds.Problems, ds.ProblemRows, ds.DataRows)
	}
	for k := range want {
		if ds.Problems[k] != want[k] {
			t.Errorf("problem %d = %+v, want %+v", k, ds.Problems[k], want[k])
		}
	}
	// Status column with text flags.
	ds = imp(t, "V;I;Status\n0,1;2;OK\n0,2;3;COMPLIANCE\n", Options{})
	if len(ds.VoltageV) != 1 || ds.ProblemRows != 1 || ds.Problems[0].Kind != ProblemCompliance {
		t.Errorf("status flags: %+v", ds)
	}
}

func TestErrors(t *testing.T) {
	cases := []struct {
		name     string
		text     string
		opt      Options
		is       error
		line     int // 0 = not checked
		col      int
		contains string
	}{
		{"bad number", "V,I\n0.1,1e-9\n0.2,abc\n", Options{}, ErrBadNumber, 3, 2, "expected a decimal number"},
		{"unit in value", "V,I\n0.1,1mA\n", Options{}, ErrBadNumber, 2, 2, "die7.csv:2:2"},
		{"hex float", "V,I\n0x1p-2,1\n", Options{}, ErrBadNumber, 2, 1, ""},
		{"too few fields", "V,I,T (K)\n0.1,1e-9,300\n0.2\n", Options{}, ErrFieldCount, 3, 2, "found 1"},
		{"missing current column", "V,T (K)\n0.1,300\n", Options{}, ErrMissingColumn, 1, 0, "header of 2 columns"},
		{"missing voltage column", "I,time\n1,2\n", Options{}, ErrMissingColumn, 1, 0, "voltage"},
		{"ambiguous", "Ch1 (V),Ch2 (V),I\n1,2,3\n", Options{}, ErrAmbiguousColumn, 1, 2, "columns 1 and 2"},
		{"current and capacitance", "V,I,C\n1,2,3\n", Options{}, ErrAmbiguousColumn, 1, 0, "set the kind"},
		{"unknown unit", "V (V),J (A/cm2)\n1,2\n", Options{Current: Column{Index: 2}}, ErrUnknownUnit, 1, 2, "allowed A, mA"},
		{"unit contradicts name", "V (mA),I (A)\n1,2\n", Options{}, ErrUnitMismatch, 1, 1, "current unit"},
		{"options contradict header", "V (V),I (A)\n1,2\n", Options{CurrentUnit: "mA"}, ErrUnitMismatch, 1, 2, `options' "mA"`},
		{"bad unit option", "V,I\n1,2\n", Options{CurrentUnit: "mV"}, ErrOption, 0, 0, "allowed A"},
		{"bad kind option", "V,I\n1,2\n", Options{Kind: "xy"}, ErrOption, 0, 0, "iv"},
		{"index beyond header", "V,I\n1,2\n", Options{Current: Column{Index: 5}}, ErrOption, 1, 0, "outside 1..2"},
		{"name not found", "V,I\n1,2\n", Options{Current: Column{Name: "Id"}}, ErrOption, 1, 0, `"Id"`},
		{"name and index disagree", "V,I,X\n1,2,3\n", Options{Current: Column{Name: "I", Index: 3}}, ErrOption, 1, 0, "not the index"},
		{"same column twice", "a,b\n1,2\n", Options{Voltage: Column{Index: 1}, Current: Column{Index: 1}}, ErrOption, 1, 1, "same column"},
		{"negative index", "V,I\n1,2\n", Options{Voltage: Column{Index: -1}}, ErrOption, 0, 0, "counts from 1"},
		{"empty file", "", Options{}, ErrNoData, 0, 0, "header"},
		{"only comments", "# nothing\n\n", Options{}, ErrNoData, 0, 0, ""},
		{"header only", "V,I\n", Options{}, ErrNoData, 0, 0, "at least one data row"},
		{"all rows flagged", "V,I,compl\n1,2,1\n2,3,1\n", Options{}, ErrNoData, 0, 0, "all 2 were left out"},
		{"utf-16", "\xFF\xFEV\x00,\x00I\x00\n", Options{}, ErrEncoding, 1, 0, "UTF-16"},
		{"binary", "V,I\n\x00\x01,2\n", Options{}, ErrEncoding, 2, 0, ""},
		{"headerless name option", "1,2\n", Options{Current: Column{Name: "I"}}, ErrOption, 0, 0, "no header"},
		{"unit row contradicts header", "V (V),I (A)\nV,mA\n1,2\n", Options{}, ErrUnitMismatch, 2, 2, "different units"},
		{"second header mid-file", "V,I\n1,2\nV,I\n3,4\n", Options{}, ErrBadNumber, 3, 1, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ds, err := Import(strings.NewReader(c.text), "die7.csv", c.opt)
			if ds != nil {
				t.Errorf("data set returned with error %v", err)
			}
			if !errors.Is(err, c.is) {
				t.Fatalf("err = %v, want %v", err, c.is)
			}
			if !strings.HasPrefix(err.Error(), "die7.csv") {
				t.Errorf("error does not name the file: %v", err)
			}
			if c.contains != "" && !strings.Contains(err.Error(), c.contains) {
				t.Errorf("error %q does not contain %q", err, c.contains)
			}
			var pe *ParseError
			var ce *ColumnError
			switch {
			case errors.As(err, &pe):
				if c.line != 0 && (pe.Line != c.line || pe.Column != c.col) {
					t.Errorf("at %d:%d, want %d:%d (%v)", pe.Line, pe.Column, c.line, c.col, err)
				}
			case errors.As(err, &ce):
				if c.line != 0 && (ce.Line != c.line || ce.Column != c.col) {
					t.Errorf("at %d:%d, want %d:%d (%v)", ce.Line, ce.Column, c.line, c.col, err)
				}
			default:
				t.Errorf("untyped error %T %v", err, err)
			}
		})
	}
}

func TestLongLineAndReadError(t *testing.T) {
	long := "V,I\n" + strings.Repeat("1", MaxLineBytes+10) + ",2\n"
	_, err := Import(strings.NewReader(long), "big.csv", Options{})
	if !errors.Is(err, ErrLineTooLong) {
		t.Errorf("long line: %v", err)
	}
	// A line longer than the read buffer but below the limit is fine.
	ok := "V,I\n" + "0." + strings.Repeat("1", 100000) + ",2\n"
	if _, err := Import(strings.NewReader(ok), "wide.csv", Options{}); err != nil {
		t.Errorf("wide line: %v", err)
	}
	r := io.MultiReader(strings.NewReader("V,I\n1,2\n"), errReader{})
	if _, err := Import(r, "broken.csv", Options{}); err == nil || !strings.Contains(err.Error(), "broken.csv") {
		t.Errorf("read error: %v", err)
	}
}

type errReader struct{}

func (errReader) Read([]byte) (int, error) { return 0, errors.New("device gone") }

func TestImportFileAndJSON(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "d1.tsv")
	if err := os.WriteFile(p, []byte("V [V]\tI [mA]\n0.6\t1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	at := time.Date(2024, 5, 1, 12, 0, 0, 0, time.UTC)
	ds, err := ImportFile(p, Options{Now: func() time.Time { return at }})
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(ds)
	if err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{`"kind":"iv"`, `"source_file":`, `"imported_at":"2024-05-01T12:00:00Z"`, `"voltage_V":[0.6]`, `"current_A":[0.001]`, `"units_found":{"voltage":"V","current":"mA"}`} {
		if !strings.Contains(string(b), key) {
			t.Errorf("JSON lacks %s: %s", key, b)
		}
	}
	var back DataSet
	if err := json.Unmarshal(b, &back); err != nil || back.CurrentA[0] != 1e-3 || !back.ImportedAt.Equal(at) {
		t.Errorf("round trip: %v %+v", err, back)
	}
	if _, err := ImportFile(filepath.Join(dir, "missing.csv"), Options{}); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}

func TestParseUnit(t *testing.T) {
	for _, c := range []struct {
		q      Quantity
		s      string
		scale  float64
		offset float64
		ok     bool
	}{
		{QuantityCurrent, "uA", 1e-6, 0, true}, {QuantityCurrent, "µA", 1e-6, 0, true}, {QuantityCurrent, "ua", 1e-6, 0, true},
		{QuantityCurrent, "pA", 1e-12, 0, true}, {QuantityVoltage, "mV", 1e-3, 0, true}, {QuantityCapacitance, "fF", 1e-15, 0, true},
		{QuantityFrequency, "MHz", 1e6, 0, true}, {QuantityFrequency, "mhz", 1e-3, 0, true}, // the SI prefix case decides (m milli, M mega), as everywhere in junco
		{QuantityFrequency, "kHz", 1e3, 0, true}, {QuantityCurrent, "MA", 1e6, 0, true}, {QuantityTemperature, "°C", 1, 273.15, true},
		{QuantityTemperature, "degC", 1, 273.15, true}, {QuantityTemperature, "K", 1, 0, true}, {QuantityVoltage, "volts", 1, 0, true},
		{QuantityCurrent, "mV", 0, 0, false}, {QuantityCurrent, "A/cm2", 0, 0, false}, {QuantityCurrent, "", 0, 0, false},
	} {
		s, o, ok := ParseUnit(c.q, c.s)
		if ok != c.ok || s != c.scale || o != c.offset {
			t.Errorf("ParseUnit(%v, %q) = %g %g %v", c.q, c.s, s, o, ok)
		}
	}
}

// TestErrorsNeverEchoContents imports texts that are not measurements, or
// whose header and fields carry a marker, and checks that no error message
// repeats any of the file's text: a served user who imports a file by
// mistake (or a system file on purpose) learns its place, never its
// contents. The cases cover every error that reads the header or a field.
func TestErrorsNeverEchoContents(t *testing.T) {
	const secret = "s3cr3t"
	cases := []struct {
		name string
		text string
		opt  Options
	}{
		{"account file", "root" + secret + ":x:0:0:root:/root:/bin/sh\ndaemon:x:1:1::/:/bin/false\n", Options{}},
		{"key file", "-----BEGIN " + secret + " PRIVATE KEY-----\nb3BlbnNzaC1rZXktdjEAAAAA\n-----END-----\n", Options{}},
		{"bad number", "V,I\n0.1," + secret + "\n", Options{}},
		{"too few fields", "V,I,T (K)\n0.1,1e-9,300\n" + secret + "\n", Options{}},
		{"ambiguous", secret + " (V)," + secret + "2 (V),I\n1,2,3\n", Options{}},
		{"missing column", "V," + secret + "\n1,2\n", Options{}},
		{"unknown unit", "V (V),J (" + secret + ")\n1,2\n", Options{Current: Column{Index: 2}}},
		{"unit contradicts name", "V (mA),I" + secret + " (A)\n1,2\n", Options{}},
		{"unit row", "V (V),I (A)\nV," + secret + "\n1,2\n", Options{}},
		{"options contradict header", "V (V),I" + secret + " (A)\n1,2\n", Options{CurrentUnit: "mA"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Import(strings.NewReader(c.text), "f.txt", c.opt)
			if err == nil {
				t.Fatal("imported without error")
			}
			if strings.Contains(err.Error(), secret) || strings.Contains(err.Error(), "root") {
				t.Errorf("error repeats the file's text: %v", err)
			}
			if !strings.HasPrefix(err.Error(), "f.txt:") {
				t.Errorf("error does not give the place: %v", err)
			}
		})
	}
}
