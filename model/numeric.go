package model

// The numeric_*.go files adapt the numerical drift-diffusion solver
// (package physics/solver) to the model level: a NumericSpec refining a
// Spec (region lengths, doping shapes, an imported depth profile, the
// mesh) and its validation (this file), the solver input
// (numeric_device.go), the solve at one bias and Compare, the readout of
// where the depletion approximation and the analytic diode formulas stop
// being trustworthy (numeric_solve.go), curves in the frame of the
// analytic curves (numeric_curves.go), I-V and C-V sweeps with CSV and
// JSON output (numeric_sweep.go) and depth-profile files
// (numeric_profile.go).

import (
	"fmt"
	"math"
	"strconv"

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
	FieldNumericCVMode  = "cv-mode"      // NumericSpec.CVMode
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
	// FlagNumericNoMultiplication: the analytic model multiplies the
	// current (and the photocurrent) at the bias by the avalanche; the
	// solver has no impact ionisation, so its current is not multiplied
	// and the current is not compared.
	FlagNumericNoMultiplication = "numeric-no-multiplication"
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
	// CVMode is the small-signal assumption of the capacitance with
	// incomplete ionisation: CVLowFrequency ("" means it; the dopant
	// occupation follows the signal) or CVHighFrequency (frozen).
	CVMode string `json:"cv_mode,omitempty"`
}

// C-V modes of a NumericSpec (the solver's CVMode labels).
const (
	CVLowFrequency  = "low-frequency"
	CVHighFrequency = "high-frequency"
)

// solverCVMode returns the solver's mode for a validated CVMode.
func solverCVMode(m string) solver.CVMode {
	if m == CVHighFrequency {
		return solver.CVHighFrequency
	}
	return solver.CVLowFrequency
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
func FormatDose(v float64) string { return Format(Dose, v, 3, true) }

// ParseDose parses an implant dose such as "1e14cm-2", "5e12 /cm2" or
// "1e18 m^-2" and returns it in m^-2. A bare number is in cm^-2 (the trade
// unit). Range checks are NumericSpec.Validate's.
func ParseDose(text string) (float64, error) { return ParseValue(Dose, text) }

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
		if !physics.Finite(v) || v < lo || v > hi {
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
	if n.CVMode != "" && n.CVMode != CVLowFrequency && n.CVMode != CVHighFrequency {
		add(FieldNumericCVMode, n.CVMode, fmt.Sprintf("%q (default) or %q", CVLowFrequency, CVHighFrequency),
			"whether the dopant occupation follows the small signal")
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
		if !physics.Finite(v) || v < lo || v > hi {
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
		if s.To != 0 && (!physics.Finite(s.To) || !(s.To > s.From) || s.To > maxWidth) {
			add("to", Format(Length, s.To, 3, true), "0 (the far contact) or above from = "+Format(Length, s.From, 3, true)+", at most 1 cm",
				"the layer must have a positive thickness")
		}
	case ShapeLinear:
		rng("concentration", Density, s.Concentration, minDensity, maxDensity, "the plateau the ramp saturates at; "+dopWhy)
		rng("position", Length, s.Position, 0, maxWidth, "the depth where the ramp starts from zero")
		if g := math.Abs(s.Gradient); !physics.Finite(s.Gradient) || g < minGradient || g > maxGradient {
			add("gradient", Format(Gradient, s.Gradient, 3, true), "magnitude "+Format(Gradient, minGradient, 3, true)+" to "+Format(Gradient, maxGradient, 3, true)+" (negative falls with depth)",
				"the range of diffused and implanted junction gradients")
		}
	case ShapeGaussian:
		if !physics.Finite(s.Dose) || s.Dose < minDose || s.Dose > maxDose {
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
		if !physics.Finite(d) || d < 0 || d > maxWidth || (i > 0 && !(d > p.Depth[i-1])) {
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
			if !physics.Finite(v) || math.Abs(v) > maxProfileDensity || (!c.signed && v < 0) {
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
