package fit

import (
	"math"
	"strings"
	"testing"

	"junco/model"
	"junco/model/measure"
)

func demoArrheniusInputs(t *testing.T) []ArrheniusInput {
	t.Helper()
	sets, err := model.DemoMeasurements(1)
	if err != nil {
		t.Fatal(err)
	}
	var in []ArrheniusInput
	for i := range sets {
		if sets[i].DataSet.Kind == measure.KindIV {
			in = append(in, ArrheniusInput{ID: sets[i].ID, DataSet: &sets[i].DataSet})
		}
	}
	return in
}

// On the invented demo sweeps (three temperatures) the activation energy
// is that of silicon's saturation current: between Eg/2 and Eg + 0.2 eV
// (diffusion near Eg, generation near Eg/2; Sze & Ng 2007, sec. 2.3).
func TestArrheniusDemo(t *testing.T) {
	in := demoArrheniusInputs(t)
	if len(in) < 3 {
		t.Fatalf("the demo has %d I-V sweeps", len(in))
	}
	v, err := Arrhenius(in, 0)
	if err != nil {
		t.Fatal(err)
	}
	const eg = 1.12
	ea := v.Fit.ActivationEnergyEV
	if !(ea > eg/2 && ea < eg+0.2) || !(v.Fit.StdErrEV >= 0) || v.Fit.Points != 3 || v.Fit.Exponent != 3 {
		t.Fatalf("Ea %.4g ± %.2g eV, %d points, exponent %g", ea, v.Fit.StdErrEV, v.Fit.Points, v.Fit.Exponent)
	}
	used := v.Used()
	for i := 1; i < len(used); i++ {
		if used[i].TemperatureK <= used[i-1].TemperatureK {
			t.Error("rows must be sorted by temperature")
		}
	}
	// The line runs through the points (1000/T descending with T).
	if !(v.LineX[0] < v.LineX[1]) || math.Abs(v.LineY[1]-used[0].LnReducedSaturationA) > 1 {
		t.Errorf("line %v %v, first point %.4g", v.LineX, v.LineY, used[0].LnReducedSaturationA)
	}
	// gamma changes the exponent and so Ea.
	v2, err := Arrhenius(in, 2)
	if err != nil || v2.Fit.Exponent != 4 || v2.Fit.ActivationEnergyEV >= ea {
		t.Fatalf("gamma 2: %v %+v", err, v2.Fit)
	}
}

func TestArrheniusTooFew(t *testing.T) {
	in := demoArrheniusInputs(t)
	v, err := Arrhenius(in[:1], 0)
	if err == nil || v == nil || len(v.Rows) != 1 || !strings.Contains(err.Error(), "two or more temperatures") {
		t.Fatalf("one temperature: %v", err)
	}
	noT := *in[0].DataSet
	noT.StatedTemperatureK, noT.TemperatureK = 0, nil
	v, err = Arrhenius(append([]ArrheniusInput{{ID: "x", DataSet: &noT}}, in...), 0)
	if err != nil || v.Rows[len(v.Rows)-1].Skip == "" || len(v.Used()) != len(in) {
		t.Fatalf("a data set without temperature is listed and left out: %v %+v", err, v.Rows)
	}
	if _, err := Arrhenius(in, math.NaN()); err == nil {
		t.Error("NaN gamma must be refused")
	}
}
