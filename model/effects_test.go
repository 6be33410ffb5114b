package model

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// The non-ideal effects' keys are in the JSON object, in SI units, and
// current_A is the total while ideal_current_A stays the Shockley current.
func TestEffectsJSONKeys(t *testing.T) {
	r := specFor(t, func(s *Spec) { s.Bias = 0.6 })
	var m map[string]any
	if err := json.Unmarshal(r.JSON(), &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"breakdown_voltage_V", "diffusion_current_A", "recombination_current_A", "generation_current_A",
		"shunt_current_A", "series_resistance_ohm", "ideality_factor", "diffusion_capacitance_F", "total_capacitance_F",
		"forward_voltage_temperature_coefficient_V_per_K", "forward_voltage_reference_current_A", "forward_voltage_V",
		"storage_time_s", "band_gap_narrowing_p_eV", "band_gap_narrowing_n_eV", "acceptor_ionised_fraction",
		"junction_voltage_V", "avalanche_multiplication", "dissipated_power_W", "conductance_S", "breakdown_sze_gibbons_V"} {
		if v, ok := m[k].(float64); !ok || math.IsNaN(v) {
			t.Errorf("key %s missing or not a number: %v", k, m[k])
		}
	}
	if _, ok := m["punch_through_voltage_V"]; !ok {
		t.Errorf("punch_through_voltage_V missing")
	}
	if m["punch_through_voltage_V"] != nil {
		t.Errorf("punch-through reported for a long region: %v", m["punch_through_voltage_V"])
	}
	cur, ideal := m["current_A"].(float64), m["ideal_current_A"].(float64)
	if cur == ideal {
		t.Errorf("current_A equals the Shockley current with the effects on")
	}
	sum := m["diffusion_current_A"].(float64) + m["recombination_current_A"].(float64) + m["generation_current_A"].(float64) + m["shunt_current_A"].(float64)
	if math.Abs(sum-cur) > 1e-9*cur {
		t.Errorf("components %g, total %g", sum, cur)
	}
	if c, ok := m["cautions"].([]any); !ok || len(c) == 0 || !strings.Contains(c[0].(string), "hazardous") {
		t.Errorf("cautions: %v", m["cautions"])
	}
	if v := m["forward_voltage_reference_current_A"].(float64); v != 1e-3 {
		t.Errorf("reference current %g, want the 1 mA default", v)
	}
}

// Breakdown and power values carry the safety caution; a bias above the
// power limit is flagged.
func TestCautionAndPowerLimit(t *testing.T) {
	r := specFor(t, func(s *Spec) { s.Bias = 1.2; s.PowerLimit = 0.1 })
	marked := map[string]bool{}
	for _, q := range r.Quantities {
		for _, f := range q.Flags {
			if f == FlagCaution {
				marked[q.Key] = true
			}
			if f == FlagPowerLimit && q.Key == "dissipated_power_W" {
				marked["power-limit"] = true
			}
		}
	}
	for _, k := range []string{"breakdown_voltage_V", "dissipated_power_W", "punch_through_voltage_V", "power-limit"} {
		if !marked[k] {
			t.Errorf("%s not marked", k)
		}
	}
	if txt := r.Text(true); !strings.Contains(txt, "[power-limit]") || !strings.Contains(txt, "rated limits") {
		t.Errorf("text lacks the power warning or caution")
	}
	// Below the limit, no power flag.
	r = specFor(t, func(s *Spec) { s.Bias = 0.5 })
	for _, f := range r.Flags {
		if f.Code == FlagPowerLimit {
			t.Errorf("power flag at 0.5 V")
		}
	}
}

// IdealEffects gives the Shockley diode: current_A = ideal_current_A.
func TestIdealEffects(t *testing.T) {
	r := specFor(t, func(s *Spec) { s.Bias = 0.7; s.Effects = IdealEffects() })
	cur, _ := r.Get("current_A")
	ideal, _ := r.Get("ideal_current_A")
	if cur != ideal {
		t.Errorf("ideal effects: %g vs %g", cur, ideal)
	}
	if vb, _ := r.Get("breakdown_voltage_V"); !math.IsNaN(vb) {
		t.Errorf("breakdown shown with the effect off: %g", vb)
	}
}

// New fields are validated with one FieldError each; the spec's JSON
// carries the effect switches.
func TestEffectsValidationAndJSON(t *testing.T) {
	s := DefaultSpec()
	s.ContactResistance = -1
	s.ShuntResistance = 1e-9
	s.PThickness = 1
	s.PowerLimit = -2
	s.ForwardCurrent = 1e9
	s.Effects.BGNModel = "nonsense"
	err := s.Validate()
	var ve *ValidationError
	if !errors.As(err, &ve) {
		t.Fatalf("no validation error: %v", err)
	}
	for _, f := range []string{FieldContactResistance, FieldShuntResistance, FieldPThickness, FieldPowerLimit, FieldForwardCurrent, FieldBGNModel} {
		if _, ok := ve.For(f); !ok {
			t.Errorf("field %s not reported: %v", f, err)
		}
	}
	s = DefaultSpec()
	s.Effects.NoBGN = true
	s.ShuntResistance = 1e6
	b, _ := json.Marshal(s)
	if !strings.Contains(string(b), `"no_band_gap_narrowing":true`) || !strings.Contains(string(b), `"shunt_resistance_ohm":1000000`) {
		t.Errorf("spec JSON: %s", b)
	}
	var back Spec
	if err := json.Unmarshal(b, &back); err != nil || back != s {
		t.Errorf("round trip: %v %+v", err, back)
	}
}

// The I-V curve's components add up to the total; a sweep above the power
// limit carries the flag.
func TestIVCurveComponents(t *testing.T) {
	s := DefaultSpec()
	s.ShuntResistance = 1e5
	iv, err := IVCurve(s, Range{-3, 1.2, 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if len(iv.Series) != 7 || iv.Series[4].Label != "diffusion" || iv.Series[6].Label != "shunt" {
		t.Fatalf("series: %d", len(iv.Series))
	}
	for i := range iv.Xs {
		sum := iv.Series[4].Y[i] + iv.Series[5].Y[i] + iv.Series[6].Y[i]
		if tot := iv.Series[0].Y[i]; math.Abs(sum-tot) > 1e-9*math.Abs(tot) {
			t.Fatalf("V = %g: components %g, total %g", iv.Xs[i], sum, tot)
		}
	}
	s.PowerLimit = 0.01
	iv, _ = IVCurve(s, Range{0, 1.2, 0.1})
	found := false
	for _, f := range iv.Flags {
		found = found || f.Code == FlagPowerLimit
	}
	if !found {
		t.Errorf("power limit not flagged on the sweep")
	}
	cv, _, err := CVCurve(s, Range{-2, 0.7, 0.1})
	if err != nil || len(cv.Series) != 3 {
		t.Fatalf("C-V: %v", err)
	}
	last := len(cv.Xs) - 1
	if !(cv.Series[2].Y[last] > cv.Series[0].Y[last]) || math.Abs(cv.Series[2].Y[0]-cv.Series[0].Y[0]) > 1e-6*cv.Series[0].Y[0] {
		t.Errorf("total C must equal Cj in reverse and exceed it at forward bias")
	}
	g, err := ConductanceCurve(s, Range{0.3, 0.6, 0.1})
	if err != nil || !(g.Series[0].Y[3] > g.Series[0].Y[0]) {
		t.Errorf("G(V): %v", err)
	}
}

// Sweeps write CSV with unit-labelled headers; the temperature sweep gives
// dVF/dT near -2 mV/K for silicon (common practice).
func TestSweepCSV(t *testing.T) {
	s := DefaultSpec()
	pts, flags, err := IVSweep(context.Background(), s, Range{-2, 0.9, 0.01})
	if err != nil || len(pts) != 291 || len(flags) == 0 {
		t.Fatalf("sweep: %v %d", err, len(pts))
	}
	var b bytes.Buffer
	if err := WriteIVCSV(&b, pts); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")
	if len(lines) != 292 || !strings.HasPrefix(lines[0], "bias_V,junction_voltage_V,current_A,") || !strings.Contains(lines[0], "ideality_factor") {
		t.Errorf("CSV header %q, %d lines", lines[0], len(lines))
	}
	rows, err := TemperatureSweep(context.Background(), s, Range{250, 400, 50}, 1e-3)
	if err != nil || len(rows) != 4 {
		t.Fatal(err)
	}
	for _, r := range rows {
		if r.DVFDT > -1.5e-3 || r.DVFDT < -2.6e-3 {
			t.Errorf("dVF/dT(%g K) = %g V/K", r.T, r.DVFDT)
		}
	}
	b.Reset()
	WriteTemperatureCSV(&b, rows, 1e-3)
	if !strings.HasPrefix(b.String(), "temperature_K,saturation_current_A,") {
		t.Errorf("temperature CSV: %q", b.String())
	}
}

// A 1000-point I-V sweep with every effect on (target under 5 ms).
func BenchmarkIVSweepAllEffects(b *testing.B) {
	s := DefaultSpec()
	r := Range{-1, 0.999, 0.002}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if c, err := IVCurve(s, r); err != nil || len(c.Xs) != 1000 {
			b.Fatal(err, len(c.Xs))
		}
	}
}

// Property test over random valid specifications (math/rand/v2, fixed
// seed) spanning the accepted inputs: Evaluate never panics, and when the
// physics accepts the junction the total current is a number and the
// self-consistent solution converged (or the result says why not).
func TestEvaluateRandomSpecs(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 9))
	mats := []string{"si", "ge", "gaas", "4h-sic"}
	lu := func(lo, hi float64) float64 { return math.Pow(10, lo+(hi-lo)*rng.Float64()) }
	for k := 0; k < 300; k++ {
		s := DefaultSpec()
		s.Material = mats[k%4]
		s.AcceptorDensity = lu(12, 21) * 1e6
		s.DonorDensity = lu(12, 21) * 1e6
		s.Temperature = 20 + 980*rng.Float64()
		s.Area = lu(-14, -1)
		switch rng.IntN(4) {
		case 0:
			s.Bias = -lu(-3, 5)
		case 1:
			s.Bias = 20 * rng.Float64()
		case 2:
			s.Bias = 3 * rng.Float64()
		default:
			s.Bias = -100 * rng.Float64()
		}
		if rng.IntN(2) == 0 {
			s.Profile, s.Gradient = "linear", lu(15, 26)*1e8
		}
		if rng.IntN(3) == 0 {
			s.NWidth = lu(-8, -2)
		}
		if rng.IntN(3) == 0 {
			s.ContactResistance = lu(-3, 9)
		}
		if rng.IntN(4) == 0 {
			s.ShuntResistance = lu(-3, 15)
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("case %d: generated an invalid spec: %v", k, err)
		}
		r, err := Evaluate(s)
		if err != nil {
			continue // the physics refuses the combination, with a message
		}
		c, _ := r.Get("current_A")
		flagged := false
		for _, f := range r.Flags {
			flagged = flagged || f.Code == "not-converged" || f.Code == "beyond-breakdown"
		}
		if (math.IsNaN(c) || !r.Point.Converged) && !flagged {
			t.Errorf("case %d: current %g, converged %v, unflagged: %+v", k, c, r.Point.Converged, s)
		}
	}
}

// The dopant-level model is a user choice that reaches the physics and is
// named in the result; an unknown one is a field error. Si:P 1e17 cm^-3 at
// 77 K: the single isolated 45 meV level (g = 2) gives 0.135 ionised
// (computed from the single-level occupation; the same check as
// physics.TestIonisationSingleLevelDefault), the lowered level more.
func TestIonisationModelChoice(t *testing.T) {
	s := DemoJunction().Spec
	s.Material, s.Temperature = "si", 77
	s.AcceptorDensity, s.DonorDensity = 1e25, 1e23
	frac := func(model string) float64 {
		t.Helper()
		s.Effects.IonisationModel = model
		r, err := Evaluate(s)
		if err != nil {
			t.Fatal(err)
		}
		v, ok := r.Get("donor_ionised_fraction")
		if !ok {
			t.Fatal("no donor_ionised_fraction")
		}
		return v
	}
	single, lowered := frac(""), frac("lowered")
	if math.Abs(single-0.135) > 0.005 {
		t.Errorf("single-level fraction %.4f, want 0.135", single)
	}
	if lowered <= single {
		t.Errorf("lowered level ionises %g, single level %g: want more with the lowered level", lowered, single)
	}
	s.Effects.IonisationModel = "deep"
	if err := s.Validate(); err == nil || !strings.Contains(err.Error(), FieldIonisationModel) {
		t.Errorf("unknown ionisation model accepted: %v", err)
	}
}
