package fit

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// ArrheniusInput is one I-V data set offered to the temperature analysis,
// under its session ID.
type ArrheniusInput struct {
	ID      string
	DataSet *measure.DataSet
}

// ArrheniusRow is one data set of the temperature analysis: its
// temperature and fitted Is and n, or why it was left out (Skip).
type ArrheniusRow struct {
	ID                   string
	TemperatureK         float64
	SaturationCurrentA   float64
	StdErrA              float64
	IdealityFactor       float64
	Skip                 string  // "" when used
	InverseKiloKelvin    float64 // 1000/T, 1/kK
	LnReducedSaturationA float64 // ln(Is/T^x), x the prefactor exponent
}

// ArrheniusView is the activation energy of the saturation current from
// I-V data sets at several temperatures: each is fitted with the single
// diode model (every forward point), and ln(Is/T^(3+gamma/2)) is fitted
// against 1/T (extract.FitArrhenius).
type ArrheniusView struct {
	Gamma float64
	Fit   *extract.ArrheniusFit
	// Rows are sorted by temperature; skipped data sets come last.
	Rows []ArrheniusRow
	// LineX (1000/T) and LineY (ln(Is/T^x)) are the fitted line at the
	// ends of the temperature range.
	LineX, LineY [2]float64
	// Notes say how to read the result.
	Notes []string
}

// Used returns the rows that entered the fit.
func (v *ArrheniusView) Used() []ArrheniusRow {
	if v == nil {
		return nil
	}
	var out []ArrheniusRow
	for _, r := range v.Rows {
		if r.Skip == "" {
			out = append(out, r)
		}
	}
	return out
}

// ArrheniusPointOf is the point a single-diode I-V fit gives the
// Arrhenius line: its temperature, Is and the standard error of Is (0,
// meaning not weighted by it, when not determined).
func ArrheniusPointOf(r *IVResult) extract.ArrheniusPoint {
	return arrheniusPoint(r.Temperature.K, r.Fit.Single.SaturationCurrentA, r.Fit.SingleStdErr.SaturationCurrentA)
}

func arrheniusPoint(t, is, se float64) extract.ArrheniusPoint {
	if !physics.Finite(se) {
		se = 0
	}
	return extract.ArrheniusPoint{TemperatureK: t, SaturationCurrentA: is, StdErrA: se}
}

// Arrhenius fits each I-V data set that states its temperature
// and then the Arrhenius line of the saturation currents; gamma sets the
// prefactor exponent 3 + gamma/2 (0: T^3). Data sets without a
// temperature, or whose fit fails, are listed with the reason and left
// out. At least three temperatures are needed for an error estimate.
func Arrhenius(sets []ArrheniusInput, gamma float64) (*ArrheniusView, error) {
	if math.IsNaN(gamma) || math.IsInf(gamma, 0) {
		return nil, errors.New("gamma must be a finite number")
	}
	v := &ArrheniusView{Gamma: gamma}
	x := 3 + gamma/2
	var used, skipped []ArrheniusRow
	for _, in := range sets {
		r := ArrheniusRow{ID: in.ID, TemperatureK: math.NaN(), SaturationCurrentA: math.NaN(), StdErrA: math.NaN(), IdealityFactor: math.NaN()}
		ds := in.DataSet
		if ds == nil || ds.Kind != measure.KindIV {
			continue
		}
		t, ok := ds.Temperature()
		if !ok || !(t > 0) || math.IsInf(t, 0) {
			r.Skip = "no temperature stated"
			skipped = append(skipped, r)
			continue
		}
		r.TemperatureK = t
		f, err := IV(ds, IVOptions{})
		if err != nil {
			r.Skip = "fit failed: " + err.Error()
			skipped = append(skipped, r)
			continue
		}
		is := f.Fit.Single.SaturationCurrentA
		r.SaturationCurrentA, r.StdErrA, r.IdealityFactor = is, f.Fit.SingleStdErr.SaturationCurrentA, f.Fit.Single.IdealityFactor
		if !(is > 0) || math.IsInf(is, 0) {
			r.Skip = "no positive saturation current"
			skipped = append(skipped, r)
			continue
		}
		r.InverseKiloKelvin = 1000 / t
		r.LnReducedSaturationA = math.Log(is) - x*math.Log(t)
		used = append(used, r)
	}
	sort.SliceStable(used, func(a, b int) bool { return used[a].TemperatureK < used[b].TemperatureK })
	v.Rows = append(used, skipped...)
	distinct := map[float64]bool{}
	for _, r := range used {
		distinct[r.TemperatureK] = true
	}
	if len(distinct) < 2 {
		return v, fmt.Errorf("%d I-V data sets with a usable fit at %d temperatures: an activation energy needs two or more temperatures (three for its error)", len(used), len(distinct))
	}
	pts := make([]extract.ArrheniusPoint, len(used))
	for i, r := range used {
		pts[i] = arrheniusPoint(r.TemperatureK, r.SaturationCurrentA, r.StdErrA)
	}
	fit, err := extract.FitArrhenius(pts, extract.ArrheniusOptions{Gamma: gamma})
	if err != nil {
		return v, err
	}
	v.Fit = fit
	lo, hi := used[0].TemperatureK, used[len(used)-1].TemperatureK
	slope := -fit.ActivationEnergyEV * physics.Q / physics.KB // ln units per 1/K
	for i, t := range [2]float64{hi, lo} {
		v.LineX[i] = 1000 / t
		v.LineY[i] = fit.LnPrefactor + slope/t
	}
	v.Notes = []string{
		fmt.Sprintf("Is = C T^%.3g exp(-Ea/kT); diffusion-limited current gives Ea near the band gap, recombination in the depletion region about half of it (Sze & Ng 2007, sec. 2.3)", x),
	}
	if n := ArrheniusScatterNote(fit); n != "" {
		v.Notes = append(v.Notes, n)
	}
	return v, nil
}

// ArrheniusScatterNote warns when the saturation currents scatter about
// the Arrhenius line more than 2 times their standard errors (reduced
// chi-square above 4): the standard error of Ea has been widened to match
// (extract.FitArrhenius), and the data sets are likely not one device or
// one mechanism. "" otherwise.
func ArrheniusScatterNote(f *extract.ArrheniusFit) string {
	if f == nil || !(f.ReducedChiSquare > 4) {
		return ""
	}
	return fmt.Sprintf("the saturation currents scatter about the line %.3g times their standard errors (reduced chi-square %.3g): the standard error of Ea is widened by that; check that the data sets are one device",
		math.Sqrt(f.ReducedChiSquare), f.ReducedChiSquare)
}
