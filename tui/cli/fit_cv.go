package cli

import (
	"context"
	"fmt"
	"io"
	"math"
	"strconv"
	"text/tabwriter"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// fitCVValues are the C-V results in SI units; a value the data do not
// determine is null (its status says why).
type fitCVValues struct {
	BuiltInPotentialV     *float64 `json:"built_in_potential_V"`
	ZeroBiasCapacitanceF  *float64 `json:"zero_bias_capacitance_F"`
	GradingCoefficient    *float64 `json:"grading_coefficient"`
	ParasiticCapacitanceF *float64 `json:"parasitic_capacitance_F"`
	DopingPerM3           *float64 `json:"doping_per_m3"`
}

// fitCVState says whether the data determine a value, or it was held.
type fitCVState struct {
	Determined bool   `json:"determined"`
	Held       bool   `json:"held,omitempty"`
	Reason     string `json:"reason,omitempty"`
}

type fitCVStatus struct {
	BuiltInPotentialV     fitCVState `json:"built_in_potential_V"`
	ZeroBiasCapacitanceF  fitCVState `json:"zero_bias_capacitance_F"`
	GradingCoefficient    fitCVState `json:"grading_coefficient"`
	ParasiticCapacitanceF fitCVState `json:"parasitic_capacitance_F"`
	DopingPerM3           fitCVState `json:"doping_per_m3"`
}

// fitCVLine is the Mott-Schottky line of C - Cpar (m held at 1/2).
type fitCVLine struct {
	BuiltInPotentialV     *float64 `json:"built_in_potential_V"`
	ParasiticCapacitanceF *float64 `json:"parasitic_capacitance_F"`
	MisfitRatio           *float64 `json:"misfit_ratio"`
	Flagged               bool     `json:"flagged"`
}

type fitProfileRow struct {
	BiasV             float64 `json:"bias_V"`
	DepthM            float64 `json:"depth_m"`
	DopingPerM3       float64 `json:"doping_per_m3"`
	DopingStdErrPerM3 float64 `json:"doping_stderr_per_m3"`
}

type fitCVReport struct {
	File              string    `json:"file"`
	Material          string    `json:"material"`
	AreaM2            *float64  `json:"area_m2"`
	PermittivityFPerM float64   `json:"permittivity_F_per_m"`
	WindowV           []float64 `json:"window_V,omitempty"`
	Points            int       `json:"points"`
	fitCVValues
	StdErr       fitCVValues      `json:"stderr"`
	Status       fitCVStatus      `json:"status"`
	RMSRel       *float64         `json:"rms_rel_residual"`
	Line         *fitCVLine       `json:"mott_schottky_line,omitempty"`
	RowProblems  int              `json:"row_problems,omitempty"`
	Correlations []fitCorrelation `json:"correlations,omitempty"`
	Profile      []fitProfileRow  `json:"doping_profile,omitempty"`
	ModelCard    string           `json:"model_card,omitempty"`
	Notes        []string         `json:"notes,omitempty"`
}

// fitCVPut fills the value, standard error and status of one quantity.
func fitCVPut(q extract.CVQuantity, val, se **float64, st *fitCVState) {
	*st = fitCVState{Determined: q.Determined, Held: q.Fixed, Reason: q.Reason}
	if q.Determined {
		*val, *se = fitNum(q.Value), fitNum(q.StdErr)
	}
}

// fitCVSub is `junco fit cv`: its help and flag definitions.
func fitCVSub() fitSub {
	return fitSub{
		use:   "cv FILE [flags]",
		short: "junction-capacitance fit of C-V data (Vbi, m, Cj0, Cpar), doping and its profile",
		summary: `  junco fit cv FILE [--area A] [--material si|ge|gaas|4h-sic] [--window V1:V2]
                       [--grading M] [--parasitic C] [--profile] [--smooth N]
                       [--model-card NAME] [--json] [--ascii] [--save-to NAME] [--data DIR]
      Junction-capacitance fit C = Cj0/(1 - V/Vbi)^m + Cpar (the headline:
      Vbi, m, Cj0, Cpar; "not determined" when the data cannot pin one
      down); --grading and --parasitic hold m and Cpar. With --area: the
      doping from the Mott-Schottky line of C - Cpar (only when m is within
      0.05 of 1/2) and, with --profile, the doping profile of C - Cpar.`,
		long: `Junction-capacitance fit C = Cj0/(1 - V/Vbi)^m + Cpar (the headline: Vbi, m,
Cj0, Cpar; "not determined" when the data cannot pin one down); --grading
and --parasitic hold m and Cpar. With --area: the doping from the
Mott-Schottky line of C - Cpar (only when m is within 0.05 of 1/2) and,
with --profile, the doping profile of C - Cpar.

` + fitSaveHelp + "\n\n" + fitDataHelp,
		flags: []fitFlag{
			{"area", "A", "junction area, for the doping, e.g. 1mm2, 1e-4cm2 or 100um2 (bare: cm^2)"},
			{"material", "si|ge|gaas|4h-sic", "semiconductor, for its permittivity (default si)"},
			{"window", "V1:V2", "bias window of the fits, e.g. -5:0"},
			{"grading", "M", "hold the grading coefficient m (1/2 abrupt, 1/3 linearly graded)"},
			{"parasitic", "C", "hold the parasitic capacitance Cpar, e.g. 2pF (bare: F)"},
			{"profile", "", "with --area: also the doping profile against depth (differential C-V)"},
			{"smooth", "N", "neighbouring points of the profile's derivative, 1..100 (default 2)"},
			{"model-card", "NAME", "also write a SPICE diode model card (CJO, VJ, M) of this name"},
			{"save-to", "NAME", "store the data and the fit as the next revision of session NAME"},
			{"data", "DIR", "session store (default $XDG_DATA_HOME/junco, else ~/.local/share/junco)"},
			{"json", "", "print JSON in SI units instead of text"},
			{"ascii", "", "plain ASCII output (u for micro)"},
		},
		run: fitRunCV,
	}
}

func fitRunCV(ctx context.Context, a *fitArgs, stdout, stderr io.Writer) int {
	var err error
	code := exitOK
	bad := func(format string, x ...any) int {
		fmt.Fprintf(stderr, "junco fit cv: "+format+"\n", x...)
		return exitUsage
	}
	if len(a.pos) != 1 {
		return bad("expected exactly one data file, got %d (junco fit cv FILE [--area A])", len(a.pos))
	}
	var area float64
	if as, ok := a.str("area"); ok {
		if area, err = model.ParseValue(model.Area, as); err != nil {
			return bad("--area: %v", err)
		}
		if !(area > 0 && area < 1) {
			return bad("--area %s = %g m^2: allowed above 0 and below 1 m^2", as, area)
		}
	}
	opt := fit.CVOptions{AreaM2: area}
	if s, ok := a.str("grading"); ok {
		m, err := strconv.ParseFloat(s, 64)
		if err != nil || !(m >= extract.CVMinGrading && m <= extract.CVMaxGrading) {
			return bad("--grading %q: expected a grading coefficient m from %g to %g (1/2 abrupt, 1/3 linearly graded)", s, extract.CVMinGrading, extract.CVMaxGrading)
		}
		opt.Grading = &m
	}
	if s, ok := a.str("parasitic"); ok {
		c, err := model.ParseValue(model.Capacitance, s)
		if err != nil {
			return bad("--parasitic: %v", err)
		}
		if math.IsNaN(c) || math.IsInf(c, 0) || math.Abs(c) > 1e-6 {
			return bad("--parasitic %s = %g F: allowed from -1 uF to 1 uF (a fixture capacitance, e.g. 2pF)", s, c)
		}
		opt.Parasitic = &c
	}
	matName := "si"
	if s, ok := a.str("material"); ok {
		matName = s
	}
	mat, err := physics.MaterialByName(matName)
	if err != nil {
		return bad("--material: %v", err)
	}
	opt.Material = mat.Key
	if s, ok := a.str("window"); ok {
		if opt.Window, err = fitWindowFlag("cv", s); err != nil {
			fmt.Fprintln(stderr, err)
			return exitUsage
		}
	}
	if a.bools["profile"] {
		if area == 0 {
			return bad("--profile needs --area: the doping profile follows from C per unit area")
		}
		opt.ProfileHalfWindow = 2
	}
	if s, ok := a.str("smooth"); ok {
		if opt.ProfileHalfWindow, err = strconv.Atoi(s); err != nil || opt.ProfileHalfWindow < 1 || opt.ProfileHalfWindow > 100 {
			return bad("--smooth %q: expected a whole number of neighbouring points, 1..100", s)
		}
		if !a.bools["profile"] {
			opt.ProfileHalfWindow = 0
		}
	}
	card, wantCard := a.str("model-card")
	if wantCard {
		if _, err := extract.ModelCard(card, extract.CardParams{}); err != nil {
			return bad("--model-card: %v", err)
		}
	}
	saveTo, wantSave := a.str("save-to")
	if wantSave {
		if err := fitSaveCheckName("cv", saveTo); err != nil {
			fmt.Fprintln(stderr, err)
			return exitUsage
		}
	}
	ascii := a.bools["ascii"]
	path := a.pos[0]
	ds, err := fitImport(ctx, path, measure.KindCV)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit cv: %v\n", err)
		return fitExitCode(err)
	}
	res, err := fit.CVContext(ctx, ds, opt)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit cv: %s: %v\n", path, err)
		return fitExitCode(err)
	}
	an, jf := res.Analysis, res.Analysis.Junction
	r := &fitCVReport{File: path, Material: mat.Key, PermittivityFPerM: res.Geometry.PermittivityFm,
		WindowV: []float64{jf.UsedWindow.MinV, jf.UsedWindow.MaxV}, Points: jf.Points,
		RMSRel:      fitNum(jf.RMSRelResidual),
		RowProblems: ds.ProblemRows, Notes: res.Notes, Correlations: fitCorrelations(jf.Correlations)}
	if res.HasArea() {
		r.AreaM2 = fitNum(area)
	}
	fitCVPut(an.BuiltInPotentialV, &r.BuiltInPotentialV, &r.StdErr.BuiltInPotentialV, &r.Status.BuiltInPotentialV)
	fitCVPut(an.ZeroBiasCapacitanceF, &r.ZeroBiasCapacitanceF, &r.StdErr.ZeroBiasCapacitanceF, &r.Status.ZeroBiasCapacitanceF)
	fitCVPut(an.GradingCoefficient, &r.GradingCoefficient, &r.StdErr.GradingCoefficient, &r.Status.GradingCoefficient)
	fitCVPut(an.ParasiticCapacitanceF, &r.ParasiticCapacitanceF, &r.StdErr.ParasiticCapacitanceF, &r.Status.ParasiticCapacitanceF)
	fitCVPut(an.DopingM3, &r.DopingPerM3, &r.StdErr.DopingPerM3, &r.Status.DopingPerM3)
	if l := an.Line; l != nil {
		r.Line = &fitCVLine{ParasiticCapacitanceF: fitNum(l.ParasiticF), MisfitRatio: fitNum(l.MisfitRatio), Flagged: l.Flagged}
		if l.Fit.Status.BuiltInPotential.Determined {
			r.Line.BuiltInPotentialV = fitNum(l.BuiltInV)
		}
	}
	code = exitOK
	if wantCard {
		// Only what the data determine goes on the card.
		var cp extract.CardParams
		for _, x := range []struct {
			q   extract.CVQuantity
			dst *extract.CardValue
		}{{an.ZeroBiasCapacitanceF, &cp.CJO}, {an.BuiltInPotentialV, &cp.VJ}, {an.GradingCoefficient, &cp.M}} {
			if x.q.Determined {
				*x.dst = extract.Given(x.q.Value)
			}
		}
		r.ModelCard, err = extract.ModelCard(card, cp)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit cv: model card: %v\n", err)
			code = max(code, exitFailure)
		}
	}
	if opt.ProfileHalfWindow > 0 {
		for _, p := range an.Profile {
			r.Profile = append(r.Profile, fitProfileRow{p.VoltageV, p.DepthM, p.DopingM3, p.StdErrM3})
		}
		if len(r.Profile) == 0 {
			fmt.Fprintf(stderr, "junco fit cv: %s: no doping profile (see the notes)\n", path)
			code = max(code, exitUsage)
		}
	}
	if a.bools["json"] {
		if err := fitWriteJSON(stdout, r); err != nil {
			fmt.Fprintf(stderr, "junco fit cv: %v\n", err)
			return exitFailure
		}
	} else {
		fitCVText(stdout, r, ascii)
	}
	if wantSave {
		dir, _ := a.str("data")
		item := fitSaveItem{prefix: "cv", ds: ds, records: fit.CVRecords(res)}
		code = max(code, fitSaveReport("cv", dir, saveTo, []fitSaveItem{item}, stderr))
	}
	return code
}

// fitCVValue is a value with its standard error, "held at ..." or "not
// determined: why".
func fitCVValue(k model.Kind, v, se *float64, st fitCVState, ascii bool) string {
	switch {
	case !st.Determined:
		return "not determined: " + st.Reason
	case st.Held:
		return model.Format(k, fitVal(v), 4, ascii) + "  (" + st.Reason + ")"
	}
	return fitPM(k, fitVal(v), fitVal(se), ascii)
}

func fitCVText(w io.Writer, r *fitCVReport, ascii bool) {
	tw := fitTable(w)
	fmt.Fprintf(tw, "file\t\t%s\n", r.File)
	area := "no area given (no doping)"
	if r.AreaM2 != nil {
		area = model.Format(model.Area, *r.AreaM2, 4, ascii)
	}
	fmt.Fprintf(tw, "material, area\t\t%s (eps = %.4g F/m), %s\n", r.Material, r.PermittivityFPerM, area)
	fmt.Fprintf(tw, "window\t\t%s .. %s, %d points\n", model.Format(model.Voltage, r.WindowV[0], 3, ascii), model.Format(model.Voltage, r.WindowV[1], 3, ascii), r.Points)
	s, e := r.Status, r.StdErr
	fmt.Fprintf(tw, "junction fit\t\tC = Cj0/(1 - V/Vbi)^m + Cpar\n")
	fmt.Fprintf(tw, "  built-in potential\tVbi\t%s\n", fitCVValue(model.Voltage, r.BuiltInPotentialV, e.BuiltInPotentialV, s.BuiltInPotentialV, ascii))
	fmt.Fprintf(tw, "  grading coefficient\tm\t%s\n", fitCVValue(model.Dimensionless, r.GradingCoefficient, e.GradingCoefficient, s.GradingCoefficient, ascii))
	fmt.Fprintf(tw, "  zero-bias capacitance\tCj0\t%s\n", fitCVValue(model.Capacitance, r.ZeroBiasCapacitanceF, e.ZeroBiasCapacitanceF, s.ZeroBiasCapacitanceF, ascii))
	fmt.Fprintf(tw, "  parasitic capacitance\tCpar\t%s\n", fitCVValue(model.Capacitance, r.ParasiticCapacitanceF, e.ParasiticCapacitanceF, s.ParasiticCapacitanceF, ascii))
	fmt.Fprintf(tw, "  rms relative residual\t\t%.4f\n", fitVal(r.RMSRel))
	if l := r.Line; l != nil {
		fmt.Fprintf(tw, "Mott-Schottky line\t\t1/(C - Cpar)^2 against V, m = 1/2\n")
		if l.BuiltInPotentialV != nil {
			fmt.Fprintf(tw, "  its intercept\tVbi\t%s\n", model.Format(model.Voltage, *l.BuiltInPotentialV, 4, ascii))
		}
		fmt.Fprintf(tw, "  doping\tN\t%s\n", fitCVValue(model.Density, r.DopingPerM3, e.DopingPerM3, s.DopingPerM3, ascii))
		flag := ""
		if l.Flagged {
			flag = fmt.Sprintf(" (flagged: above %g)", extract.CVLineMisfitLimit)
		}
		fmt.Fprintf(tw, "  misfit / junction fit's\t\t%.3g%s\n", fitVal(l.MisfitRatio), flag)
	}
	fitTextTail(tw, r.Correlations, r.Notes, r.ModelCard)
	tw.Flush()
	if len(r.Profile) > 0 {
		fmt.Fprintln(w, "\ndoping profile (differential C-V of C - Cpar)")
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "bias\tdepth\tdoping\t\n")
		for _, p := range r.Profile {
			fmt.Fprintf(tw, "%s\t%s\t%s\t\n", model.Format(model.Voltage, p.BiasV, 4, ascii), model.Format(model.Length, p.DepthM, 4, ascii), model.Format(model.Density, p.DopingPerM3, 4, ascii))
		}
		tw.Flush()
	}
}
