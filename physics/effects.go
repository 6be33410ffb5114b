package physics

// Effects switches the non-ideal effects of the diode model on or off. The
// zero value is the ideal Shockley diode (every effect off), so that code
// which builds a Device without naming effects keeps the ideal behaviour;
// RealisticEffects returns the default set that junco shows a user.
type Effects struct {
	// SRH adds the space-charge-region recombination (forward) and
	// generation (reverse) current of Sah, Noyce and Shockley (1957),
	// integrated over the depletion region (SCRCurrentDensity).
	SRH bool
	// HighInjection replaces the low-injection law of the junction by the
	// boundary condition n p = ni^2 exp(V/Vt) with charge neutrality at the
	// depletion edges (DiffusionSide).
	HighInjection bool
	// SeriesResistance adds the resistance of the quasi-neutral regions and
	// the contact resistance, solved self-consistently (V = Vj + I Rs). The
	// shunt resistance applies whenever it is set, independent of this
	// switch.
	SeriesResistance bool
	// BGN adds band-gap narrowing at heavy doping to each region's
	// minority-carrier density (BandGapNarrowing).
	BGN bool
	// Ionisation replaces full ionisation by the Fermi-Dirac occupation of
	// the dopant levels in the neutral regions (IonisedDensity).
	Ionisation bool
	// Breakdown searches the avalanche breakdown voltage from the
	// ionisation integral and multiplies the reverse current, dark and
	// photocurrent alike, by the avalanche multiplication factors
	// (Breakdown, MultiplicationAt).
	Breakdown bool
	// BGNModel selects the band-gap narrowing parameter set.
	BGNModel BGNModel
	// IonisationModel selects the dopant-level description of Ionisation;
	// the zero value is the textbook single level.
	IonisationModel IonisationModel
}

// RealisticEffects returns the default set of effects: every effect on,
// band-gap narrowing by Klaassen, Slotboom and de Graaff (1992), the
// single-level ionisation model.
func RealisticEffects() Effects {
	return Effects{SRH: true, HighInjection: true, SeriesResistance: true, BGN: true, Ionisation: true,
		Breakdown: true, BGNModel: BGNKlaassen1992}
}

// Any reports whether any effect is on.
func (e Effects) Any() bool {
	return e.SRH || e.HighInjection || e.SeriesResistance || e.BGN || e.Ionisation || e.Breakdown
}

// Flag codes of the non-ideal effects.
const (
	FlagHighInjection     = "high-injection"    // injected minority density above 10% of the doping
	FlagNotConverged      = "not-converged"     // the self-consistent series-resistance solution failed
	FlagBeyondBreakdown   = "beyond-breakdown"  // reverse bias beyond the avalanche breakdown voltage
	FlagNearBreakdown     = "near-breakdown"    // avalanche multiplication above 1.1
	FlagTunnelling        = "tunnelling"        // breakdown below 6 Eg/q: Zener tunnelling competes or dominates
	FlagPunchThrough      = "punch-through"     // a region is thinner than the depletion width at breakdown
	FlagAssumedThickness  = "assumed-thickness" // a long region's thickness was assumed
	FlagIncompleteIon     = "incomplete-ionisation"
	FlagMottTransition    = "mott-transition" // doping within x10 below the dopant's Mott density
	FlagBGNModel          = "bgn-model"       // no band-gap narrowing parameters or outside their range
	FlagImpactRange       = "impact-ionisation-range"
	FlagLifetimeTemp      = "lifetime-temperature" // lifetimes are taken as temperature independent
	FlagSeriesDominates   = "series-resistance"    // the series drop exceeds 10% of the forward bias
	FlagBreakdownNotFound = "breakdown-not-found"
	// FlagBreakdownTemperature: breakdown away from 300 K with a
	// temperature law not checked against measurement.
	FlagBreakdownTemperature = "breakdown-temperature"
)

// gl8 returns the Gauss-Legendre 8-point nodes (positive half) and
// weights (Abramowitz & Stegun 1964, table 25.4); a fresh array each call,
// so that no caller can change the rule.
func gl8() [4][2]float64 {
	return [4][2]float64{
		{0.9602898564975363, 0.1012285362903763},
		{0.7966664774136267, 0.2223810344533745},
		{0.5255324099163290, 0.3137066458778873},
		{0.1834346424956498, 0.3626837833783620},
	}
}

// gl10 returns the Gauss-Legendre 10-point nodes (positive half) and
// weights (Abramowitz & Stegun 1964, table 25.4), like gl8.
func gl10() [5][2]float64 {
	return [5][2]float64{
		{0.9739065285171717, 0.0666713443086881},
		{0.8650633666889845, 0.1494513491505806},
		{0.6794095682990244, 0.2190863625159820},
		{0.4333953941292472, 0.2692667193099963},
		{0.1488743389816312, 0.2955242247147529},
	}
}
