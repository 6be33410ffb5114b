package cli

import (
	"context"
	"fmt"
	"io"
	"strconv"
	"text/tabwriter"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// fitCVValues are the C-V results in SI units.
type fitCVValues struct {
	BuiltInPotentialV         *float64 `json:"built_in_potential_V"`
	DopingPerM3               *float64 `json:"doping_per_m3"`
	ZeroBiasCapacitanceF      *float64 `json:"zero_bias_capacitance_F"`
	GradingCoefficient        *float64 `json:"grading_coefficient"`
	ParasiticCapacitanceF     *float64 `json:"parasitic_capacitance_F"`
	JunctionBuiltInPotentialV *float64 `json:"junction_fit_built_in_potential_V"`
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
	AreaM2            float64   `json:"area_m2"`
	PermittivityFPerM float64   `json:"permittivity_F_per_m"`
	WindowV           []float64 `json:"window_V,omitempty"`
	fitCVValues
	Points             int              `json:"points"`
	MottSchottkyRMSRel *float64         `json:"mott_schottky_rms_rel_residual,omitempty"`
	JunctionFitRMSRel  *float64         `json:"junction_fit_rms_rel_residual,omitempty"`
	RowProblems        int              `json:"row_problems,omitempty"`
	StdErr             fitCVValues      `json:"stderr"`
	Correlations       []fitCorrelation `json:"correlations,omitempty"`
	Profile            []fitProfileRow  `json:"doping_profile,omitempty"`
	ModelCard          string           `json:"model_card,omitempty"`
	Notes              []string         `json:"notes,omitempty"`
}

func fitRunCV(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	a, code, done := fitStart("cv", args, []string{"area", "material", "window", "smooth", "model-card", "save-to", "data"}, []string{"json", "ascii", "profile"}, stdout, stderr)
	if done {
		return code
	}
	var err error
	bad := func(format string, x ...any) int {
		fmt.Fprintf(stderr, "junco fit cv: "+format+"\n", x...)
		return exitUsage
	}
	if len(a.pos) != 1 {
		return bad("expected exactly one data file, got %d (junco fit cv FILE --area A)", len(a.pos))
	}
	as, ok := a.str("area")
	if !ok {
		return bad("--area is required (e.g. --area 1mm2): the doping follows from C per unit area")
	}
	area, err := model.ParseValue(model.Area, as)
	if err != nil {
		return bad("--area: %v", err)
	}
	if !(area > 0 && area < 1) {
		return bad("--area %s = %g m^2: allowed above 0 and below 1 m^2", as, area)
	}
	matName := "si"
	if s, ok := a.str("material"); ok {
		matName = s
	}
	mat, err := physics.MaterialByName(matName)
	if err != nil {
		return bad("--material: %v", err)
	}
	eps := mat.Permittivity()
	var win extract.Window
	if s, ok := a.str("window"); ok {
		if win, err = fitWindowFlag("cv", s); err != nil {
			fmt.Fprintln(stderr, err)
			return exitUsage
		}
	}
	smooth := 2
	if s, ok := a.str("smooth"); ok {
		if smooth, err = strconv.Atoi(s); err != nil || smooth < 1 || smooth > 100 {
			return bad("--smooth %q: expected a whole number of neighbouring points, 1..100", s)
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
	res, err := fit.CV(ds, fit.CVOptions{Window: win, AreaM2: area, Material: mat.Key})
	if err != nil {
		fmt.Fprintf(stderr, "junco fit cv: %s: %v\n", path, err)
		return fitExitCode(err)
	}
	ms, g := res.MottSchottky, res.Geometry
	r := &fitCVReport{File: path, Material: mat.Key, AreaM2: area, PermittivityFPerM: eps,
		WindowV: []float64{ms.UsedWindow.MinV, ms.UsedWindow.MaxV}, Points: ms.Points,
		MottSchottkyRMSRel: fitNum(ms.RMSRelResidual), RowProblems: ds.ProblemRows, Notes: res.Notes}
	r.BuiltInPotentialV, r.DopingPerM3 = fitNum(ms.BuiltInV), fitNum(ms.DopingM3)
	r.StdErr.BuiltInPotentialV, r.StdErr.DopingPerM3 = fitNum(ms.StdErrV), fitNum(ms.StdErrM3)
	code = exitOK
	if jf := res.Junction; jf == nil {
		fmt.Fprintf(stderr, "junco fit cv: %s: junction-capacitance fit: %v\n", path, res.JunctionErr)
		code = fitExitCode(res.JunctionErr)
	} else {
		p, s := jf.Params, jf.StdErr
		r.ZeroBiasCapacitanceF, r.GradingCoefficient = fitNum(p.ZeroBiasCapacitanceF), fitNum(p.GradingCoefficient)
		r.ParasiticCapacitanceF, r.JunctionBuiltInPotentialV = fitNum(p.ParasiticCapacitanceF), fitNum(p.BuiltInPotentialV)
		r.StdErr.ZeroBiasCapacitanceF, r.StdErr.GradingCoefficient = fitNum(s.ZeroBiasCapacitanceF), fitNum(s.GradingCoefficient)
		r.StdErr.ParasiticCapacitanceF, r.StdErr.JunctionBuiltInPotentialV = fitNum(s.ParasiticCapacitanceF), fitNum(s.BuiltInPotentialV)
		r.JunctionFitRMSRel = fitNum(jf.RMSRelResidual)
		r.Correlations = fitCorrelations(jf.Correlations)
		if wantCard {
			r.ModelCard, err = extract.ModelCard(card, extract.CardParams{CJO: p.ZeroBiasCapacitanceF, VJ: p.BuiltInPotentialV, M: p.GradingCoefficient})
			if err != nil {
				fmt.Fprintf(stderr, "junco fit cv: model card: %v\n", err)
				code = max(code, exitFailure)
			}
		}
	}
	if a.bools["profile"] {
		vv, cc := fit.Windowed(ds.VoltageV, ds.CapacitanceF, win)
		prof, err := extract.DopingProfile(vv, cc, g, smooth)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit cv: %s: doping profile: %v\n", path, err)
			code = max(code, fitExitCode(err))
		}
		for _, p := range prof {
			r.Profile = append(r.Profile, fitProfileRow{p.VoltageV, p.DepthM, p.DopingM3, p.StdErrM3})
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

func fitCVText(w io.Writer, r *fitCVReport, ascii bool) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "file\t\t%s\n", r.File)
	fmt.Fprintf(tw, "material, area\t\t%s (eps = %.4g F/m), %s\n", r.Material, r.PermittivityFPerM, model.Format(model.Area, r.AreaM2, 4, ascii))
	fmt.Fprintf(tw, "window\t\t%s .. %s, %d points\n", model.Format(model.Voltage, r.WindowV[0], 3, ascii), model.Format(model.Voltage, r.WindowV[1], 3, ascii), r.Points)
	fmt.Fprintf(tw, "Mott-Schottky\t\t\n")
	fmt.Fprintf(tw, "  built-in potential\tVbi\t%s\n", fitPM(model.Voltage, fitVal(r.BuiltInPotentialV), fitVal(r.StdErr.BuiltInPotentialV), ascii))
	fmt.Fprintf(tw, "  doping\tN\t%s\n", fitPM(model.Density, fitVal(r.DopingPerM3), fitVal(r.StdErr.DopingPerM3), ascii))
	if r.ZeroBiasCapacitanceF != nil {
		fmt.Fprintf(tw, "junction fit\t\tC = Cj0/(1 - V/Vbi)^m + Cpar\n")
		fmt.Fprintf(tw, "  zero-bias capacitance\tCj0\t%s\n", fitPM(model.Capacitance, fitVal(r.ZeroBiasCapacitanceF), fitVal(r.StdErr.ZeroBiasCapacitanceF), ascii))
		fmt.Fprintf(tw, "  built-in potential\tVbi\t%s\n", fitPM(model.Voltage, fitVal(r.JunctionBuiltInPotentialV), fitVal(r.StdErr.JunctionBuiltInPotentialV), ascii))
		fmt.Fprintf(tw, "  grading coefficient\tm\t%s\n", fitPM(model.Dimensionless, fitVal(r.GradingCoefficient), fitVal(r.StdErr.GradingCoefficient), ascii))
		fmt.Fprintf(tw, "  parasitic capacitance\tCpar\t%s\n", fitPM(model.Capacitance, fitVal(r.ParasiticCapacitanceF), fitVal(r.StdErr.ParasiticCapacitanceF), ascii))
		fmt.Fprintf(tw, "  rms relative residual\t\t%.4f\n", fitVal(r.JunctionFitRMSRel))
	}
	fitTextTail(tw, r.Correlations, r.Notes, r.ModelCard)
	tw.Flush()
	if len(r.Profile) > 0 {
		fmt.Fprintln(w, "\ndoping profile (differential C-V)")
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "bias\tdepth\tdoping\t\n")
		for _, p := range r.Profile {
			fmt.Fprintf(tw, "%s\t%s\t%s\t\n", model.Format(model.Voltage, p.BiasV, 4, ascii), model.Format(model.Length, p.DepthM, 4, ascii), model.Format(model.Density, p.DopingPerM3, 4, ascii))
		}
		tw.Flush()
	}
}
