package cli

import (
	"context"
	"fmt"
	"io"
	"os"

	"junco/model"
)

// lightPairFlag is --light WAVELENGTH:POWER_DENSITY (model.ParseLightPair).
type lightPairFlag struct {
	spec  *model.Spec
	shown string
}

func (f *lightPairFlag) String() string {
	if f == nil {
		return ""
	}
	return f.shown
}

func (f *lightPairFlag) Set(s string) error {
	w, p, err := model.ParseLightPair(s)
	if err != nil {
		return err
	}
	f.spec.Light.Wavelength, f.spec.Light.PowerDensity = w, p
	f.shown = s
	return nil
}

// absorptionFlag is --absorption: a value in trade units (the catalogue's
// field), or the path of an absorption table (model.ParseAbsorption), read
// at once; the value at the light's wavelength is taken after all flags
// are read (calcOptions.applyAbsorption).
type absorptionFlag struct {
	sv *specValue
	o  *calcOptions
}

func (f *absorptionFlag) String() string {
	if f == nil || f.sv == nil {
		return ""
	}
	return f.sv.String()
}

func (f *absorptionFlag) Set(s string) error {
	valueErr := f.sv.Set(s)
	if valueErr == nil {
		f.o.absorption = nil
		return nil
	}
	fi, err := os.Stat(s)
	if err != nil || !fi.Mode().IsRegular() {
		return fmt.Errorf("%v; nor is it a readable table file", valueErr)
	}
	file, err := os.Open(s)
	if err != nil {
		return err
	}
	defer file.Close()
	tab, err := model.ParseAbsorption(file, s)
	if err != nil {
		return err
	}
	f.o.absorption = tab
	f.sv.shown = s
	return nil
}

// applyAbsorption puts the absorption table's value at the light's
// wavelength into the junction (nothing to do without a table).
func (o *calcOptions) applyAbsorption() error {
	if o.absorption == nil || o.spec.Light.Wavelength == 0 {
		return nil
	}
	a, err := o.absorption.At(o.spec.Light.Wavelength)
	if err != nil {
		return fmt.Errorf("--absorption: %w", err)
	}
	o.spec.Light.Absorption = a
	return nil
}

// runQE prints the internal quantum efficiency against wavelength
// (model.QuantumEfficiency), each wavelength's absorption coefficient from
// the --absorption table, or the one --absorption value for all.
func (o *solveOptions) runQE(ctx context.Context, stdout, stderr io.Writer) int {
	rng, err := parseRange("qe", o.qe, model.Length, model.MaxQEPoints)
	if err != nil {
		fmt.Fprintln(stderr, "junco solve:", err)
		return exitUsage
	}
	wl, err := rng.PointsUpTo(model.MaxQEPoints)
	if err != nil {
		fmt.Fprintln(stderr, "junco solve: --qe:", err)
		return exitUsage
	}
	alpha := make([]float64, len(wl))
	for i, w := range wl {
		switch {
		case o.calc.absorption != nil:
			if alpha[i], err = o.calc.absorption.At(w); err != nil {
				fmt.Fprintln(stderr, "junco solve: --qe with --absorption:", err)
				return exitUsage
			}
		case o.calc.spec.Light.Absorption > 0:
			alpha[i] = o.calc.spec.Light.Absorption
		default:
			fmt.Fprintln(stderr, "junco solve: --qe needs the absorption coefficient: --absorption FILE (a table against wavelength) or one value")
			return exitUsage
		}
	}
	pp := newProgressPrinter(stderr, "QE")
	tab, err := model.QuantumEfficiency(ctx, o.calc.spec, o.num, wl, alpha, pp.update)
	pp.finish()
	if tab == nil {
		return o.fail(stderr, err)
	}
	if o.calc.json {
		if _, err := stdout.Write(tab.JSON()); err != nil {
			return exitFailure
		}
		return exitOK
	}
	f := func(k model.Kind, v float64) string { return model.Format(k, v, 4, o.calc.ascii) }
	fmt.Fprintf(stdout, "Internal quantum efficiency at short circuit, light through the %s side (collected pairs / absorbed photons)\n", tab.Side)
	fmt.Fprintf(stdout, "%12s %16s %10s %10s %11s\n", "wavelength", "absorption", "analytic", "numeric", "difference")
	for _, p := range tab.Points {
		fmt.Fprintf(stdout, "%12s %16s %10.4f %10.4f %11s\n", f(model.Length, p.Wavelength), f(model.Absorption, p.Absorption),
			p.Analytic, p.Numeric, percent(p.Numeric, p.Analytic))
	}
	printSolveFlags(stderr, tab.Flags)
	return exitOK
}
