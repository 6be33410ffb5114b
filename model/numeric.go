package model

// This file adapts the numerical drift-diffusion solver (package
// physics/solver) to the model level: a NumericSpec refining a Spec
// (region lengths, doping shapes, an imported depth profile, the mesh),
// its validation, the solves at one bias, over a bias sweep and a C-V
// sweep, curves in the frame of the analytic curves (so that the two can
// be overlaid), CSV and JSON output, and Compare, the readout of where the
// depletion approximation and the analytic diode formulas stop being
// trustworthy.

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"junco/physics"
	"junco/physics/solver"
)

// Numeric profile bases: the doping the shapes of a NumericSpec are added
// to (NumericSpec.Base).
const (
	// BaseJunction is the Spec's own abrupt or linearly graded junction,
	// placed at x = PLength with the p side (anode) at x = 0. The default
	// when no shapes and no depth profile are given.
	BaseJunction = "junction"
	// BaseDonor is the Spec's donor density everywhere: an n-type
	// substrate for implanted or diffused p layers.
	BaseDonor = "donor"
	// BaseAcceptor is the Spec's acceptor density everywhere: a p-type
	// substrate.
	BaseAcceptor = "acceptor"
	// BaseNone is no doping but the shapes and the depth profile. The
	// default when shapes or a depth profile are given.
	BaseNone = "none"
)

// Doping shape kinds (DopingShape.Kind).
const (
	// ShapeUniform is a constant concentration over a depth range.
	ShapeUniform = "uniform"
	// ShapeLinear is a concentration rising linearly from zero and
	// saturating at a plateau.
	ShapeLinear = "linear"
	// ShapeGaussian is an ion implant described by dose, projected range
	// and straggle.
	ShapeGaussian = "gaussian"
	// ShapeErfc is a constant-surface-concentration diffusion.
	ShapeErfc = "erfc"
)

// Dopant species of a shape or a depth-profile column.
const (
	SpeciesDonor    = "donor"    // donors (n-type dopants)
	SpeciesAcceptor = "acceptor" // acceptors (p-type dopants)
	// SpeciesNet marks a signed net doping Nd - Na (depth profiles only).
	SpeciesNet = "net"
)

// Faces a depth is measured from (DopingShape.Face, DepthProfile.Face).
const (
	// FaceLeft is the contact at x = 0 (the anode of the junction base).
	FaceLeft = "left"
	// FaceRight is the contact at x = L.
	FaceRight = "right"
)

// Field names of NumericSpec errors (FieldError.Field). Shape errors are
// "shape[i].<parameter>" with i counted from 0; depth-profile errors are
// "profile-file" or "profile-file.<column>".
const (
	FieldNumericLengths = "lengths"      // p and n lengths given for a profile device
	FieldNumericPLength = "p-length"     // NumericSpec.PLength
	FieldNumericNLength = "n-length"     // NumericSpec.NLength
	FieldNumericLength  = "length"       // NumericSpec.Length
	FieldNumericNodes   = "nodes"        // NumericSpec.Nodes
	FieldNumericBase    = "base"         // NumericSpec.Base
	FieldNumericProfile = "profile"      // the doping at the contacts (same type at both)
	FieldNumericFile    = "profile-file" // NumericSpec.File
	FieldNumericSweep   = "sweep"        // the bias range of NumericIV
	FieldNumericCV      = "cv"           // the bias range of NumericCV
)

// Flag codes added by the numeric adapter (the solver's own codes, such as
// solver.FlagHighInjection, come with the solution).
const (
	// FlagNumericLength: a region or device length was chosen
	// automatically (see NumericSpec).
	FlagNumericLength = "numeric-length"
	// FlagNumericContacts: the Spec's contact recombination velocities are
	// ignored; the solver's contacts are ohmic.
	FlagNumericContacts = "numeric-ohmic-contacts"
	// FlagNumericExternal: the Spec's contact and shunt resistances are
	// outside the simulated device.
	FlagNumericExternal = "numeric-external-resistance"
	// FlagNumericEffects: an effect switched off in the Spec is always
	// part of the drift-diffusion model.
	FlagNumericEffects = "numeric-effects"
	// FlagNumericReference: the analytic values describe the Spec's
	// junction, not the numeric doping profile.
	FlagNumericReference = "numeric-reference"
	// FlagNumericCapacitance: the capacitance could not be computed.
	FlagNumericCapacitance = "numeric-capacitance"
	// FlagNumericBreakdown: the bias lies beyond the analytic breakdown
	// voltage, which the solver (no impact ionisation) does not model.
	FlagNumericBreakdown = "numeric-breakdown"
	// FlagNumericBGN: band-gap narrowing is on but junco has no parameter
	// set for the material.
	FlagNumericBGN = "numeric-bgn"
	// FlagNumericProfileHeld: the imported depth profile does not cover
	// the device; its end value is held.
	FlagNumericProfileHeld = "numeric-profile-held"
	// FlagNumericDoseOutside: more than 1 % of a Gaussian implant lies
	// above its surface (outside the device).
	FlagNumericDoseOutside = "numeric-dose-outside"
)

// Limits of the numeric inputs, SI (see NumericSpec.Validate).
const (
	minNumericNodes, maxNumericNodes = 20, 200000
	maxNumericShapes                 = 32
	minDose, maxDose                 = 1e8 * 1e4, 1e17 * 1e4 // m^-2 (1e8 to 1e17 cm^-2)
	maxProjectedRange                = 100e-6                // m
	minStraggle, maxStraggle         = 1e-10, 100e-6         // m
	minDiffLength, maxDiffLength     = 1e-10, 1e-3           // m
	// longRegionDiffusionLengths is how many minority diffusion lengths a
	// "long" region is given beyond its depletion edge: the hole or
	// electron current of a region of width W with an ohmic contact is
	// coth(W/L) times the long-region value (Sze & Ng 2007, section 2.3),
	// and coth(5) - 1 = 9e-5.
	longRegionDiffusionLengths = 5
	// profileMargin is the depth added below the deepest shape feature
	// when no device length is given, m (a documented default, 20 um).
	profileMargin = 20e-6
)

// NumericSpec refines a Spec for the drift-diffusion solver. Every field
// is optional; the zero value solves the Spec's own junction with
// automatic lengths and mesh. Values are SI and the JSON names carry the
// unit, so that sessions can store it.
//
// Lengths. For the junction base, PLength and NLength are the physical
// lengths of the p and n regions from the metallurgical junction to the
// contacts, m. A zero length is chosen (and flagged FlagNumericLength):
// the Spec's quasi-neutral width plus the depletion-approximation edge at
// the most reverse bias of the solve when the Spec gives a width; for a
// long region (width 0) the edge plus 5 minority diffusion lengths of the
// analytic model (coth(5) - 1 < 1e-4, so the current is the long-region
// current), at most 1 cm. For the other bases Length is the device length
// (default: the deepest shape feature plus 20 um, or the depth of the
// imported profile, whichever is larger; flagged).
//
// Profile. Base is the doping the shapes and the depth profile are added
// to (BaseJunction, BaseDonor, BaseAcceptor, BaseNone; "" = junction when
// there are no shapes and no file, else none). Shapes are summed per
// species (solver.Profile); File is an imported depth profile
// (ParseDepthProfile). The net doping must be p-type at one contact and
// n-type at the other.
//
// Nodes overrides the automatic node count of the mesh (0 = automatic,
// else 20 to 200000); the relative spacing stays the automatic one.
type NumericSpec struct {
	// PLength and NLength are the p and n region lengths of the junction
	// base, m (0 = chosen).
	PLength float64 `json:"p_length_m,omitempty"`
	NLength float64 `json:"n_length_m,omitempty"` // see PLength
	// Length is the device length of the other bases, m (0 = chosen).
	Length float64 `json:"device_length_m,omitempty"`
	// Base is the doping the shapes are added to (Base* constants).
	Base string `json:"base,omitempty"`
	// Shapes are the doping shapes, summed per species.
	Shapes []DopingShape `json:"shapes,omitempty"`
	// File is an imported depth profile, nil when none.
	File *DepthProfile `json:"depth_profile,omitempty"`
	// Nodes is the mesh node count (0 = automatic).
	Nodes int `json:"nodes,omitempty"`
}

// DopingShape is one dopant distribution of a NumericSpec, with depths
// measured from the contact named by Face into the device. Fields that do
// not apply to the Kind are ignored.
//
//   - ShapeUniform: Concentration (m^-3) from depth From to depth To (m; To
//     = 0 means up to the far contact). Step junction, Sze & Ng 2007,
//     section 2.2.1.
//   - ShapeLinear: zero at depth Position (m), rising with slope Gradient
//     (m^-4; negative falls with depth), saturating at Concentration
//     (m^-3). Sze & Ng 2007, section 2.2.2.
//   - ShapeGaussian: Dose (m^-2), projected range Range (m) and straggle
//     Straggle (m): N = Dose/(sqrt(2 pi) Straggle) exp(-(x - Range)^2/(2
//     Straggle^2)). Plummer, Deal, Griffin, Silicon VLSI Technology
//     (2000), ch. 8. The part above the surface (depth < 0, the share 1/2
//     erfc(Range/(sqrt(2) Straggle))) is not in the device; above 1 % it
//     is flagged (FlagNumericDoseOutside).
//   - ShapeErfc: surface concentration Concentration (m^-3) and diffusion
//     length DiffusionLength = sqrt(D t) (m): N = Cs erfc(x/(2 sqrt(D t))).
//     Plummer, Deal, Griffin 2000, ch. 7.
type DopingShape struct {
	Kind    string `json:"kind"`           // ShapeUniform, ShapeLinear, ShapeGaussian or ShapeErfc
	Species string `json:"species"`        // SpeciesDonor or SpeciesAcceptor
	Face    string `json:"face,omitempty"` // FaceLeft ("" too) or FaceRight
	// Concentration is the level (uniform), plateau (linear) or surface
	// concentration (erfc), m^-3.
	Concentration   float64 `json:"concentration_per_m3,omitempty"`
	From            float64 `json:"from_m,omitempty"`             // uniform: start depth, m
	To              float64 `json:"to_m,omitempty"`               // uniform: end depth, m (0 = far contact)
	Position        float64 `json:"position_m,omitempty"`         // linear: depth of the zero, m
	Gradient        float64 `json:"gradient_per_m4,omitempty"`    // linear: slope, m^-4
	Dose            float64 `json:"dose_per_m2,omitempty"`        // gaussian: dose, m^-2
	Range           float64 `json:"projected_range_m,omitempty"`  // gaussian: projected range Rp, m
	Straggle        float64 `json:"straggle_m,omitempty"`         // gaussian: straggle dRp (standard deviation), m
	DiffusionLength float64 `json:"diffusion_length_m,omitempty"` // erfc: sqrt(D t), m
}

// DepthProfile is an imported doping depth profile: depths (m, strictly
// increasing, >= 0, from the contact named by Face) and either a signed
// net doping Nd - Na or the donor and/or acceptor concentrations (m^-3).
// Between points the solver interpolates log-linearly (linearly across a
// sign change); beyond the table the end values are held
// (solver.Tabulated).
type DepthProfile struct {
	// Source names where the table came from (a file name), for messages.
	Source    string    `json:"source,omitempty"`
	Face      string    `json:"face,omitempty"`             // FaceLeft ("" too) or FaceRight
	Depth     []float64 `json:"depth_m"`                    // m, from the face
	Net       []float64 `json:"net_per_m3,omitempty"`       // Nd - Na, m^-3 (nil when per species)
	Donors    []float64 `json:"donors_per_m3,omitempty"`    // m^-3, nil when absent
	Acceptors []float64 `json:"acceptors_per_m3,omitempty"` // m^-3, nil when absent
}

// base returns the effective base (resolving "").
func (n NumericSpec) base() string {
	if n.Base != "" {
		return n.Base
	}
	if len(n.Shapes) == 0 && n.File == nil {
		return BaseJunction
	}
	return BaseNone
}

// FormatDose writes an areal density (dose, m^-2) in the trade unit cm^-2.
func FormatDose(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return Format(Dimensionless, v, 3, true)
	}
	return sci(v/1e4, 3) + " cm^-2"
}

// ParseDose parses an implant dose such as "1e14cm-2", "5e12 /cm2" or
// "1e18 m^-2" and returns it in m^-2. A bare number is in cm^-2 (the trade
// unit). Range checks are NumericSpec.Validate's.
func ParseDose(text string) (float64, error) {
	s := strings.TrimSpace(text)
	end := numberPrefix(s)
	if end == 0 {
		return 0, fmt.Errorf("%q is not a valid dose: no number (units: cm-2, m-2; a bare number is in cm^-2)", text)
	}
	num, err := strconv.ParseFloat(s[:end], 64)
	if err != nil || math.IsInf(num, 0) || math.IsNaN(num) {
		return 0, fmt.Errorf("%q is not a valid dose: not a finite number", text)
	}
	unit := strings.ToLower(strings.ReplaceAll(strings.TrimSpace(s[end:]), " ", ""))
	switch unit {
	case "", "cm-2", "cm^-2", "/cm2", "/cm^2", "cm⁻²":
		return num * 1e4, nil
	case "m-2", "m^-2", "/m2", "/m^2", "m⁻²":
		return num, nil
	}
	return 0, fmt.Errorf("%q is not a valid dose: unknown unit %q (units: cm-2, m-2; a bare number is in cm^-2)", text, unit)
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Validate checks every field of the numeric refinement and returns nil or
// a *ValidationError with one FieldError per bad field (field, value in
// trade units, allowed range, reason). The combination with the Spec
// (contact doping of opposite signs) is checked by BuildNumericDevice.
func (n NumericSpec) Validate() error {
	var errs []FieldError
	add := func(field, value, allowed, why string) {
		errs = append(errs, FieldError{Field: field, Value: value, Allowed: allowed, Why: why})
	}
	rng := func(field string, k Kind, v, lo, hi float64, why string) {
		if !isFinite(v) || v < lo || v > hi {
			add(field, Format(k, v, 3, true), Format(k, lo, 3, true)+" to "+Format(k, hi, 3, true), why)
		}
	}
	base := n.base()
	switch base {
	case BaseJunction, BaseDonor, BaseAcceptor, BaseNone:
	default:
		add(FieldNumericBase, fmt.Sprintf("%q", n.Base), "junction, donor, acceptor, none", "the doping the shapes are added to")
	}
	const lenWhy = "0 chooses it; otherwise between a thin layer and a whole wafer"
	for _, l := range []struct {
		f string
		v float64
	}{{FieldNumericPLength, n.PLength}, {FieldNumericNLength, n.NLength}, {FieldNumericLength, n.Length}} {
		if l.v != 0 {
			rng(l.f, Length, l.v, minWidth, maxWidth, lenWhy)
		}
	}
	if base == BaseJunction && n.Length != 0 {
		add(FieldNumericLength, Format(Length, n.Length, 3, true), "0 with the junction base (give the p and n lengths)",
			"the Spec's junction is placed between a p region and an n region of their own lengths")
	}
	if base != BaseJunction && (n.PLength != 0 || n.NLength != 0) {
		add(FieldNumericLengths, Format(Length, n.PLength, 3, true)+" and "+Format(Length, n.NLength, 3, true),
			"0 unless the base is junction (give the device length)", "a profile device has one length, not a p and an n region")
	}
	if n.Nodes != 0 && (n.Nodes < minNumericNodes || n.Nodes > maxNumericNodes) {
		add(FieldNumericNodes, strconv.Itoa(n.Nodes), fmt.Sprintf("0 (automatic) or %d to %d", minNumericNodes, maxNumericNodes),
			"fewer nodes cannot resolve a depletion region; more only cost time")
	}
	if len(n.Shapes) > maxNumericShapes {
		add("shapes", strconv.Itoa(len(n.Shapes)), fmt.Sprintf("at most %d", maxNumericShapes), "a profile is a sum of a few shapes")
	}
	if (base == BaseNone) && len(n.Shapes) == 0 && n.File == nil {
		add(FieldNumericBase, fmt.Sprintf("%q", base), "junction, donor or acceptor when there are no shapes and no depth profile",
			"without doping there is no junction")
	}
	for i, s := range n.Shapes {
		if i >= maxNumericShapes {
			break
		}
		errs = append(errs, s.validate(fmt.Sprintf("shape[%d]", i))...)
	}
	if n.File != nil {
		errs = append(errs, n.File.validate()...)
	}
	if len(errs) == 0 {
		return nil
	}
	return &ValidationError{Fields: errs}
}

// validate checks one shape; field names are prefix.<parameter>.
func (s DopingShape) validate(prefix string) []FieldError {
	var errs []FieldError
	add := func(p, value, allowed, why string) {
		errs = append(errs, FieldError{Field: prefix + "." + p, Value: value, Allowed: allowed, Why: why})
	}
	rng := func(p string, k Kind, v, lo, hi float64, why string) {
		if !isFinite(v) || v < lo || v > hi {
			add(p, Format(k, v, 3, true), Format(k, lo, 3, true)+" to "+Format(k, hi, 3, true), why)
		}
	}
	switch s.Species {
	case SpeciesDonor, SpeciesAcceptor:
	default:
		add("species", fmt.Sprintf("%q", s.Species), "donor, acceptor", "a shape dopes with one kind of impurity")
	}
	switch s.Face {
	case "", FaceLeft, FaceRight:
	default:
		add("face", fmt.Sprintf("%q", s.Face), "left, right", "the contact the depth is measured from")
	}
	const dopWhy = "below, background impurities dominate; above, solid solubility and degeneracy make the model meaningless"
	switch s.Kind {
	case ShapeUniform:
		rng("concentration", Density, s.Concentration, minDensity, maxDensity, dopWhy)
		rng("from", Length, s.From, 0, maxWidth, "a depth into the device")
		if s.To != 0 && (!isFinite(s.To) || !(s.To > s.From) || s.To > maxWidth) {
			add("to", Format(Length, s.To, 3, true), "0 (the far contact) or above from = "+Format(Length, s.From, 3, true)+", at most 1 cm",
				"the layer must have a positive thickness")
		}
	case ShapeLinear:
		rng("concentration", Density, s.Concentration, minDensity, maxDensity, "the plateau the ramp saturates at; "+dopWhy)
		rng("position", Length, s.Position, 0, maxWidth, "the depth where the ramp starts from zero")
		if g := math.Abs(s.Gradient); !isFinite(s.Gradient) || g < minGradient || g > maxGradient {
			add("gradient", Format(Gradient, s.Gradient, 3, true), "magnitude "+Format(Gradient, minGradient, 3, true)+" to "+Format(Gradient, maxGradient, 3, true)+" (negative falls with depth)",
				"the range of diffused and implanted junction gradients")
		}
	case ShapeGaussian:
		if !isFinite(s.Dose) || s.Dose < minDose || s.Dose > maxDose {
			add("dose", FormatDose(s.Dose), FormatDose(minDose)+" to "+FormatDose(maxDose), "from a light threshold-adjust implant to a heavy source/drain implant")
		}
		rng("range", Length, s.Range, 0, maxProjectedRange, "the projected range is a depth below the surface; MeV implants reach tens of um")
		rng("straggle", Length, s.Straggle, minStraggle, maxStraggle, "the straggle is the standard deviation of the implanted depth")
	case ShapeErfc:
		rng("concentration", Density, s.Concentration, minDensity, maxDensity, "the surface concentration; "+dopWhy)
		rng("diffusion-length", Length, s.DiffusionLength, minDiffLength, maxDiffLength, "sqrt(D t) of the diffusion")
	default:
		add("kind", fmt.Sprintf("%q", s.Kind), "uniform, linear, gaussian, erfc", "the shapes junco can describe")
	}
	return errs
}

// validate checks a depth profile given as a value (the parser checks a
// file as it reads it).
func (p *DepthProfile) validate() []FieldError {
	var errs []FieldError
	add := func(col, value, allowed, why string) {
		f := FieldNumericFile
		if col != "" {
			f += "." + col
		}
		errs = append(errs, FieldError{Field: f, Value: value, Allowed: allowed, Why: why})
	}
	switch p.Face {
	case "", FaceLeft, FaceRight:
	default:
		add("face", fmt.Sprintf("%q", p.Face), "left, right", "the contact the depth is measured from")
	}
	n := len(p.Depth)
	if n < 2 || n > maxProfileRows {
		add("depth", fmt.Sprintf("%d points", n), fmt.Sprintf("2 to %d points", maxProfileRows), "interpolation needs two points")
		return errs
	}
	for i, d := range p.Depth {
		if !isFinite(d) || d < 0 || d > maxWidth || (i > 0 && !(d > p.Depth[i-1])) {
			add(fmt.Sprintf("depth[%d]", i), Format(Length, d, 4, true), "0 to 1 cm, strictly increasing", "depths from the surface into the device")
			break
		}
	}
	if p.Net == nil && p.Donors == nil && p.Acceptors == nil {
		add("", "no concentration column", "net, or donors and/or acceptors", "a profile needs doping")
	}
	if p.Net != nil && (p.Donors != nil || p.Acceptors != nil) {
		add("net", "net together with donors or acceptors", "net alone, or donors and/or acceptors", "the net doping already contains both species")
	}
	for _, c := range []struct {
		name   string
		v      []float64
		signed bool
	}{{"net", p.Net, true}, {"donors", p.Donors, false}, {"acceptors", p.Acceptors, false}} {
		if c.v == nil {
			continue
		}
		if len(c.v) != n {
			add(c.name, fmt.Sprintf("%d points", len(c.v)), fmt.Sprintf("%d points, as many as depths", n), "one value per depth")
			continue
		}
		for i, v := range c.v {
			if !isFinite(v) || math.Abs(v) > maxProfileDensity || (!c.signed && v < 0) {
				allowed := "0 to " + Format(Density, maxProfileDensity, 3, true)
				if c.signed {
					allowed = "magnitude up to " + Format(Density, maxProfileDensity, 3, true)
				}
				add(fmt.Sprintf("%s[%d]", c.name, i), Format(Density, v, 3, true), allowed, "a dopant concentration below the atomic density of the host")
				break
			}
		}
	}
	return errs
}

// NumericDevice is the solver input that a Spec and a NumericSpec resolve
// to: the solver device and options, the lengths actually used and the
// flags of the choices made.
type NumericDevice struct {
	// Device and Options are what solver.New receives.
	Device  solver.Device
	Options solver.Options // mesh node count and refined-zone bias
	// Base is the resolved profile base.
	Base string
	// PLength and NLength are the p and n region lengths of the junction
	// base, m (0 for the other bases); Length is the device length, m.
	PLength, NLength, Length float64
	// Flags are the validity and choice flags (FlagNumeric*).
	Flags []physics.Flag
	// Static is the analytic model of the Spec (for the lengths and the
	// comparison).
	Static *physics.Static
}

// BuildNumericDevice validates the Spec and the NumericSpec and resolves
// them into a solver device for biases down to vmin (V, the most reverse
// bias of interest; values above 0 count as 0): lengths (see NumericSpec),
// the doping profile, the species, lifetimes, the incomplete-ionisation
// and band-gap-narrowing hooks of the Spec's Effects, and the mesh
// options (node count; a refined depletion zone up to |vmin|, at least
// 0.5 V, widened for the ionised fraction when ionisation is incomplete).
//
// Hooks. Incomplete ionisation (Effects.Ionisation): at each node the
// dopants compensated by the other species are taken ionised and the
// remainder follows the Fermi-Dirac occupation of a neutral region doped
// with the net amount, physics.IonisedDensity with the level
// physics.Material.EffectiveDopantLevel of the majority species at its
// own concentration (the neutral-region approximation the solver asks
// for: in a depletion region the true ionisation is more complete).
// Band-gap narrowing (Effects.BGN): n_ie = ni exp(dEg/(2 kT)) with dEg =
// physics.BandGapNarrowing of the node's total doping Nd + Na, split
// equally between the bands by the solver (Slotboom & de Graaff 1976).
// Unlike the analytic model, whose electrostatic built-in potential keeps
// ni, the solver's electrostatic barrier includes the narrowing.
//
// Errors: a *ValidationError for bad fields (including a profile that is
// not p-type at one contact and n-type at the other), or the analytic
// model's error for a combination physics refuses.
func BuildNumericDevice(spec Spec, num NumericSpec, vmin float64) (*NumericDevice, error) {
	if err := validateSpecs(spec, num); err != nil {
		return nil, err
	}
	pd, err := spec.Device()
	if err != nil {
		return nil, err
	}
	st, err := pd.Prepare()
	if err != nil {
		return nil, err
	}
	vmin = math.Min(vmin, 0)
	// Prepare resolves the dopant species ("" = the material's default).
	pd.DonorSpecies, pd.AcceptorSpecies = st.Device.DonorSpecies, st.Device.AcceptorSpecies
	m := pd.Material
	t := pd.Temperature
	out := &NumericDevice{Base: num.base(), Static: st}
	flag := func(code string, q []string, msg string) {
		out.Flags = append(out.Flags, physics.Flag{Code: code, Quantities: q, Message: msg})
	}
	var dev solver.Device
	switch out.Base {
	case BaseJunction:
		dep := st.Junction.Solve(st.Vbi, vmin)
		side := func(given, width, edge, diffLen float64, name string) float64 {
			switch {
			case given > 0:
				return given
			case width > 0:
				l := width + edge
				flag(FlagNumericLength, []string{"all"}, fmt.Sprintf("%s region length %s: the quasi-neutral width plus the depletion edge at %s (give --lengths to choose)",
					name, Format(Length, l, 3, true), Format(Voltage, vmin, 3, true)))
				return l
			}
			l := math.Min(edge+longRegionDiffusionLengths*diffLen, maxWidth)
			flag(FlagNumericLength, []string{"all"}, fmt.Sprintf("the %s region is long: simulated as %s, the depletion edge at %s plus %d minority diffusion lengths (%s each; give --lengths to choose)",
				name, Format(Length, l, 3, true), Format(Voltage, vmin, 3, true), longRegionDiffusionLengths, Format(Length, diffLen, 3, true)))
			return l
		}
		out.PLength = side(num.PLength, spec.PWidth, dep.Xp, st.LN, "p")
		out.NLength = side(num.NLength, spec.NWidth, dep.Xn, st.LP, "n")
		out.Length = out.PLength + out.NLength
		ohmic := pd
		ohmic.Sp, ohmic.Sn = math.Inf(1), math.Inf(1)
		dev, err = solver.FromPhysics(ohmic, out.PLength, out.NLength)
		if err != nil {
			return nil, err
		}
	default:
		out.Length = num.Length
		if out.Length == 0 {
			deep := num.deepestFeature()
			out.Length = math.Min(maxWidth, deep+profileMargin)
			if num.File != nil {
				out.Length = math.Max(out.Length, num.File.Depth[len(num.File.Depth)-1])
			}
			flag(FlagNumericLength, []string{"all"}, fmt.Sprintf("device length %s: the deepest profile feature (%s) plus %s, or the depth of the imported profile (give --length to choose)",
				Format(Length, out.Length, 3, true), Format(Length, deep, 3, true), Format(Length, profileMargin, 3, true)))
		}
		dev = solver.Device{Material: m, Temperature: t, Length: out.Length,
			DonorSpecies: pd.DonorSpecies, AcceptorSpecies: pd.AcceptorSpecies, TauN: pd.TauN, TauP: pd.TauP}
		switch out.Base {
		case BaseDonor:
			dev.Profile.Donors = []solver.Shape{solver.Uniform{Concentration: spec.DonorDensity, From: math.Inf(-1), To: math.Inf(1)}}
		case BaseAcceptor:
			dev.Profile.Acceptors = []solver.Shape{solver.Uniform{Concentration: spec.AcceptorDensity, From: math.Inf(-1), To: math.Inf(1)}}
		}
		flag(FlagNumericReference, []string{"all"}, "the analytic values are those of the Spec's step or graded junction, not of this doping profile: read the differences as a comparison with that reference")
	}
	for i, s := range num.Shapes {
		sh := s.shape(out.Length)
		if s.Kind == ShapeGaussian {
			// Share of the Gaussian above the surface: 1/2 erfc(Rp/(sqrt(2) dRp)).
			if lost := 0.5 * math.Erfc(s.Range/(math.Sqrt2*s.Straggle)); lost > 0.01 {
				flag(FlagNumericDoseOutside, []string{"all"}, fmt.Sprintf("shape %d: %.1f %% of the implanted dose lies above the surface (projected range %s < 2.3 straggles) and is not in the device",
					i+1, 100*lost, Format(Length, s.Range, 3, true)))
			}
		}
		if s.Species == SpeciesDonor {
			dev.Profile.Donors = append(dev.Profile.Donors, sh)
		} else {
			dev.Profile.Acceptors = append(dev.Profile.Acceptors, sh)
		}
	}
	if f := num.File; f != nil {
		wrap := func(sh solver.Shape) solver.Shape {
			if f.Face == FaceRight {
				return solver.Mirrored{Shape: sh, Surface: out.Length}
			}
			return sh
		}
		if f.Net != nil {
			dev.Profile.Net = append(dev.Profile.Net, wrap(solver.TabulatedNet{Depth: f.Depth, Net: f.Net}))
		}
		if f.Donors != nil {
			dev.Profile.Donors = append(dev.Profile.Donors, wrap(solver.Tabulated{Depth: f.Depth, Concentration: f.Donors}))
		}
		if f.Acceptors != nil {
			dev.Profile.Acceptors = append(dev.Profile.Acceptors, wrap(solver.Tabulated{Depth: f.Depth, Concentration: f.Acceptors}))
		}
		if last := f.Depth[len(f.Depth)-1]; last < out.Length*(1-1e-9) || f.Depth[0] > 0 {
			name := f.Source
			if name == "" {
				name = "the depth profile"
			}
			flag(FlagNumericProfileHeld, []string{"all"}, fmt.Sprintf("%s covers depths %s to %s of a %s device: its end values are held beyond",
				name, Format(Length, f.Depth[0], 3, true), Format(Length, last, 3, true), Format(Length, out.Length, 3, true)))
		}
	}
	// The contacts must be of opposite type.
	left, right := dev.Profile.NetAt(0), dev.Profile.NetAt(out.Length)
	if !(left*right < 0) {
		kind := func(v float64) string {
			switch {
			case v > 0:
				return "n-type"
			case v < 0:
				return "p-type"
			}
			return "undoped"
		}
		return nil, &ValidationError{Fields: []FieldError{{Field: FieldNumericProfile,
			Value:   fmt.Sprintf("%s at x = 0 (net %s), %s at x = %s (net %s)", kind(left), Format(Density, left, 3, true), kind(right), Format(Length, out.Length, 3, true), Format(Density, right, 3, true)),
			Allowed: "p-type at one contact and n-type at the other",
			Why:     "a diode needs a pn junction between its contacts: add a background (base donor or acceptor, or a uniform shape) or change the length"}}}
	}
	e := spec.Effects.Physics()
	if e.Ionisation {
		dev.Ionisation = ionisationHook(m, t, st.Device.DonorSpecies, st.Device.AcceptorSpecies)
	}
	if e.BGN {
		if hook, ok := narrowingHook(m, t, e.BGNModel); ok {
			dev.IntrinsicDensity = hook
		} else {
			flag(FlagNumericBGN, []string{"current"}, fmt.Sprintf("no band-gap narrowing parameters for %s: the solver uses ni everywhere", m.Name))
		}
	}
	if spec.PContactVelocity != nil || spec.NContactVelocity != nil {
		flag(FlagNumericContacts, []string{"current"}, "the solver's contacts are ohmic: the contact recombination velocities of the Spec apply to the analytic values only")
	}
	if spec.ContactResistance > 0 || spec.ShuntResistance > 0 {
		flag(FlagNumericExternal, []string{"current"}, "the contact and shunt resistances are outside the simulated device: the numeric current is that of the device alone")
	}
	if spec.Effects.NoSRH || spec.Effects.NoHighInjection || spec.Effects.NoSeriesResistance {
		flag(FlagNumericEffects, []string{"current"}, "the drift-diffusion model always contains recombination in the depletion region, high injection and the resistance of the simulated regions: the switches that turn them off apply to the analytic values only")
	}
	out.Device = dev
	// The solver sizes its refined depletion zone from the chemical
	// doping. With incomplete ionisation (fractions fa, fd) the depletion
	// edges of a step at total voltage V = Vbi + VR lie at xp = sqrt(2 eps
	// V NdI/(q NaI (NaI + NdI))) and xn alike (Sze & Ng 2007, eqs.
	// 2.10-2.11 with the ionised densities), while the zone estimate uses
	// Na, Nd: the zone covers both edges when its voltage is V times the
	// larger of (fd/fa)(Na + Nd)/(fa Na + fd Nd) and (fa/fd)(Na +
	// Nd)/(fa Na + fd Nd).
	vr := math.Max(-vmin, 0.5)
	if e.Ionisation {
		fa, fd := st.NaIonised/pd.Na, st.NdIonised/pd.Nd
		if fa > 0 && fd > 0 && (fa < 1 || fd < 1) {
			k := (pd.Na + pd.Nd) / (fa*pd.Na + fd*pd.Nd)
			scale := math.Max(1, k*math.Max(fd/fa, fa/fd))
			vr = math.Min((st.Vbi+vr)*scale-st.Vbi, 1e5)
		}
	}
	out.Options = solver.Options{Mesh: solver.MeshOptions{Nodes: num.Nodes, MaxReverseBias: vr}}
	return out, nil
}

// validateSpecs validates both specifications and merges their errors.
func validateSpecs(spec Spec, num NumericSpec) error {
	var fields []FieldError
	for _, err := range []error{spec.Validate(), num.Validate()} {
		var ve *ValidationError
		if errors.As(err, &ve) {
			fields = append(fields, ve.Fields...)
		} else if err != nil {
			return err
		}
	}
	if len(fields) > 0 {
		return &ValidationError{Fields: fields}
	}
	return nil
}

// deepestFeature returns the largest depth (m) at which a shape still
// changes: a uniform layer's end, a ramp's plateau start, Rp + 5 straggles
// of an implant, 4 diffusion lengths of an erfc (erfc(2) = 5e-3).
func (n NumericSpec) deepestFeature() float64 {
	d := 0.0
	for _, s := range n.Shapes {
		switch s.Kind {
		case ShapeUniform:
			d = math.Max(d, math.Max(s.From, s.To))
		case ShapeLinear:
			d = math.Max(d, s.Position+math.Max(s.Concentration/s.Gradient, 0))
		case ShapeGaussian:
			d = math.Max(d, s.Range+5*s.Straggle)
		case ShapeErfc:
			d = math.Max(d, 4*s.DiffusionLength)
		}
	}
	return d
}

// shape converts a validated DopingShape into a solver shape on a device
// of the given length.
func (s DopingShape) shape(length float64) solver.Shape {
	var sh solver.Shape
	switch s.Kind {
	case ShapeUniform:
		to := s.To
		if to == 0 {
			to = math.Inf(1)
		}
		sh = solver.Uniform{Concentration: s.Concentration, From: s.From, To: to}
	case ShapeLinear:
		sh = solver.LinearGraded{Position: s.Position, Gradient: s.Gradient, Max: s.Concentration}
	case ShapeGaussian:
		sh = solver.Gaussian{Dose: s.Dose, Range: s.Range, Straggle: s.Straggle}
	default:
		sh = solver.Erfc{Surface: s.Concentration, Length: s.DiffusionLength}
	}
	if s.Face == FaceRight {
		return solver.Mirrored{Shape: sh, Surface: length}
	}
	return sh
}

// ionisationHook returns the solver's ionisation hook for the material at
// temperature t (see BuildNumericDevice).
func ionisationHook(m *physics.Material, t float64, donor, acceptor string) func(x, nd, na float64) (float64, float64) {
	dd, _ := m.Dopant(donor)
	da, _ := m.Dopant(acceptor)
	nc, nv, ni := m.Nc(t), m.Nv(t), m.Ni(t)
	return func(_, nd, na float64) (float64, float64) {
		switch {
		case nd > na:
			_, ion := physics.IonisedDensity(nd-na, m.EffectiveDopantLevel(dd, nd), nc, ni, t)
			return na + ion, na
		case na > nd:
			_, ion := physics.IonisedDensity(na-nd, m.EffectiveDopantLevel(da, na), nv, ni, t)
			return nd, nd + ion
		}
		return nd, na
	}
}

// narrowingHook returns the solver's effective-intrinsic-density hook, and
// false when the material has no narrowing parameters.
func narrowingHook(m *physics.Material, t float64, bm physics.BGNModel) (func(x, nd, na float64) float64, bool) {
	if _, ok := physics.BandGapNarrowing(m, bm, 1); !ok {
		return nil, false
	}
	ni, vt := m.Ni(t), physics.ThermalVoltage(t)
	return func(_, nd, na float64) float64 {
		n := nd + na
		if !(n > 0) {
			return ni
		}
		deg, _ := physics.BandGapNarrowing(m, bm, n)
		return ni * math.Exp(deg/(2*vt))
	}, true
}

// NumericProgress reports the advance of a numeric solve or sweep.
type NumericProgress struct {
	// Stage is "equilibrium", "bias" or "capacitance" (Solve), "iv"
	// (NumericIV) or "cv" (NumericCV).
	Stage string
	// Done and Total count the finished and requested steps or points.
	Done, Total int
	// Bias is the bias just finished, V.
	Bias float64
	// Value is the result of the step: the built-in potential (V) at
	// equilibrium, the current (A) for bias and iv, the capacitance (F)
	// for capacitance and cv.
	Value float64
}

// NumericProgressFunc receives progress on the solving goroutine; it must
// return quickly. It may be nil.
type NumericProgressFunc func(NumericProgress)

// NumericResult is the drift-diffusion solution of a Spec at its bias.
type NumericResult struct {
	Spec    Spec        // the junction as given
	Numeric NumericSpec // the numeric refinement as given
	// Device is the resolved solver input.
	Device *NumericDevice
	// Solution is the solver's result at the bias (node and edge arrays).
	Solution *solver.Result
	// BuiltInPotential is the equilibrium electrostatic barrier, V.
	BuiltInPotential float64
	// CapacitancePerArea (F/m^2) and Capacitance (F) are the quasi-static
	// depletion capacitance -dQ/dV (solver.CV, the stored minority charge
	// excluded); NaN when it could not be computed.
	CapacitancePerArea, Capacitance float64
	// CurrentDensity (A/m^2) and Current (A, times the Spec's area) are the
	// terminal current, forward positive.
	CurrentDensity, Current float64
	// Donors and Acceptors are the chemical dopant concentrations at the
	// nodes, m^-3 (point values of the profile).
	Donors, Acceptors []float64
	// Junctions are the metallurgical junctions (zero crossings of the
	// net doping), m from the left contact.
	Junctions []float64
	// Flags are the adapter's flags followed by the solver's.
	Flags []physics.Flag
}

// numericSweep is what a numeric sweep starts from: its biases, the most
// reverse of them (which sizes the device), the device, the solver and
// its built-in potential.
type numericSweep struct {
	vs   []float64
	vmin float64
	nd   *NumericDevice
	s    *solver.Solver
	vbi  float64
}

// numericSweepSetup validates the range (errors name field), builds the
// device for its most reverse bias and solves the equilibrium.
func numericSweepSetup(spec Spec, num NumericSpec, r Range, field string) (numericSweep, error) {
	vs, err := numericBiases(r, field)
	if err != nil {
		return numericSweep{}, err
	}
	vmin := 0.0
	for _, v := range vs {
		vmin = math.Min(vmin, v)
	}
	nd, s, err := numericBuild(spec, num, vmin)
	if err != nil {
		return numericSweep{}, err
	}
	vbi, err := s.BuiltInPotential()
	if err != nil {
		return numericSweep{}, err
	}
	return numericSweep{vs: vs, vmin: vmin, nd: nd, s: s, vbi: vbi}, nil
}

// numericBuild validates, builds and meshes.
func numericBuild(spec Spec, num NumericSpec, vmin float64) (*NumericDevice, *solver.Solver, error) {
	nd, err := BuildNumericDevice(spec, num, vmin)
	if err != nil {
		return nil, nil, err
	}
	s, err := solver.New(nd.Device, nd.Options)
	if err != nil {
		return nil, nil, err
	}
	return nd, s, nil
}

// Solve computes the drift-diffusion solution of the Spec at its bias with
// the refinements of num: the equilibrium (for the built-in potential),
// the solution at the bias by continuation from equilibrium, and the
// capacitance from a second continuation (solver.CV, over 5 mV). Method,
// discretisation and validity: package physics/solver. progress, if not
// nil, is called after each of the three stages.
//
// Errors: a *ValidationError or *solver.ParamError for bad input, a
// *solver.ConvergenceError (naming the bias) when the iteration fails,
// ctx.Err() when cancelled. A capacitance that fails alone gives NaN and
// the FlagNumericCapacitance flag.
func Solve(ctx context.Context, spec Spec, num NumericSpec, progress NumericProgressFunc) (*NumericResult, error) {
	nd, s, err := numericBuild(spec, num, spec.Bias)
	if err != nil {
		return nil, err
	}
	report := func(stage string, done int, v, val float64) {
		if progress != nil {
			progress(NumericProgress{Stage: stage, Done: done, Total: 3, Bias: v, Value: val})
		}
	}
	vbi, err := s.BuiltInPotential()
	if err != nil {
		return nil, err
	}
	report("equilibrium", 1, 0, vbi)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	sol, err := s.SolveContext(ctx, spec.Bias)
	if err != nil {
		return nil, err
	}
	r := &NumericResult{Spec: spec, Numeric: num, Device: nd, Solution: sol, BuiltInPotential: vbi,
		CurrentDensity: sol.Current, Current: sol.Current * spec.Area,
		CapacitancePerArea: math.NaN(), Capacitance: math.NaN()}
	report("bias", 2, spec.Bias, r.Current)
	r.Flags = append(r.Flags, nd.Flags...)
	cv, cerr := s.CV(ctx, []float64{spec.Bias}, nil)
	switch {
	case ctx.Err() != nil:
		return nil, ctx.Err()
	case cerr != nil || len(cv) == 0:
		r.Flags = append(r.Flags, physics.Flag{Code: FlagNumericCapacitance, Quantities: []string{"capacitance"},
			Message: fmt.Sprintf("the capacitance could not be computed: %v", cerr)})
	default:
		r.CapacitancePerArea = cv[0].Capacitance
		r.Capacitance = cv[0].Capacitance * spec.Area
	}
	report("capacitance", 3, spec.Bias, r.Capacitance)
	r.Junctions = s.Junctions()
	r.Donors, r.Acceptors = make([]float64, len(sol.X)), make([]float64, len(sol.X))
	for i, x := range sol.X {
		r.Donors[i], r.Acceptors[i] = nd.Device.Profile.At(x)
	}
	r.Flags = append(r.Flags, breakdownFlags(nd.Static, spec.Bias)...)
	r.Flags = append(r.Flags, sol.Flags...)
	return r, nil
}

// breakdownFlags flags a reverse bias beyond the analytic breakdown
// voltage (with the safety caution).
func breakdownFlags(st *physics.Static, vmin float64) []physics.Flag {
	vb := st.Breakdown.Voltage
	if !(vb > 0) || !(-vmin >= vb) {
		return nil
	}
	return []physics.Flag{{Code: FlagNumericBreakdown, Quantities: []string{"current"},
		Message: fmt.Sprintf("%s is beyond the analytic avalanche breakdown voltage (%s): the solver has no impact ionisation and shows no breakdown",
			Format(Voltage, vmin, 4, true), Format(Voltage, -vb, 4, true))}, cautionFlag()}
}

// Nodes returns the number of mesh nodes of the solution.
func (r *NumericResult) Nodes() int { return len(r.Solution.X) }

// frame returns the quantities that put a solution into the frame of the
// analytic curves: the main metallurgical junction xj (m), the
// orientation (+1 when the anode is the left contact) and the anode's
// node index.
func frame(sol *solver.Result) (xj, orient float64, ia int) {
	xj = sol.Depletion.Junction
	orient, ia = 1, 0
	if len(sol.NetDoping) > 0 && sol.NetDoping[0] > 0 {
		orient, ia = -1, len(sol.X)-1
	}
	return xj, orient, ia
}

// NumericQuantities returns the numeric result as quantities under the
// JSON keys of `junco calc` where they mean the same (SI values): bias,
// built-in potential (equilibrium electrostatic barrier), barrier at the
// bias, depletion width and its parts (half-density edges,
// solver.Depletion), peak field, capacitance (also per area), current
// (also density), the minority/majority ratio at the depletion edges, the
// lengths, node count, Newton iterations of the last bias step and the
// current-conservation error max|Jn + Jp - J|/|J|.
func NumericQuantities(r *NumericResult) []Quantity {
	sol := r.Solution
	d := sol.Depletion
	xj, _, _ := frame(sol)
	w, xn, xp := math.NaN(), math.NaN(), math.NaN()
	if d.Valid {
		w, xn, xp = d.W, math.Abs(d.XCathode-xj), math.Abs(xj-d.XAnode)
	}
	pl, nl := r.Device.PLength, r.Device.NLength
	if r.Device.Base != BaseJunction {
		pl, nl = math.NaN(), math.NaN()
	}
	g := GroupElectrostatics
	return []Quantity{
		{"bias_V", GroupConditions, "bias", "V", Voltage, sol.Bias, nil},
		{"built_in_potential_V", g, "built-in potential", "Vbi", Voltage, r.BuiltInPotential, nil},
		{"barrier_V", g, "electrostatic barrier at bias", "Vbi-V", Voltage, sol.Barrier, nil},
		{"depletion_width_m", g, "depletion width", "W", Length, w, nil},
		{"depletion_width_n_m", g, "  into n side", "xn", Length, xn, nil},
		{"depletion_width_p_m", g, "  into p side", "xp", Length, xp, nil},
		{"peak_field_V_per_m", g, "peak field", "Emax", Field, sol.PeakField, nil},
		{"junction_capacitance_F", GroupCapacitance, "depletion capacitance", "Cj", Capacitance, r.Capacitance, nil},
		{"junction_capacitance_per_area_F_per_m2", GroupCapacitance, "  per area", "Cj/A", CapacitancePerArea, r.CapacitancePerArea, nil},
		{"current_A", GroupCurrents, "total current at bias", "I", Current, r.Current, nil},
		{"current_density_A_per_m2", GroupCurrents, "  density", "J", CurrentDensity, r.CurrentDensity, nil},
		{"minority_injection_ratio", GroupCurrents, "minority/majority at depletion edges", "inj", Dimensionless, d.MinorityRatio, nil},
		{"p_length_m", GroupNumeric, "p region length", "Lp,dev", Length, pl, nil},
		{"n_length_m", GroupNumeric, "n region length", "Ln,dev", Length, nl, nil},
		{"device_length_m", GroupNumeric, "device length", "L", Length, r.Device.Length, nil},
		{"nodes", GroupNumeric, "mesh nodes", "N", Dimensionless, float64(r.Nodes()), nil},
		{"newton_iterations", GroupNumeric, "Newton iterations (last bias step)", "it", Dimensionless, float64(sol.Iterations), nil},
		{"current_conservation_error", GroupNumeric, "current conservation error", "dJ/J", Dimensionless, sol.CurrentSpread, nil},
	}
}

// GroupNumeric is the display group of the numeric solution's own
// quantities (lengths, mesh, iterations).
const GroupNumeric = "Numerical solution"

// Difference is one line of the analytic-numeric comparison.
type Difference struct {
	// Key is the JSON key of the quantity (as in `junco calc --json`).
	Key, Label, Symbol string
	Kind               Kind // fixes the trade unit of the two values
	// Analytic and Numeric are the two values, SI.
	Analytic, Numeric float64
	// Relative is (Numeric - Analytic)/|Analytic|; NaN when either value
	// is NaN or the analytic value is 0.
	Relative float64
}

// compareKeys are the quantities Compare reads out, in order.
var compareKeys = [...]string{"built_in_potential_V", "depletion_width_m", "peak_field_V_per_m", "junction_capacitance_F", "current_A"}

// Compare reads out the analytic and numeric values of the built-in
// potential, depletion width, peak field, depletion capacitance and
// current with their relative difference. The analytic values are those
// of `junco calc` (depletion approximation, the Spec's Effects); the
// numeric ones those of the drift-diffusion solution. Expected agreement
// in the analytic model's regime (non-degenerate step, low injection, a
// few kT/q below flat band): the built-in potential within 1 mV (Sze & Ng
// 2007, eq. 2.8); the depletion width a few percent below the
// approximation, which ignores the majority tails (the 2kT/q correction,
// Sze & Ng 2007, section 2.2); the reverse capacitance within 5 %; the
// low-injection current within a few percent. Larger differences mark
// where the analytic model is not to be trusted.
func Compare(analytic *Result, numeric *NumericResult) []Difference {
	if analytic == nil || numeric == nil {
		return nil
	}
	nq := map[string]Quantity{}
	for _, q := range NumericQuantities(numeric) {
		nq[q.Key] = q
	}
	out := make([]Difference, 0, len(compareKeys))
	for _, k := range compareKeys {
		q := nq[k]
		a, _ := analytic.Get(k)
		rel := math.NaN()
		if isFinite(a) && isFinite(q.Value) && a != 0 {
			rel = (q.Value - a) / math.Abs(a)
		}
		out = append(out, Difference{Key: k, Label: strings.TrimSpace(q.Label), Symbol: q.Symbol, Kind: q.Kind, Analytic: a, Numeric: q.Value, Relative: rel})
	}
	return out
}

// NumericJSON encodes a numeric result as one JSON object: every
// NumericQuantities key (SI, null where not applicable),
// "depletion_valid", "junctions_m" (the metallurgical junctions), "flags"
// (code, message), and, when analytic is not nil, "analytic" (the
// compared quantities under their `junco calc` keys) and "difference"
// (the relative differences of Compare).
func NumericJSON(r *NumericResult, analytic *Result) []byte {
	var b bytes.Buffer
	b.WriteString("{\n")
	for _, q := range NumericQuantities(r) {
		fmt.Fprintf(&b, "  %q: %s,\n", q.Key, jsonNumber(q.Value))
	}
	fmt.Fprintf(&b, "  \"depletion_valid\": %t,\n", r.Solution.Depletion.Valid)
	b.WriteString("  \"junctions_m\": [")
	for i, x := range r.Junctions {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(jsonNumber(x))
	}
	b.WriteString("],\n")
	writeJSONFlags(&b, r.Flags)
	if analytic != nil {
		diffs := Compare(analytic, r)
		b.WriteString(",\n  \"analytic\": {")
		for i, d := range diffs {
			if i > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "\n    %q: %s", d.Key, jsonNumber(d.Analytic))
		}
		b.WriteString("\n  },\n  \"difference\": {")
		for i, d := range diffs {
			if i > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "\n    %q: %s", d.Key, jsonNumber(d.Relative))
		}
		b.WriteString("\n  }")
	}
	b.WriteString("\n}\n")
	return b.Bytes()
}

// writeJSONFlags writes the "flags" member (without a trailing comma).
func writeJSONFlags(b *bytes.Buffer, flags []physics.Flag) {
	b.WriteString("  \"flags\": [")
	for i, f := range flags {
		if i > 0 {
			b.WriteString(",")
		}
		fmt.Fprintf(b, "\n    {\"code\": %q, \"message\": %q}", f.Code, f.Message)
	}
	if len(flags) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("]")
}

// Curve IDs of the numeric curves (Curve.ID).
const (
	CurveNumericPotential = "numeric-potential"       // NumericPotentialCurve
	CurveNumericField     = "numeric-field"           // NumericFieldCurve
	CurveNumericBands     = "numeric-bands"           // NumericBandCurve
	CurveNumericCarriers  = "numeric-carriers"        // NumericCarrierCurve
	CurveNumericCurrent   = "numeric-current-density" // NumericCurrentCurve
	CurveNumericCharge    = "numeric-charge"          // NumericChargeCurve
	CurveNumericIV        = "numeric-iv"              // NumericIVCurve
	CurveNumericCV        = "numeric-cv"              // NumericCVCurve
)

// positionAxis is the x axis of the numeric profiles: as the analytic
// JunctionProfiles, um from the metallurgical junction, p side negative.
func positionAxis() Axis {
	return Axis{Label: "position from junction x - xj", Kind: Length, Unit: "um"}
}

// sampled returns the positions (um from the junction, p side negative,
// increasing) and the matching permutation of the solver's indices.
func sampled(xs []float64, xj, orient float64) (pos []float64, idx []int) {
	n := len(xs)
	pos, idx = make([]float64, n), make([]int, n)
	for k := 0; k < n; k++ {
		i := k
		if orient < 0 {
			i = n - 1 - k
		}
		idx[k] = i
		pos[k] = orient * (xs[i] - xj) * 1e6
	}
	return pos, idx
}

// pick returns v permuted by idx and scaled by f.
func pick(v []float64, idx []int, f float64) []float64 {
	out := make([]float64, len(idx))
	for k, i := range idx {
		out[k] = f * v[i]
	}
	return out
}

// NumericPotentialCurve returns the electrostatic potential (V) relative to
// the anode (p-side) contact against position (um from the junction, p
// side negative): the frame of the analytic potential curve, which starts
// at 0 in the neutral p region and rises by Vbi - V.
func NumericPotentialCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, ia := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	psi := pick(sol.Potential, idx, 1)
	for k := range psi {
		psi[k] -= sol.Potential[ia]
	}
	return Curve{ID: CurveNumericPotential, Title: "Electrostatic potential (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "potential psi", Kind: Voltage}, Xs: pos, Series: []Series{{"psi (numeric)", psi}}, Flags: r.Flags}
}

// NumericFieldCurve returns the electric field (V/m) on the cell midpoints
// against position, positive toward the n side (negative in the
// depletion region, as the analytic field curve).
func NumericFieldCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.XMid, xj, orient)
	return Curve{ID: CurveNumericField, Title: "Electric field (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "field E", Kind: Field}, Xs: pos, Series: []Series{{"E (numeric)", pick(sol.Field, idx, orient)}}, Flags: r.Flags}
}

// NumericBandCurve returns the band diagram, eV, relative to the anode's
// (p-side) hole quasi-Fermi level, against position: Ec, Ev and the
// quasi-Fermi levels Efn and Efp (Ec and Ev include the band-gap
// narrowing split between the bands when it is on).
func NumericBandCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, ia := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	shift := -sol.Efp[ia]
	series := []Series{{"Ec", pick(sol.Ec, idx, 1)}, {"Ev", pick(sol.Ev, idx, 1)}, {"Efn", pick(sol.Efn, idx, 1)}, {"Efp", pick(sol.Efp, idx, 1)}}
	for _, s := range series {
		for k := range s.Y {
			s.Y[k] += shift
		}
	}
	return Curve{ID: CurveNumericBands, Title: "Band diagram (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "energy", Kind: Energy}, Xs: pos, Series: series, Flags: r.Flags}
}

// NumericCarrierCurve returns the electron and hole densities and the
// magnitude of the ionised net doping |Nd+ - Na-| (m^-3, log axis)
// against position.
func NumericCarrierCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	net := pick(sol.NetDoping, idx, 1)
	for k := range net {
		net[k] = math.Abs(net[k])
	}
	return Curve{ID: CurveNumericCarriers, Title: "Carrier densities and net doping (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "density", Kind: Density, Log: true}, Xs: pos,
		Series: []Series{{"n", pick(sol.N, idx, 1)}, {"p", pick(sol.P, idx, 1)}, {"|net doping|", net}}, Flags: r.Flags}
}

// NumericCurrentCurve returns the electron, hole and total current
// densities (A/m^2) on the cell midpoints against position, positive from
// the p side to the n side (forward current positive).
func NumericCurrentCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.XMid, xj, orient)
	jn, jp := pick(sol.Jn, idx, orient), pick(sol.Jp, idx, orient)
	tot := make([]float64, len(jn))
	for k := range tot {
		tot[k] = jn[k] + jp[k]
	}
	return Curve{ID: CurveNumericCurrent, Title: "Current densities (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "current density", Kind: CurrentDensity}, Xs: pos,
		Series: []Series{{"Jn", jn}, {"Jp", jp}, {"total", tot}}, Flags: r.Flags}
}

// NumericChargeCurve returns the space-charge density q (p - n + Nd+ -
// Na-) in C/m^3 against position.
func NumericChargeCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	return Curve{ID: CurveNumericCharge, Title: "Space-charge density (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "charge density rho", Kind: Dimensionless, Unit: "C/m^3"}, Xs: pos, Series: []Series{{"rho (numeric)", pick(sol.Charge, idx, 1)}}, Flags: r.Flags}
}

// NumericCurves returns every profile curve of a numeric result, in the
// order potential, field, bands, carriers, current densities, charge.
func NumericCurves(r *NumericResult) []Curve {
	return []Curve{NumericPotentialCurve(r), NumericFieldCurve(r), NumericBandCurve(r), NumericCarrierCurve(r), NumericCurrentCurve(r), NumericChargeCurve(r)}
}

// numericBiases returns the validated points of a numeric sweep.
func numericBiases(r Range, field string) ([]float64, error) {
	vs, err := r.PointsUpTo(MaxNumericSweepPoints)
	if err != nil {
		return nil, &ValidationError{Fields: []FieldError{{Field: field, Value: fmt.Sprintf("%g:%g:%g V", r.From, r.To, r.Step),
			Allowed: fmt.Sprintf("FROM:TO:STEP with a non-zero step pointing from FROM to TO, at most %d points (MaxNumericSweepPoints)", MaxNumericSweepPoints),
			Why:     err.Error()}}}
	}
	for _, v := range vs {
		if v < -maxReverse || v > maxForward {
			return nil, &ValidationError{Fields: []FieldError{{Field: field, Value: Format(Voltage, v, 4, true), Allowed: "-100 kV to 20 V",
				Why: "the bias range of a Spec"}}}
		}
	}
	return vs, nil
}

// NumericIVPoint is one bias of a numeric current-voltage sweep.
type NumericIVPoint struct {
	Bias float64 // V
	// Current (A) and CurrentDensity (A/m^2) are the terminal current,
	// forward positive.
	Current, CurrentDensity float64
	// AnalyticCurrent is the analytic total current at the same bias, A
	// (model.IVSweep; NaN when unavailable).
	AnalyticCurrent float64
	// Barrier is the electrostatic barrier Vbi - V, V.
	Barrier float64
	// DepletionWidth (m, NaN when no region is depleted) and PeakField
	// (V/m) describe the junction.
	DepletionWidth, PeakField float64
	// Iterations is the Newton iteration count of the last step and
	// CurrentSpread the current-conservation error.
	Iterations    int
	CurrentSpread float64 // max |Jn + Jp - J|/|J| along the device
}

// NumericIVResult is a numeric current-voltage sweep; on cancellation or
// non-convergence it holds the points finished.
type NumericIVResult struct {
	Spec   Spec           // the junction
	Device *NumericDevice // the resolved solver input
	Range  Range          // the sweep asked for, V
	// Requested is the number of biases asked for.
	Requested int
	// Nodes is the mesh node count; BuiltInPotential the equilibrium
	// barrier, V.
	Nodes            int
	BuiltInPotential float64          // see Nodes
	Points           []NumericIVPoint // the points finished, in sweep order
	// Flags are the distinct flags of the device and the points.
	Flags []physics.Flag
}

// flagSet collects distinct flags in order of appearance: flags of the
// device by code and message (two length choices are two flags), flags of
// the sweep's points by code (the first message stands for the others).
type flagSet struct {
	seen  map[string]bool
	flags []physics.Flag
}

func (f *flagSet) addKeyed(key func(physics.Flag) string, fl []physics.Flag) {
	if f.seen == nil {
		f.seen = map[string]bool{}
	}
	for _, x := range fl {
		if k := key(x); !f.seen[k] {
			f.seen[k] = true
			f.flags = append(f.flags, x)
		}
	}
}

// add adds device flags (distinct by code and message).
func (f *flagSet) add(fl ...physics.Flag) {
	f.addKeyed(func(x physics.Flag) string { return x.Code + "\x00" + x.Message }, fl)
}

// addPoint adds the flags of a sweep point (distinct by code).
func (f *flagSet) addPoint(fl ...physics.Flag) {
	f.addKeyed(func(x physics.Flag) string { return x.Code }, fl)
}

// NumericIV sweeps the bias over r (V) with the drift-diffusion solver,
// each point by continuation from the previous one (solver.Sweep), and
// pairs each point with the analytic total current. progress, if not nil,
// is called after each point (Stage "iv", Value the current in A).
//
// On cancellation or non-convergence it returns the points finished
// together with the error (ctx.Err() or a *solver.ConvergenceError naming
// the bias); bad input gives a nil result and a *ValidationError.
func NumericIV(ctx context.Context, spec Spec, num NumericSpec, r Range, progress NumericProgressFunc) (*NumericIVResult, error) {
	sw, err := numericSweepSetup(spec, num, r, FieldNumericSweep)
	if err != nil {
		return nil, err
	}
	vs, vmin, nd, s, vbi := sw.vs, sw.vmin, sw.nd, sw.s, sw.vbi
	out := &NumericIVResult{Spec: spec, Device: nd, Range: r, Requested: len(vs), Nodes: len(s.Nodes()), BuiltInPotential: vbi}
	analytic := make([]float64, len(vs))
	for i := range analytic {
		analytic[i] = math.NaN()
	}
	if pts, _, aerr := IVSweep(ctx, spec, r); aerr == nil && len(pts) == len(vs) {
		for i, p := range pts {
			analytic[i] = p.Current
		}
	}
	var fs flagSet
	fs.add(nd.Flags...)
	fs.add(breakdownFlags(nd.Static, vmin)...)
	fs.add(s.Flags()...)
	res, serr := s.Sweep(ctx, vs, func(p solver.Progress) {
		if progress != nil {
			progress(NumericProgress{Stage: "iv", Done: p.Done, Total: p.Total, Bias: p.Bias, Value: p.Current * spec.Area})
		}
	})
	for i, x := range res {
		w := math.NaN()
		if x.Depletion.Valid {
			w = x.Depletion.W
		}
		out.Points = append(out.Points, NumericIVPoint{Bias: x.Bias, Current: x.Current * spec.Area, CurrentDensity: x.Current,
			AnalyticCurrent: analytic[i], Barrier: x.Barrier, DepletionWidth: w, PeakField: x.PeakField,
			Iterations: x.Iterations, CurrentSpread: x.CurrentSpread})
		fs.addPoint(x.Flags...)
	}
	out.Flags = fs.flags
	return out, serr
}

// NumericCVPoint is one bias of a numeric capacitance-voltage sweep.
type NumericCVPoint struct {
	Bias float64 // V
	// Capacitance (F) and CapacitancePerArea (F/m^2) are the quasi-static
	// depletion capacitance -dQ/dV (solver.CVPoint).
	Capacitance, CapacitancePerArea float64
	// AnalyticCapacitance is the depletion-approximation capacitance at
	// the same bias, F (NaN at or above the built-in potential).
	AnalyticCapacitance float64
	// DepletionWidth and AnalyticDepletionWidth are the numeric
	// (half-density) and depletion-approximation widths, m.
	DepletionWidth, AnalyticDepletionWidth float64
	// Charge is the dipole charge per area, C/m^2; Current the terminal
	// current, A.
	Charge, Current float64
}

// NumericCVResult is a numeric capacitance-voltage sweep; on cancellation
// or non-convergence it holds the points finished.
type NumericCVResult struct {
	Spec             Spec             // the junction
	Device           *NumericDevice   // the resolved solver input
	Range            Range            // the sweep asked for, V
	Requested        int              // biases asked for
	Nodes            int              // mesh node count
	BuiltInPotential float64          // equilibrium barrier, V
	Points           []NumericCVPoint // the points finished, in sweep order
	Flags            []physics.Flag   // distinct flags of the device
}

// NumericCV computes the quasi-static depletion capacitance at each bias
// of r (V) with the drift-diffusion solver (solver.CV: C = -dQ/dV over 5
// mV, Q the charge on the cathode side of the electrical junction), paired
// with the depletion-approximation capacitance eps A/W of the analytic
// model (Sze & Ng 2007, eq. 2.30). Errors and partial results as
// NumericIV; progress Stage "cv", Value the capacitance in F.
func NumericCV(ctx context.Context, spec Spec, num NumericSpec, r Range, progress NumericProgressFunc) (*NumericCVResult, error) {
	sw, err := numericSweepSetup(spec, num, r, FieldNumericCV)
	if err != nil {
		return nil, err
	}
	vs, vmin, nd, s, vbi := sw.vs, sw.vmin, sw.nd, sw.s, sw.vbi
	out := &NumericCVResult{Spec: spec, Device: nd, Range: r, Requested: len(vs), Nodes: len(s.Nodes()), BuiltInPotential: vbi}
	var fs flagSet
	fs.add(nd.Flags...)
	fs.add(breakdownFlags(nd.Static, vmin)...)
	fs.add(s.Flags()...)
	pts, serr := s.CV(ctx, vs, func(p solver.Progress) {
		if progress != nil {
			progress(NumericProgress{Stage: "cv", Done: p.Done, Total: p.Total, Bias: p.Bias, Value: p.Current * spec.Area})
		}
	})
	for _, p := range pts {
		ap := nd.Static.At(p.Bias)
		out.Points = append(out.Points, NumericCVPoint{Bias: p.Bias, Capacitance: p.Capacitance * spec.Area, CapacitancePerArea: p.Capacitance,
			AnalyticCapacitance: ap.Cap, DepletionWidth: p.Width, AnalyticDepletionWidth: ap.Depletion.W,
			Charge: p.Charge, Current: p.Current * spec.Area})
	}
	out.Flags = fs.flags
	return out, serr
}

// NumericIVCurve returns the numeric and the analytic total current (A)
// against bias, for overlay with the analytic "iv" curve.
func NumericIVCurve(r *NumericIVResult) Curve {
	n := len(r.Points)
	xs, num, an := make([]float64, n), make([]float64, n), make([]float64, n)
	for i, p := range r.Points {
		xs[i], num[i], an[i] = p.Bias, p.Current, p.AnalyticCurrent
	}
	return Curve{ID: CurveNumericIV, Title: "Current against bias: drift-diffusion and analytic",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "current I", Kind: Current}, Xs: xs,
		Series: []Series{{"drift-diffusion", num}, {"analytic (total)", an}}, Flags: r.Flags}
}

// NumericCVCurve returns the numeric and the depletion-approximation
// capacitance (F) against bias, for overlay with the analytic "cv" curve.
func NumericCVCurve(r *NumericCVResult) Curve {
	n := len(r.Points)
	xs, num, an := make([]float64, n), make([]float64, n), make([]float64, n)
	for i, p := range r.Points {
		xs[i], num[i], an[i] = p.Bias, p.Capacitance, p.AnalyticCapacitance
	}
	return Curve{ID: CurveNumericCV, Title: "Depletion capacitance against bias: drift-diffusion and analytic",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "capacitance C", Kind: Capacitance}, Xs: xs,
		Series: []Series{{"drift-diffusion", num}, {"depletion approximation", an}}, Flags: r.Flags}
}

// relDiff returns (a - b)/|b|, NaN when undefined.
func relDiff(a, b float64) float64 {
	if !isFinite(a) || !isFinite(b) || b == 0 {
		return math.NaN()
	}
	return (a - b) / math.Abs(b)
}

// writeCSVRow writes one CSV row of numbers (NaN as empty fields).
func writeCSVRow(b *bytes.Buffer, row []float64) {
	for i, v := range row {
		if i > 0 {
			b.WriteByte(',')
		}
		if v == 0 {
			v = 0 // no "-0"
		}
		b.WriteString(csvNumber(v))
	}
	b.WriteByte('\n')
}

// NumericProfileCSVHeader is the header of WriteNumericProfileCSV.
const NumericProfileCSVHeader = "x_m,position_from_junction_m,potential_V,field_V_per_m,ec_eV,ev_eV,efn_eV,efp_eV," +
	"electron_density_per_m3,hole_density_per_m3,donor_density_per_m3,acceptor_density_per_m3,net_ionised_doping_per_m3," +
	"charge_density_C_per_m3,recombination_rate_per_m3_s,electron_current_density_A_per_m2,hole_current_density_A_per_m2,total_current_density_A_per_m2"

// WriteNumericProfileCSV writes the solution at the nodes as CSV with
// unit-labelled SI headers: x from the left contact, position from the
// junction (p side negative), potential relative to the anode, field,
// band edges and quasi-Fermi levels relative to the anode's hole
// quasi-Fermi level, densities, chemical and ionised doping, charge,
// recombination rate, current densities. Field and current densities
// live on the cells; at a node they are the mean of the adjacent cells,
// signed as in the curves (positive from p to n).
func WriteNumericProfileCSV(w io.Writer, r *NumericResult) error {
	sol := r.Solution
	xj, orient, ia := frame(sol)
	shift := -sol.Efp[ia]
	cell := func(v []float64, i int) float64 {
		switch {
		case len(v) == 0:
			return math.NaN()
		case i == 0:
			return v[0]
		case i >= len(v):
			return v[len(v)-1]
		}
		return 0.5 * (v[i-1] + v[i])
	}
	var b bytes.Buffer
	b.WriteString(NumericProfileCSVHeader + "\n")
	for i, x := range sol.X {
		jn, jp := orient*cell(sol.Jn, i), orient*cell(sol.Jp, i)
		writeCSVRow(&b, []float64{x, orient * (x - xj), sol.Potential[i] - sol.Potential[ia], orient * cell(sol.Field, i),
			sol.Ec[i] + shift, sol.Ev[i] + shift, sol.Efn[i] + shift, sol.Efp[i] + shift,
			sol.N[i], sol.P[i], r.Donors[i], r.Acceptors[i], sol.NetDoping[i], sol.Charge[i], sol.Recombination[i], jn, jp, jn + jp})
	}
	_, err := w.Write(b.Bytes())
	return err
}

// NumericIVCSVHeader is the header of WriteNumericIVCSV.
const NumericIVCSVHeader = "bias_V,current_A,current_density_A_per_m2,analytic_current_A,relative_difference,barrier_V,depletion_width_m,peak_field_V_per_m,newton_iterations,current_conservation_error"

// WriteNumericIVCSV writes a numeric I-V sweep as CSV with unit-labelled
// SI headers, one row per finished point; relative_difference is
// (numeric - analytic)/|analytic|.
func WriteNumericIVCSV(w io.Writer, r *NumericIVResult) error {
	var b bytes.Buffer
	b.WriteString(NumericIVCSVHeader + "\n")
	for _, p := range r.Points {
		writeCSVRow(&b, []float64{p.Bias, p.Current, p.CurrentDensity, p.AnalyticCurrent, relDiff(p.Current, p.AnalyticCurrent),
			p.Barrier, p.DepletionWidth, p.PeakField, float64(p.Iterations), p.CurrentSpread})
	}
	_, err := w.Write(b.Bytes())
	return err
}

// NumericCVCSVHeader is the header of WriteNumericCVCSV.
const NumericCVCSVHeader = "bias_V,capacitance_F,capacitance_per_area_F_per_m2,analytic_capacitance_F,relative_difference,depletion_width_m,analytic_depletion_width_m,charge_C_per_m2,current_A"

// WriteNumericCVCSV writes a numeric C-V sweep as CSV with unit-labelled
// SI headers, one row per finished point.
func WriteNumericCVCSV(w io.Writer, r *NumericCVResult) error {
	var b bytes.Buffer
	b.WriteString(NumericCVCSVHeader + "\n")
	for _, p := range r.Points {
		writeCSVRow(&b, []float64{p.Bias, p.Capacitance, p.CapacitancePerArea, p.AnalyticCapacitance, relDiff(p.Capacitance, p.AnalyticCapacitance),
			p.DepletionWidth, p.AnalyticDepletionWidth, p.Charge, p.Current})
	}
	_, err := w.Write(b.Bytes())
	return err
}

// JSON encodes a numeric I-V sweep: "nodes", "built_in_potential_V",
// "requested_points", "complete", "points" (bias_V, current_A,
// current_density_A_per_m2, analytic_current_A, relative_difference,
// barrier_V, depletion_width_m, peak_field_V_per_m, newton_iterations,
// current_conservation_error) and "flags".
func (r *NumericIVResult) JSON() []byte {
	rows := make([][]float64, len(r.Points))
	for i, p := range r.Points {
		rows[i] = []float64{p.Bias, p.Current, p.CurrentDensity, p.AnalyticCurrent, relDiff(p.Current, p.AnalyticCurrent),
			p.Barrier, p.DepletionWidth, p.PeakField, float64(p.Iterations), p.CurrentSpread}
	}
	return sweepJSON(r.Nodes, r.BuiltInPotential, r.Requested, strings.Split(NumericIVCSVHeader, ","), rows, r.Flags)
}

// JSON encodes a numeric C-V sweep like NumericIVResult.JSON, with the
// columns of WriteNumericCVCSV.
func (r *NumericCVResult) JSON() []byte {
	rows := make([][]float64, len(r.Points))
	for i, p := range r.Points {
		rows[i] = []float64{p.Bias, p.Capacitance, p.CapacitancePerArea, p.AnalyticCapacitance, relDiff(p.Capacitance, p.AnalyticCapacitance),
			p.DepletionWidth, p.AnalyticDepletionWidth, p.Charge, p.Current}
	}
	return sweepJSON(r.Nodes, r.BuiltInPotential, r.Requested, strings.Split(NumericCVCSVHeader, ","), rows, r.Flags)
}

func sweepJSON(nodes int, vbi float64, requested int, keys []string, rows [][]float64, flags []physics.Flag) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "{\n  \"nodes\": %d,\n  \"built_in_potential_V\": %s,\n  \"requested_points\": %d,\n  \"complete\": %t,\n  \"points\": [",
		nodes, jsonNumber(vbi), requested, len(rows) == requested)
	for i, row := range rows {
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString("\n    {")
		for k, v := range row {
			if k > 0 {
				b.WriteString(", ")
			}
			fmt.Fprintf(&b, "%q: %s", keys[k], jsonNumber(v))
		}
		b.WriteString("}")
	}
	if len(rows) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("],\n")
	writeJSONFlags(&b, flags)
	b.WriteString("\n}\n")
	return b.Bytes()
}

// ---------------------------------------------------------------------
// Depth-profile files.

// Limits of a depth-profile file.
const (
	maxProfileRows     = 100000
	maxProfileLine     = 1024
	maxProfileDensity  = 1e23 * 1e6 // m^-3 (1e23 cm^-3, above the atomic density of any host)
	profileColumnRoles = "depth, and net or donors and/or acceptors (or conc with a species)"
)

// DepthProfileError reports a problem in a depth-profile file: the file,
// the line (1-based) and, when one column is at fault, its number
// (1-based) and header name.
type DepthProfileError struct {
	File       string // the file name given to ParseDepthProfile
	Line       int    // 1-based line number
	Column     int    // 1-based column (field) number; 0 when the whole line is at fault
	ColumnName string // the column's header cell, "" when unknown
	Msg        string // what is wrong
}

// Error implements error: "FILE: line L, column C (NAME): message".
func (e *DepthProfileError) Error() string {
	s := fmt.Sprintf("%s: line %d", e.File, e.Line)
	if e.Column > 0 {
		s += fmt.Sprintf(", column %d", e.Column)
		if e.ColumnName != "" {
			s += fmt.Sprintf(" (%s)", e.ColumnName)
		}
	}
	return s + ": " + e.Msg
}

// column roles of a depth-profile header.
const (
	roleDepth = iota + 1
	roleNet
	roleDonors
	roleAcceptors
	roleConc
)

// profileRole maps a normalised column name to its role.
func profileRole(name string) int {
	switch name {
	case "depth", "x":
		return roleDepth
	case "net", "netdoping":
		return roleNet
	case "donor", "donors", "nd":
		return roleDonors
	case "acceptor", "acceptors", "na":
		return roleAcceptors
	case "conc", "concentration":
		return roleConc
	}
	return 0
}

// splitHeaderCell splits "name_unit", "name (unit)" or "name [unit]" into
// a normalised name (lower case, without spaces and underscores) and the
// unit text ("" when none is written).
func splitHeaderCell(cell string) (name, unit string) {
	c := strings.TrimSpace(cell)
	norm := func(s string) string {
		s = strings.ToLower(strings.TrimSpace(s))
		return strings.NewReplacer(" ", "", "_", "").Replace(s)
	}
	if n := len(c); n > 0 && (c[n-1] == ')' || c[n-1] == ']') {
		open := byte('(')
		if c[n-1] == ']' {
			open = '['
		}
		if k := strings.LastIndexByte(c, open); k >= 0 {
			return norm(c[:k]), strings.TrimSpace(c[k+1 : n-1])
		}
	}
	if k := strings.LastIndexByte(c, '_'); k > 0 {
		return norm(c[:k]), strings.TrimSpace(c[k+1:])
	}
	return norm(c), ""
}

// ParseDepthProfile reads a doping depth profile from r; name is the file
// name used in errors (and kept as Source).
//
// Format (strict): blank lines and lines starting with # are skipped; the
// first other line is the header, and every later line a row with as many
// fields. The separator is ';' if the header contains one, else a tab if
// it contains one, else ','. Each header cell is a name and a unit,
// written name_unit, "name (unit)" or "name [unit]", e.g. depth_um,
// conc_cm-3 or "depth (nm);net (cm^-3)". Names: depth (or x) once, then
// net (signed Nd - Na), or donors (nd) and/or acceptors (na), or one conc
// column whose species is given by species (SpeciesDonor,
// SpeciesAcceptor or SpeciesNet). Units: any length unit of ParseValue
// for the depth, any density unit for the concentrations. Numbers are
// plain decimals (no NaN, no infinities, a decimal point, not a comma);
// depths are >= 0, at most 1 cm, strictly increasing; donor and acceptor
// concentrations are >= 0; every magnitude is at most 1e23 cm^-3; 2 to
// 100000 rows of at most 1024 bytes.
//
// Errors are *DepthProfileError values naming the file, line and column.
func ParseDepthProfile(name string, r io.Reader, species string) (*DepthProfile, error) {
	fail := func(line, col int, colName, msg string, a ...any) error {
		return &DepthProfileError{File: name, Line: line, Column: col, ColumnName: colName, Msg: fmt.Sprintf(msg, a...)}
	}
	const maxBytes = int64(maxProfileRows+100) * maxProfileLine
	data, err := io.ReadAll(io.LimitReader(r, maxBytes+1))
	if err != nil {
		return nil, fail(0, 0, "", "%v", err)
	}
	if int64(len(data)) > maxBytes {
		return nil, fail(0, 0, "", "larger than %d bytes", maxBytes)
	}
	lines := strings.Split(string(data), "\n")
	if len(lines) > 0 && strings.HasPrefix(lines[0], "\ufeff") {
		lines[0] = strings.TrimPrefix(lines[0], "\ufeff")
	}
	type col struct {
		role   int
		factor float64
		header string
	}
	var cols []col
	sep := ","
	out := &DepthProfile{Source: name}
	var values [6][]float64 // by role
	rows := 0
	headerLine := 0
	for i, raw := range lines {
		ln := i + 1
		if len(raw) > maxProfileLine {
			return nil, fail(ln, 0, "", "line longer than %d bytes", maxProfileLine)
		}
		line := strings.TrimRight(raw, "\r")
		trimmed := strings.TrimSpace(line)
		if trimmed == "" || strings.HasPrefix(trimmed, "#") {
			continue
		}
		if cols == nil {
			headerLine = ln
			switch {
			case strings.Contains(line, ";"):
				sep = ";"
			case strings.Contains(line, "\t"):
				sep = "\t"
			}
			cells := strings.Split(line, sep)
			seen := map[int]int{}
			for c, cell := range cells {
				cn := strings.TrimSpace(cell)
				nm, unit := splitHeaderCell(cell)
				role := profileRole(nm)
				if role == 0 {
					return nil, fail(ln, c+1, cn, "unknown column name %q: the columns are %s", nm, profileColumnRoles)
				}
				if prev, dup := seen[role]; dup {
					return nil, fail(ln, c+1, cn, "a second %s column (the first is column %d)", nm, prev)
				}
				seen[role] = c + 1
				if role == roleConc {
					switch species {
					case SpeciesDonor:
						role = roleDonors
					case SpeciesAcceptor:
						role = roleAcceptors
					case SpeciesNet:
						role = roleNet
					default:
						return nil, fail(ln, c+1, cn, "a conc column does not say of what: name it net, donors or acceptors, or give the species (donor, acceptor or net)")
					}
					if prev, dup := seen[role]; dup {
						return nil, fail(ln, c+1, cn, "the species of the conc column already has column %d", prev)
					}
					seen[role] = c + 1
				}
				if unit == "" {
					return nil, fail(ln, c+1, cn, "no unit: write it as name_unit, \"name (unit)\" or \"name [unit]\", e.g. depth_um or conc (cm^-3)")
				}
				k := Density
				if role == roleDepth {
					k = Length
				}
				f, uerr := ParseValue(k, "1 "+unit)
				if uerr != nil || !(f > 0) {
					_, _, def, _ := kindInfo(k)
					return nil, fail(ln, c+1, cn, "unit %q is not a %s unit (for example %s)", unit, KindName(k), def)
				}
				cols = append(cols, col{role: role, factor: f, header: cn})
			}
			if _, ok := seen[roleDepth]; !ok {
				return nil, fail(ln, 0, "", "no depth column: the columns are %s", profileColumnRoles)
			}
			if len(cols) < 2 {
				return nil, fail(ln, 0, "", "no concentration column: the columns are %s", profileColumnRoles)
			}
			if _, ok := seen[roleNet]; ok {
				if _, d := seen[roleDonors]; d {
					return nil, fail(ln, 0, "", "net together with donors: give net alone, or donors and/or acceptors")
				}
				if _, a := seen[roleAcceptors]; a {
					return nil, fail(ln, 0, "", "net together with acceptors: give net alone, or donors and/or acceptors")
				}
			}
			continue
		}
		cells := strings.Split(line, sep)
		if len(cells) != len(cols) {
			return nil, fail(ln, 0, "", "%d fields, the header (line %d) has %d", len(cells), headerLine, len(cols))
		}
		if rows >= maxProfileRows {
			return nil, fail(ln, 0, "", "more than %d rows", maxProfileRows)
		}
		for c, cell := range cells {
			cl := cols[c]
			s := strings.TrimSpace(cell)
			if s == "" {
				return nil, fail(ln, c+1, cl.header, "empty field")
			}
			if numberPrefix(s) != len(s) {
				hint := ""
				if strings.Contains(s, ",") {
					hint = " (use a decimal point, not a comma)"
				}
				return nil, fail(ln, c+1, cl.header, "%q is not a plain decimal number%s", s, hint)
			}
			v, perr := strconv.ParseFloat(s, 64)
			if perr != nil {
				return nil, fail(ln, c+1, cl.header, "%q is out of the floating-point range", s)
			}
			v *= cl.factor
			if !isFinite(v) {
				return nil, fail(ln, c+1, cl.header, "%q is out of the floating-point range", s)
			}
			switch cl.role {
			case roleDepth:
				d := values[roleDepth]
				switch {
				case v < 0 || v > maxWidth:
					return nil, fail(ln, c+1, cl.header, "depth %s is outside 0 to 1 cm", Format(Length, v, 4, true))
				case len(d) > 0 && !(v > d[len(d)-1]):
					return nil, fail(ln, c+1, cl.header, "depth %s does not increase (the previous row has %s)", Format(Length, v, 6, true), Format(Length, d[len(d)-1], 6, true))
				}
			case roleNet:
				if math.Abs(v) > maxProfileDensity {
					return nil, fail(ln, c+1, cl.header, "net doping %s exceeds %s in magnitude", Format(Density, v, 3, true), Format(Density, maxProfileDensity, 3, true))
				}
			default:
				if v < 0 || v > maxProfileDensity {
					return nil, fail(ln, c+1, cl.header, "concentration %s is outside 0 to %s", Format(Density, v, 3, true), Format(Density, maxProfileDensity, 3, true))
				}
			}
			values[cl.role] = append(values[cl.role], v)
		}
		rows++
	}
	if cols == nil {
		return nil, fail(len(lines), 0, "", "no header: the first line must name the columns with units, e.g. depth_um,conc_cm-3")
	}
	if rows < 2 {
		return nil, fail(len(lines), 0, "", "%d data rows: a profile needs at least 2", rows)
	}
	out.Depth = values[roleDepth]
	out.Net, out.Donors, out.Acceptors = values[roleNet], values[roleDonors], values[roleAcceptors]
	return out, nil
}

// WriteCSV writes the profile in the file format ParseDepthProfile reads,
// in SI units (depth_m and the concentration columns in m-3), so that
// reading it back gives the same numbers.
func (p *DepthProfile) WriteCSV(w io.Writer) error {
	var b bytes.Buffer
	b.WriteString("depth_m")
	var cols [][]float64
	for _, c := range []struct {
		name string
		v    []float64
	}{{"net", p.Net}, {"donors", p.Donors}, {"acceptors", p.Acceptors}} {
		if c.v != nil {
			b.WriteString("," + c.name + "_m-3")
			cols = append(cols, c.v)
		}
	}
	b.WriteByte('\n')
	for i, d := range p.Depth {
		b.WriteString(strconv.FormatFloat(d, 'g', -1, 64))
		for _, c := range cols {
			b.WriteByte(',')
			if i < len(c) {
				b.WriteString(strconv.FormatFloat(c[i], 'g', -1, 64))
			}
		}
		b.WriteByte('\n')
	}
	_, err := w.Write(b.Bytes())
	return err
}
