package measure

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"testing"
)

// FuzzImport feeds arbitrary bytes (and a kind selector) to Import: it must
// never panic, and what it returns must be consistent — either an error of
// this package's types and no data set, or a data set whose columns have
// equal lengths, hold only finite numbers and account for every data row.
func FuzzImport(f *testing.F) {
	f.Add([]byte("V,I\n0.1,1e-9\n0.2,1e-8\n"), byte(0))
	f.Add([]byte("V (V);C (pF)\n-1;10\n0;12,5\n"), byte(2))
	f.Fuzz(func(t *testing.T, data []byte, sel byte) {
		opt := Options{}
		switch sel % 4 {
		case 1:
			opt.Kind = KindIV
		case 2:
			opt.Kind = KindCV
		case 3:
			opt.Voltage, opt.Current, opt.CurrentUnit = Column{Index: 1}, Column{Index: 2}, "uA"
		}
		ds, err := Import(bytes.NewReader(data), "fuzz.csv", opt)
		if err != nil {
			if ds != nil {
				t.Fatalf("data set returned with error %v", err)
			}
			var pe *ParseError
			var ce *ColumnError
			if !errors.As(err, &pe) && !errors.As(err, &ce) {
				t.Fatalf("untyped error %T: %v", err, err)
			}
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		n := len(ds.VoltageV)
		if n == 0 {
			t.Fatal("empty data set without error")
		}
		switch ds.Kind {
		case KindIV:
			if len(ds.CurrentA) != n || ds.CapacitanceF != nil {
				t.Fatalf("I-V lengths V %d I %d C %d", n, len(ds.CurrentA), len(ds.CapacitanceF))
			}
		case KindCV:
			if len(ds.CapacitanceF) != n || ds.CurrentA != nil {
				t.Fatalf("C-V lengths V %d C %d I %d", n, len(ds.CapacitanceF), len(ds.CurrentA))
			}
		default:
			t.Fatalf("kind %q", ds.Kind)
		}
		if opt.Kind != KindAuto && ds.Kind != opt.Kind {
			t.Fatalf("kind %q, forced %q", ds.Kind, opt.Kind)
		}
		for _, col := range [][]float64{ds.FrequencyHz, ds.TemperatureK} {
			if col != nil && len(col) != n {
				t.Fatalf("optional column length %d, want %d", len(col), n)
			}
		}
		for _, col := range [][]float64{ds.VoltageV, ds.CurrentA, ds.CapacitanceF, ds.FrequencyHz, ds.TemperatureK} {
			for _, x := range col {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Fatalf("non-finite value %g kept", x)
				}
			}
		}
		if ds.DataRows != n+ds.ProblemRows || len(ds.Problems) > ds.ProblemRows || len(ds.Problems) > MaxProblems {
			t.Fatalf("rows %d kept %d problems %d/%d", ds.DataRows, n, len(ds.Problems), ds.ProblemRows)
		}
		last := 0
		for _, p := range ds.Problems {
			if p.Line <= last || p.Column < 1 {
				t.Fatalf("problem order/position %+v after line %d", p, last)
			}
			last = p.Line
		}
		if _, err := json.Marshal(ds); err != nil {
			t.Fatalf("data set does not marshal: %v", err)
		}
	})
}
