package model

import (
	"encoding/json"
	"math"
	"slices"
	"testing"

	"junco/physics"
)

// The minority-carrier and diffusion-current profiles are driven by the
// junction voltage and the edge densities the results use. Reference: the
// high-injection boundary condition at the depletion edge, p n = ni^2
// exp(qVj/kT) with neutrality n = N + p' (Sze & Ng 2007, section 2.3.2;
// R. M. Warner, B. L. Grung, Transistors (1983), ch. 3; from memory), solved
// here as the quadratic p'^2 + (N + p0) p' - ni^2 (exp(Vj/Vt) - 1) = 0 at
// the junction voltage of the results. At 1.2 V the default diode (series
// resistance on) carries its current at Vj near 0.7 V; driven by the
// applied bias in an ideal exponent the chart showed 1e25 cm^-3, above
// silicon's 5e22 atoms per cm^3 (identity: an excess density cannot exceed
// the atom density).
func TestMinorityProfilesFollowJunctionVoltage(t *testing.T) {
	s := DefaultSpec()
	s.Bias = 1.2
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	st, p := r.Static, r.Point
	dens, cur, err := MinorityProfiles(s, 50)
	if err != nil {
		t.Fatal(err)
	}
	// n side edge: the first point of the second half (the p side comes
	// first, ending at its edge).
	i0 := len(dens.Xs) / 2
	if dens.Xs[i0] != 0 || dens.Xs[i0+1] <= 0 {
		t.Fatalf("n-side edge not at index %d: %v", i0, dens.Xs[i0:i0+2])
	}
	nd := st.NEff.Doping
	ni2 := st.NEff.NiEff * st.NEff.NiEff
	p0 := ni2 / nd
	x := ni2 * math.Expm1(p.Vj/st.Vt)
	want := (-(nd + p0) + math.Sqrt((nd+p0)*(nd+p0)+4*x)) / 2
	if got := dens.Series[0].Y[i0]; math.Abs(got/want-1) > 1e-6 {
		t.Errorf("n-side edge density %.5g m^-3, high-injection law at Vj = %.4f V gives %.5g", got, p.Vj, want)
	}
	if jEdge := cur.Series[0].Y[i0] * st.Device.Area; math.Abs(jEdge/p.DiffusionP-1) > 1e-9 {
		t.Errorf("edge current %.5g A, the results' hole diffusion current %.5g A", jEdge, p.DiffusionP)
	}
	for _, v := range dens.Series[0].Y {
		if v > 5e22*1e6 {
			t.Fatalf("excess density %.3g m^-3 above the atom density of silicon", v)
		}
	}
}

// The intrinsic-regime flag attaches to the quantities it concerns in the
// existing way (by label): Si at 600 K with Nd = 1e15 cm^-3, where ni =
// 4.2e15 cm^-3 exceeds the doping (n0 = N/2 + sqrt(N^2/4 + ni^2), Neamen
// 4th ed., eq. 4.60). The JSON names the ionisation model used.
func TestIntrinsicFlagAndIonisationModelInResult(t *testing.T) {
	s := DefaultSpec()
	s.DonorDensity = 1e15 * 1e6
	s.Temperature = 600
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{"built_in_potential_V", "saturation_current_A", "electron_density_n_side_per_m3", "depletion_width_m"} {
		ok := false
		for _, q := range r.Quantities {
			if q.Key == key {
				ok = slices.Contains(q.Flags, physics.FlagIntrinsic)
			}
		}
		if !ok {
			t.Errorf("%s not marked %q", key, physics.FlagIntrinsic)
		}
	}
	var m map[string]any
	if err := json.Unmarshal(r.JSON(), &m); err != nil {
		t.Fatal(err)
	}
	if m["ionisation_model"] != "single-level" {
		t.Errorf("ionisation_model %v, want single-level", m["ionisation_model"])
	}
}
