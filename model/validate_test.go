package model

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestDefaultSpecValid(t *testing.T) {
	if err := DefaultSpec().Validate(); err != nil {
		t.Fatal(err)
	}
}

// Each bad field yields exactly one FieldError naming the field, the value
// and the allowed range.
func TestValidateOneErrorPerField(t *testing.T) {
	neg := -1.0
	cases := []struct {
		field  string
		mutate func(*Spec)
	}{
		{FieldMaterial, func(s *Spec) { s.Material = "wood" }},
		{FieldProfile, func(s *Spec) { s.Profile = "gaussian" }},
		{FieldAcceptorDensity, func(s *Spec) { s.AcceptorDensity = -1 }},
		{FieldAcceptorDensity, func(s *Spec) { s.AcceptorDensity = math.NaN() }},
		{FieldDonorDensity, func(s *Spec) { s.DonorDensity = math.Inf(1) }},
		{FieldDonorDensity, func(s *Spec) { s.DonorDensity = 1e30 }},
		{FieldGradient, func(s *Spec) { s.Profile = "linear"; s.Gradient = 0 }},
		{FieldAcceptorSpecies, func(s *Spec) { s.AcceptorSpecies = "phosphorus" }},
		{FieldDonorSpecies, func(s *Spec) { s.DonorSpecies = "kryptonite" }},
		{FieldTemperature, func(s *Spec) { s.Temperature = -3 }},
		{FieldTemperature, func(s *Spec) { s.Temperature = 5000 }},
		{FieldArea, func(s *Spec) { s.Area = 0 }},
		{FieldBias, func(s *Spec) { s.Bias = 50 }},
		{FieldBias, func(s *Spec) { s.Bias = math.NaN() }},
		{FieldPWidth, func(s *Spec) { s.PWidth = 1e-12 }},
		{FieldNWidth, func(s *Spec) { s.NWidth = -2e-6 }},
		{FieldPContactVelocity, func(s *Spec) { s.PContactVelocity = &neg }},
		{FieldElectronLifetime, func(s *Spec) { s.ElectronLifetime = 10 }},
		{FieldHoleLifetime, func(s *Spec) { s.HoleLifetime = -1e-6 }},
	}
	for _, c := range cases {
		s := DefaultSpec()
		c.mutate(&s)
		err := s.Validate()
		var ve *ValidationError
		if !errors.As(err, &ve) {
			t.Errorf("%s: no ValidationError (%v)", c.field, err)
			continue
		}
		if len(ve.Fields) != 1 || ve.Fields[0].Field != c.field {
			t.Errorf("%s: got %v", c.field, ve.Fields)
			continue
		}
		f := ve.Fields[0]
		if f.Value == "" || f.Allowed == "" || f.Why == "" || !strings.Contains(f.Error(), c.field) {
			t.Errorf("%s: incomplete error %+v", c.field, f)
		}
	}
	// Several bad fields: one error each.
	s := DefaultSpec()
	s.Temperature, s.Area, s.Material = -1, -1, "cheese"
	var ve *ValidationError
	if err := s.Validate(); !errors.As(err, &ve) || len(ve.Fields) != 3 {
		t.Errorf("three bad fields: %v", err)
	}
	if _, ok := ve.For(FieldArea); !ok {
		t.Errorf("For(area) missing")
	}
}

// Evaluate refuses a spec with bad fields and never returns numbers for it.
func TestEvaluateRefusesInvalid(t *testing.T) {
	s := DefaultSpec()
	s.Area = math.NaN()
	if r, err := Evaluate(s); err == nil || r != nil {
		t.Fatalf("evaluated a NaN area: %v", r)
	}
}
