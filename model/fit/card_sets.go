package fit

import (
	"errors"
	"math"
	"strings"

	"junco/model/measure"
)

// NamedDataSet is a data set with the name it goes by (its ID in a
// session).
type NamedDataSet struct {
	Name    string
	DataSet *measure.DataSet
}

// ErrNoForwardIV means a session holds no forward I-V data set, which a
// model card needs.
var ErrNoForwardIV = errors.New("no forward I-V data set (the model card needs forward I-V)")

// CardInputsFrom chooses a card's inputs among a session's data sets, the
// one rule the workbench and `fit card --session` follow: every dark I-V
// set with forward points is a forward sweep (lit sets are left out: the
// card describes the dark diode), the one nearest the junction's
// temperature junctionK first (the reference: TNOM); the first I-V set
// with no forward points is the reverse sweep; the first C-V set gives the
// capacitance. Temperatures follow the fit layer's rule with junctionK as
// the fallback.
func CardInputsFrom(name string, sets []NamedDataSet, junctionK float64) (CardInputs, error) {
	in := CardInputs{Name: name, Temperature: TemperatureRule{FallbackK: junctionK, FallbackSource: SourceJunction}}
	ref, best := -1, math.Inf(1)
	for _, s := range sets {
		ds := s.DataSet
		switch {
		case ds == nil:
		case ds.Kind == measure.KindCV:
			if in.CV == nil {
				in.CV = ds
			}
		case ds.Kind != measure.KindIV || IsLit(ds):
		case !hasForward(ds):
			if in.Reverse == nil {
				in.Reverse = ds
			}
		default:
			t, _ := in.Temperature.Choose(ds)
			if d := math.Abs(t.K - junctionK); d < best {
				ref, best = len(in.IV), d
			}
			in.IV = append(in.IV, ds)
			in.IVFiles = append(in.IVFiles, s.Name)
		}
	}
	if len(in.IV) == 0 {
		return in, ErrNoForwardIV
	}
	in.IV[0], in.IV[ref] = in.IV[ref], in.IV[0]
	in.IVFiles[0], in.IVFiles[ref] = in.IVFiles[ref], in.IVFiles[0]
	return in, nil
}

// hasForward reports a sweep with a point of positive bias and current.
func hasForward(ds *measure.DataSet) bool {
	for k, v := range ds.VoltageV {
		if v > 0 && k < len(ds.CurrentA) && ds.CurrentA[k] > 0 {
			return true
		}
	}
	return false
}

// CardName makes a card name from a session's title: "D_" and its letters
// and digits, at most 24 characters.
func CardName(title string) string {
	var b strings.Builder
	b.WriteString("D_")
	for _, r := range title {
		if b.Len() >= 24 {
			break
		}
		if r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' {
			b.WriteRune(r)
		}
	}
	if b.Len() == 2 {
		b.WriteString("session")
	}
	return b.String()
}
