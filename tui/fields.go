package tui

import (
	"math"
	"strconv"
	"strings"

	"junco/model"
)

// option is one value of a choice field.
type option struct {
	value, label string
}

// fieldDef describes one input of the guided definition: what it edits in
// model.Spec, its words and its unit. Field definitions are built by
// fieldDefs on demand; there is no package state.
type fieldDef struct {
	id    string // model.Field* name, as model.Validate reports it
	label string
	hint  string // one line in trade words
	step  int

	// Number fields.
	kind model.Kind
	// optWord names the value in force when the field is empty (a long
	// region, an ohmic contact, the doping-dependent lifetime); "" means
	// the field is required. optAlias lists the words typed for it.
	optWord  string
	optAlias []string
	// derivedKey names the result quantity that shows the value in force
	// when the field is empty.
	derivedKey string
	num        func(model.Spec) (v float64, set bool)
	setNum     func(s *model.Spec, v float64, set bool)

	// Choice fields.
	choice  bool
	options func(model.Spec) []option
	str     func(model.Spec) string
	setStr  func(*model.Spec, string)

	// shown reports whether the field applies to the spec; nil = always.
	shown func(model.Spec) bool
	// section, when set, is a heading drawn above the field.
	section string
}

func (d fieldDef) visible(s model.Spec) bool { return d.shown == nil || d.shown(s) }

// stepDef is one step of the guided definition.
type stepDef struct {
	name  string // short, for the step bar
	title string
	intro string
}

func stepDefs() []stepDef {
	return []stepDef{
		{"Material", "Material", "The semiconductor the junction is made in; its band gap and intrinsic density follow the temperature set under Conditions."},
		{"Doping", "Doping and profile", "Net impurity levels on each side, the species that supply them, and whether the doping steps or grades across the junction."},
		{"Geometry", "Geometry and contacts", "Junction area, the neutral widths out to each contact (empty: long), how strongly each contact recombines minority carriers (empty: ohmic), layer thicknesses and the resistances around the junction."},
		{"Lifetimes", "Minority lifetimes", "Leave a lifetime empty to use the doping-dependent value shown beside it; type a measured one to override it."},
		{"Conditions", "Operating conditions", "Temperature and applied bias (forward is positive: p side positive against the n side), the reference currents, and which non-ideal effects are on."},
	}
}

func fieldDefs() []fieldDef {
	return []fieldDef{
		{id: model.FieldMaterial, label: "Semiconductor", hint: "host crystal of the junction", step: 0, choice: true,
			options: func(model.Spec) []option {
				var out []option
				for _, c := range model.MaterialChoices() {
					out = append(out, option{c.Key, c.Name})
				}
				return out
			},
			str: func(s model.Spec) string { return s.Material }, setStr: func(s *model.Spec, v string) { s.Material = v }},

		{id: model.FieldProfile, label: "Doping profile", hint: "step (abrupt) or linearly graded net doping", step: 1, choice: true,
			options: func(model.Spec) []option {
				return []option{{"abrupt", "step (abrupt)"}, {"linear", "linearly graded"}}
			},
			str: func(s model.Spec) string { return s.Profile }, setStr: func(s *model.Spec, v string) { s.Profile = v }},
		{id: model.FieldAcceptorDensity, label: "Acceptor doping, p side", hint: "net acceptor concentration of the p region", step: 1, kind: model.Density,
			num:    func(s model.Spec) (float64, bool) { return s.AcceptorDensity, true },
			setNum: func(s *model.Spec, v float64, _ bool) { s.AcceptorDensity = v }},
		{id: model.FieldAcceptorSpecies, label: "Acceptor species", hint: "impurity that supplies the holes", step: 1, choice: true,
			options: func(s model.Spec) []option { return speciesOptions(s.Material, false) },
			str:     func(s model.Spec) string { return s.AcceptorSpecies }, setStr: func(s *model.Spec, v string) { s.AcceptorSpecies = v }},
		{id: model.FieldDonorDensity, label: "Donor doping, n side", hint: "net donor concentration of the n region", step: 1, kind: model.Density,
			num:    func(s model.Spec) (float64, bool) { return s.DonorDensity, true },
			setNum: func(s *model.Spec, v float64, _ bool) { s.DonorDensity = v }},
		{id: model.FieldDonorSpecies, label: "Donor species", hint: "impurity that supplies the electrons", step: 1, choice: true,
			options: func(s model.Spec) []option { return speciesOptions(s.Material, true) },
			str:     func(s model.Spec) string { return s.DonorSpecies }, setStr: func(s *model.Spec, v string) { s.DonorSpecies = v }},
		{id: model.FieldGradient, label: "Doping gradient", hint: "slope of the net doping through a graded junction", step: 1, kind: model.Gradient,
			num:    func(s model.Spec) (float64, bool) { return s.Gradient, true },
			setNum: func(s *model.Spec, v float64, _ bool) { s.Gradient = v },
			shown:  func(s model.Spec) bool { return s.Profile == "linear" }},

		{id: model.FieldArea, label: "Junction area", hint: "area of the junction, e.g. 1mm2, 250um2, 1e-4cm2", step: 2, kind: model.Area,
			num:    func(s model.Spec) (float64, bool) { return s.Area, true },
			setNum: func(s *model.Spec, v float64, _ bool) { s.Area = v }},
		{id: model.FieldPWidth, label: "p-side neutral width", hint: "from the depletion edge to the p contact", step: 2, kind: model.Length,
			optWord: "long", optAlias: []string{"long", "inf", "infinite", "0"},
			num:    func(s model.Spec) (float64, bool) { return s.PWidth, s.PWidth != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.PWidth = pick(set, v, 0) }},
		{id: model.FieldNWidth, label: "n-side neutral width", hint: "from the depletion edge to the n contact", step: 2, kind: model.Length,
			optWord: "long", optAlias: []string{"long", "inf", "infinite", "0"},
			num:    func(s model.Spec) (float64, bool) { return s.NWidth, s.NWidth != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.NWidth = pick(set, v, 0) }},
		{id: model.FieldPContactVelocity, label: "p-contact recombination", hint: "surface recombination velocity at the p contact", step: 2, kind: model.Velocity,
			optWord: "ohmic", optAlias: []string{"ohmic"},
			num:    func(s model.Spec) (float64, bool) { return deref(s.PContactVelocity) },
			setNum: func(s *model.Spec, v float64, set bool) { s.PContactVelocity = ptrIf(set, v) }},
		{id: model.FieldNContactVelocity, label: "n-contact recombination", hint: "surface recombination velocity at the n contact", step: 2, kind: model.Velocity,
			optWord: "ohmic", optAlias: []string{"ohmic"},
			num:    func(s model.Spec) (float64, bool) { return deref(s.NContactVelocity) },
			setNum: func(s *model.Spec, v float64, set bool) { s.NContactVelocity = ptrIf(set, v) }},

		{id: model.FieldElectronLifetime, label: "Electron lifetime, p side", hint: "minority electrons in the p region", step: 3, kind: model.Time,
			optWord: "from doping", optAlias: []string{"auto", "default", "doping", "0"}, derivedKey: "electron_lifetime_s",
			num:    func(s model.Spec) (float64, bool) { return s.ElectronLifetime, s.ElectronLifetime != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.ElectronLifetime = pick(set, v, 0) }},
		{id: model.FieldHoleLifetime, label: "Hole lifetime, n side", hint: "minority holes in the n region", step: 3, kind: model.Time,
			optWord: "from doping", optAlias: []string{"auto", "default", "doping", "0"}, derivedKey: "hole_lifetime_s",
			num:    func(s model.Spec) (float64, bool) { return s.HoleLifetime, s.HoleLifetime != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.HoleLifetime = pick(set, v, 0) }},

		{id: model.FieldPThickness, label: "p-layer thickness", hint: "junction to p contact, for the series resistance and punch-through of a long region", step: 2, kind: model.Length,
			optWord: "300 um assumed", optAlias: []string{"0", "default"},
			num:    func(s model.Spec) (float64, bool) { return s.PThickness, s.PThickness != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.PThickness = pick(set, v, 0) },
			shown:  func(s model.Spec) bool { return s.PWidth == 0 }},
		{id: model.FieldNThickness, label: "n-layer thickness", hint: "junction to n contact, for the series resistance and punch-through of a long region", step: 2, kind: model.Length,
			optWord: "300 um assumed", optAlias: []string{"0", "default"},
			num:    func(s model.Spec) (float64, bool) { return s.NThickness, s.NThickness != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.NThickness = pick(set, v, 0) },
			shown:  func(s model.Spec) bool { return s.NWidth == 0 }},
		{id: model.FieldContactResistance, label: "Contact resistance", hint: "contacts and leads in series with the diode", step: 2, kind: model.Resistance,
			optWord: "none", optAlias: []string{"none", "0"},
			num:    func(s model.Spec) (float64, bool) { return s.ContactResistance, s.ContactResistance != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.ContactResistance = pick(set, v, 0) }},
		{id: model.FieldShuntResistance, label: "Shunt resistance", hint: "leakage path across the junction", step: 2, kind: model.Resistance,
			optWord: "none", optAlias: []string{"none", "0", "inf"},
			num:    func(s model.Spec) (float64, bool) { return s.ShuntResistance, s.ShuntResistance != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.ShuntResistance = pick(set, v, 0) }},

		{id: model.FieldTemperature, label: "Temperature", hint: "device temperature, e.g. 300K or 27C", step: 4, kind: model.Temperature,
			num:    func(s model.Spec) (float64, bool) { return s.Temperature, true },
			setNum: func(s *model.Spec, v float64, _ bool) { s.Temperature = v }},
		{id: model.FieldBias, label: "Applied bias", hint: "forward positive (p side +), e.g. 0.6V, -5V, 650mV", step: 4, kind: model.Voltage,
			num:    func(s model.Spec) (float64, bool) { return s.Bias, true },
			setNum: func(s *model.Spec, v float64, _ bool) { s.Bias = v }},
		{id: model.FieldForwardCurrent, label: "Reference forward current", hint: "the current VF, dVF/dT and the storage time are given at", step: 4, kind: model.Current,
			optWord: "1 mA", optAlias: []string{"0", "default"},
			num:    func(s model.Spec) (float64, bool) { return s.ForwardCurrent, s.ForwardCurrent != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.ForwardCurrent = pick(set, v, 0) }},
		{id: model.FieldReverseCurrent, label: "Switching reverse current", hint: "reverse current the diode is switched to, for the storage time", step: 4, kind: model.Current,
			optWord: "same as forward", optAlias: []string{"0", "default"},
			num:    func(s model.Spec) (float64, bool) { return s.ReverseCurrent, s.ReverseCurrent != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.ReverseCurrent = pick(set, v, 0) }},
		{id: model.FieldPowerLimit, label: "Power limit for flags", hint: "dissipation above which a bias is flagged", step: 4, kind: model.Power,
			optWord: "1 W", optAlias: []string{"0", "default"},
			num:    func(s model.Spec) (float64, bool) { return s.PowerLimit, s.PowerLimit != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.PowerLimit = pick(set, v, 0) }},
		effectSwitch("effect-srh", "SCR recombination", "recombination and generation in the depletion region", "Effects switched on",
			func(e *model.Effects) *bool { return &e.NoSRH }),
		effectSwitch("effect-hi", "High injection", "the ideality rising towards 2 at high current", "",
			func(e *model.Effects) *bool { return &e.NoHighInjection }),
		effectSwitch("effect-rs", "Series resistance", "voltage drop in the neutral regions and contacts", "",
			func(e *model.Effects) *bool { return &e.NoSeriesResistance }),
		effectSwitch("effect-bgn", "Band-gap narrowing", "smaller gap in heavily doped regions", "",
			func(e *model.Effects) *bool { return &e.NoBGN }),
		{id: model.FieldBGNModel, label: "  narrowing data set", hint: "published parameter set of the band-gap narrowing", step: 4, choice: true,
			options: func(model.Spec) []option {
				return []option{{"", "Klaassen 1992 (usual)"}, {"klaassen1992", "Klaassen 1992"}, {"slotboom1976", "Slotboom 1976"}}
			},
			str:    func(s model.Spec) string { return s.Effects.BGNModel },
			setStr: func(s *model.Spec, v string) { s.Effects.BGNModel = v },
			shown:  func(s model.Spec) bool { return !s.Effects.NoBGN }},
		effectSwitch("effect-ion", "Incomplete ionisation", "dopants not all ionised (shallow levels, low temperature)", "",
			func(e *model.Effects) *bool { return &e.NoIonisation }),
		{id: model.FieldIonisationModel, label: "  dopant levels", hint: "how the ionisation of a dopant is described", step: 4, choice: true,
			options: func(model.Spec) []option {
				return []option{{"", "single level (textbook)"}, {"single-level", "single level"}, {"lowered", "lowered with doping"}}
			},
			str:    func(s model.Spec) string { return s.Effects.IonisationModel },
			setStr: func(s *model.Spec, v string) { s.Effects.IonisationModel = v },
			shown:  func(s model.Spec) bool { return !s.Effects.NoIonisation }},
		effectSwitch("effect-bd", "Avalanche breakdown", "impact ionisation: multiplication and breakdown voltage", "",
			func(e *model.Effects) *bool { return &e.NoBreakdown }),

		lightValue(model.FieldGeneration, "Uniform generation", "pairs generated everywhere, e.g. 1e20 (cm^-3 s^-1)", model.GenerationRate,
			"Light (none by default)", func(l *model.Light) *float64 { return &l.Generation }),
		lightValue(model.FieldWavelength, "Light wavelength", "monochromatic light, e.g. 650nm", model.Length,
			"", func(l *model.Light) *float64 { return &l.Wavelength }),
		lightValue(model.FieldAbsorption, "Absorption coefficient", "of that light in this semiconductor, e.g. 2.5e3 (1/cm); no table ships", model.Absorption,
			"", func(l *model.Light) *float64 { return &l.Absorption }),
		lightValue(model.FieldLightPower, "Light power density", "entering the surface (after reflection), e.g. 10 (mW/cm^2); needs the two above", model.PowerDensity,
			"", func(l *model.Light) *float64 { return &l.PowerDensity }),
		{id: model.FieldIlluminatedSide, label: "Illuminated surface", hint: "the contact the light enters through", step: 4, choice: true,
			options: func(model.Spec) []option { return []option{{"", "p side (usual)"}, {"p", "p side"}, {"n", "n side"}} },
			str:     func(s model.Spec) string { return s.Light.Side },
			setStr:  func(s *model.Spec, v string) { s.Light.Side = v },
			shown:   func(s model.Spec) bool { return s.Light.PowerDensity > 0 }},
		{id: model.FieldIrradiance, label: "Irradiance for efficiency", hint: "incident power density the efficiency refers to", step: 4, kind: model.PowerDensity,
			optWord: "the light power", optAlias: []string{"0", "default"},
			num:    func(s model.Spec) (float64, bool) { return s.Light.Irradiance, s.Light.Irradiance != 0 },
			setNum: func(s *model.Spec, v float64, set bool) { s.Light.Irradiance = pick(set, v, 0) },
			shown:  func(s model.Spec) bool { return s.Light.Lit() }},
	}
}

// effectSwitch is an on/off choice for one of model.Effects (whose fields
// say "No..." and are true when the effect is off).
func effectSwitch(id, label, hint, section string, off func(*model.Effects) *bool) fieldDef {
	return fieldDef{id: id, label: label, hint: hint, step: 4, choice: true, section: section,
		options: func(model.Spec) []option { return []option{{"on", "on"}, {"off", "off"}} },
		str: func(s model.Spec) string {
			if *off(&s.Effects) {
				return "off"
			}
			return "on"
		},
		setStr: func(s *model.Spec, v string) { *off(&s.Effects) = v == "off" }}
}

func pick(set bool, v, unset float64) float64 {
	if set {
		return v
	}
	return unset
}

func deref(p *float64) (float64, bool) {
	if p == nil {
		return 0, false
	}
	return *p, true
}

func ptrIf(set bool, v float64) *float64 {
	if !set {
		return nil
	}
	return &v
}

// speciesOptions lists the dopants of a material, the usual one first as
// the empty choice.
func speciesOptions(material string, donor bool) []option {
	names, usual := model.DopantChoices(material, donor)
	out := []option{{"", "usual (" + usual + ")"}}
	for _, n := range names {
		out = append(out, option{n, n})
	}
	return out
}

// inputText writes an SI value as the text a user would type: the number
// in the trade default unit, with no rounding beyond ten digits.
func inputText(k model.Kind, v float64) string {
	unit, si := model.TradeUnit(k)
	x := v / si
	s := strconv.FormatFloat(x, 'g', 10, 64)
	if mant, exp, ok := strings.Cut(s, "e"); ok {
		n, err := strconv.Atoi(exp)
		if err == nil {
			s = mant + "e" + strconv.Itoa(n)
		}
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		s = "?"
	}
	if unit == "" {
		return s
	}
	return s + " " + unit
}

// fieldText returns the text a field starts with for a spec.
func fieldText(d fieldDef, s model.Spec) string {
	if d.choice {
		return d.str(s)
	}
	v, set := d.num(s)
	if !set {
		return ""
	}
	return inputText(d.kind, v)
}

// lightValue is an optional number of the junction's light ("none" when
// zero).
func lightValue(id, label, hint string, k model.Kind, section string, p func(*model.Light) *float64) fieldDef {
	return fieldDef{id: id, label: label, hint: hint, step: 4, kind: k, section: section,
		optWord: "none", optAlias: []string{"none", "0", "off"},
		num:    func(s model.Spec) (float64, bool) { v := *p(&s.Light); return v, v != 0 },
		setNum: func(s *model.Spec, v float64, set bool) { *p(&s.Light) = pick(set, v, 0) }}
}
