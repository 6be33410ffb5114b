package model

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

func specFor(t testing.TB, mutate func(*Spec)) *Result {
	t.Helper()
	s := DefaultSpec()
	mutate(&s)
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// The JSON object carries every public key in SI units.
func TestResultJSONKeys(t *testing.T) {
	r := specFor(t, func(s *Spec) { s.Bias = -2 })
	var m map[string]any
	if err := json.Unmarshal(r.JSON(), &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"thermal_voltage_V", "intrinsic_density_per_m3", "built_in_potential_V", "depletion_width_m",
		"depletion_width_n_m", "depletion_width_p_m", "peak_field_V_per_m", "junction_capacitance_F",
		"electron_mobility_m2_per_Vs", "hole_mobility_m2_per_Vs", "electron_diffusivity_m2_per_s",
		"hole_diffusivity_m2_per_s", "electron_lifetime_s", "hole_lifetime_s", "electron_diffusion_length_m",
		"hole_diffusion_length_m", "saturation_current_density_A_per_m2", "saturation_current_A",
		"ideal_current_A", "current_A"} {
		v, ok := m[k].(float64)
		if !ok || math.IsNaN(v) {
			t.Errorf("key %s missing or not a number: %v", k, m[k])
		}
	}
	// Cj = eps A / W (internal identity).
	cj, _ := r.Get("junction_capacitance_F")
	w, _ := r.Get("depletion_width_m")
	if e := cj * w / r.Spec.Area; math.Abs(e-11.7*8.8541878128e-12) > 1e-3*e {
		t.Errorf("Cj W / A = %g F/m, want eps of Si", e)
	}
}

// At V >= Vbi the result says the depletion approximation fails and the
// JSON carries null, never a number, for the affected values.
func TestResultBeyondBuiltIn(t *testing.T) {
	// Without series resistance the junction itself sits at 1.5 V (with it,
	// the resistance takes the excess and the junction stays below Vbi).
	r := specFor(t, func(s *Spec) { s.Bias = 1.5; s.Effects.NoSeriesResistance = true })
	var m map[string]any
	if err := json.Unmarshal(r.JSON(), &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"depletion_width_m", "peak_field_V_per_m", "junction_capacitance_F"} {
		if m[k] != nil {
			t.Errorf("%s = %v beyond Vbi, want null", k, m[k])
		}
	}
	if m["depletion_valid"] != false {
		t.Errorf("depletion_valid = %v", m["depletion_valid"])
	}
	txt := r.Text(true)
	if !strings.Contains(txt, "depletion-fails") || !strings.Contains(txt, "n/a") {
		t.Errorf("text lacks the failure flag:\n%s", txt)
	}
}

// A temperature outside the mobility model's range is flagged beside the
// values it affects.
func TestFlagsAttachToQuantities(t *testing.T) {
	r := specFor(t, func(s *Spec) { s.Temperature = 150 })
	found := false
	for _, q := range r.Quantities {
		if q.Key == "electron_mobility_m2_per_Vs" {
			for _, f := range q.Flags {
				if f == "mobility-range" {
					found = true
				}
			}
		}
	}
	if !found {
		t.Errorf("mobility at 150 K not flagged")
	}
}

func TestCurves(t *testing.T) {
	s := DefaultSpec()
	iv, err := IVCurve(s, Range{-1, 0.7, 0.01})
	if err != nil {
		t.Fatal(err)
	}
	if len(iv.Xs) != 171 {
		t.Fatalf("points: %d", len(iv.Xs))
	}
	// Components add up to the ideal current.
	for i := range iv.Xs {
		sum := iv.Series[2].Y[i] + iv.Series[3].Y[i]
		if math.Abs(sum-iv.Series[1].Y[i]) > 1e-9*math.Abs(iv.Series[1].Y[i])+1e-30 {
			t.Fatalf("components do not sum at %g V", iv.Xs[i])
		}
	}
	ideal := s
	ideal.Effects = IdealEffects()
	n, err := IdealityCurve(ideal, Range{0.2, 0.7, 0.01})
	if err != nil {
		t.Fatal(err)
	}
	// Ideal diffusion current: local ideality 1 (Shockley 1949).
	for i, v := range n.Series[0].Y {
		if i > 0 && i < len(n.Series[0].Y)-1 && math.Abs(v-1) > 1e-3 {
			t.Fatalf("n(%g V) = %g for the ideal diode", n.Xs[i], v)
		}
	}
	cv, ms, err := CVCurve(s, Range{-5, 0, 0.5})
	if err != nil {
		t.Fatal(err)
	}
	if !(cv.Series[0].Y[0] < cv.Series[0].Y[len(cv.Xs)-1]) || len(ms.Xs) != len(cv.Xs) {
		t.Errorf("C must grow toward 0 V")
	}
	if _, err := (Range{0, 1, -0.1}).Points(); err == nil {
		t.Errorf("backward step accepted")
	}
	if _, err := (Range{0, 1e6, 1e-3}).Points(); err == nil {
		t.Errorf("billion-point sweep accepted")
	}
	ch, fi, po, bands, err := JunctionProfiles(s, 200)
	if err != nil || len(ch.Xs) == 0 || len(fi.Xs) != len(po.Xs) || len(bands.Series) != 4 {
		t.Fatalf("profiles: %v", err)
	}
	// Band bending equals Vbi - V: Ec(p side) - Ec(n side).
	ec := bands.Series[0].Y
	if d := ec[0] - ec[len(ec)-1]; math.Abs(d-r0(t, s).Static.Vbi) > 1e-6 {
		t.Errorf("band bending %g, Vbi %g", d, r0(t, s).Static.Vbi)
	}
	s.Bias = 0.5
	dens, cur, err := MinorityProfiles(s, 50)
	if err != nil || len(dens.Xs) != 100 || len(cur.Xs) != 100 {
		t.Fatalf("minority profiles: %v", err)
	}
	isC, vfC, err := TemperatureCurves(s, Range{250, 400, 10}, 1e-3)
	if err != nil {
		t.Fatal(err)
	}
	for i := 1; i < len(isC.Xs); i++ {
		if !(isC.Series[0].Y[i] > isC.Series[0].Y[i-1]) || !(vfC.Series[0].Y[i] < vfC.Series[0].Y[i-1]) {
			t.Fatalf("Is must rise and VF fall with temperature")
		}
	}
}

// In the neutral n region the band diagram must satisfy
// n0 = Nc exp(-(Ec - EFn)/kT) (Boltzmann statistics, Sze & Ng 2007, eq. 1.16)
// at any bias, and EFn - EFp = q Vj.
func TestBandDiagramFermiLevels(t *testing.T) {
	for _, v := range []float64{-2, 0, 0.3} {
		s := DefaultSpec()
		s.Effects = IdealEffects()
		s.Bias = v
		_, _, _, bands, err := JunctionProfiles(s, 200)
		if err != nil {
			t.Fatal(err)
		}
		r := r0(t, s)
		last := len(bands.Xs) - 1
		ec, efn := bands.Series[0].Y[last], bands.Series[3].Y[last]
		want := r.Static.Vt * math.Log(r.Static.Device.Material.Nc(s.Temperature)/s.DonorDensity)
		if math.Abs((ec-efn)-want) > 1e-6 {
			t.Errorf("V=%g: Ec - EFn = %g eV in the n region, want %g", v, ec-efn, want)
		}
		if math.Abs(efn-v) > 1e-9 {
			t.Errorf("V=%g: EFn = %g, want +V", v, efn)
		}
	}
}

func r0(t *testing.T, s Spec) *Result {
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// Benchmarks: one evaluation of the ideal (foundation) model (target
// under 20 us), the same with every real-diode effect on, and a
// 1000-point ideal I-V sweep (target under 1 ms).
func BenchmarkEvaluateIdeal(b *testing.B) {
	s := DefaultSpec()
	s.Bias = -2
	s.Effects = IdealEffects()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Evaluate(s); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkEvaluate(b *testing.B) {
	s := DefaultSpec()
	s.Bias = -2
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Evaluate(s); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkIVSweep1000(b *testing.B) {
	s := DefaultSpec()
	s.Effects = IdealEffects()
	r := Range{-1, 0.999, 0.002}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if c, err := IVCurve(s, r); err != nil || len(c.Xs) != 1000 {
			b.Fatal(err, len(c.Xs))
		}
	}
}
