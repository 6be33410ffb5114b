package model

// This file adds the Spec's light to the numeric solution: the lit
// figures of merit of the drift-diffusion I-V beside the analytic ones,
// and the internal quantum efficiency against wavelength.

import (
	"bytes"
	"context"
	"fmt"
	"math"

	"junco/physics"
	"junco/physics/solver"
)

// FlagNumericLight: the numeric figures of the lit curve could not be
// computed (the message says why).
const FlagNumericLight = "numeric-light"

// numericLitFigures returns the figures of merit of the solver's lit I-V
// (physics.LitFiguresOf on the terminal current in A, times area),
// followed along one continuation path (solver.Path) so that the search
// for Voc and the maximum-power point costs a few Newton iterations per
// bias.
func numericLitFigures(ctx context.Context, s *solver.Solver, area float64) (physics.LitFigures, error) {
	path, err := s.NewPath()
	if err != nil {
		return physics.LitFigures{}, err
	}
	var first error
	cur := func(v float64) float64 {
		if first != nil {
			return math.NaN()
		}
		r, err := path.Solve(ctx, v)
		if err != nil {
			first = err
			return math.NaN()
		}
		return r.Current * area
	}
	f, err := physics.LitFiguresOf(cur)
	if first != nil {
		return f, first
	}
	return f, err
}

// litFiguresNaN are the figures of a lit curve that could not be computed.
func litFiguresNaN() physics.LitFigures {
	nan := math.NaN()
	return physics.LitFigures{Isc: nan, Voc: nan, Pmax: nan, Vmp: nan, Imp: nan, FF: nan}
}

// numericLitQuantities are the lit results of the numeric solution under
// the keys of the analytic ones (litQuantities): the photocurrent (the
// pairs collected at short circuit, -I(0): the dark current vanishes at
// zero bias, so it is the short-circuit current), Isc, Voc, the
// maximum-power point, the fill factor and the efficiency. None in the
// dark.
func numericLitQuantities(r *NumericResult) []Quantity {
	if !r.Lit {
		return nil
	}
	f := r.LitFigures
	return append([]Quantity{
		{"photocurrent_A", GroupLight, "photocurrent (collected at short circuit)", "IL", Current, f.Isc, nil},
	}, litFigureQuantities(f, efficiencyOf(r.Spec, f.Pmax))...)
}

// litCompareKeys are the lit quantities Compare reads out when the Spec is
// lit.
func litCompareKeys() []string {
	return []string{"short_circuit_current_A", "open_circuit_voltage_V", "max_power_W", "fill_factor"}
}

// Limits of a quantum-efficiency table.
const (
	// MaxQEPoints is the largest number of wavelengths of one table.
	MaxQEPoints = 200
	// DefaultQEPowerDensity is the power density of the monochromatic
	// light of a quantum-efficiency table when the Spec gives none, W/m^2
	// (1 mW/cm^2: low injection in any practical junction; the internal
	// quantum efficiency does not depend on it there).
	DefaultQEPowerDensity = 10.0
)

// Field names of quantum-efficiency errors: "qe" for the lists, and
// "qe[i].wavelength", "qe[i].absorption" for one point (i from 0).
const FieldQE = "qe"

// QEPoint is one wavelength of a quantum-efficiency table.
type QEPoint struct {
	// Wavelength (m) and Absorption (1/m) are the light's, as given.
	Wavelength, Absorption float64
	// Absorbed is the number of photons absorbed in the simulated device
	// per second, Phi A (1 - e^(-alpha D)) (D the device length; the
	// solver's exact integral of the generation).
	Absorbed float64
	// AnalyticCurrent and NumericCurrent are the short-circuit
	// photocurrents, A: physics.JunctionPhotocurrent (the Spec's analytic
	// model) and the drift-diffusion solution at zero bias.
	AnalyticCurrent, NumericCurrent float64
	// Analytic and Numeric are the internal quantum efficiencies, collected
	// pairs over absorbed photons: I / (q Absorbed).
	Analytic, Numeric float64
	// Nodes is the mesh node count of the numeric solution.
	Nodes int
}

// QETable is the internal quantum efficiency of a Spec against wavelength.
type QETable struct {
	// PowerDensity is the monochromatic light's power density, W/m^2, and
	// Side the illuminated surface ("p" or "n").
	PowerDensity float64
	Side         string
	Points       []QEPoint
	// Flags are the distinct flags of the numeric devices.
	Flags []physics.Flag
}

// QuantumEfficiency returns the internal quantum efficiency IQE(lambda) =
// collected pairs / absorbed photons at short circuit of the Spec's
// junction (refined by num for the solver) for each wavelength (m) with
// its absorption coefficient (1/m, the caller's: junco ships no
// absorption table), analytic and numeric. The light is monochromatic at
// the Spec's power density (DefaultQEPowerDensity when it has none) on
// the Spec's illuminated side; the Spec's uniform generation is left
// out. The absorbed photons are counted in the simulated device (length D,
// Phi A (1 - e^(-alpha D))) for both models, so that the two IQEs differ
// only by the collected current. progress, if not nil, is called after
// each wavelength (Stage "qe", Wavelength in m, Value the
// numeric IQE).
//
// Errors: a *ValidationError (FieldQE) for lists of different lengths,
// empty or longer than MaxQEPoints, or a wavelength or absorption out of
// the Spec's light ranges; the numeric errors of Solve; ctx.Err().
func QuantumEfficiency(ctx context.Context, spec Spec, num NumericSpec, wavelengths, absorption []float64, progress NumericProgressFunc) (*QETable, error) {
	if err := checkQEInput(wavelengths, absorption); err != nil {
		return nil, err
	}
	power := spec.Light.PowerDensity
	if power == 0 {
		power = DefaultQEPowerDensity
	}
	side := spec.Light.Side
	if side == "" {
		side = "p"
	}
	out := &QETable{PowerDensity: power, Side: side}
	var flags flagSet
	for i, lam := range wavelengths {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		sp := spec
		sp.Light = Light{Wavelength: lam, PowerDensity: power, Absorption: absorption[i], Side: side}
		nd, s, err := numericBuild(sp, num, 0)
		if err != nil {
			return nil, err
		}
		r, err := s.SolveContext(ctx, 0)
		if err != nil {
			return nil, err
		}
		flags.add(nd.Flags...)
		flags.addPoint(r.Flags...)
		p := QEPoint{Wavelength: lam, Absorption: absorption[i], Absorbed: s.Generation() * spec.Area,
			AnalyticCurrent: nd.Static.IL, NumericCurrent: -r.Current * spec.Area, Nodes: len(r.X)}
		p.Analytic = p.AnalyticCurrent / (physics.Q * p.Absorbed)
		p.Numeric = p.NumericCurrent / (physics.Q * p.Absorbed)
		out.Points = append(out.Points, p)
		if progress != nil {
			progress(NumericProgress{Stage: "qe", Done: i + 1, Total: len(wavelengths), Wavelength: lam, Value: p.Numeric})
		}
	}
	out.Flags = flags.flags
	return out, nil
}

// checkQEInput validates the wavelength and absorption lists against the
// ranges of the Spec's light (Light.problems).
func checkQEInput(wavelengths, absorption []float64) error {
	n := len(wavelengths)
	if n == 0 || n > MaxQEPoints || len(absorption) != n {
		return &ValidationError{Fields: []FieldError{{Field: FieldQE, Value: fmt.Sprintf("%d wavelengths, %d absorption coefficients", n, len(absorption)),
			Allowed: fmt.Sprintf("1 to %d wavelengths (MaxQEPoints), each with its absorption coefficient", MaxQEPoints),
			Why:     "the quantum efficiency needs the absorption of the light at every wavelength (no table ships with junco)"}}}
	}
	var errs []FieldError
	for i := range wavelengths {
		l := Light{Wavelength: wavelengths[i], PowerDensity: DefaultQEPowerDensity, Absorption: absorption[i]}
		for _, e := range l.problems() {
			e.Field = fmt.Sprintf("%s[%d].%s", FieldQE, i, e.Field)
			errs = append(errs, e)
		}
	}
	if len(errs) > 0 {
		return &ValidationError{Fields: errs}
	}
	return nil
}

// JSON encodes the table as one object: "power_density_W_per_m2",
// "illuminated_side", "quantum_efficiency" (an array of objects with
// "wavelength_m", "absorption_per_m", "absorbed_photons_per_s",
// "analytic_photocurrent_A", "numeric_photocurrent_A", "analytic",
// "numeric" and "difference", the relative difference (numeric -
// analytic)/analytic) and "flags".
func (t *QETable) JSON() []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "{\n  \"power_density_W_per_m2\": %s,\n  \"illuminated_side\": %q,\n  \"quantum_efficiency\": [", jsonNumber(t.PowerDensity), t.Side)
	for i, p := range t.Points {
		if i > 0 {
			b.WriteString(",")
		}
		diff := math.NaN()
		if p.Analytic != 0 {
			diff = (p.Numeric - p.Analytic) / math.Abs(p.Analytic)
		}
		fmt.Fprintf(&b, "\n    {\"wavelength_m\": %s, \"absorption_per_m\": %s, \"absorbed_photons_per_s\": %s, \"analytic_photocurrent_A\": %s, \"numeric_photocurrent_A\": %s, \"analytic\": %s, \"numeric\": %s, \"difference\": %s}",
			jsonNumber(p.Wavelength), jsonNumber(p.Absorption), jsonNumber(p.Absorbed), jsonNumber(p.AnalyticCurrent), jsonNumber(p.NumericCurrent),
			jsonNumber(p.Analytic), jsonNumber(p.Numeric), jsonNumber(diff))
	}
	if len(t.Points) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("],\n")
	writeJSONFlags(&b, t.Flags)
	b.WriteString("\n}\n")
	return b.Bytes()
}
