package model

import "fmt"

// This file is the one list of the junction's fields and effect switches:
// for each member of Spec its session key, command-line flag, label, unit
// kind, help and accessors. The command line builds its junction flags
// from it and the session comparison its labels; a test proves that every
// Spec member is in it.

// FieldClass tells how a catalogue field is typed and edited.
type FieldClass int

// Field classes.
const (
	// ClassValue is a number in trade units of the field's Kind.
	ClassValue FieldClass = iota
	// ClassText is a word: a material, a profile, a species, a model set.
	ClassText
	// ClassEffect is a switch that turns one non-ideal effect off.
	ClassEffect
)

// CatalogueField describes one member of Spec (or of Spec.Effects).
type CatalogueField struct {
	// Key is the member's JSON key in a session; a member of the effects
	// object is written "effects.KEY".
	Key string
	// Flag is the command-line flag (without dashes); for value and text
	// fields it is also the field name Validate reports (the Field*
	// constants).
	Flag string
	// Label names the quantity for people, with its symbol when it has one.
	Label string
	// Class is how the field is typed.
	Class FieldClass
	// Kind is the unit kind of a ClassValue field.
	Kind Kind
	// Help is the one-line description of the flag, with an example.
	Help string
	// Zero is what a zero or absent value means, shown instead of the
	// number ("" = show the number).
	Zero string
	// Lower says a ClassText word is read case-insensitively and stored
	// in lower case.
	Lower bool

	num   func(*Spec) (float64, bool)
	setN  func(*Spec, float64)
	text  func(*Spec) *string
	bswit func(*Spec) *bool
}

// Value returns a ClassValue field's value and whether it is set (false
// for an absent optional member such as an ohmic contact's velocity).
func (f CatalogueField) Value(s Spec) (float64, bool) {
	if f.num == nil {
		return 0, false
	}
	return f.num(&s)
}

// SetValue sets a ClassValue field to v (SI units). It panics for another
// class: a programmer's mistake.
func (f CatalogueField) SetValue(s *Spec, v float64) {
	if f.setN == nil {
		panic(fmt.Sprintf("model: SetValue on %s, a field of class %d", f.Key, f.Class))
	}
	f.setN(s, v)
}

// Text returns a ClassText field's word ("" for another class).
func (f CatalogueField) Text(s Spec) string {
	if f.text == nil {
		return ""
	}
	return *f.text(&s)
}

// SetText sets a ClassText field. It panics for another class.
func (f CatalogueField) SetText(s *Spec, v string) {
	if f.text == nil {
		panic(fmt.Sprintf("model: SetText on %s, a field of class %d", f.Key, f.Class))
	}
	*f.text(s) = v
}

// Off reports whether a ClassEffect switch turns its effect off.
func (f CatalogueField) Off(s Spec) bool {
	if f.bswit == nil {
		return false
	}
	return *f.bswit(&s)
}

// SetOff sets a ClassEffect switch. It panics for another class.
func (f CatalogueField) SetOff(s *Spec, off bool) {
	if f.bswit == nil {
		panic(fmt.Sprintf("model: SetOff on %s, a field of class %d", f.Key, f.Class))
	}
	*f.bswit(s) = off
}

// value builds a ClassValue entry on a float64 member.
func value(key, flag, label string, k Kind, zero, help string, p func(*Spec) *float64) CatalogueField {
	return CatalogueField{Key: key, Flag: flag, Label: label, Class: ClassValue, Kind: k, Zero: zero, Help: help,
		num:  func(s *Spec) (float64, bool) { return *p(s), true },
		setN: func(s *Spec, v float64) { *p(s) = v }}
}

// optional builds a ClassValue entry on a *float64 member (nil = absent).
func optional(key, flag, label string, k Kind, zero, help string, p func(*Spec) **float64) CatalogueField {
	return CatalogueField{Key: key, Flag: flag, Label: label, Class: ClassValue, Kind: k, Zero: zero, Help: help,
		num: func(s *Spec) (float64, bool) {
			if *p(s) == nil {
				return 0, false
			}
			return **p(s), true
		},
		setN: func(s *Spec, v float64) { *p(s) = &v }}
}

func text(key, flag, label, zero, help string, p func(*Spec) *string) CatalogueField {
	return CatalogueField{Key: key, Flag: flag, Label: label, Class: ClassText, Zero: zero, Help: help, text: p}
}

func lower(f CatalogueField) CatalogueField {
	f.Lower = true
	return f
}

func effect(key, flag, label, help string, p func(*Spec) *bool) CatalogueField {
	return CatalogueField{Key: "effects." + key, Flag: flag, Label: label, Class: ClassEffect, Help: help, bswit: p}
}

// Catalogue returns the junction's fields and effect switches in display
// order: a new slice each call (the caller may keep or change it).
func Catalogue() []CatalogueField {
	return []CatalogueField{
		lower(text("material", FieldMaterial, "material", "", "semiconductor: si, ge, gaas, 4h-sic (default si)", func(s *Spec) *string { return &s.Material })),
		lower(text("profile", FieldProfile, "doping profile", "", "doping profile: abrupt or linear (default abrupt)", func(s *Spec) *string { return &s.Profile })),
		value("acceptor_density_per_m3", FieldAcceptorDensity, "acceptor doping Na", Density, "", "acceptor doping of the p side, e.g. 1e16cm-3", func(s *Spec) *float64 { return &s.AcceptorDensity }),
		value("donor_density_per_m3", FieldDonorDensity, "donor doping Nd", Density, "", "donor doping of the n side, e.g. 1e15cm-3", func(s *Spec) *float64 { return &s.DonorDensity }),
		value("gradient_per_m4", FieldGradient, "net-doping gradient a", Gradient, "none", "net-doping gradient of a linear profile, e.g. 1e20cm-4", func(s *Spec) *float64 { return &s.Gradient }),
		text("acceptor_species", FieldAcceptorSpecies, "acceptor species", "material default", "acceptor species, e.g. boron (default: the material's usual one)", func(s *Spec) *string { return &s.AcceptorSpecies }),
		text("donor_species", FieldDonorSpecies, "donor species", "material default", "donor species, e.g. phosphorus or arsenic", func(s *Spec) *string { return &s.DonorSpecies }),
		value("temperature_K", FieldTemperature, "temperature T", Temperature, "", "temperature, e.g. 300K or 27C (default 300 K)", func(s *Spec) *float64 { return &s.Temperature }),
		value("area_m2", FieldArea, "junction area A", Area, "", "junction area, e.g. 1mm2, 1e-4cm2, 100um2 (default 1 mm^2)", func(s *Spec) *float64 { return &s.Area }),
		value("bias_V", FieldBias, "bias V", Voltage, "", "applied bias, forward positive (p side positive), e.g. -5V, 0.6V", func(s *Spec) *float64 { return &s.Bias }),
		value("p_width_m", FieldPWidth, "p-side width Wp", Length, "long", "quasi-neutral width of the p side, e.g. 200um (omitted: long)", func(s *Spec) *float64 { return &s.PWidth }),
		value("n_width_m", FieldNWidth, "n-side width Wn", Length, "long", "quasi-neutral width of the n side (omitted: long)", func(s *Spec) *float64 { return &s.NWidth }),
		optional("p_contact_recombination_m_per_s", FieldPContactVelocity, "p contact recombination Sp", Velocity, "ohmic", "recombination velocity of the p-side contact, e.g. 1e3cm/s (omitted: ohmic)", func(s *Spec) **float64 { return &s.PContactVelocity }),
		optional("n_contact_recombination_m_per_s", FieldNContactVelocity, "n contact recombination Sn", Velocity, "ohmic", "recombination velocity of the n-side contact (omitted: ohmic)", func(s *Spec) **float64 { return &s.NContactVelocity }),
		value("electron_lifetime_s", FieldElectronLifetime, "electron lifetime tau_n", Time, "default", "electron lifetime in the p side, e.g. 1us (omitted: doping-dependent default)", func(s *Spec) *float64 { return &s.ElectronLifetime }),
		value("hole_lifetime_s", FieldHoleLifetime, "hole lifetime tau_p", Time, "default", "hole lifetime in the n side (omitted: default)", func(s *Spec) *float64 { return &s.HoleLifetime }),
		value("contact_resistance_ohm", FieldContactResistance, "contact resistance", Resistance, "none", "contact and lead resistance in series, e.g. 0.5ohm (omitted: none)", func(s *Spec) *float64 { return &s.ContactResistance }),
		value("shunt_resistance_ohm", FieldShuntResistance, "shunt resistance", Resistance, "none", "shunt resistance across the junction, e.g. 1Mohm (omitted: none)", func(s *Spec) *float64 { return &s.ShuntResistance }),
		value("p_thickness_m", FieldPThickness, "p layer thickness", Length, "default", "thickness of a long p layer for its resistance and punch-through (omitted: 300 um)", func(s *Spec) *float64 { return &s.PThickness }),
		value("n_thickness_m", FieldNThickness, "n layer thickness", Length, "default", "thickness of a long n layer, e.g. a 525um substrate (omitted: 300 um)", func(s *Spec) *float64 { return &s.NThickness }),
		value("power_limit_W", FieldPowerLimit, "power limit", Power, "default", "flag a bias or sweep dissipating more than this, e.g. 250mW (omitted: 1 W)", func(s *Spec) *float64 { return &s.PowerLimit }),
		value("reference_forward_current_A", FieldForwardCurrent, "reference forward current", Current, "default", "reference forward current of VF, dVF/dT and the storage time (omitted: 1 mA)", func(s *Spec) *float64 { return &s.ForwardCurrent }),
		value("switching_reverse_current_A", FieldReverseCurrent, "switching reverse current", Current, "default", "reverse current the diode is switched to for the storage time (omitted: equal to --if)", func(s *Spec) *float64 { return &s.ReverseCurrent }),
		effect("no_scr_recombination", "no-srh", "effect: depletion-region recombination", "effect off: depletion-region SRH recombination and generation", func(s *Spec) *bool { return &s.Effects.NoSRH }),
		effect("no_high_injection", "no-hli", "effect: high injection", "effect off: high injection", func(s *Spec) *bool { return &s.Effects.NoHighInjection }),
		effect("no_series_resistance", "no-rs", "effect: series resistance", "effect off: series resistance of the regions and --rc", func(s *Spec) *bool { return &s.Effects.NoSeriesResistance }),
		effect("no_band_gap_narrowing", "no-bgn", "effect: band-gap narrowing", "effect off: band-gap narrowing", func(s *Spec) *bool { return &s.Effects.NoBGN }),
		effect("no_incomplete_ionisation", "no-ion", "effect: incomplete ionisation", "effect off: incomplete ionisation (dopants fully ionised)", func(s *Spec) *bool { return &s.Effects.NoIonisation }),
		effect("no_breakdown", "no-breakdown", "effect: avalanche breakdown", "effect off: avalanche breakdown search and multiplication", func(s *Spec) *bool { return &s.Effects.NoBreakdown }),
		text("effects.bgn_model", FieldBGNModel, "band-gap narrowing set", "klaassen1992", "band-gap narrowing set: klaassen1992 (default) or slotboom1976", func(s *Spec) *string { return &s.Effects.BGNModel }),
		text("effects.ionisation_model", FieldIonisationModel, "dopant levels of incomplete ionisation", "single-level", "dopant levels of incomplete ionisation: single-level (default) or lowered", func(s *Spec) *string { return &s.Effects.IonisationModel }),
		value("light.generation_per_m3_s", FieldGeneration, "uniform generation G", GenerationRate, "none", "pair-generation rate uniform through the device, e.g. 1e20cm-3/s (omitted: dark)", func(s *Spec) *float64 { return &s.Light.Generation }),
		value("light.wavelength_m", FieldWavelength, "light wavelength", Length, "none", "wavelength of monochromatic light, e.g. 650nm", func(s *Spec) *float64 { return &s.Light.Wavelength }),
		value("light.power_density_W_per_m2", FieldLightPower, "light power density", PowerDensity, "none", "power density of the monochromatic light entering the surface, e.g. 100mW/cm2 (omitted: dark)", func(s *Spec) *float64 { return &s.Light.PowerDensity }),
		value("light.absorption_per_m", FieldAbsorption, "absorption coefficient alpha", Absorption, "none", "absorption coefficient of the light in the semiconductor, e.g. 3e3/cm", func(s *Spec) *float64 { return &s.Light.Absorption }),
		lower(text("light.illuminated_side", FieldIlluminatedSide, "illuminated side", "p", "illuminated surface: p (default) or n", func(s *Spec) *string { return &s.Light.Side })),
		value("light.irradiance_W_per_m2", FieldIrradiance, "irradiance for the efficiency", PowerDensity, "light power", "incident power density the efficiency refers to (omitted: --light-power)", func(s *Spec) *float64 { return &s.Light.Irradiance }),
	}
}

// CatalogueByFlag returns the catalogue entry with the given flag name.
func CatalogueByFlag(flag string) (CatalogueField, bool) {
	for _, f := range Catalogue() {
		if f.Flag == flag {
			return f, true
		}
	}
	return CatalogueField{}, false
}
