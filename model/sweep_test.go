package model

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Absurd sweeps are refused before any memory is taken, with the cap
// named; they used to panic (makeslice: len out of range) because the
// point count overflowed an int.
func TestSweepHugeCountsRefused(t *testing.T) {
	cases := []struct {
		k     Kind
		text  string
		limit int
		name  string
	}{
		{Voltage, "0:1e30:1", MaxSweepPoints, "MaxSweepPoints"},
		{Voltage, "-1e300:1e300:1e-300", MaxSweepPoints, "MaxSweepPoints"},
		{Voltage, "0:1:1e-320", MaxSweepPoints, "MaxSweepPoints"},
		{Temperature, "0:1e30:1", MaxSweepPoints, "MaxSweepPoints"},
		{Voltage, "0:1e30:1", MaxNumericSweepPoints, "MaxNumericSweepPoints"},
		{Voltage, "-5V:0V:0.5mV", MaxNumericSweepPoints, "MaxNumericSweepPoints"},
		{Voltage, "0:1e30:1", MaxChartPoints, "MaxChartPoints"},
	}
	for _, c := range cases {
		_, err := ParseSweep(c.k, c.text, c.limit)
		var se *SweepError
		if !errors.As(err, &se) || se.Limit != c.limit || !(se.Points > float64(c.limit)) {
			t.Errorf("%s (limit %d): err %v, want a SweepError over the limit", c.text, c.limit, err)
			continue
		}
		if !strings.Contains(err.Error(), c.name) || !strings.Contains(err.Error(), "points") {
			t.Errorf("%s: %q does not name the limit %s", c.text, err, c.name)
		}
	}
	// Range.Points (the sessions' sweeps) counts the same way.
	if _, err := (Range{From: 0, To: 1e30, Step: 1}).Points(); err == nil {
		t.Error("Range.Points accepted 1e30 points")
	}
}

// The caps themselves are reachable: exactly MaxSweepPoints points pass,
// one more is refused (-1 V to 1 V in 20 uV steps is 100001 points).
func TestSweepCapBoundary(t *testing.T) {
	r, err := ParseSweep(Voltage, "-1V:1V:20uV", MaxSweepPoints)
	if err != nil {
		t.Fatal(err)
	}
	if n, err := r.Count(MaxSweepPoints); n != MaxSweepPoints || err != nil {
		t.Fatalf("%d points, %v", n, err)
	}
	if _, err := r.Count(MaxSweepPoints - 1); err == nil {
		t.Fatal("a sweep over the cap was accepted")
	}
}

// A step is a difference of two values: with Celsius ends and step,
// 0C:100C:10C is 273.15 K to 373.15 K in 10 K steps, 11 points (the
// Celsius offset applies to the ends only; 10 C = 283.15 K as a
// temperature but 10 K as a difference, by the definition of the Celsius
// scale, BIPM SI Brochure, 9th ed. (2019), sec. 2.3.1).
func TestSweepCelsiusStep(t *testing.T) {
	for _, r := range []func() (Range, error){
		func() (Range, error) { return ParseSweep(Temperature, "0C:100C:10C", MaxSweepPoints) },
		func() (Range, error) { return ParseSweepParts(Temperature, "0C", "100C", "10C", MaxChartPoints) },
		func() (Range, error) { return ParseSweep(Temperature, "273.15K:100C:10K", MaxSweepPoints) },
	} {
		got, err := r()
		if err != nil {
			t.Fatal(err)
		}
		pts, err := got.Points()
		if err != nil || len(pts) != 11 || math.Abs(pts[0]-273.15) > 1e-9 || math.Abs(pts[10]-373.15) > 1e-9 {
			t.Errorf("%+v: points %v, %v; want 11 from 273.15 K to 373.15 K", got, pts, err)
		}
	}
	if d, err := ParseDifference(Temperature, "10C"); err != nil || d != 10 {
		t.Errorf("ParseDifference(10C) = %g, %v; want 10", d, err)
	}
	if v, err := ParseValue(Temperature, "10C"); err != nil || math.Abs(v-283.15) > 1e-12 {
		t.Errorf("ParseValue(10C) = %g, %v; want 283.15", v, err)
	}
}

// Malformed sweeps name the part at fault.
func TestSweepErrorsNamePart(t *testing.T) {
	cases := map[string]string{"0:1": "FROM:TO:STEP", "x:1:0.1": "FROM", "0:1V:0.1A": "STEP", "0:1:0": "step must be non-zero", "1:0:0.1": "step must be non-zero", "0:nan:1": "TO"}
	for text, want := range cases {
		_, err := ParseSweep(Voltage, text, MaxSweepPoints)
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("%q: err %v, want mention of %q", text, err, want)
		}
	}
}

// FuzzParseSweep: no input panics, hangs or takes unbounded memory; an
// accepted sweep has between 1 and limit points, all finite, starting at
// FROM and never past TO by more than the rounding slack.
func FuzzParseSweep(f *testing.F) {
	for _, s := range []string{"-2V:0.9V:10mV", "0C:100C:10C", "0:1e30:1", "250K:400K:10K", "1:0:-0.1", "-1e308:1e308:1e-308", "0:1:1e-320", "::", "0:0:1"} {
		f.Add(s, false)
	}
	f.Fuzz(func(t *testing.T, text string, temperature bool) {
		k := Voltage
		if temperature {
			k = Temperature
		}
		for _, limit := range []int{MaxChartPoints, MaxNumericSweepPoints, MaxSweepPoints} {
			r, err := ParseSweep(k, text, limit)
			if err != nil {
				var se *SweepError
				if !errors.As(err, &se) {
					t.Fatalf("%q: error %v is not a *SweepError", text, err)
				}
				continue
			}
			pts, err := r.PointsUpTo(limit)
			if err != nil || len(pts) < 1 || len(pts) > limit {
				t.Fatalf("%q: accepted, then %d points, %v (limit %d)", text, len(pts), err, limit)
			}
			for _, p := range pts {
				if math.IsNaN(p) || math.IsInf(p, 0) {
					t.Fatalf("%q: point %g", text, p)
				}
			}
			last := pts[len(pts)-1]
			if (last-r.To)/r.Step > 1e-6 {
				t.Fatalf("%q: last point %g past the end %g", text, last, r.To)
			}
		}
	})
}
