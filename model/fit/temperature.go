package fit

import (
	"fmt"

	"junco/model"
	"junco/model/measure"
)

// Where a fit's temperature came from.
const (
	SourceColumn   = "column"   // the mean of the file's temperature column
	SourceComment  = "comment"  // a "# temperature: 300 K" comment in the file
	SourceOption   = "option"   // given by the user (--temp, a value typed at import)
	SourceJunction = "junction" // the session junction's temperature (workbench)
	SourceAssumed  = "assumed"  // nothing given: AssumedTemperatureK
)

// AssumedTemperatureK is the temperature assumed when neither the file,
// nor an option, nor a junction gives one (room temperature, common
// practice).
const AssumedTemperatureK = 300.0

// Temperature is a fit's temperature in K and its source (one of the
// Source constants).
type Temperature struct {
	K      float64
	Source string
}

// String gives "300.0 K (comment)".
func (t Temperature) String() string {
	return fmt.Sprintf("%s (%s)", model.Format(model.Temperature, t.K, 4, true), t.Source)
}

// FromFile reports whether the temperature is the file's own.
func (t Temperature) FromFile() bool { return t.Source == SourceColumn || t.Source == SourceComment }

// TemperatureRule says how to choose a temperature when the file states
// none: OptionK when above 0 (source "option"), else FallbackK with
// FallbackSource (SourceJunction in the workbench), else
// AssumedTemperatureK (source "assumed").
type TemperatureRule struct {
	OptionK        float64
	FallbackK      float64
	FallbackSource string
}

// Choose returns the temperature of a fit of ds: the file's own (its
// temperature column, else its comment), else the rule's option, else its
// fallback, else AssumedTemperatureK. note is "" when the file's own
// temperature is used with no option, and otherwise says what was used and
// why (one line).
func (r TemperatureRule) Choose(ds *measure.DataSet) (t Temperature, note string) {
	if ds != nil {
		if k, ok := ds.Temperature(); ok && k > 0 {
			src := SourceComment
			switch {
			case len(ds.TemperatureK) > 0:
				src = SourceColumn
			case ds.TemperatureTyped:
				// Typed by the user at import (the file states none).
				src = SourceOption
			}
			t = Temperature{K: k, Source: src}
			if r.OptionK > 0 && r.OptionK != k {
				note = fmt.Sprintf("the file states %s; the option's %s is not used",
					model.Format(model.Temperature, k, 4, true), model.Format(model.Temperature, r.OptionK, 4, true))
			}
			return t, note
		}
	}
	switch {
	case r.OptionK > 0:
		return Temperature{K: r.OptionK, Source: SourceOption}, ""
	case r.FallbackK > 0:
		src := r.FallbackSource
		if src == "" {
			src = SourceJunction
		}
		return Temperature{K: r.FallbackK, Source: src},
			fmt.Sprintf("temperature not stated in the file: the %s's %s used", src, model.Format(model.Temperature, r.FallbackK, 5, true))
	}
	return Temperature{K: AssumedTemperatureK, Source: SourceAssumed},
		"temperature not given (no --temp, column or comment): 300 K assumed"
}
