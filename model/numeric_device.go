package model

// This file resolves a Spec and a NumericSpec into the solver input.

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"junco/physics"
	"junco/physics/solver"
)

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
// Hooks. Incomplete ionisation (Effects.Ionisation): the dopant
// occupation follows the local carrier densities inside the solver,
// Nd+ = Nd [1 - b n/(n + n1)] and alike for acceptors
// (solver.DopantOccupation, with the level of the Spec's ionisation model,
// physics.Material.DopantLevelFor, of each species at its own
// concentration): neutral regions freeze out as in the analytic model,
// while the dopants in a depletion region are fully ionised.
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
	flag := func(code string, q []physics.Class, msg string) {
		out.Flags = append(out.Flags, physics.Flag{Code: code, Affects: q, Message: msg})
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
				flag(FlagNumericLength, []physics.Class{physics.ClassAll}, fmt.Sprintf("%s region length %s: the quasi-neutral width plus the depletion edge at %s (give --lengths to choose)",
					name, Format(Length, l, 3, true), Format(Voltage, vmin, 3, true)))
				return l
			}
			l := math.Min(edge+longRegionDiffusionLengths*diffLen, maxWidth)
			flag(FlagNumericLength, []physics.Class{physics.ClassAll}, fmt.Sprintf("the %s region is long: simulated as %s, the depletion edge at %s plus %d minority diffusion lengths (%s each; give --lengths to choose)",
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
			flag(FlagNumericLength, []physics.Class{physics.ClassAll}, fmt.Sprintf("device length %s: the deepest profile feature (%s) plus %s, or the depth of the imported profile (give --length to choose)",
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
		flag(FlagNumericReference, []physics.Class{physics.ClassAll}, "the analytic values are those of the Spec's step or graded junction, not of this doping profile: read the differences as a comparison with that reference")
	}
	for i, s := range num.Shapes {
		sh := s.shape(out.Length)
		if s.Kind == ShapeGaussian {
			// Share of the Gaussian above the surface: 1/2 erfc(Rp/(sqrt(2) dRp)).
			if lost := 0.5 * math.Erfc(s.Range/(math.Sqrt2*s.Straggle)); lost > 0.01 {
				flag(FlagNumericDoseOutside, []physics.Class{physics.ClassAll}, fmt.Sprintf("shape %d: %.1f %% of the implanted dose lies above the surface (projected range %s < 2.3 straggles) and is not in the device",
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
			flag(FlagNumericProfileHeld, []physics.Class{physics.ClassAll}, fmt.Sprintf("%s covers depths %s to %s of a %s device: its end values are held beyond",
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
		occ, err := solver.DopantOccupation(m, t, st.Device.DonorSpecies, st.Device.AcceptorSpecies, e.IonisationModel)
		if err != nil {
			return nil, err
		}
		dev.Occupation = occ
	}
	if e.BGN {
		if hook, ok := narrowingHook(m, t, e.BGNModel); ok {
			dev.IntrinsicDensity = hook
		} else {
			flag(FlagNumericBGN, []physics.Class{physics.ClassCurrent}, fmt.Sprintf("no band-gap narrowing parameters for %s: the solver uses ni everywhere", m.Name))
		}
	}
	if spec.PContactVelocity != nil || spec.NContactVelocity != nil {
		flag(FlagNumericContacts, []physics.Class{physics.ClassCurrent}, "the solver's contacts are ohmic: the contact recombination velocities of the Spec apply to the analytic values only")
	}
	if spec.ContactResistance > 0 || spec.ShuntResistance > 0 {
		flag(FlagNumericExternal, []physics.Class{physics.ClassCurrent}, "the contact and shunt resistances are outside the simulated device: the numeric current is that of the device alone")
	}
	var always []string // what the solver contains although switched off
	for _, f := range Catalogue() {
		if f.InSolver != "" && f.Off(spec) {
			always = append(always, f.InSolver)
		}
	}
	if len(always) > 0 {
		flag(FlagNumericEffects, []physics.Class{physics.ClassCurrent}, "the drift-diffusion model always contains "+strings.Join(always, ", ")+": the switches that turn them off apply to the analytic values only")
	}
	// The Spec's light illuminates the biased solutions (the p side's
	// contact is the anode, the n side's the cathode: solver.Device.Light).
	dev.Light = spec.Light.Physics()
	out.Device = dev
	// The solver sizes its refined depletion zone from the chemical
	// doping, which is the depletion charge also with incomplete
	// ionisation (the occupation follows the carriers, and the depletion
	// region is fully ionised).
	vr := math.Max(-vmin, 0.5)
	out.Options = solver.Options{Mesh: solver.MeshOptions{Nodes: num.Nodes, MaxReverseBias: vr}, CVMode: solverCVMode(num.CVMode)}
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
