// Package model is what a junco user edits and sees: the junction
// specification, its validation with one error per bad field, parsing and
// formatting of values in trade units, and evaluation into results and
// curves by package physics.
package model

import (
	"fmt"
	"math"
	"strings"

	"junco/physics"
)

// Spec is the junction specification a user edits. All values are SI; the
// JSON names carry the unit. Zero values of the optional fields mean
// "long region" (widths), "material default" (lifetimes, species) and a nil
// contact recombination velocity means an ideal ohmic contact.
type Spec struct {
	Material        string  `json:"material"`
	Profile         string  `json:"profile"` // "abrupt" or "linear"
	AcceptorDensity float64 `json:"acceptor_density_per_m3"`
	DonorDensity    float64 `json:"donor_density_per_m3"`
	// Gradient is the net-doping gradient of a linear profile, m^-4.
	Gradient        float64 `json:"gradient_per_m4,omitempty"`
	AcceptorSpecies string  `json:"acceptor_species,omitempty"`
	DonorSpecies    string  `json:"donor_species,omitempty"`
	Temperature     float64 `json:"temperature_K"`
	Area            float64 `json:"area_m2"`
	Bias            float64 `json:"bias_V"`
	// PWidth and NWidth are the quasi-neutral widths, m; 0 = long.
	PWidth float64 `json:"p_width_m,omitempty"`
	NWidth float64 `json:"n_width_m,omitempty"`
	// PContactVelocity and NContactVelocity are the contact recombination
	// velocities, m/s; nil = ideal ohmic contact.
	PContactVelocity *float64 `json:"p_contact_recombination_m_per_s,omitempty"`
	NContactVelocity *float64 `json:"n_contact_recombination_m_per_s,omitempty"`
	// ElectronLifetime (in the p region) and HoleLifetime (in the n region),
	// s; 0 = the doping-dependent default.
	ElectronLifetime float64 `json:"electron_lifetime_s,omitempty"`
	HoleLifetime     float64 `json:"hole_lifetime_s,omitempty"`

	// Effects switches the non-ideal effects off one by one; the zero value
	// is the realistic default set with every effect on.
	Effects Effects `json:"effects"`
	// ContactResistance is the contact and lead resistance in series with
	// the regions, ohm (0 = none).
	ContactResistance float64 `json:"contact_resistance_ohm,omitempty"`
	// ShuntResistance is a resistance across the junction, ohm (0 = none).
	ShuntResistance float64 `json:"shunt_resistance_ohm,omitempty"`
	// PThickness and NThickness are the layer thicknesses from the junction
	// to the contacts of long regions, m, for their series resistance and
	// punch-through (0 = 300 um assumed).
	PThickness float64 `json:"p_thickness_m,omitempty"`
	NThickness float64 `json:"n_thickness_m,omitempty"`
	// PowerLimit is the dissipated power above which a bias or sweep is
	// flagged, W (0 = 1 W).
	PowerLimit float64 `json:"power_limit_W,omitempty"`
	// ForwardCurrent is the reference forward current of VF, dVF/dT and the
	// storage time, A (0 = 1 mA); ReverseCurrent the reverse current the
	// diode is switched to, A (0 = equal to ForwardCurrent).
	ForwardCurrent float64 `json:"reference_forward_current_A,omitempty"`
	ReverseCurrent float64 `json:"switching_reverse_current_A,omitempty"`

	// Light illuminates the junction (the zero value: dark).
	Light Light `json:"light,omitzero"`
}

// Light is the illumination of a junction: a uniform generation rate, and
// monochromatic light entering one surface, absorbed by Beer-Lambert.
type Light struct {
	// Generation is a pair-generation rate uniform through the device,
	// m^-3 s^-1 (0 = none).
	Generation float64 `json:"generation_per_m3_s,omitempty"`
	// Wavelength (m) and PowerDensity (W/m^2, entering the surface, after
	// any reflection) of monochromatic light; Absorption is its
	// absorption coefficient in the semiconductor, 1/m. PowerDensity 0
	// means none.
	Wavelength   float64 `json:"wavelength_m,omitempty"`
	PowerDensity float64 `json:"power_density_W_per_m2,omitempty"`
	Absorption   float64 `json:"absorption_per_m,omitempty"`
	// Side is the illuminated surface: "p" (default, also "") or "n".
	Side string `json:"illuminated_side,omitempty"`
	// Irradiance is the incident power density the efficiency refers to,
	// W/m^2 (0 = PowerDensity, the monochromatic light's).
	Irradiance float64 `json:"irradiance_W_per_m2,omitempty"`
}

// Lit reports whether the light generates carriers.
func (l Light) Lit() bool { return l.Generation > 0 || l.PowerDensity > 0 }

// IrradianceOrDefault is the power density an efficiency refers to, W/m^2
// (NaN when none is known).
func (l Light) IrradianceOrDefault() float64 {
	switch {
	case l.Irradiance > 0:
		return l.Irradiance
	case l.PowerDensity > 0:
		return l.PowerDensity
	}
	return math.NaN()
}

// Effects switches junco's non-ideal effects off (each field true turns
// one off); the zero value keeps them all on, the realistic default.
type Effects struct {
	// NoSRH drops the depletion-region recombination and generation current
	// (Sah, Noyce, Shockley 1957).
	NoSRH bool `json:"no_scr_recombination,omitempty"`
	// NoHighInjection keeps the low-injection law at every current.
	NoHighInjection bool `json:"no_high_injection,omitempty"`
	// NoSeriesResistance drops the regions' and the contact resistance.
	NoSeriesResistance bool `json:"no_series_resistance,omitempty"`
	// NoBGN drops band-gap narrowing at heavy doping.
	NoBGN bool `json:"no_band_gap_narrowing,omitempty"`
	// NoIonisation assumes fully ionised dopants.
	NoIonisation bool `json:"no_incomplete_ionisation,omitempty"`
	// NoBreakdown skips the avalanche breakdown and multiplication.
	NoBreakdown bool `json:"no_breakdown,omitempty"`
	// BGNModel names the band-gap narrowing set: "klaassen1992" (default,
	// also "") or "slotboom1976".
	BGNModel string `json:"bgn_model,omitempty"`
	// IonisationModel names the dopant-level description of incomplete
	// ionisation: "single-level" (default, also "") or "lowered" (see
	// physics.IonisationModel).
	IonisationModel string `json:"ionisation_model,omitempty"`
}

// IdealEffects returns the switches of the ideal Shockley diode: every
// effect of the catalogue off.
func IdealEffects() Effects {
	var s Spec
	for _, f := range Catalogue() {
		if f.Class == ClassEffect {
			f.SetOff(&s, true)
		}
	}
	return s.Effects
}

// Physics converts the switches into physics.Effects (an unknown BGN model
// falls back to the default; Validate reports it). TestEffectsFromCatalogue
// proves that each switch of the catalogue reaches its own physics switch.
func (e Effects) Physics() physics.Effects {
	bm, _ := physics.ParseBGNModel(e.BGNModel)
	im, _ := physics.ParseIonisationModel(e.IonisationModel)
	return physics.Effects{SRH: !e.NoSRH, HighInjection: !e.NoHighInjection, SeriesResistance: !e.NoSeriesResistance,
		BGN: !e.NoBGN, Ionisation: !e.NoIonisation, Breakdown: !e.NoBreakdown, BGNModel: bm, IonisationModel: im}
}

// DefaultPowerLimit, DefaultForwardCurrent are the values used when the
// Spec leaves them 0.
const (
	DefaultPowerLimit     = 1.0  // W
	DefaultForwardCurrent = 1e-3 // A
)

// PowerLimitOrDefault returns PowerLimit, or DefaultPowerLimit when unset.
func (s Spec) PowerLimitOrDefault() float64 {
	if s.PowerLimit > 0 {
		return s.PowerLimit
	}
	return DefaultPowerLimit
}

// ForwardCurrentOrDefault returns ForwardCurrent, or DefaultForwardCurrent.
func (s Spec) ForwardCurrentOrDefault() float64 {
	if s.ForwardCurrent > 0 {
		return s.ForwardCurrent
	}
	return DefaultForwardCurrent
}

// ReverseCurrentOrDefault returns ReverseCurrent, or the forward current.
func (s Spec) ReverseCurrentOrDefault() float64 {
	if s.ReverseCurrent > 0 {
		return s.ReverseCurrent
	}
	return s.ForwardCurrentOrDefault()
}

// DefaultSpec returns the specification a new junction starts from: a
// silicon p+n step junction at 300 K, 1 mm^2, long regions, ohmic contacts,
// default lifetimes.
func DefaultSpec() Spec {
	return Spec{
		Material:        "si",
		Profile:         "abrupt",
		AcceptorDensity: 1e19 * 1e6,
		DonorDensity:    1e16 * 1e6,
		Gradient:        1e20 * 1e8,
		Temperature:     300,
		Area:            1e-6,
	}
}

// Field names used in FieldError and by user interfaces. They match the
// command-line flag names without dashes.
const (
	FieldMaterial          = "material"
	FieldProfile           = "profile"
	FieldAcceptorDensity   = "na"
	FieldDonorDensity      = "nd"
	FieldGradient          = "gradient"
	FieldAcceptorSpecies   = "acceptor"
	FieldDonorSpecies      = "donor"
	FieldTemperature       = "temp"
	FieldArea              = "area"
	FieldBias              = "bias"
	FieldPWidth            = "wp"
	FieldNWidth            = "wn"
	FieldPContactVelocity  = "sp"
	FieldNContactVelocity  = "sn"
	FieldElectronLifetime  = "taun"
	FieldHoleLifetime      = "taup"
	FieldContactResistance = "rc"
	FieldShuntResistance   = "rsh"
	FieldPThickness        = "tp"
	FieldNThickness        = "tn"
	FieldPowerLimit        = "power-limit"
	FieldForwardCurrent    = "if"
	FieldReverseCurrent    = "ir"
	FieldBGNModel          = "bgn-model"
	FieldIonisationModel   = "ion-model"
	FieldGeneration        = "generation"
	FieldWavelength        = "wavelength"
	FieldLightPower        = "light-power"
	FieldAbsorption        = "absorption"
	FieldIlluminatedSide   = "lit-side"
	FieldIrradiance        = "irradiance"
)

// FieldError reports one bad field: which, the offending value as the user
// would read it, the allowed range and why.
type FieldError struct {
	Field   string // one of the Field* names
	Value   string // the value, formatted in trade units
	Allowed string // the allowed range or set
	Why     string // the reason for the limit
}

func (e FieldError) Error() string {
	return fmt.Sprintf("%s = %s: allowed %s (%s)", e.Field, e.Value, e.Allowed, e.Why)
}

// ValidationError collects the field errors of a Spec.
type ValidationError struct{ Fields []FieldError }

func (e *ValidationError) Error() string {
	parts := make([]string, len(e.Fields))
	for i, f := range e.Fields {
		parts[i] = f.Error()
	}
	return strings.Join(parts, "; ")
}

// For returns the error of one field, if any.
func (e *ValidationError) For(field string) (FieldError, bool) {
	if e == nil {
		return FieldError{}, false
	}
	for _, f := range e.Fields {
		if f.Field == field {
			return f, true
		}
	}
	return FieldError{}, false
}

// Limits of the accepted inputs, SI. Values outside are rejected; values
// inside but outside a model's validity are accepted and flagged.
const (
	minDensity, maxDensity         = 1e12 * 1e6, 1e21 * 1e6 // m^-3
	minGradient, maxGradient       = 1e15 * 1e8, 1e26 * 1e8 // m^-4
	minTemperature, maxTemperature = 20.0, 1000.0           // K
	minArea, maxArea               = 1e-14, 0.1             // m^2 (0.01 um^2 to 1000 cm^2)
	maxReverse, maxForward         = 1e5, 20.0              // V
	minWidth, maxWidth             = 1e-8, 1e-2             // m
	minLifetime, maxLifetime       = 1e-13, 1.0             // s
	maxVelocity                    = 1e7                    // m/s (1e9 cm/s)
	maxContactResistance           = 1e9                    // ohm
	minShunt, maxShunt             = 1e-3, 1e15             // ohm
	minThickness, maxThickness     = 1e-7, 1e-2             // m
	minPower, maxPower             = 1e-9, 1e6              // W
	minRefCurrent, maxRefCurrent   = 1e-15, 1e4             // A
	maxGeneration                  = 1e30                   // m^-3 s^-1 (1e24 cm^-3 s^-1)
	minWavelength, maxWavelength   = 100e-9, 20e-6          // m
	maxPowerDensity                = 1e8                    // W/m^2 (10 kW/cm^2)
	maxAbsorption                  = 1e9                    // 1/m (1e7 1/cm)
)

// Validate checks every field and returns nil or a *ValidationError with one
// FieldError per bad field.
func (s Spec) Validate() error {
	var errs []FieldError
	add := func(field, value, allowed, why string) {
		errs = append(errs, FieldError{Field: field, Value: value, Allowed: allowed, Why: why})
	}
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	rng := func(field string, k Kind, v, lo, hi float64, why string) {
		if !finite(v) || v < lo || v > hi {
			add(field, Format(k, v, 3, true), Format(k, lo, 3, true)+" to "+Format(k, hi, 3, true), why)
		}
	}
	mat, err := physics.MaterialByName(s.Material)
	if err != nil {
		add(FieldMaterial, fmt.Sprintf("%q", s.Material), strings.Join(physics.MaterialKeys(), ", "), "only these materials have parameter sets")
	}
	switch s.Profile {
	case "abrupt", "linear":
	default:
		add(FieldProfile, fmt.Sprintf("%q", s.Profile), "abrupt, linear", "the analytic model knows step and linearly graded junctions")
	}
	const dopWhy = "below, background impurities dominate; above, solid solubility and degeneracy make the model meaningless"
	rng(FieldAcceptorDensity, Density, s.AcceptorDensity, minDensity, maxDensity, dopWhy)
	rng(FieldDonorDensity, Density, s.DonorDensity, minDensity, maxDensity, dopWhy)
	if s.Profile == "linear" {
		rng(FieldGradient, Gradient, s.Gradient, minGradient, maxGradient, "the range of diffused and implanted junction gradients")
	}
	if mat != nil {
		if s.AcceptorSpecies != "" {
			if d, ok := mat.Dopant(s.AcceptorSpecies); !ok || d.Donor {
				add(FieldAcceptorSpecies, fmt.Sprintf("%q", s.AcceptorSpecies), strings.Join(mat.DopantNames(false), ", "), "acceptors with known parameters in "+mat.Name)
			}
		}
		if s.DonorSpecies != "" {
			if d, ok := mat.Dopant(s.DonorSpecies); !ok || !d.Donor {
				add(FieldDonorSpecies, fmt.Sprintf("%q", s.DonorSpecies), strings.Join(mat.DopantNames(true), ", "), "donors with known parameters in "+mat.Name)
			}
		}
	}
	rng(FieldTemperature, Temperature, s.Temperature, minTemperature, maxTemperature, "beyond, no material model here is meaningful")
	rng(FieldArea, Area, s.Area, minArea, maxArea, "from a small test structure to a large power or solar device")
	if !biasInRange(s.Bias) {
		add(FieldBias, Format(Voltage, s.Bias, 3, true), biasAllowed, biasWhy)
	}
	for _, w := range []struct {
		f string
		v float64
	}{{FieldPWidth, s.PWidth}, {FieldNWidth, s.NWidth}} {
		if w.v != 0 {
			rng(w.f, Length, w.v, minWidth, maxWidth, "0 means a long region; otherwise between a thin layer and a whole wafer")
		}
	}
	for _, c := range []struct {
		f string
		v *float64
	}{{FieldPContactVelocity, s.PContactVelocity}, {FieldNContactVelocity, s.NContactVelocity}} {
		if c.v != nil {
			rng(c.f, Velocity, *c.v, 0, maxVelocity, "0 is a perfectly passivated surface; above about 1e7 cm/s the contact is ohmic (leave it unset)")
		}
	}
	for _, l := range []struct {
		f string
		v float64
	}{{FieldElectronLifetime, s.ElectronLifetime}, {FieldHoleLifetime, s.HoleLifetime}} {
		if l.v != 0 {
			rng(l.f, Time, l.v, minLifetime, maxLifetime, "0 selects the doping-dependent default")
		}
	}
	if s.ContactResistance != 0 {
		rng(FieldContactResistance, Resistance, s.ContactResistance, 0, maxContactResistance, "0 means none; above a gigaohm the diode is an open circuit")
	}
	if s.ShuntResistance != 0 {
		rng(FieldShuntResistance, Resistance, s.ShuntResistance, minShunt, maxShunt, "0 means no shunt; below a milliohm the junction is a short circuit")
	}
	for _, w := range []struct {
		f string
		v float64
	}{{FieldPThickness, s.PThickness}, {FieldNThickness, s.NThickness}} {
		if w.v != 0 {
			rng(w.f, Length, w.v, minThickness, maxThickness, "0 assumes 300 um; otherwise between a thin layer and a whole wafer")
		}
	}
	if s.PowerLimit != 0 {
		rng(FieldPowerLimit, Power, s.PowerLimit, minPower, maxPower, "0 selects 1 W")
	}
	if s.ForwardCurrent != 0 {
		rng(FieldForwardCurrent, Current, s.ForwardCurrent, minRefCurrent, maxRefCurrent, "0 selects 1 mA")
	}
	if s.ReverseCurrent != 0 {
		rng(FieldReverseCurrent, Current, s.ReverseCurrent, minRefCurrent, maxRefCurrent, "0 selects the forward current")
	}
	if _, err := physics.ParseBGNModel(s.Effects.BGNModel); err != nil {
		add(FieldBGNModel, fmt.Sprintf("%q", s.Effects.BGNModel), "klaassen1992, slotboom1976", "the band-gap narrowing parameter sets junco knows")
	}
	if _, err := physics.ParseIonisationModel(s.Effects.IonisationModel); err != nil {
		add(FieldIonisationModel, fmt.Sprintf("%q", s.Effects.IonisationModel), "single-level, lowered", "the dopant-level descriptions junco knows")
	}
	errs = append(errs, s.Light.problems()...)
	if len(errs) == 0 {
		return nil
	}
	return &ValidationError{Fields: errs}
}

// Static validates and converts the Spec and prepares the physics for
// evaluation at any bias (physics.Device.Prepare): the one way from a Spec
// to the analytic model, for Evaluate, the curves and the fit layer's
// comparison.
func (s Spec) Static() (*physics.Static, error) {
	d, err := s.Device()
	if err != nil {
		return nil, err
	}
	return d.Prepare()
}

// Device converts a valid Spec into the physics description.
func (s Spec) Device() (physics.Device, error) {
	if err := s.Validate(); err != nil {
		return physics.Device{}, err
	}
	mat, err := physics.MaterialByName(s.Material)
	if err != nil {
		return physics.Device{}, err
	}
	inf := math.Inf(1)
	d := physics.Device{
		Material: mat, Na: s.AcceptorDensity, Nd: s.DonorDensity, Gradient: s.Gradient,
		AcceptorSpecies: s.AcceptorSpecies, DonorSpecies: s.DonorSpecies,
		Temperature: s.Temperature, Area: s.Area,
		Wp: inf, Wn: inf, Sp: inf, Sn: inf,
		TauN: s.ElectronLifetime, TauP: s.HoleLifetime,
		Effects: s.Effects.Physics(), ContactResistance: s.ContactResistance, ShuntResistance: s.ShuntResistance,
		PThickness: s.PThickness, NThickness: s.NThickness,
	}
	if s.Profile == "linear" {
		d.Profile = physics.LinearGraded
	}
	if s.PWidth > 0 {
		d.Wp = s.PWidth
	}
	if s.NWidth > 0 {
		d.Wn = s.NWidth
	}
	if s.PContactVelocity != nil {
		d.Sp = *s.PContactVelocity
	}
	if s.NContactVelocity != nil {
		d.Sn = *s.NContactVelocity
	}
	d.Light = s.Light.Physics()
	return d, nil
}

// The bias range of a Spec: one rule for --bias and every bias sweep.
const (
	biasAllowed = "-100 kV to 20 V"
	biasWhy     = "forward bias beyond a few volts only heats a real diode; reverse beyond breakdown is meaningless"
)

func biasInRange(v float64) bool {
	return !math.IsNaN(v) && !math.IsInf(v, 0) && v >= -maxReverse && v <= maxForward
}

// checkBiases returns a *ValidationError naming field at the first bias
// of vs outside the bias range of a Spec, or nil.
func checkBiases(field string, vs []float64) error {
	for _, v := range vs {
		if !biasInRange(v) {
			return &ValidationError{Fields: []FieldError{{Field: field, Value: Format(Voltage, v, 4, true), Allowed: biasAllowed,
				Why: "the bias range of a Spec: " + biasWhy}}}
		}
	}
	return nil
}

// biasPoints returns the points of the bias sweep r (at most
// MaxSweepPoints), each within the bias range of a Spec; field names the
// sweep in the error.
func biasPoints(r Range, field string) ([]float64, error) {
	vs, err := r.Points()
	if err != nil {
		return nil, err
	}
	if err := checkBiases(field, vs); err != nil {
		return nil, err
	}
	return vs, nil
}
