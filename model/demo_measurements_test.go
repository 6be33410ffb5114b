package model

import (
	"math"
	"reflect"
	"strings"
	"testing"

	"junco/model/measure"
	"junco/physics/extract"
)

func TestDemoMeasurementsReproducibleAndLabelled(t *testing.T) {
	a, err := DemoMeasurements(42)
	if err != nil {
		t.Fatal(err)
	}
	b, err := DemoMeasurements(42)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a, b) {
		t.Error("the same seed gave different data")
	}
	c, err := DemoMeasurements(43)
	if err != nil {
		t.Fatal(err)
	}
	if reflect.DeepEqual(a[0].CurrentA, c[0].CurrentA) {
		t.Error("another seed gave the same noise")
	}
	nIV, nCV := 0, 0
	for _, d := range a {
		if !strings.Contains(d.SourceFile, "invented") {
			t.Errorf("%s: source %q is not labelled invented", d.ID, d.SourceFile)
		}
		switch d.Kind {
		case measure.KindIV:
			nIV++
		case measure.KindCV:
			nCV++
		}
	}
	if nIV != len(DemoIVTemperaturesK()) || nCV != 1 {
		t.Errorf("%d I-V and %d C-V data sets, want %d and 1", nIV, nCV, len(DemoIVTemperaturesK()))
	}
}

// Round trip: the invented I-V data fit back to the model that made them.
// Is: the n = 1 part of a double-diode fit against the model's diffusion
// saturation current IsDiff (within 10 %). n: the single-diode fit of the
// noisy data against that of the noise-free model curve over the same
// window (within 2 %), i.e. the model's apparent ideality there.
func TestDemoMeasurementsFitBack(t *testing.T) {
	sets, err := DemoMeasurements(1)
	if err != nil {
		t.Fatal(err)
	}
	w := extract.Window{MinV: 0.4, MaxV: 0.6}
	for _, d := range sets {
		if d.Kind != measure.KindIV {
			continue
		}
		temp, ok := d.Temperature()
		if !ok {
			t.Fatalf("%s: no temperature", d.ID)
		}
		s := DemoJunction().Spec
		s.Temperature = temp
		r, err := Evaluate(s)
		if err != nil {
			t.Fatal(err)
		}
		opt := extract.IVOptions{TemperatureK: temp, Window: w, RelativeNoise: DemoCurrentNoise, CurrentFloorA: DemoCurrentFloorA}
		single, err := extract.FitIV(d.VoltageV, d.CurrentA, opt)
		if err != nil {
			t.Fatalf("%s: %v", d.ID, err)
		}
		clean, err := IVCurve(s, DemoIVRange())
		if err != nil {
			t.Fatal(err)
		}
		ref, err := extract.FitIV(clean.Xs, clean.Series[0].Y, opt)
		if err != nil {
			t.Fatal(err)
		}
		if got, want := single.Single.IdealityFactor, ref.Single.IdealityFactor; math.Abs(got/want-1) > 0.02 {
			t.Errorf("%s: n = %.4f, model's %.4f: want within 2 %%", d.ID, got, want)
		}
		// The double-diode fit needs the n = 2 part in its window: from
		// 0.2 V (the demo's depletion-region current, with the n side's
		// local lifetimes, is small above 0.4 V).
		opt.Model = extract.ModelDouble
		opt.Window = extract.Window{MinV: 0.2, MaxV: 0.6}
		double, err := extract.FitIV(d.VoltageV, d.CurrentA, opt)
		if err != nil {
			t.Fatalf("%s double: %v", d.ID, err)
		}
		if got, want := double.Double.DiffusionCurrentA, r.Static.IsDiff; math.Abs(got/want-1) > 0.10 {
			t.Errorf("%s: Is = %.4g A, model's IsDiff %.4g A: want within 10 %%", d.ID, got, want)
		}
		t.Logf("%s: n %.4f (model %.4f), Is %.4g A (model %.4g A)", d.ID, single.Single.IdealityFactor, ref.Single.IdealityFactor, double.Double.DiffusionCurrentA, r.Static.IsDiff)
	}
}

// The C-V set fits back (Mott-Schottky) to the donor density of the demo's
// lightly doped n side within 5 % (0.2 % noise; the p+ side adds Nd/Na,
// 0.04 %).
func TestDemoMeasurementsCVFitBack(t *testing.T) {
	sets, err := DemoMeasurements(1)
	if err != nil {
		t.Fatal(err)
	}
	s := DemoJunction().Spec
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	eps := r.Static.Device.Material.Permittivity()
	for _, d := range sets {
		if d.Kind != measure.KindCV {
			continue
		}
		f, err := extract.MottSchottky(d.VoltageV, d.CapacitanceF, extract.CVGeometry{AreaM2: s.Area, PermittivityFm: eps}, extract.Window{MinV: -5, MaxV: -0.5})
		if err != nil {
			t.Fatal(err)
		}
		if got := f.DopingM3 / s.DonorDensity; math.Abs(got-1) > 0.05 {
			t.Errorf("Mott-Schottky doping %g m^-3, demo Nd %g m^-3", f.DopingM3, s.DonorDensity)
		}
		return
	}
	t.Error("no C-V data set")
}
