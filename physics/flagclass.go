package physics

// Class is a kind of result that a validity Flag can concern. Each result
// a front end shows belongs to one or more classes (model's quantity table
// says which), and a flag attaches to the results that share a class with
// it: no label text is matched.
type Class string

// The classes of results.
const (
	ClassAll              Class = "all"                // every result
	ClassIntrinsic        Class = "intrinsic-density"  // ni and ni,eff
	ClassBuiltIn          Class = "built-in-potential" // Vbi in all its forms
	ClassIonisation       Class = "ionisation"         // ionised densities, fractions, majority densities
	ClassNarrowing        Class = "band-gap-narrowing" // dEg and ni,eff
	ClassDepletion        Class = "depletion"          // W, xn, xp, peak field, depletion capacitance
	ClassCapacitance      Class = "capacitance"        // every capacitance
	ClassTransport        Class = "transport"          // mobilities, diffusivities, diffusion lengths
	ClassLifetime         Class = "lifetime"           // minority lifetimes and what follows from them
	ClassSaturation       Class = "saturation-current" // Js, Is and their parts, the Shockley current
	ClassDiffusionCurrent Class = "diffusion-current"  // the diffusion currents at bias
	ClassSCRCurrent       Class = "scr-current"        // depletion-region recombination and generation
	ClassCurrent          Class = "current"            // the total current at bias and what is read from it
	ClassIdeality         Class = "ideality"           // the local ideality factor
	ClassJunctionVoltage  Class = "junction-voltage"   // Vj and the series drop
	ClassSeriesResistance Class = "series-resistance"  // the regions' resistance, Rs, the series drop
	ClassForwardVoltage   Class = "forward-voltage"    // VF and dVF/dT at the reference current
	ClassPower            Class = "power"              // dissipated power
	ClassSwitching        Class = "switching"          // storage time
	ClassBreakdown        Class = "breakdown"          // breakdown voltages and fields
	ClassMultiplication   Class = "multiplication"     // avalanche multiplication
	ClassPunchThrough     Class = "punch-through"      // punch-through voltage
	ClassLight            Class = "light"              // photocurrent and the lit figures of merit
	ClassLightAtBias      Class = "light-at-bias"      // the photocurrent at the bias and its avalanche gain
)

// Concerns reports whether the flag concerns a result of the given
// classes.
func (f Flag) Concerns(classes []Class) bool {
	for _, a := range f.Affects {
		if a == ClassAll {
			return true
		}
		for _, c := range classes {
			if a == c {
				return true
			}
		}
	}
	return false
}
