package fit

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"junco/model"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// RecordTemperatureK reads the fit temperature an I-V record's notes give
// ("temperature 300 K (comment)", written by IVRecord); ok is false when
// none does.
func RecordTemperatureK(notes []string) (t float64, ok bool) {
	for _, n := range notes {
		if !strings.HasPrefix(n, "temperature ") {
			continue
		}
		if _, err := fmt.Sscanf(n, "temperature %g K", &t); err == nil && t > 0 && !math.IsInf(t, 0) {
			return t, true
		}
	}
	return 0, false
}

// RecordModel returns the model a stored fit record describes, as a
// function of bias V: the current in A of an I-V record (single diode:
// Is, n, Rs, Rsh; double: Is1, Is2, Rs, Rsh; Rs absent = 0, Rsh absent =
// no shunt, as IVRecord stores them), evaluated at the temperature in its
// notes (RecordTemperatureK, else fallbackK); the capacitance in F of a
// junction-capacitance record (Cj0, Vbi, m, Cpar absent = 0). The
// Mott-Schottky record is a line in 1/C^2, with no curve here (an error
// says so). params maps parameter names to SI values.
func RecordModel(method string, params map[string]float64, notes []string, fallbackK float64) (func(v float64) float64, error) {
	get := func(name string, absent float64, need bool) (float64, error) {
		v, ok := params[name]
		if !ok {
			if need {
				return 0, fmt.Errorf("%s record without %s", method, name)
			}
			return absent, nil
		}
		return v, nil
	}
	switch method {
	case MethodIVSingle, MethodIVDouble:
		t, ok := RecordTemperatureK(notes)
		if !ok {
			t = fallbackK
		}
		if !(t > 0) {
			return nil, errors.New("no temperature for the I-V record")
		}
		vt := physics.ThermalVoltage(t)
		rs, _ := get("Rs", 0, false)
		rsh, _ := get("Rsh", math.Inf(1), false)
		if method == MethodIVSingle {
			is, err := get("Is", 0, true)
			if err != nil {
				return nil, err
			}
			n, err := get("n", 0, true)
			if err != nil {
				return nil, err
			}
			d := extract.SingleDiode{SaturationCurrentA: is, IdealityFactor: n, SeriesResistanceOhm: rs, ShuntResistanceOhm: rsh}
			return func(v float64) float64 { return d.Current(v, vt) }, nil
		}
		is1, err := get("Is1", 0, true)
		if err != nil {
			return nil, err
		}
		is2, _ := get("Is2", 0, false)
		d := extract.DoubleDiode{DiffusionCurrentA: is1, RecombinationCurrentA: is2, SeriesResistanceOhm: rs, ShuntResistanceOhm: rsh}
		return func(v float64) float64 { return d.Current(v, vt) }, nil
	case MethodCVJunction:
		var j extract.JunctionCV
		var err error
		if j.ZeroBiasCapacitanceF, err = get("Cj0", 0, true); err != nil {
			return nil, err
		}
		if j.BuiltInPotentialV, err = get("Vbi", 0, true); err != nil {
			return nil, err
		}
		if j.GradingCoefficient, err = get("m", 0, true); err != nil {
			return nil, err
		}
		j.ParasiticCapacitanceF, _ = get("Cpar", 0, false)
		return j.Capacitance, nil
	case MethodMottSchottky:
		return nil, errors.New("the Mott-Schottky record is a straight line in 1/C^2 against V, drawn in the workbench's C-V screen")
	}
	return nil, fmt.Errorf("no model for the method %q", method)
}

// PredictedCV is the junction's predicted capacitance (total: depletion
// plus diffusion, as an instrument measures it) over the
// bias span of a data set (about 200 points), at the data set's
// temperature when it states one; the one series is "prediction".
func PredictedCV(s model.Spec, ds *measure.DataSet) (model.Curve, error) {
	if ds == nil || len(ds.VoltageV) == 0 {
		return model.Curve{}, errors.New("the data set has no points")
	}
	s, r, label, err := predictionSweep(s, ds)
	if err != nil {
		return model.Curve{}, err
	}
	cv, _, err := model.CVCurve(s, r)
	if err != nil {
		return model.Curve{}, err
	}
	if len(cv.Series) == 0 {
		return model.Curve{}, errors.New("the prediction has no capacitance")
	}
	// The measured capacitance is the total (depletion plus diffusion).
	y := cv.Series[0].Y
	for _, sr := range cv.Series {
		if sr.Label == "total" {
			y = sr.Y
		}
	}
	cv.ID = "cv-prediction"
	cv.Series = []model.Series{{Label: label, Y: y}}
	return cv, nil
}
