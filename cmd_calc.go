package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"junco/model"
)

// calcOptions holds the inputs of `junco calc`.
type calcOptions struct {
	spec  model.Spec
	json  bool
	ascii bool
}

// specFlag is a flag.Value that parses a trade-unit value into a Spec field.
type specFlag struct {
	kind  model.Kind
	set   func(float64)
	shown string
}

func (f *specFlag) String() string { return f.shown }
func (f *specFlag) Set(s string) error {
	v, err := model.ParseValue(f.kind, s)
	if err != nil {
		return err
	}
	f.set(v)
	f.shown = s
	return nil
}

// newCalcFlags builds the flag set shared by calc and the commands that
// take a junction on the command line.
func newCalcFlags(o *calcOptions, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("calc", flag.ContinueOnError)
	fs.SetOutput(stderr)
	s := &o.spec
	val := func(name string, k model.Kind, set func(float64), help string) {
		fs.Var(&specFlag{kind: k, set: set}, name, fmt.Sprintf("%s (bare number: %s)", help, model.DefaultUnit(k)))
	}
	fs.Func("material", "semiconductor: si, ge, gaas, 4h-sic (default si)", func(v string) error {
		s.Material = strings.ToLower(v)
		return nil
	})
	fs.Func("profile", "doping profile: abrupt or linear (default abrupt)", func(v string) error {
		s.Profile = strings.ToLower(v)
		return nil
	})
	val("na", model.Density, func(v float64) { s.AcceptorDensity = v }, "acceptor doping of the p side, e.g. 1e16cm-3")
	val("nd", model.Density, func(v float64) { s.DonorDensity = v }, "donor doping of the n side, e.g. 1e15cm-3")
	val("gradient", model.Gradient, func(v float64) { s.Gradient = v }, "net-doping gradient of a linear profile, e.g. 1e20cm-4")
	fs.StringVar(&s.AcceptorSpecies, "acceptor", "", "acceptor species, e.g. boron (default: the material's usual one)")
	fs.StringVar(&s.DonorSpecies, "donor", "", "donor species, e.g. phosphorus or arsenic")
	val("temp", model.Temperature, func(v float64) { s.Temperature = v }, "temperature, e.g. 300K or 27C (default 300 K)")
	val("area", model.Area, func(v float64) { s.Area = v }, "junction area, e.g. 1mm2, 1e-4cm2, 100um2 (default 1 mm^2)")
	val("bias", model.Voltage, func(v float64) { s.Bias = v }, "applied bias, forward positive (p side positive), e.g. -5V, 0.6V")
	val("wp", model.Length, func(v float64) { s.PWidth = v }, "quasi-neutral width of the p side, e.g. 200um (omitted: long)")
	val("wn", model.Length, func(v float64) { s.NWidth = v }, "quasi-neutral width of the n side (omitted: long)")
	val("taun", model.Time, func(v float64) { s.ElectronLifetime = v }, "electron lifetime in the p side, e.g. 1us (omitted: doping-dependent default)")
	val("taup", model.Time, func(v float64) { s.HoleLifetime = v }, "hole lifetime in the n side (omitted: default)")
	val("sp", model.Velocity, func(v float64) { s.PContactVelocity = &v }, "recombination velocity of the p-side contact, e.g. 1e3cm/s (omitted: ohmic)")
	val("sn", model.Velocity, func(v float64) { s.NContactVelocity = &v }, "recombination velocity of the n-side contact (omitted: ohmic)")
	fs.BoolVar(&o.json, "json", false, "print one JSON object in SI units instead of text")
	fs.BoolVar(&o.ascii, "ascii", false, "plain ASCII output (u for micro)")
	return fs
}

// runCalc implements `junco calc`.
func runCalc(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	o := calcOptions{spec: model.DefaultSpec()}
	fs := newCalcFlags(&o, stderr)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "Usage: junco calc [flags]\n\nEvaluate one pn junction in the depletion approximation with the ideal\n(Shockley) diffusion currents. Values take units (1e17cm-3, 300K, 1mm2);\na bare number takes the unit named in brackets. Positive bias is forward.\n\nFlags:")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return exitOK
		}
		return exitUsage
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "junco calc: unexpected argument %q\n", fs.Arg(0))
		return exitUsage
	}
	res, err := model.Evaluate(o.spec)
	if err != nil {
		var ve *model.ValidationError
		if errors.As(err, &ve) {
			for _, f := range ve.Fields {
				fmt.Fprintf(stderr, "junco calc: --%s\n", f.Error())
			}
		} else {
			fmt.Fprintf(stderr, "junco calc: %v\n", err)
		}
		return exitUsage
	}
	if o.json {
		stdout.Write(res.JSON())
		return exitOK
	}
	fmt.Fprint(stdout, res.Text(o.ascii))
	return exitOK
}
