package model

import (
	"fmt"
	"strings"
)

// This file is the one list of the junction's fields and effect switches:
// for each member of Spec its session key, command-line flag, labels, unit
// kind, help, the group of the workbench's form it is edited in, its
// choices and accessors. The command line builds its junction flags from
// it, the session comparison and report their labels and the workbench its
// form; a test proves that every Spec member is in it.

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
	// Label names the quantity for tables (the session comparison, the
	// report), with its symbol when it has one.
	Label string
	// Class is how the field is typed.
	Class FieldClass
	// Kind is the unit kind of a ClassValue field.
	Kind Kind
	// Help is the one-line description of the flag, with an example.
	Help string
	// Zero is what an empty value (a zero or absent member) means, shown
	// instead of the number; "" = a number field needs a value.
	Zero string
	// Aliases are the words a user may type for the empty value of a
	// number field besides the empty text (for example "long", "0").
	Aliases []string
	// Lower says a ClassText word is read case-insensitively and stored
	// in lower case.
	Lower bool

	// Group is the group (the step of the workbench's form) the field is
	// edited in; Title names the field there and Hint says in one line
	// what it is.
	Group InputGroup
	Title string
	Hint  string
	// Section is a heading drawn above the field in its group ("" = none).
	Section string
	// Parent is the flag of the effect switch a field refines (the
	// parameter set of that effect): the field applies only while the
	// effect is on.
	Parent string
	// Shows is the key of the result quantity that gives the value in
	// force beside the field: the doping-dependent lifetime of an empty
	// lifetime, the band gap of a material.
	Shows string
	// InSolver names, for an effect switch, what of the effect the
	// drift-diffusion solver always contains (its switch then applies to
	// the analytic values only, and a numeric result says so); "" when the
	// solver follows the switch or lacks the effect.
	InSolver string

	zeroEmpty bool // a zero member is the empty value (not only an absent one)
	num       func(*Spec) (float64, bool)
	setN      func(*Spec, float64)
	clear     func(*Spec)
	text      func(*Spec) *string
	bswit     func(*Spec) *bool
	parentOff func(*Spec) *bool
	applies   func(Spec) bool
	choices   func(Spec) []Choice
}

// InputGroup is one group of fields: a step of the workbench's guided
// definition.
type InputGroup int

// The groups, in order.
const (
	InputMaterial InputGroup = iota
	InputDoping
	InputGeometry
	InputLifetimes
	InputConditions
)

// InputGroupInfo describes a group for people.
type InputGroupInfo struct {
	Group InputGroup
	// Name is short (a step bar), Title a heading, Intro one paragraph.
	Name, Title, Intro string
	// Glance lists the keys of the results the group's fields change most,
	// shown under it.
	Glance []string
}

// InputGroups returns the groups of the catalogue in order: a new slice each
// call.
func InputGroups() []InputGroupInfo {
	return []InputGroupInfo{
		{InputMaterial, "Material", "Material", "The semiconductor the junction is made in; its band gap and intrinsic density follow the temperature set under Conditions.",
			[]string{"band_gap_eV", "intrinsic_density_per_m3"}},
		{InputDoping, "Doping", "Doping and profile", "Net impurity levels on each side, the species that supply them, and whether the doping steps or grades across the junction.",
			[]string{"built_in_potential_V", "depletion_width_m"}},
		{InputGeometry, "Geometry", "Geometry and contacts", "Junction area, the neutral widths out to each contact (empty: long), how strongly each contact recombines minority carriers (empty: ohmic), layer thicknesses and the resistances around the junction.",
			[]string{"saturation_current_A", "junction_capacitance_F"}},
		{InputLifetimes, "Lifetimes", "Minority lifetimes", "Leave a lifetime empty to use the doping-dependent value shown beside it; type a measured one to override it.",
			[]string{"electron_diffusion_length_m", "hole_diffusion_length_m"}},
		{InputConditions, "Conditions", "Operating conditions", "Temperature and applied bias (forward is positive: p side positive against the n side), the reference currents, and which non-ideal effects are on.",
			[]string{"depletion_width_m", "saturation_current_A", "current_A"}},
	}
}

// Choice is one value of a choice field: the word stored and its label.
type Choice struct {
	Value, Label string
}

// Value returns a ClassValue field's value and whether one is given:
// false for an empty field, that is an absent optional member (an ohmic
// contact's velocity) or a zero where zero means Zero (a long region).
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

// ZeroIsEmpty reports whether a zero member is the field's empty value (a
// long region, no shunt); false where zero is a value (a perfectly
// passivated contact, a bias of 0 V) and only absence is empty.
func (f CatalogueField) ZeroIsEmpty() bool { return f.zeroEmpty }

// Clear empties the field: the member's zero (or absent) value, which
// means Zero.
func (f CatalogueField) Clear(s *Spec) { f.clear(s) }

// Parse reads the text a user typed for a ClassValue field: the empty
// text or one of Aliases is the empty value (given false) where the field
// has one; anything else is a value in trade units (ParseValue).
func (f CatalogueField) Parse(text string) (v float64, given bool, err error) {
	t := strings.TrimSpace(text)
	if f.Zero != "" && f.Class == ClassValue {
		if t == "" {
			return 0, false, nil
		}
		for _, a := range f.Aliases {
			if strings.EqualFold(t, a) {
				return 0, false, nil
			}
		}
	}
	v, err = ParseValue(f.Kind, t)
	return v, err == nil, err
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

// Choices lists the values a ClassText or ClassEffect field is chosen
// from for the junction s (the species depend on its material; an
// effect is "on" or "off"); nil for a number field.
func (f CatalogueField) Choices(s Spec) []Choice {
	switch {
	case f.Class == ClassEffect:
		return []Choice{{"on", "on"}, {"off", "off"}}
	case f.choices != nil:
		return f.choices(s)
	}
	return nil
}

// Choice returns the chosen value of a ClassText field, or "on"/"off" for
// an effect switch.
func (f CatalogueField) Choice(s Spec) string {
	if f.Class == ClassEffect {
		if f.Off(s) {
			return "off"
		}
		return "on"
	}
	return f.Text(s)
}

// SetChoice sets a ClassText field, or an effect switch from "on"/"off".
func (f CatalogueField) SetChoice(s *Spec, v string) {
	if f.Class == ClassEffect {
		f.SetOff(s, v == "off")
		return
	}
	f.SetText(s, v)
}

// Applies reports whether the field means something for the junction s:
// a gradient only for a graded profile, a layer thickness only for a long
// region, a refinement only while its effect is on.
func (f CatalogueField) Applies(s Spec) bool {
	if f.parentOff != nil && *f.parentOff(&s) {
		return false
	}
	return f.applies == nil || f.applies(s)
}

// value builds a ClassValue entry on a float64 member; where zero means
// something (zero != "") a zero member is the empty value.
func value(key, flag, label string, k Kind, zero, help string, p func(*Spec) *float64) CatalogueField {
	return CatalogueField{Key: key, Flag: flag, Label: label, Class: ClassValue, Kind: k, Zero: zero, Help: help, zeroEmpty: zero != "",
		num:   func(s *Spec) (float64, bool) { v := *p(s); return v, zero == "" || v != 0 },
		setN:  func(s *Spec, v float64) { *p(s) = v },
		clear: func(s *Spec) { *p(s) = 0 }}
}

// optional builds a ClassValue entry on a *float64 member (nil = absent,
// the empty value; zero is a value).
func optional(key, flag, label string, k Kind, zero, help string, p func(*Spec) **float64) CatalogueField {
	return CatalogueField{Key: key, Flag: flag, Label: label, Class: ClassValue, Kind: k, Zero: zero, Help: help,
		num: func(s *Spec) (float64, bool) {
			if *p(s) == nil {
				return 0, false
			}
			return **p(s), true
		},
		setN:  func(s *Spec, v float64) { *p(s) = &v },
		clear: func(s *Spec) { *p(s) = nil }}
}

func text(key, flag, label, zero, help string, p func(*Spec) *string) CatalogueField {
	return CatalogueField{Key: key, Flag: flag, Label: label, Class: ClassText, Zero: zero, Help: help, text: p,
		clear: func(s *Spec) { *p(s) = "" }}
}

// effect builds a ClassEffect entry on the switch p of Spec.Effects.
func effect(key, flag, label, help string, p func(*Spec) *bool) CatalogueField {
	return CatalogueField{Key: "effects." + key, Flag: flag, Label: label, Class: ClassEffect, Help: help, bswit: p,
		clear: func(s *Spec) { *p(s) = false }}
}

// The modifiers below add what the workbench's form needs to an entry.

// form places the entry in group g under the title and hint given.
func (f CatalogueField) form(g InputGroup, title, hint string) CatalogueField {
	f.Group, f.Title, f.Hint = g, title, hint
	return f
}

// empty lists the words typed for the empty value.
func (f CatalogueField) empty(aliases ...string) CatalogueField {
	f.Aliases = aliases
	return f
}

func (f CatalogueField) lower() CatalogueField {
	f.Lower = true
	return f
}

func (f CatalogueField) section(heading string) CatalogueField {
	f.Section = heading
	return f
}

func (f CatalogueField) shows(key string) CatalogueField {
	f.Shows = key
	return f
}

func (f CatalogueField) when(applies func(Spec) bool) CatalogueField {
	f.applies = applies
	return f
}

func (f CatalogueField) refines(parent string) CatalogueField {
	f.Parent = parent
	return f
}

func (f CatalogueField) inSolver(what string) CatalogueField {
	f.InSolver = what
	return f
}

func (f CatalogueField) choose(c func(Spec) []Choice) CatalogueField {
	f.choices = c
	return f
}

// fixed is a choice list that does not depend on the junction.
func fixed(c ...Choice) func(Spec) []Choice { return func(Spec) []Choice { return c } }

// Catalogue returns the junction's fields and effect switches in display
// order (the groups in order, and in each the order of the workbench's
// form): a new slice each call (the caller may keep or change it).
func Catalogue() []CatalogueField {
	cat := []CatalogueField{
		text("material", FieldMaterial, "material", "", "semiconductor: si, ge, gaas, 4h-sic (default si)", func(s *Spec) *string { return &s.Material }).lower().
			form(InputMaterial, "Semiconductor", "host crystal of the junction").choose(materialChoices).shows("band_gap_eV"),

		text("profile", FieldProfile, "doping profile", "", "doping profile: abrupt or linear (default abrupt)", func(s *Spec) *string { return &s.Profile }).lower().
			form(InputDoping, "Doping profile", "step (abrupt) or linearly graded net doping").choose(fixed(Choice{"abrupt", "step (abrupt)"}, Choice{"linear", "linearly graded"})),
		value("acceptor_density_per_m3", FieldAcceptorDensity, "acceptor doping Na", Density, "", "acceptor doping of the p side, e.g. 1e16cm-3", func(s *Spec) *float64 { return &s.AcceptorDensity }).
			form(InputDoping, "Acceptor doping, p side", "net acceptor concentration of the p region"),
		text("acceptor_species", FieldAcceptorSpecies, "acceptor species", "material default", "acceptor species, e.g. boron (default: the material's usual one)", func(s *Spec) *string { return &s.AcceptorSpecies }).
			form(InputDoping, "Acceptor species", "impurity that supplies the holes").choose(func(s Spec) []Choice { return speciesChoices(s.Material, false) }),
		value("donor_density_per_m3", FieldDonorDensity, "donor doping Nd", Density, "", "donor doping of the n side, e.g. 1e15cm-3", func(s *Spec) *float64 { return &s.DonorDensity }).
			form(InputDoping, "Donor doping, n side", "net donor concentration of the n region"),
		text("donor_species", FieldDonorSpecies, "donor species", "material default", "donor species, e.g. phosphorus or arsenic", func(s *Spec) *string { return &s.DonorSpecies }).
			form(InputDoping, "Donor species", "impurity that supplies the electrons").choose(func(s Spec) []Choice { return speciesChoices(s.Material, true) }),
		value("gradient_per_m4", FieldGradient, "net-doping gradient a", Gradient, "none", "net-doping gradient of a linear profile, e.g. 1e20cm-4", func(s *Spec) *float64 { return &s.Gradient }).
			form(InputDoping, "Doping gradient", "slope of the net doping through a graded junction").when(func(s Spec) bool { return s.Profile == "linear" }),

		value("area_m2", FieldArea, "junction area A", Area, "", "junction area, e.g. 1mm2, 1e-4cm2, 100um2 (default 1 mm^2)", func(s *Spec) *float64 { return &s.Area }).
			form(InputGeometry, "Junction area", "area of the junction, e.g. 1mm2, 250um2, 1e-4cm2"),
		value("p_width_m", FieldPWidth, "p-side width Wp", Length, "long", "quasi-neutral width of the p side, e.g. 200um (omitted: long)", func(s *Spec) *float64 { return &s.PWidth }).
			form(InputGeometry, "p-side neutral width", "from the depletion edge to the p contact").empty("long", "inf", "infinite", "0"),
		value("n_width_m", FieldNWidth, "n-side width Wn", Length, "long", "quasi-neutral width of the n side (omitted: long)", func(s *Spec) *float64 { return &s.NWidth }).
			form(InputGeometry, "n-side neutral width", "from the depletion edge to the n contact").empty("long", "inf", "infinite", "0"),
		optional("p_contact_recombination_m_per_s", FieldPContactVelocity, "p contact recombination Sp", Velocity, "ohmic", "recombination velocity of the p-side contact, e.g. 1e3cm/s (omitted: ohmic)", func(s *Spec) **float64 { return &s.PContactVelocity }).
			form(InputGeometry, "p-contact recombination", "surface recombination velocity at the p contact").empty("ohmic"),
		optional("n_contact_recombination_m_per_s", FieldNContactVelocity, "n contact recombination Sn", Velocity, "ohmic", "recombination velocity of the n-side contact (omitted: ohmic)", func(s *Spec) **float64 { return &s.NContactVelocity }).
			form(InputGeometry, "n-contact recombination", "surface recombination velocity at the n contact").empty("ohmic"),
		value("p_thickness_m", FieldPThickness, "p layer thickness", Length, "300 um assumed", "thickness of a long p layer for its resistance and punch-through (omitted: 300 um)", func(s *Spec) *float64 { return &s.PThickness }).
			form(InputGeometry, "p-layer thickness", "junction to p contact, for the series resistance and punch-through of a long region").empty("0", "default").
			when(func(s Spec) bool { return s.PWidth == 0 }),
		value("n_thickness_m", FieldNThickness, "n layer thickness", Length, "300 um assumed", "thickness of a long n layer, e.g. a 525um substrate (omitted: 300 um)", func(s *Spec) *float64 { return &s.NThickness }).
			form(InputGeometry, "n-layer thickness", "junction to n contact, for the series resistance and punch-through of a long region").empty("0", "default").
			when(func(s Spec) bool { return s.NWidth == 0 }),
		value("contact_resistance_ohm", FieldContactResistance, "contact resistance", Resistance, "none", "contact and lead resistance in series, e.g. 0.5ohm (omitted: none)", func(s *Spec) *float64 { return &s.ContactResistance }).
			form(InputGeometry, "Contact resistance", "contacts and leads in series with the diode").empty("none", "0"),
		value("shunt_resistance_ohm", FieldShuntResistance, "shunt resistance", Resistance, "none", "shunt resistance across the junction, e.g. 1Mohm (omitted: none)", func(s *Spec) *float64 { return &s.ShuntResistance }).
			form(InputGeometry, "Shunt resistance", "leakage path across the junction").empty("none", "0", "inf"),

		value("electron_lifetime_s", FieldElectronLifetime, "electron lifetime tau_n", Time, "from doping", "electron lifetime in the p side, e.g. 1us (omitted: doping-dependent default)", func(s *Spec) *float64 { return &s.ElectronLifetime }).
			form(InputLifetimes, "Electron lifetime, p side", "minority electrons in the p region").empty("auto", "default", "doping", "0").shows("electron_lifetime_s"),
		value("hole_lifetime_s", FieldHoleLifetime, "hole lifetime tau_p", Time, "from doping", "hole lifetime in the n side (omitted: default)", func(s *Spec) *float64 { return &s.HoleLifetime }).
			form(InputLifetimes, "Hole lifetime, n side", "minority holes in the n region").empty("auto", "default", "doping", "0").shows("hole_lifetime_s"),

		value("temperature_K", FieldTemperature, "temperature T", Temperature, "", "temperature, e.g. 300K or 27C (default 300 K)", func(s *Spec) *float64 { return &s.Temperature }).
			form(InputConditions, "Temperature", "device temperature, e.g. 300K or 27C"),
		value("bias_V", FieldBias, "bias V", Voltage, "", "applied bias, forward positive (p side positive), e.g. -5V, 0.6V", func(s *Spec) *float64 { return &s.Bias }).
			form(InputConditions, "Applied bias", "forward positive (p side +), e.g. 0.6V, -5V, 650mV"),
		value("reference_forward_current_A", FieldForwardCurrent, "reference forward current", Current, "1 mA", "reference forward current of VF, dVF/dT and the storage time (omitted: 1 mA)", func(s *Spec) *float64 { return &s.ForwardCurrent }).
			form(InputConditions, "Reference forward current", "the current VF, dVF/dT and the storage time are given at").empty("0", "default"),
		value("switching_reverse_current_A", FieldReverseCurrent, "switching reverse current", Current, "same as forward", "reverse current the diode is switched to for the storage time (omitted: equal to --if)", func(s *Spec) *float64 { return &s.ReverseCurrent }).
			form(InputConditions, "Switching reverse current", "reverse current the diode is switched to, for the storage time").empty("0", "default"),
		value("power_limit_W", FieldPowerLimit, "power limit", Power, "1 W", "flag a bias or sweep dissipating more than this, e.g. 250mW (omitted: 1 W)", func(s *Spec) *float64 { return &s.PowerLimit }).
			form(InputConditions, "Power limit for flags", "dissipation above which a bias is flagged").empty("0", "default"),

		effect("no_scr_recombination", "no-srh", "effect: depletion-region recombination", "effect off: depletion-region recombination and generation (Sah, Noyce, Shockley 1957)",
			func(s *Spec) *bool { return &s.Effects.NoSRH }).
			form(InputConditions, "SCR recombination", "recombination and generation in the depletion region").section("Effects switched on").
			inSolver("recombination in the depletion region"),
		effect("no_high_injection", "no-hli", "effect: high injection", "effect off: high injection at the depletion edges",
			func(s *Spec) *bool { return &s.Effects.NoHighInjection }).
			form(InputConditions, "High injection", "the ideality rising towards 2 at high current").inSolver("high injection"),
		effect("no_series_resistance", "no-rs", "effect: series resistance", "effect off: series resistance of the regions and --rc, solved self-consistently",
			func(s *Spec) *bool { return &s.Effects.NoSeriesResistance }).
			form(InputConditions, "Series resistance", "voltage drop in the neutral regions and contacts").inSolver("the resistance of the simulated regions"),
		effect("no_band_gap_narrowing", "no-bgn", "effect: band-gap narrowing", "effect off: band-gap narrowing (Si only)",
			func(s *Spec) *bool { return &s.Effects.NoBGN }).
			form(InputConditions, "Band-gap narrowing", "smaller gap in heavily doped regions"),
		text("effects.bgn_model", FieldBGNModel, "band-gap narrowing set", "klaassen1992", "band-gap narrowing set: klaassen1992 (default; Klaassen, Slotboom, de Graaff 1992) or slotboom1976 (Slotboom, de Graaff 1976)", func(s *Spec) *string { return &s.Effects.BGNModel }).
			form(InputConditions, "narrowing data set", "published parameter set of the band-gap narrowing").refines("no-bgn").
			choose(fixed(Choice{"", "Klaassen 1992 (usual)"}, Choice{"klaassen1992", "Klaassen 1992"}, Choice{"slotboom1976", "Slotboom 1976"})),
		effect("no_incomplete_ionisation", "no-ion", "effect: incomplete ionisation", "effect off: incomplete ionisation of the dopants (Fermi-Dirac occupation of their levels)",
			func(s *Spec) *bool { return &s.Effects.NoIonisation }).
			form(InputConditions, "Incomplete ionisation", "dopants not all ionised (shallow levels, low temperature)"),
		text("effects.ionisation_model", FieldIonisationModel, "dopant levels of incomplete ionisation", "single-level", "dopant levels of incomplete ionisation: single-level (default: one isolated level per dopant, fully ionised above its Mott density) or lowered (level lowered with doping)", func(s *Spec) *string { return &s.Effects.IonisationModel }).
			form(InputConditions, "dopant levels", "how the ionisation of a dopant is described").refines("no-ion").
			choose(fixed(Choice{"", "single level (textbook)"}, Choice{"single-level", "single level"}, Choice{"lowered", "lowered with doping"})),
		effect("no_breakdown", "no-breakdown", "effect: avalanche breakdown", "effect off: avalanche breakdown (ionisation integral) and multiplication",
			func(s *Spec) *bool { return &s.Effects.NoBreakdown }).
			form(InputConditions, "Avalanche breakdown", "impact ionisation: multiplication and breakdown voltage"),

		value("light.generation_per_m3_s", FieldGeneration, "uniform generation G", GenerationRate, "none", "pair-generation rate uniform through the device, e.g. 1e20cm-3/s (omitted: dark)", func(s *Spec) *float64 { return &s.Light.Generation }).
			form(InputConditions, "Uniform generation", "pairs generated everywhere, e.g. 1e20 (cm^-3 s^-1)").empty("none", "0", "off").section("Light (none by default)"),
		value("light.wavelength_m", FieldWavelength, "light wavelength", Length, "none", "wavelength of monochromatic light, e.g. 650nm", func(s *Spec) *float64 { return &s.Light.Wavelength }).
			form(InputConditions, "Light wavelength", "monochromatic light, e.g. 650nm").empty("none", "0", "off"),
		value("light.absorption_per_m", FieldAbsorption, "absorption coefficient alpha", Absorption, "none", "absorption coefficient of the light in the semiconductor, e.g. 3e3/cm", func(s *Spec) *float64 { return &s.Light.Absorption }).
			form(InputConditions, "Absorption coefficient", "of that light in this semiconductor, e.g. 2.5e3 (1/cm); no table ships").empty("none", "0", "off"),
		value("light.power_density_W_per_m2", FieldLightPower, "light power density", PowerDensity, "none", "power density of the monochromatic light entering the surface, e.g. 100mW/cm2 (omitted: dark)", func(s *Spec) *float64 { return &s.Light.PowerDensity }).
			form(InputConditions, "Light power density", "entering the surface (after reflection), e.g. 10 (mW/cm^2); needs the two above").empty("none", "0", "off"),
		text("light.illuminated_side", FieldIlluminatedSide, "illuminated side", "p", "illuminated surface: p (default) or n", func(s *Spec) *string { return &s.Light.Side }).lower().
			form(InputConditions, "Illuminated surface", "the contact the light enters through").
			choose(fixed(Choice{"", "p side (usual)"}, Choice{"p", "p side"}, Choice{"n", "n side"})).when(func(s Spec) bool { return s.Light.PowerDensity > 0 }),
		value("light.irradiance_W_per_m2", FieldIrradiance, "irradiance for the efficiency", PowerDensity, "the light power", "incident power density the efficiency refers to (omitted: --light-power)", func(s *Spec) *float64 { return &s.Light.Irradiance }).
			form(InputConditions, "Irradiance for efficiency", "incident power density the efficiency refers to").empty("0", "default").when(func(s Spec) bool { return s.Light.Lit() }),
	}
	// A refinement applies while the effect it refines is on.
	for i := range cat {
		for _, p := range cat {
			if cat[i].Parent != "" && p.Flag == cat[i].Parent {
				cat[i].parentOff = p.bswit
			}
		}
	}
	return cat
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
