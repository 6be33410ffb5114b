package physics

import (
	"fmt"
	"math"
)

// Device is a complete pn-junction diode description in SI units: what the
// analytic model needs to compute electrostatics, transport and currents.
type Device struct {
	Material *Material
	Profile  ProfileKind
	// Na and Nd are the p- and n-region dopings, m^-3.
	Na, Nd float64
	// Gradient is the net-doping gradient of a LinearGraded profile, m^-4.
	Gradient float64
	// AcceptorSpecies and DonorSpecies name the dopants ("" = material default).
	AcceptorSpecies, DonorSpecies string
	// Temperature, K.
	Temperature float64
	// Area of the junction, m^2.
	Area float64
	// Wp and Wn are the quasi-neutral widths of the p and n regions, m
	// (+Inf = long).
	Wp, Wn float64
	// Sp and Sn are the recombination velocities of the p-side and n-side
	// contacts, m/s (+Inf = ohmic).
	Sp, Sn float64
	// TauN and TauP override the minority lifetimes (electrons in the p
	// region, holes in the n region), s; 0 selects the doping-dependent
	// default (MinorityLifetime).
	TauN, TauP float64
	// Effects switches the non-ideal effects; the zero value is the ideal
	// Shockley diode (see Effects and RealisticEffects).
	Effects Effects
	// ContactResistance is the contact and lead resistance, ohm, added to
	// the regions' resistance when Effects.SeriesResistance is on.
	ContactResistance float64
	// ShuntResistance is a resistance across the junction, ohm; 0 or +Inf
	// means none. It applies whatever the Effects.
	ShuntResistance float64
	// Light illuminates the junction (the zero value: dark). Its
	// photocurrent (JunctionPhotocurrent) is subtracted from the dark
	// current at every bias, whatever the Effects; in reverse bias with
	// Effects.Breakdown it is multiplied by the avalanche first
	// (MultiplicationAt, Point.Photo).
	Light Light
	// PThickness and NThickness are the layer thicknesses from the
	// metallurgical junction to the contacts used for a long region's
	// series resistance and for punch-through, m; 0 assumes 300 um
	// (flagged). A region with a finite width uses that width instead.
	PThickness, NThickness float64
}

// Flag codes attached to results.
const (
	FlagDepletionFails    = "depletion-fails"    // V >= Vbi
	FlagDepletionMarginal = "depletion-marginal" // Vbi - V < 3 kT/q
	FlagTemperatureRange  = "temperature-range"  // outside the material's trusted range
	FlagMobilityRange     = "mobility-range"     // outside the mobility model's range
	FlagNiFitRange        = "ni-fit-range"       // outside the measured ni fit's range
	FlagDegenerate        = "degenerate"         // doping near or above Nc or Nv
	FlagShortDiffusion    = "short-diffusion"    // quasi-neutral width << L: short base
	FlagIntrinsic         = "intrinsic"          // ni above a tenth of a side's doping
)

// Flag is a validity warning attached to a result, naming the classes of
// results it concerns.
type Flag struct {
	Code    string  // one of the Flag* codes
	Affects []Class // the classes of results the flag concerns
	Message string  // a sentence fit to show a user
}

// Static holds the bias-independent part of a device evaluation.
type Static struct {
	Device Device
	Vt     float64 // thermal voltage kT/q, V
	Eg     float64 // band gap, eV
	Ni     float64 // intrinsic density, m^-3
	// Vbi is the electrostatic built-in potential, V: the one W, Emax, Cj
	// and the breakdown use. It includes incomplete ionisation and, with
	// BGN on, band-gap narrowing split evenly between the band edges,
	// Vbi = Vt ln(p0 n0 / (ni,eff,p ni,eff,n)) (see VbiNoBGN).
	Vbi float64
	// VbiNoBGN is Vt ln(p0 n0 / ni^2), the built-in potential without
	// band-gap narrowing, V (the textbook formula; the depletion-region
	// recombination integral, written with ni, uses it).
	VbiNoBGN float64
	// Tail is the potential carried by the majority-carrier tails at the
	// depletion edges, V: 2kT/q for the step junction, Vbi - Vg for the
	// graded one (Junction.SolveWithTails). GradientVoltage is Vg of the
	// graded junction (NaN for the step junction), V.
	Tail, GradientVoltage float64
	Junction              Junction
	// Minority-carrier transport: electrons in the p region, holes in the n region.
	MuN, MuP float64 // mobilities, m^2/(V s)
	DN, DP   float64 // diffusivities, m^2/s
	TauN     float64 // electron lifetime, s
	TauP     float64 // hole lifetime, s
	// TauNParts and TauPParts are the default lifetime components (also
	// filled when a lifetime is overridden, for reference).
	TauNParts, TauPParts LifetimeParts
	LN, LP               float64 // diffusion lengths, m
	// Majority-carrier mobilities (holes in p, electrons in n), m^2/(V s).
	MuMajP, MuMajN float64
	P, N           QuasiNeutral // the p and n quasi-neutral regions
	JsN, JsP       float64      // electron (p region) and hole (n region) parts of Js, A/m^2
	Js             float64      // saturation current density, A/m^2
	Is, IsN, IsP   float64      // saturation current and its parts, A
	Flags          []Flag

	// Non-ideal effects (filled by Prepare; see Effects).
	Effects Effects
	// AcceptorLevel and DonorLevel are the effective dopant levels.
	AcceptorLevel, DonorLevel DopantLevel
	// P0 and N0 are the majority-carrier densities of the neutral p and n
	// regions, m^-3 (Na and Nd with full ionisation); NaIonised and
	// NdIonised the ionised dopant densities there.
	P0, N0               float64
	NaIonised, NdIonised float64
	// VbiFullIonisation is the built-in potential with full ionisation, V
	// (Vbi itself uses P0 and N0).
	VbiFullIonisation float64
	// DEgP, DEgN are the band-gap narrowing of the p and n regions, eV, and
	// NiEffP, NiEffN the effective intrinsic densities, m^-3; BGNKnown is
	// false when no narrowing model exists for the material.
	DEgP, DEgN     float64
	NiEffP, NiEffN float64
	BGNKnown       bool
	// PEff and NEff are the regions as the diffusion model with the effects
	// sees them (majority density after ionisation, ni_eff).
	PEff, NEff DiffusionSide
	// Photo is the photocurrent under the Device's light by where its
	// pairs were generated, and IL its total, A (zero in the dark).
	Photo Photocurrent
	IL    float64
	// photoDepUniform and photoDepBeam split Photo.Depletion into the
	// uniform generation's part and the monochromatic light's, A (they
	// are multiplied differently: MultiplicationAt).
	photoDepUniform, photoDepBeam float64
	// IsDiffN, IsDiffP and IsDiff are the low-injection diffusion
	// saturation currents with band-gap narrowing and ionisation, A.
	IsDiffN, IsDiffP, IsDiff float64
	// SCR holds the parameters of the depletion-region recombination.
	SCR SCRParams
	// RP, RN are the quasi-neutral regions' resistances, RContact the
	// contact resistance and Rs their sum (0 with SeriesResistance off), ohm;
	// Rsh the shunt resistance (+Inf for none). ResThicknessP/N are the
	// lengths the region resistances were computed over, m.
	RP, RN, RContact, Rs, Rsh    float64
	ResThicknessP, ResThicknessN float64
	// Breakdown is the avalanche breakdown result (Voltage NaN when the
	// Breakdown effect is off or no impact model is known).
	Breakdown Breakdown
	aval      *avalanche
}

// Prepare evaluates everything that does not depend on bias. It returns an
// error for inputs outside the model's domain (non-positive densities,
// temperature, area or widths; an unknown dopant; Na Nd <= ni^2).
//
// Formulas: Vt = kT/q; Eg Varshni; ni (Material.Ni); Vbi
// (BuiltInPotential or GradedBuiltInPotential, then with ionisation and
// band-gap narrowing in prepareEffects); minority mobilities at the
// doping of the region the carrier is minority in (Material.Mobility);
// D = mu kT/q (Einstein); tau (MinorityLifetime or override); L = sqrt(D
// tau); majority densities p0, n0 = N/2 + sqrt(N^2/4 + ni^2)
// (MajorityDensity); Js = q ni^2 [Dn/(Ln p0) G_p + Dp/(Lp n0) G_n]
// (SaturationCurrentDensity); Is = A Js.
func (d Device) Prepare() (*Static, error) {
	m := d.Material
	if m == nil {
		return nil, fmt.Errorf("no material")
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"acceptor density", d.Na}, {"donor density", d.Nd}, {"temperature", d.Temperature}, {"area", d.Area}, {"p width", d.Wp}, {"n width", d.Wn}} {
		if !(c.v > 0) || math.IsNaN(c.v) {
			return nil, fmt.Errorf("%s must be positive, got %g", c.name, c.v)
		}
	}
	if d.Profile == LinearGraded && !(d.Gradient > 0 && !math.IsInf(d.Gradient, 1)) {
		return nil, fmt.Errorf("gradient must be positive and finite for a linearly graded junction, got %g", d.Gradient)
	}
	donor := d.DonorSpecies
	if donor == "" {
		donor = m.DefaultDonor
	}
	acceptor := d.AcceptorSpecies
	if acceptor == "" {
		acceptor = m.DefaultAcceptor
	}
	if dd, ok := m.Dopant(donor); !ok || !dd.Donor {
		return nil, fmt.Errorf("%q is not a donor known in %s (known: %v)", donor, m.Name, m.DopantNames(true))
	} else {
		donor = dd.Name
	}
	if da, ok := m.Dopant(acceptor); !ok || da.Donor {
		return nil, fmt.Errorf("%q is not an acceptor known in %s (known: %v)", acceptor, m.Name, m.DopantNames(false))
	} else {
		acceptor = da.Name
	}
	d.DonorSpecies, d.AcceptorSpecies = donor, acceptor

	t := d.Temperature
	s := &Static{Device: d, Vt: ThermalVoltage(t), Eg: m.BandGap(t), Ni: m.Ni(t)}
	if d.Na*d.Nd <= s.Ni*s.Ni {
		return nil, fmt.Errorf("Na Nd = %.3g m^-6 does not exceed ni^2 = %.3g m^-6 at %g K: no junction forms", d.Na*d.Nd, s.Ni*s.Ni, t)
	}
	s.Junction = Junction{Eps: m.Permittivity(), Na: d.Na, Nd: d.Nd, Profile: d.Profile, Gradient: d.Gradient}
	s.Vbi = s.Junction.GradedBuiltInPotential(s.Ni, t)
	if math.IsInf(s.Vbi, 0) || math.IsNaN(s.Vbi) || !(s.Ni > 0) {
		return nil, fmt.Errorf("the intrinsic density of %s at %g K (%.3g m^-3) is outside floating-point range: no junction model applies", m.Name, t, s.Ni)
	}

	s.MuN = m.Mobility(Electron, d.Na, t, donor)
	s.MuP = m.Mobility(Hole, d.Nd, t, donor)
	s.MuMajP = m.Mobility(Hole, d.Na, t, donor)
	s.MuMajN = m.Mobility(Electron, d.Nd, t, donor)
	s.DN, s.DP = Diffusivity(s.MuN, t), Diffusivity(s.MuP, t)
	s.TauNParts = m.MinorityLifetime(Electron, d.Na)
	s.TauPParts = m.MinorityLifetime(Hole, d.Nd)
	s.TauN, s.TauP = s.TauNParts.Total, s.TauPParts.Total
	if d.TauN > 0 {
		s.TauN = d.TauN
	}
	if d.TauP > 0 {
		s.TauP = d.TauP
	}
	// The regions' majority densities from neutrality with ni (they differ
	// from the dopings only near the intrinsic regime, FlagIntrinsic).
	s.P = QuasiNeutral{Doping: MajorityDensity(d.Na, s.Ni), Diffusivity: s.DN, Lifetime: s.TauN, Width: d.Wp, Recombination: d.Sp}
	s.N = QuasiNeutral{Doping: MajorityDensity(d.Nd, s.Ni), Diffusivity: s.DP, Lifetime: s.TauP, Width: d.Wn, Recombination: d.Sn}
	s.LN, s.LP = s.P.DiffusionLength(), s.N.DiffusionLength()
	s.JsN = s.P.SaturationCurrentDensity(s.Ni)
	s.JsP = s.N.SaturationCurrentDensity(s.Ni)
	s.Js = s.JsN + s.JsP
	s.IsN, s.IsP = s.JsN*d.Area, s.JsP*d.Area
	s.Is = s.Js * d.Area
	s.Flags = s.staticFlags()
	if err := s.prepareEffects(); err != nil {
		return nil, err
	}
	if d.Light.Lit() {
		pc, err := JunctionPhotocurrent(s.PEff.QuasiNeutral, s.NEff.QuasiNeutral, s.DepletionAt(0).W, d.Area, d.Light)
		if err != nil {
			return nil, err
		}
		s.Photo, s.IL = pc, pc.Total()
		beam := d.Light
		beam.Generation = 0
		if beam.Lit() {
			pb, err := JunctionPhotocurrent(s.PEff.QuasiNeutral, s.NEff.QuasiNeutral, s.DepletionAt(0).W, d.Area, beam)
			if err != nil {
				return nil, err
			}
			s.photoDepBeam = pb.Depletion
		}
		s.photoDepUniform = pc.Depletion - s.photoDepBeam
	}
	return s, nil
}

func (s *Static) staticFlags() []Flag {
	m, d, t := s.Device.Material, s.Device, s.Device.Temperature
	var f []Flag
	if t < m.TMin || t > m.TMax {
		f = append(f, Flag{FlagTemperatureRange, []Class{ClassAll},
			fmt.Sprintf("%g K is outside %g-%g K, the range %s's parameters are trusted over", t, m.TMin, m.TMax, m.Name)})
	}
	if t < m.MobilityTMin || t > m.MobilityTMax {
		f = append(f, Flag{FlagMobilityRange, []Class{ClassTransport, ClassSaturation, ClassDiffusionCurrent},
			fmt.Sprintf("mobility model used outside its %g-%g K range", m.MobilityTMin, m.MobilityTMax)})
	}
	if m.NiFit != nil && (t < m.NiFit.TMin || t > m.NiFit.TMax) {
		f = append(f, Flag{FlagNiFitRange, []Class{ClassIntrinsic, ClassBuiltIn, ClassSaturation, ClassDiffusionCurrent},
			fmt.Sprintf("intrinsic density extrapolated: the fit of %s covers %g-%g K", m.NiFit.Source, m.NiFit.TMin, m.NiFit.TMax)})
	}
	if d.Na > 0.1*m.Nv(t) || d.Nd > 0.1*m.Nc(t) {
		f = append(f, Flag{FlagDegenerate, []Class{ClassBuiltIn, ClassIonisation, ClassSaturation, ClassDiffusionCurrent},
			"doping above a tenth of the effective density of states: Boltzmann statistics and full ionisation are doubtful"})
	}
	if s.Ni > 0.1*math.Min(d.Na, d.Nd) {
		f = append(f, Flag{FlagIntrinsic, []Class{ClassIntrinsic, ClassBuiltIn, ClassIonisation, ClassSaturation, ClassDepletion, ClassCapacitance},
			fmt.Sprintf("intrinsic regime: ni = %.3g cm^-3 exceeds a tenth of a side's doping (Na %.3g, Nd %.3g cm^-3); majority densities from n0 = N/2 + sqrt(N^2/4 + ni^2), and the junction fades as ni approaches the doping", s.Ni/perCm3, d.Na/perCm3, d.Nd/perCm3)})
	}
	if (!math.IsInf(d.Wp, 1) && d.Wp < 0.1*s.LN) || (!math.IsInf(d.Wn, 1) && d.Wn < 0.1*s.LP) {
		f = append(f, Flag{FlagShortDiffusion, []Class{ClassSaturation},
			"a quasi-neutral region is much shorter than its diffusion length: the contact sets the current (short base)"})
	}
	return f
}

// Point is the bias-dependent part of an evaluation.
type Point struct {
	V         float64   // applied bias, V (forward positive)
	Depletion Depletion // depletion-approximation electrostatics
	// CapPerArea and Cap are the depletion capacitance per area (F/m^2) and
	// total (F); NaN when the depletion approximation fails.
	CapPerArea, Cap float64
	// IdealCurrent is the Shockley current Is (exp(V/Vt) - 1), A, and
	// IdealN, IdealP its electron and hole parts.
	IdealCurrent, IdealN, IdealP float64
	// Current is the total with every enabled effect, A (the ideal current
	// until non-ideal effects are enabled).
	Current float64
	Flags   []Flag

	// Vj is the junction voltage, V (V minus the series-resistance drop).
	Vj float64
	// Textbook is the plain depletion approximation at Vj (no
	// majority-carrier tails, the built-in potential Vbi itself), and
	// CapTextbook its capacitance, F: the values of the textbook formulas
	// (Sze & Ng 2007, eqs. 2.10-2.14 and 2.33-2.36) for comparison.
	Textbook    Depletion
	CapTextbook float64
	// DiffusionN and DiffusionP are the electron (from the p region) and
	// hole (from the n region) diffusion currents with the enabled effects,
	// Diffusion their sum; Recombination and Generation the positive and
	// negative parts of the depletion-region SRH current; Shunt the shunt
	// current, A. Reverse currents include the avalanche multiplication,
	// so Diffusion + Recombination + Generation + Shunt = Current.
	DiffusionN, DiffusionP, Diffusion float64
	Recombination, Generation         float64
	Shunt                             float64
	// Photo is the photocurrent taken from the total, A (0 in the dark),
	// so that Diffusion + Recombination + Generation + Shunt - Photo =
	// Current. In reverse bias it is multiplied by the avalanche like the
	// dark current of the same carriers (the p region's part by Mn, the n
	// region's by Mp, the depletion region's by Mgen and Mbeam:
	// MultiplicationAt); at zero and forward junction voltage it is IL.
	Photo float64
	// PhotoGain is Photo / IL, the avalanche gain of the photocurrent (1
	// in the dark, at zero and forward bias and with Breakdown off; NaN
	// beyond breakdown).
	PhotoGain float64
	// Mn, Mp and Mgen are the avalanche multiplication factors of electrons
	// injected from the p side, holes from the n side and pairs generated
	// uniformly in the depletion region, and Mbeam that of the pairs of
	// the monochromatic light absorbed there (1 in forward bias or with
	// Breakdown off; MultiplicationAt).
	Mn, Mp, Mgen, Mbeam float64
	// MultiplicationCapped is true when a factor reached MaxMultiplication.
	MultiplicationCapped bool
	// SeriesDrop is I Rs, V.
	SeriesDrop float64
	// InjectionP and InjectionN are the excess minority densities at the
	// p-side and n-side depletion edges relative to the majority density.
	InjectionP, InjectionN float64
	// Conductance is dI/dV at the terminals, S; Ideality the local ideality
	// factor n = I/(Vt dI/dV) (NaN unless I > 0).
	Conductance, Ideality float64
	// DiffusionCap is the low-frequency diffusion (storage) capacitance,
	// F; TotalCap = Cap + DiffusionCap with the depletion part taken where
	// the depleted drop is 2 Vt, min(Vj, Vbi - Tail - 2 Vt), where the
	// depletion approximation fails.
	DiffusionCap, TotalCap float64
	// Power is the dissipated power |V I|, W.
	Power float64
	// Converged reports whether the self-consistent solution converged;
	// Iterations counts its steps.
	Converged  bool
	Iterations int
}

// At evaluates the device at bias v (V, forward positive) with every
// enabled effect: the junction voltage Vj from V = Vj + I Rs (Solve), the
// current components, the depletion electrostatics at Vj, the small-signal
// conductance, ideality and capacitances. The electrostatics include the
// majority-carrier tails (DepletionAt); Point.Textbook keeps the plain
// depletion approximation.
func (s *Static) At(v float64) Point {
	p := s.Solve(v)
	p.Depletion = s.DepletionAt(p.Vj)
	p.CapPerArea = p.Depletion.CapPerArea
	p.Cap = p.CapPerArea * s.Device.Area
	p.Textbook = s.Junction.Solve(s.Vbi, p.Vj)
	p.CapTextbook = p.Textbook.CapPerArea * s.Device.Area
	s.smallSignal(&p)
	switch {
	case !p.Depletion.Valid:
		p.Flags = append(p.Flags, Flag{FlagDepletionFails, []Class{ClassDepletion, ClassCapacitance}, p.Depletion.Problem})
	case p.Depletion.Drop() < 3*s.Vt:
		p.Flags = append(p.Flags, Flag{FlagDepletionMarginal, []Class{ClassDepletion, ClassCapacitance},
			fmt.Sprintf("the depleted region holds less than 3 kT/q (built-in potential %.3f V less %.3g V in the majority-carrier tails): the depletion approximation is rough here", s.Vbi, s.Tail)})
	}
	return p
}

// DepletionAt returns the depletion solution at junction voltage vj (V)
// with the majority-carrier tails (Junction.SolveWithTails with Tail).
func (s *Static) DepletionAt(vj float64) Depletion {
	return s.Junction.SolveWithTails(s.Vbi, s.Tail, vj)
}
