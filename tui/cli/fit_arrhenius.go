package cli

import (
	"context"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics/extract"
)

type fitArrheniusRow struct {
	File                    string   `json:"file"`
	TemperatureK            float64  `json:"temperature_K"`
	TemperatureSource       string   `json:"temperature_source"`
	SaturationCurrentA      float64  `json:"saturation_current_A"`
	SaturationCurrentStdErr *float64 `json:"saturation_current_stderr_A"`
	IdealityFactor          float64  `json:"ideality_factor"`
	ForwardVoltageV         *float64 `json:"forward_voltage_V,omitempty"`
}

type fitArrheniusReport struct {
	ActivationEnergyEV float64 `json:"activation_energy_eV"`
	StdErr             struct {
		ActivationEnergyEV   float64  `json:"activation_energy_eV"`
		VFTemperatureCoeffVK *float64 `json:"vf_temperature_coefficient_V_per_K,omitempty"`
	} `json:"stderr"`
	PrefactorExponent    float64           `json:"prefactor_exponent"`
	Gamma                float64           `json:"gamma"`
	Points               int               `json:"points"`
	RMSLnResidual        float64           `json:"rms_ln_residual"`
	ReducedChiSquare     *float64          `json:"reduced_chi_square,omitempty"`
	VFCurrentA           *float64          `json:"vf_current_A,omitempty"`
	VFTemperatureCoeffVK *float64          `json:"vf_temperature_coefficient_V_per_K,omitempty"`
	Temperatures         []fitArrheniusRow `json:"temperatures"`
	Notes                []string          `json:"notes,omitempty"`
}

// fitArrheniusSub is `junco fit arrhenius`.
func fitArrheniusSub() fitSub {
	return fitSub{
		use:   "arrhenius FILE... [flags]",
		short: "saturation current against temperature: activation energy",
		summary: `  junco fit arrhenius FILE... [--temp T1,T2,...] [--dtau-exponent G] [--current I]
                       [--window V1:V2] [--json] [--ascii]
      Saturation current against temperature: activation energy from
      Is = C T^(3+G/2) exp(-Ea/kT); with --current also dVF/dT at that
      current. --dtau-exponent G (default 0) is the exponent of the
      temperature dependence of D/tau (D/tau ~ T^G), not the prefactor's
      exponent: the prefactor is T^(3+G/2), printed as "prefactor
      exponent". --gamma is its deprecated old name. The standard error of
      Ea is widened by sqrt(reduced chi-square) when the points scatter
      more than their errors.`,
		long: `Saturation current against temperature: activation energy from
Is = C T^(3+G/2) exp(-Ea/kT); with --current also dVF/dT at that current.
Give I-V curves at 3 or more temperatures. --dtau-exponent G (default 0) is
the exponent of the temperature dependence of D/tau (D/tau ~ T^G), not the
prefactor's exponent: the prefactor is T^(3+G/2), printed as "prefactor
exponent". --gamma is its deprecated old name. The standard error of Ea is
widened by sqrt(reduced chi-square) when the points scatter more than their
errors.

` + fitDataHelp,
		flags: []fitFlag{
			{"temp", "T1,T2,...", "temperature of each file, in file order, for files that state none (repeatable)"},
			{"window", "V1:V2", "forward-bias window of each fit, e.g. 0.1:0.7"},
			{"dtau-exponent", "G", "exponent of D/tau against T (D/tau ~ T^G; Is ~ T^(3+G/2) exp(-Ea/kT)), default 0"},
			{"gamma", "G", "deprecated old name of --dtau-exponent"},
			{"current", "I", "also give dVF/dT at this forward current, e.g. 1mA"},
			{"json", "", "print JSON in SI units instead of text"},
			{"ascii", "", "plain ASCII output (u for micro)"},
		},
		run: fitRunArrhenius,
	}
}

func fitRunArrhenius(ctx context.Context, a *fitArgs, stdout, stderr io.Writer) int {
	c, err := fitParseCommon("arrhenius", a)
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	files := a.pos
	if len(files) < 3 {
		fmt.Fprintf(stderr, "junco fit arrhenius: %d files given; an activation energy with an error estimate needs I-V curves at 3 or more temperatures\n", len(files))
		return exitUsage
	}
	var temps []float64
	for _, v := range a.vals["temp"] {
		for _, s := range strings.Split(v, ",") {
			t, err := fitTemperatureFlag("arrhenius", s)
			if err != nil {
				fmt.Fprintln(stderr, err)
				return exitUsage
			}
			temps = append(temps, t)
		}
	}
	if len(temps) > 0 && len(temps) != len(files) {
		fmt.Fprintf(stderr, "junco fit arrhenius: --temp gives %d temperatures for %d files; give one per file, in file order\n", len(temps), len(files))
		return exitUsage
	}
	gamma, code, done := fitDTauExponent(a, stderr)
	if done {
		return code
	}
	var atI *float64
	if s, ok := a.str("current"); ok {
		v, err := model.ParseValue(model.Current, s)
		if err != nil || !(v > 0) {
			fmt.Fprintf(stderr, "junco fit arrhenius: --current %q: expected a forward current above 0, e.g. 1mA\n", s)
			return exitUsage
		}
		atI = &v
	}
	rep := fitArrheniusReport{Gamma: gamma}
	var pts []extract.ArrheniusPoint
	var curves []extract.IVCurve
	nsum := 0.0
	for k, p := range files {
		ds, err := fitImport(ctx, p, measure.KindIV)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: %v\n", err)
			return fitExitCode(err)
		}
		opt := fit.IVOptions{Window: c.window}
		if len(temps) > 0 {
			opt.Temperature.OptionK = temps[k]
		}
		if tt, _ := opt.Temperature.Choose(ds); tt.Source == fit.SourceAssumed {
			fmt.Fprintf(stderr, "junco fit arrhenius: %s: no temperature (no column, no \"# temperature:\" comment); give --temp T1,T2,... in file order\n", p)
			return exitUsage
		}
		res, err := fit.IVContext(ctx, ds, opt)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: %s: %v\n", p, err)
			return fitExitCode(err)
		}
		f, t := res.Fit, res.Temperature.K
		pts = append(pts, fit.ArrheniusPointOf(res))
		curves = append(curves, extract.IVCurve{TemperatureK: t, VoltageV: ds.VoltageV, CurrentA: ds.CurrentA})
		rep.Temperatures = append(rep.Temperatures, fitArrheniusRow{File: p, TemperatureK: t, TemperatureSource: res.Temperature.Source,
			SaturationCurrentA: f.Single.SaturationCurrentA, SaturationCurrentStdErr: fitNum(f.SingleStdErr.SaturationCurrentA), IdealityFactor: f.Single.IdealityFactor})
		nsum += f.Single.IdealityFactor
	}
	af, err := extract.FitArrhenius(pts, extract.ArrheniusOptions{Gamma: gamma})
	if err != nil {
		fmt.Fprintf(stderr, "junco fit arrhenius: %v\n", err)
		return fitExitCode(err)
	}
	rep.ActivationEnergyEV, rep.StdErr.ActivationEnergyEV = af.ActivationEnergyEV, af.StdErrEV
	rep.PrefactorExponent, rep.Points, rep.RMSLnResidual = af.Exponent, af.Points, af.RMSResidual
	rep.ReducedChiSquare = fitNum(af.ReducedChiSquare)
	if n := fit.ArrheniusScatterNote(af); n != "" {
		rep.Notes = append(rep.Notes, n)
	}
	if n := nsum / float64(len(files)); n > 1.3 {
		rep.Notes = append(rep.Notes, fmt.Sprintf("mean ideality factor %.2f: Is mixes diffusion and recombination, so Ea lies between Eg/2 and Eg", n))
	}
	if atI != nil {
		vf, err := extract.FitVFTemperature(curves, *atI)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: --current: %v\n", err)
			return fitExitCode(err)
		}
		rep.VFCurrentA, rep.VFTemperatureCoeffVK, rep.StdErr.VFTemperatureCoeffVK = atI, fitNum(vf.SlopeVPerK), fitNum(vf.StdErrVPerK)
		for k := range rep.Temperatures {
			for j, t := range vf.TemperatureK {
				if t == rep.Temperatures[k].TemperatureK {
					rep.Temperatures[k].ForwardVoltageV = fitNum(vf.ForwardVV[j])
				}
			}
		}
	}
	if c.json {
		if err := fitWriteJSON(stdout, rep); err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: %v\n", err)
			return exitFailure
		}
		return exitOK
	}
	ascii := c.ascii
	tw := fitTable(stdout)
	fmt.Fprintf(tw, "activation energy\tEa\t%s\n", fitPM(model.Energy, rep.ActivationEnergyEV, rep.StdErr.ActivationEnergyEV, ascii))
	fmt.Fprintf(tw, "prefactor exponent\tx\t%g = 3 + g/2, g = %g the exponent of D/tau in T (Is = C T^x exp(-Ea/kT))\n", rep.PrefactorExponent, rep.Gamma)
	fmt.Fprintf(tw, "plot\t\tln(Is/T^%g) against 1/T, %d temperatures, rms %.3g", rep.PrefactorExponent, rep.Points, rep.RMSLnResidual)
	if rep.ReducedChiSquare != nil {
		fmt.Fprintf(tw, ", reduced chi-square %.3g", *rep.ReducedChiSquare)
	}
	fmt.Fprintln(tw)
	if atI != nil {
		fmt.Fprintf(tw, "dVF/dT at %s\t\t%.4g mV/K  %s %.2g mV/K\n", model.Format(model.Current, *atI, 3, ascii), 1e3*fitVal(rep.VFTemperatureCoeffVK),
			map[bool]string{true: "+-", false: "±"}[ascii], 1e3*fitVal(rep.StdErr.VFTemperatureCoeffVK))
	}
	for _, n := range rep.Notes {
		fmt.Fprintf(tw, "note\t\t%s\n", n)
	}
	tw.Flush()
	fmt.Fprintln(stdout)
	tw = fitTable(stdout)
	fmt.Fprintf(tw, "file\tT\tIs\tn\n")
	for _, r := range rep.Temperatures {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.3f\n", r.File, model.Format(model.Temperature, r.TemperatureK, 4, ascii),
			model.Format(model.Current, r.SaturationCurrentA, 4, ascii), r.IdealityFactor)
	}
	tw.Flush()
	return exitOK
}

// fitDTauExponent reads --dtau-exponent G (or its deprecated alias
// --gamma, with a note on stderr): D/tau proportional to T^G, so the
// prefactor of Is is T^(3 + G/2); -20..20, default 0.
func fitDTauExponent(a *fitArgs, stderr io.Writer) (g float64, code int, done bool) {
	s, ok := a.str("dtau-exponent")
	name := "dtau-exponent"
	if old, isOld := a.str("gamma"); isOld {
		fmt.Fprintln(stderr, "junco fit arrhenius: --gamma is deprecated, use --dtau-exponent (the same value: the exponent of D/tau in T, not the prefactor's; --gamma 3 means T^4.5)")
		if !ok {
			s, ok, name = old, true, "gamma"
		}
	}
	if !ok {
		return 0, exitOK, false
	}
	g, err := strconv.ParseFloat(s, 64)
	if err != nil || math.Abs(g) > 20 {
		fmt.Fprintf(stderr, "junco fit arrhenius: --%s %q: expected a number in -20..20 (the exponent g of D/tau against T; the prefactor is T^(3+g/2))\n", name, s)
		return 0, exitUsage, true
	}
	return g, exitOK, false
}
