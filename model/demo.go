package model

// Demo is the built-in demo junction the workbench opens on. Its scenario
// and numbers are invented for illustration; they describe no real device,
// lot or laboratory.
type Demo struct {
	// Title is a short name for a status line.
	Title string
	// Short is a shorter title for narrow screens.
	Short string
	// Story is a few sentences about the invented scenario.
	Story string
	// Spec is the junction.
	Spec Spec
}

// DemoJunction returns the built-in demo: test diode D7 from the invented
// wafer lot QM-0417 of the imaginary Quillmere Device Lab, a shallow
// boron-doped p+ layer on a phosphorus-doped n epitaxial layer over an n+
// substrate, probed at a lab temperature of 23 °C.
func DemoJunction() Demo {
	hole := 5e-6              // s, an invented "measured" hole lifetime
	backSurface := 100 * 1e-2 // m/s (100 cm/s): the n+ substrate acts as a low-recombination back contact
	return Demo{
		Title: "test diode D7, lot QM-0417, Quillmere Device Lab",
		Short: "demo diode D7, lot QM-0417",
		Story: "Invented demo data. A 0.5 mm x 0.5 mm test diode from an imaginary wafer lot: " +
			"0.4 um boron p+ layer (5e18 cm^-3) on a 40 um phosphorus n epi layer (2e15 cm^-3) " +
			"over an n+ substrate, hole lifetime 5 us from an invented decay measurement, probed at 23 °C and +0.55 V.",
		Spec: Spec{
			Material:         "si",
			Profile:          "abrupt",
			AcceptorDensity:  5e18 * 1e6,
			DonorDensity:     2e15 * 1e6,
			Gradient:         1e20 * 1e8,
			AcceptorSpecies:  "boron",
			DonorSpecies:     "phosphorus",
			Temperature:      296.15,
			Area:             0.25e-6,
			Bias:             0.55,
			PWidth:           0.4e-6,
			NWidth:           40e-6,
			NContactVelocity: &backSurface,
			HoleLifetime:     hole,
		},
	}
}
