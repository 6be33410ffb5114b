package physics

import (
	"fmt"
	"math"
)

// BGNModel names a band-gap narrowing parameter set.
type BGNModel int

const (
	// BGNKlaassen1992 is the revised Slotboom set V1 = 6.92 mV,
	// N0 = 1.3e17 cm^-3, C = 0.5 of D. B. M. Klaassen, J. W. Slotboom,
	// H. C. de Graaff, Solid-State Electron. 35, 125 (1992), refitted for an
	// intrinsic density near 1.0e10 cm^-3 (from memory); it goes with
	// junco's Misiakos & Tsamakis ni of 9.7e9 cm^-3 at 300 K. The default.
	BGNKlaassen1992 BGNModel = iota
	// BGNSlotboom1976 is the original set V1 = 9 mV, N0 = 1e17 cm^-3,
	// C = 0.5 of J. W. Slotboom, H. C. de Graaff, Solid-State Electron. 19,
	// 857 (1976), fitted with ni = 1.4e10 cm^-3 (from memory); with junco's
	// lower ni it overstates the narrowing.
	BGNSlotboom1976
)

// String returns "klaassen1992" or "slotboom1976".
func (m BGNModel) String() string {
	if m == BGNSlotboom1976 {
		return "slotboom1976"
	}
	return "klaassen1992"
}

// ParseBGNModel accepts "klaassen1992" (or "klaassen", "") and
// "slotboom1976" (or "slotboom").
func ParseBGNModel(s string) (BGNModel, error) {
	switch s {
	case "", "klaassen", "klaassen1992":
		return BGNKlaassen1992, nil
	case "slotboom", "slotboom1976":
		return BGNSlotboom1976, nil
	}
	return 0, fmt.Errorf("unknown band-gap narrowing model %q: choose klaassen1992 or slotboom1976", s)
}

// SlotboomNarrowing returns the apparent band-gap narrowing in eV at total
// doping n (m^-3) for the parameters v1 (V), n0 (m^-3) and c.
//
// Formula: dEg = V1 [ln(N/N0) + sqrt(ln^2(N/N0) + C)]. Source:
// J. W. Slotboom, H. C. de Graaff, Solid-State Electron. 19, 857 (1976).
// Spot values: original set 6.4 meV (1e17 cm^-3), 42.4 (1e18), 83.4 (1e19);
// 1992 set 3.4, 29.1, 60.5 meV (computed).
func SlotboomNarrowing(n, v1, n0, c float64) float64 {
	l := math.Log(n / n0)
	return v1 * (l + math.Sqrt(l*l+c))
}

// BandGapNarrowing returns the apparent band-gap narrowing (eV) of
// material m at total doping n (m^-3) by model bm, and false when junco
// has no parameter set for the material (then 0).
//
// The narrowing raises the effective intrinsic density of the region:
// ni_eff^2 = ni^2 exp(dEg/kT) (Slotboom & de Graaff 1976), used for the
// minority-carrier density and so the saturation current of that region
// only; the electrostatic built-in potential keeps ni. Parameter sets exist
// for silicon only; they were fitted near 300 K and are applied unchanged
// at other temperatures (the apparent narrowing is nearly temperature
// independent in Slotboom & de Graaff's data; approximate, flagged outside
// 200-500 K).
func BandGapNarrowing(m *Material, bm BGNModel, n float64) (float64, bool) {
	if m.Key != "si" {
		return 0, false
	}
	if bm == BGNSlotboom1976 {
		return SlotboomNarrowing(n, 9e-3, 1e17*perCm3, 0.5), true
	}
	return SlotboomNarrowing(n, 6.92e-3, 1.3e17*perCm3, 0.5), true
}

// BGN validity range of the temperature, K (see BandGapNarrowing).
const bgnTMin, bgnTMax = 200.0, 500.0
