package physics

import (
	"math"
	"testing"
)

// Band-gap narrowing against the published models' own formula,
// dEg = V1 [ln(N/N0) + sqrt(ln^2(N/N0) + C)]: Slotboom & de Graaff,
// Solid-State Electron. 19, 857 (1976) (V1 9 mV, N0 1e17 cm^-3, C 0.5) and
// the Klaassen, Slotboom & de Graaff, Solid-State Electron. 35, 125 (1992)
// revision (V1 6.92 mV, N0 1.3e17 cm^-3); spot values computed from those
// parameters (computed), compared to the
// printed 0.1 meV.
func TestBandGapNarrowingSpotValues(t *testing.T) {
	si, _ := MaterialByName("si")
	for _, c := range []struct {
		m    BGNModel
		n    float64 // cm^-3
		want float64 // meV
	}{
		{BGNSlotboom1976, 1e17, 6.4}, {BGNSlotboom1976, 1e18, 42.4}, {BGNSlotboom1976, 1e19, 83.4},
		{BGNKlaassen1992, 1e17, 3.4}, {BGNKlaassen1992, 1e18, 29.1}, {BGNKlaassen1992, 1e19, 60.5},
	} {
		got, ok := BandGapNarrowing(si, c.m, c.n*perCm3)
		if !ok || math.Abs(got*1e3-c.want) > 0.05 {
			t.Errorf("%s at %g cm^-3: %.3f meV, want %.1f", c.m, c.n, got*1e3, c.want)
		}
	}
	gaas, _ := MaterialByName("gaas")
	if _, ok := BandGapNarrowing(gaas, BGNKlaassen1992, 1e25); ok {
		t.Errorf("GaAs has no BGN set here")
	}
}

// ni_eff^2 = ni^2 exp(dEg/kT) enters the region's saturation current only:
// a p+ emitter at 1e19 cm^-3 carries exp(60.5 meV/kT) ~ 10x the electron
// current of the ideal model; the built-in potential without narrowing
// (VbiNoBGN) keeps ni (the electrostatic one: TestBuiltInPotentialWithBGN).
func TestBandGapNarrowingInSaturationCurrent(t *testing.T) {
	d := siDiode()
	d.Effects = Effects{BGN: true}
	s := prep(t, d)
	ratio := s.IsDiffN / s.IsN
	want := math.Exp(s.DEgP / s.Vt)
	if math.Abs(ratio/want-1) > 1e-9 {
		t.Errorf("Is,n ratio %g, want exp(dEg/kT) = %g", ratio, want)
	}
	if s.VbiNoBGN != s.VbiFullIonisation {
		t.Errorf("BGN changed Vbi")
	}
}
