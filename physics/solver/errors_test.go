package solver

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"junco/physics"
)

// Invalid devices and options are refused with a *ParamError that names
// the field, its value and the allowed range; nothing panics.
func TestNewRejectsBadInput(t *testing.T) {
	si := material(t, "si")
	good := stepDiode(si, 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um)
	mod := func(f func(*Device)) Device { d := good; f(&d); return d }
	cases := []struct {
		dev   Device
		opt   Options
		field string
	}{
		{mod(func(d *Device) { d.Material = nil }), Options{}, "Device.Material"},
		{mod(func(d *Device) { d.Temperature = 0 }), Options{}, "Device.Temperature"},
		{mod(func(d *Device) { d.Temperature = math.NaN() }), Options{}, "Device.Temperature"},
		{mod(func(d *Device) { d.Length = -1 }), Options{}, "Device.Length"},
		{mod(func(d *Device) { d.TauN = -1e-6 }), Options{}, "Device.TauN"},
		{mod(func(d *Device) { d.DonorSpecies = "boron" }), Options{}, "Device.DonorSpecies"},
		{mod(func(d *Device) { d.AcceptorSpecies = "unobtainium" }), Options{}, "Device.AcceptorSpecies"},
		{mod(func(d *Device) {
			d.Profile = Profile{Donors: []Shape{Gaussian{Dose: 1e18, Range: 1e-7, Straggle: 0}}}
		}), Options{}, "Device.Profile.Donors[0].Straggle"},
		{mod(func(d *Device) { d.Profile = StepProfile(1e23, 1e22, 20*um) }), Options{}, "Device.Profile"},
		{mod(func(d *Device) {
			d.Ionisation = func(x, nd, na float64) (float64, float64) { return nd, -na }
		}), Options{}, "Device.Ionisation"},
		{mod(func(d *Device) { d.IntrinsicDensity = func(x, nd, na float64) float64 { return 0 } }), Options{}, "Device.IntrinsicDensity"},
		{good, Options{Tolerance: 0.1}, "Options.Tolerance"},
		{good, Options{MaxBiasStep: 2}, "Options.MaxBiasStep"},
		{good, Options{MaxBiasStep: 0.01, MinBiasStep: 0.02}, "Options.MinBiasStep"},
		{good, Options{CVStep: 1}, "Options.CVStep"},
		{good, Options{Mesh: MeshOptions{Nodes: 2}}, "Options.Mesh.Nodes"},
		{good, Options{Mesh: MeshOptions{Density: -1}}, "Options.Mesh.Density"},
		{good, Options{Recombination: Recombination{TrapLevel: 5}}, "Options.Recombination.TrapLevel"},
		{good, Options{Mesh: MeshOptions{Positions: []float64{0, 1e-6}}}, "Options.Mesh.Positions"},
		{good, Options{Mesh: MeshOptions{Positions: []float64{1e-7, 1e-6, 15e-6}}}, "Options.Mesh.Positions[0]"},
		{good, Options{Mesh: MeshOptions{Positions: []float64{0, 2e-6, 1e-6, 15e-6}}}, "Options.Mesh.Positions[2]"},
		{good, Options{Mesh: MeshOptions{Positions: []float64{0, 1e-6, 14e-6}}}, "Options.Mesh.Positions[2]"},
	}
	for _, c := range cases {
		_, err := New(c.dev, c.opt)
		var pe *ParamError
		if !errors.As(err, &pe) {
			t.Errorf("%s: got %v, want a *ParamError", c.field, err)
			continue
		}
		if pe.Field != c.field || pe.Allowed == "" || !strings.HasPrefix(err.Error(), "solver: "+c.field) {
			t.Errorf("%s: got field %q: %v", c.field, pe.Field, err)
		}
	}
	s := newSolver(t, good, Options{})
	for _, v := range []float64{math.NaN(), math.Inf(1), 1e6} {
		if _, err := s.Solve(v); !errors.As(err, new(*ParamError)) {
			t.Errorf("Solve(%g): %v, want a *ParamError", v, err)
		}
		if _, err := s.Sweep(context.Background(), []float64{0.1, v}, nil); !errors.As(err, new(*ParamError)) {
			t.Errorf("Sweep with %g: %v, want a *ParamError", v, err)
		}
	}
}

// When Newton cannot converge (here: one iteration allowed, no Gummel
// start, no room to halve the step) the solver returns a
// *ConvergenceError with the requested and reached biases, never a
// result.
func TestConvergenceErrorIsTyped(t *testing.T) {
	d := stepDiode(material(t, "si"), 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um)
	s := newSolver(t, d, Options{MaxIterations: 1, GummelIterations: -1, MaxBiasStep: 0.1, MinBiasStep: 0.1})
	r, err := s.Solve(0.6)
	var ce *ConvergenceError
	if !errors.As(err, &ce) || r != nil {
		t.Fatalf("got result %v, error %v; want a *ConvergenceError and no result", r, err)
	}
	if ce.Stage != "bias" || ce.Bias != 0.6 || ce.Reached != 0 || ce.Iterations != 1 || !(ce.Update > 0) {
		t.Errorf("error fields %+v", *ce)
	}
	if !strings.Contains(err.Error(), "0.6 V") {
		t.Errorf("message does not name the bias: %v", err)
	}
	rs, err := s.Sweep(context.Background(), []float64{0, 0.6}, nil)
	if !errors.As(err, &ce) || len(rs) != 1 {
		t.Errorf("sweep: %d results, error %v; want the equilibrium point and a *ConvergenceError", len(rs), err)
	}
}

// A sweep reports progress after every point and stops on cancellation,
// returning the points done and the context's error.
func TestSweepProgressAndCancel(t *testing.T) {
	d := stepDiode(material(t, "si"), 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um)
	s := newSolver(t, d, Options{})
	biases := []float64{0, 0.1, 0.2, 0.3, 0.4}
	var seen []Progress
	res, err := s.Sweep(context.Background(), biases, func(p Progress) { seen = append(seen, p) })
	if err != nil || len(res) != len(biases) || len(seen) != len(biases) {
		t.Fatalf("sweep: %d results, %d reports, %v", len(res), len(seen), err)
	}
	for i, p := range seen {
		if p.Done != i+1 || p.Total != len(biases) || p.Bias != biases[i] || p.Current != res[i].Current {
			t.Errorf("report %d: %+v", i, p)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	res, err = s.Sweep(ctx, biases, func(p Progress) {
		if p.Done == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) || len(res) != 2 {
		t.Errorf("cancelled sweep: %d results, %v; want 2 and context.Canceled", len(res), err)
	}
	ctx2, cancel2 := context.WithCancel(context.Background())
	cancel2()
	cv, err := s.CV(ctx2, []float64{-1, -2}, nil)
	if !errors.Is(err, context.Canceled) || len(cv) != 0 {
		t.Errorf("cancelled CV: %d points, %v", len(cv), err)
	}
}

// FromPhysics carries the analytic device over and refuses what the solver
// cannot model.
func TestFromPhysics(t *testing.T) {
	si := material(t, "si")
	d := physics.Device{Material: si, Na: 1e17 * cm3, Nd: 1e16 * cm3, Temperature: 300, Area: 1e-6,
		Wp: math.Inf(1), Wn: math.Inf(1), Sp: math.Inf(1), Sn: math.Inf(1), TauN: 1e-6, TauP: 2e-6}
	dev, err := FromPhysics(d, 5*um, 10*um)
	if err != nil {
		t.Fatal(err)
	}
	if relErr(dev.Length, 15*um) > 1e-15 || dev.TauN != 1e-6 || dev.TauP != 2e-6 || dev.Profile.NetAt(1*um) != -1e17*cm3 || dev.Profile.NetAt(6*um) != 1e16*cm3 {
		t.Errorf("converted device %+v", dev)
	}
	d.Sn = 1e3
	if _, err := FromPhysics(d, 5*um, 10*um); !errors.As(err, new(*ParamError)) {
		t.Errorf("finite Sn accepted: %v", err)
	}
	d.Sn = math.Inf(1)
	if _, err := FromPhysics(d, 0, 10*um); !errors.As(err, new(*ParamError)) {
		t.Errorf("zero length accepted: %v", err)
	}
}

// New must never panic, whatever the numbers (fuzzed over dopings,
// lengths, temperature and node count; the seeds run in every go test).
func FuzzNewNoPanic(f *testing.F) {
	f.Add(1e22, 1e21, 5e-6, 10e-6, 300.0, 0)
	f.Add(1e26, 1e16, 1e-9, 1e-3, 77.0, 50)
	f.Add(-1.0, 1e21, 5e-6, 10e-6, 300.0, 3)
	f.Add(1e22, math.Inf(1), 5e-6, 10e-6, 300.0, 0)
	f.Add(1e22, 1e21, math.NaN(), 10e-6, 1e9, 0)
	f.Add(1e30, 1e30, 1e-6, 1e-6, 4000.0, 7)
	si, err := physics.MaterialByName("si")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, na, nd, lp, ln, temp float64, nodes int) {
		if nodes > 400 || nodes < -10 {
			nodes = 60
		}
		d := Device{Material: si, Temperature: temp, Length: lp + ln, Profile: StepProfile(na, nd, lp)}
		s, err := New(d, Options{Mesh: MeshOptions{Nodes: nodes, MaxNodes: 400}})
		if err != nil {
			return
		}
		if _, err := s.Equilibrium(); err != nil {
			var ce *ConvergenceError
			if !errors.As(err, &ce) {
				t.Errorf("equilibrium error of an unexpected type: %v", err)
			}
		}
	})
}
