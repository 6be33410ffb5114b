package extract

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"junco/physics"
)

// The SPICE saturation-current law with N = 1 and XTI = 3 is the ideal
// diffusion law Js ~ T^3 exp(-Eg/kT) of Sze & Ng, Physics of
// Semiconductor Devices, 3rd ed. (2007), sec. 2.3: the ratio of two
// temperatures must be (T2/T1)^3 exp(Eg/k (1/T1 - 1/T2)).
func TestCardDiodeSaturationIsSzeNgLaw(t *testing.T) {
	d := CardDiode{IS: 1e-14, N: 1, EG: 1.12, XTI: 3, TNOMK: 300}
	kq := physics.KB / physics.Q
	for _, tt := range []float64{250, 300, 350, 400} {
		is, isr := d.Saturation(tt)
		want := 1e-14 * math.Pow(tt/300, 3) * math.Exp(1.12/kq*(1.0/300-1/tt))
		if math.Abs(is/want-1) > 1e-12 || isr != 0 {
			t.Errorf("T = %g K: IS(T) = %g, want %g (ISR %g, want 0)", tt, is, want, isr)
		}
	}
	// ISR scales with EG/NR: with NR = 2 the activation energy halves
	// (recombination current ~ ni, Sze & Ng 2007, sec. 2.3).
	d.ISR, d.NR = 1e-10, 2
	_, isr := d.Saturation(350)
	want := 1e-10 * math.Pow(350.0/300, 1.5) * math.Exp(0.56/kq*(1.0/300-1.0/350))
	if math.Abs(isr/want-1) > 1e-12 {
		t.Errorf("ISR(350 K) = %g, want %g", isr, want)
	}
}

// Identities of the current: with RS = 0 it is the closed form; with RS
// the junction voltage V - I RS gives back the same current.
func TestCardDiodeCurrentIdentities(t *testing.T) {
	d := CardDiode{IS: 1e-14, N: 1.1, ISR: 1e-11, NR: 2, TNOMK: 300, RSH: 1e7}
	vt := physics.ThermalVoltage(300)
	for _, v := range []float64{-0.5, 0.1, 0.4, 0.7} {
		kgen := math.Pow((1-v)*(1-v)+0.005, 0.25) // VJ = 1 V, M = 0.5: the defaults
		want := 1e-14*math.Expm1(v/(1.1*vt)) + 1e-11*math.Expm1(v/(2*vt))*kgen + v/1e7
		if got := d.Current(v, 300); math.Abs(got/want-1) > 1e-9 {
			t.Errorf("RS = 0, V = %g: I = %g, want %g", v, got, want)
		}
	}
	d.RS = 3
	for _, v := range []float64{0.3, 0.6, 0.9, 1.5} {
		i := d.Current(v, 300)
		d0 := d
		d0.RS = 0
		back := d0.Current(v-i*d.RS, 300)
		if math.Abs(back/i-1) > 1e-8 {
			t.Errorf("V = %g: I = %g, I(V - I RS) = %g", v, i, back)
		}
	}
	if !math.IsNaN((CardDiode{IS: -1, N: 1, TNOMK: 300}).Current(0.5, 300)) {
		t.Error("negative IS must give NaN")
	}
}

func cardCurves(d CardDiode, temps []float64, noise float64, seed uint64) []CardCurve {
	rng := rand.New(rand.NewPCG(seed, 11))
	var out []CardCurve
	for _, tk := range temps {
		var c CardCurve
		c.TemperatureK = tk
		for v := 0.25; v <= 0.8; v += 0.01 {
			c.VoltageV = append(c.VoltageV, v)
			c.CurrentA = append(c.CurrentA, d.Current(v, tk)*(1+noise*rng.NormFloat64()))
		}
		out = append(out, c)
	}
	return out
}

// Round trip (common practice for fits): curves simulated from a known
// card with 1 % noise give back its parameters within 4 standard errors,
// and the standard errors are not absurdly small.
func TestFitCardIVRecoversCard(t *testing.T) {
	want := CardDiode{IS: 2e-14, N: 1.05, RS: 2.5, EG: 1.12, XTI: 3, TNOMK: 300}
	curves := cardCurves(want, []float64{260, 300, 340}, 0.01, 1)
	start := CardDiode{IS: 1e-14, N: 1.2, RS: 1, XTI: 2, TNOMK: 300}
	f, err := FitCardIV(context.Background(), curves, start, CardFitOptions{Series: true, Temperature: true})
	if err != nil {
		t.Fatal(err)
	}
	check := func(name string, got, se, w float64) {
		t.Helper()
		if !(se > 0) || math.Abs(got-w) > 4*se {
			t.Errorf("%s = %g ± %g, want %g", name, got, se, w)
		}
	}
	check("IS", f.Diode.IS, f.StdErr.IS, want.IS)
	check("N", f.Diode.N, f.StdErr.N, want.N)
	check("RS", f.Diode.RS, f.StdErr.RS, want.RS)
	check("EG", f.Diode.EG, f.StdErr.EG, want.EG)
	check("XTI", f.Diode.XTI, f.StdErr.XTI, want.XTI)
	for k, r := range f.RMSLogResidual {
		if r > 0.02 {
			t.Errorf("curve %d: rms %g above the 1 %% noise", k, r)
		}
	}
	// With XTI held at the truth, EG alone comes back too.
	start.XTI = 3
	f, err = FitCardIV(context.Background(), curves[:2], start, CardFitOptions{Series: true, Temperature: true, HoldXTI: true})
	if err != nil {
		t.Fatal(err)
	}
	check("EG (XTI held)", f.Diode.EG, f.StdErr.EG, want.EG)
	if f.Diode.XTI != 3 || !math.IsNaN(f.StdErr.XTI) {
		t.Errorf("held XTI = %g ± %g", f.Diode.XTI, f.StdErr.XTI)
	}
}

// A long sweep is thinned to MaxPointsPerCurve points; the fit still
// recovers the card.
func TestFitCardIVThinsLongSweeps(t *testing.T) {
	want := CardDiode{IS: 2e-14, N: 1.05, RS: 2.5, TNOMK: 300}
	var c CardCurve
	c.TemperatureK = 300
	for k := 0; k < 20000; k++ {
		v := 0.25 + 0.55*float64(k)/19999
		c.VoltageV = append(c.VoltageV, v)
		c.CurrentA = append(c.CurrentA, want.Current(v, 300))
	}
	f, err := FitCardIV(context.Background(), []CardCurve{c}, CardDiode{IS: 1e-14, N: 1.1, RS: 1, TNOMK: 300}, CardFitOptions{Series: true, MaxPointsPerCurve: 300})
	if err != nil || f.Points != 300 || math.Abs(f.Diode.N/want.N-1) > 1e-6 || math.Abs(f.Diode.RS/want.RS-1) > 1e-4 {
		t.Errorf("%+v, %v", f, err)
	}
}

func TestFitCardIVErrors(t *testing.T) {
	ctx := context.Background()
	good := cardCurves(CardDiode{IS: 1e-14, N: 1, TNOMK: 300}, []float64{300}, 0, 1)
	cases := []struct {
		name   string
		curves []CardCurve
		start  CardDiode
		opt    CardFitOptions
		field  string
	}{
		{"bad start", good, CardDiode{IS: 0, N: 1, TNOMK: 300}, CardFitOptions{}, "start"},
		{"rs fitted at 0", good, CardDiode{IS: 1e-14, N: 1, TNOMK: 300}, CardFitOptions{Series: true}, "start.RS"},
		{"one temperature", good, CardDiode{IS: 1e-14, N: 1, TNOMK: 300}, CardFitOptions{Temperature: true}, "curves"},
		{"bad temperature", []CardCurve{{TemperatureK: -3, VoltageV: []float64{0.5}, CurrentA: []float64{1e-6}}}, CardDiode{IS: 1e-14, N: 1, TNOMK: 300}, CardFitOptions{}, "curves[0].TemperatureK"},
	}
	for _, c := range cases {
		_, err := FitCardIV(ctx, c.curves, c.start, c.opt)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("%s: err = %v, want an InputError on %s", c.name, err, c.field)
		}
	}
}

// A sweep with a 10 pA Gaussian floor and a 5 mA compliance: the window
// starts where the currents exceed 100 times the floor (about 1 nA),
// within a few steps, and ends below the clipped points.
func TestCardWindow(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	d := SingleDiode{1e-15, 1, 0, math.Inf(1)}
	vt := physics.ThermalVoltage(300)
	var v, i []float64
	for x := -0.2; x <= 0.8; x += 0.01 {
		v = append(v, x)
		i = append(i, math.Min(d.Current(x, vt)+10e-12*rng.NormFloat64(), 5e-3))
	}
	w, err := CardWindow(v, i, 300, 100)
	if err != nil {
		t.Fatal(err)
	}
	// I = 1e-15 exp(V/Vt) reaches 1 nA at V = Vt ln(1e6) = 0.357 V; 5 mA
	// at Vt ln(5e12) = 0.758 V.
	if lo := vt * math.Log(1e6); math.Abs(w.MinV-lo) > 0.04 {
		t.Errorf("window %v, want it to start near %.3f V", w, lo)
	}
	if hi := vt * math.Log(5e12); !(w.MaxV < hi) || w.MaxV < hi-0.02 {
		t.Errorf("window %v, want it to end just below %.3f V", w, hi)
	}
	// Noise-free, unclipped data: the only "noise" is the exponential's
	// own fourth difference, so the window reaches down to the first
	// forward points.
	for k := range i {
		i[k] = d.Current(v[k], vt)
	}
	if w, err := CardWindow(v, i, 300, 100); err != nil || w.MinV > 0.02 {
		t.Errorf("noise-free: window %v, %v; want it to start at the first forward points", w, err)
	}
	if _, err := CardWindow(v, i, 0, 100); err == nil || !strings.Contains(err.Error(), "TemperatureK") {
		t.Errorf("temperature 0: %v", err)
	}
}

// A reverse sweep: 1 nA leakage, an exponential breakdown at 50 V (at
// 1 uA) rising a decade per 0.2 V. BV at the knee's middle current
// follows from that law in closed form.
func TestExtractBreakdown(t *testing.T) {
	var v, i []float64
	law := func(vr float64) float64 { return 1e-9 + 1e-6*math.Pow(10, (vr-50)/0.2) }
	for k := 0; k <= 506; k++ {
		vr := float64(k) / 10
		v = append(v, -vr)
		i = append(i, -law(vr))
	}
	b, err := ExtractBreakdown(v, i)
	if err != nil || !b.Reached {
		t.Fatalf("%+v, %v", b, err)
	}
	// IBV = sqrt(1e-9 * I(50.6)); solve law(BV) = IBV.
	imax := law(50.6)
	if math.Abs(b.LeakageA-1e-9)/1e-9 > 0.01 || math.Abs(b.MaxReverseA-imax)/imax > 1e-3 {
		t.Errorf("leakage %g, max %g", b.LeakageA, b.MaxReverseA)
	}
	ibv := math.Sqrt(b.LeakageA * imax)
	bv := 50 + 0.2*math.Log10((ibv-1e-9)/1e-6)
	if math.Abs(b.BV-bv) > 0.05 || math.Abs(b.IBV/ibv-1) > 1e-9 {
		t.Errorf("BV = %g at IBV %g, want %g at %g", b.BV, b.IBV, bv, ibv)
	}
	// Stopped before breakdown: not reached, with the reason.
	b, err = ExtractBreakdown(v[:400], i[:400])
	if err != nil || b.Reached || !strings.Contains(b.Reason, "100 times") || !math.IsNaN(b.BV) {
		t.Errorf("short sweep: %+v, %v", b, err)
	}
	if _, err := ExtractBreakdown([]float64{1, 2}, []float64{1, 2}); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("forward only: %v", err)
	}
}

// TT inverts the charge-control storage time (physics.ChargeControlStorageTime).
func TestTransitTimeFromStorage(t *testing.T) {
	ts := physics.ChargeControlStorageTime(20e-9, 10e-3, 5e-3)
	tt, se, err := TransitTimeFromStorage(ts, 1e-9, 10e-3, 5e-3)
	if err != nil || math.Abs(tt/20e-9-1) > 1e-12 || math.Abs(se-1e-9/math.Log(3)) > 1e-21 {
		t.Errorf("TT = %g ± %g, %v; want 20 ns", tt, se, err)
	}
	for _, c := range [][3]float64{{0, 1, 1}, {1e-9, -1, 1}, {1e-9, 1, 0}} {
		if _, _, err := TransitTimeFromStorage(c[0], 0, c[1], c[2]); !errors.Is(err, ErrInput) {
			t.Errorf("%v: %v", c, err)
		}
	}
}

// Forward C-V with a diffusion part TT g: TT comes back.
func TestFitDiffusionTransitTime(t *testing.T) {
	j := JunctionCV{100e-12, 0.8, 0.5, 0}
	d := CardDiode{IS: 1e-14, N: 1, TNOMK: 300}
	vt := physics.ThermalVoltage(300)
	g := func(v float64) float64 { return d.Current(v, 300) / vt }
	var v, c []float64
	for x := -2.0; x <= 0.55; x += 0.05 {
		v = append(v, x)
		c = append(c, j.Capacitance(x)+5e-9*g(x))
	}
	f, err := FitDiffusionTransitTime(v, c, j.Capacitance, g)
	if err != nil || math.Abs(f.TT/5e-9-1) > 1e-6 || f.Points < 5 {
		t.Errorf("%+v, %v", f, err)
	}
	if _, err := FitDiffusionTransitTime(v[:20], c[:20], j.Capacitance, g); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("reverse only: %v", err)
	}
}

// The card carries every parameter given, in SPICE order (Nagel 1975).
func TestModelCardAllParameters(t *testing.T) {
	s, err := ModelCard("DX", CardParams{IS: Given(1e-14), N: Given(1.02), RS: Given(2), ISR: Given(1e-11), NR: Given(2),
		CJO: Given(1e-11), VJ: Given(0.7), M: Given(0.5), FC: Given(0.5), TT: Given(5e-9), EG: Given(1.12), XTI: Given(3),
		BV: Given(50), IBV: Given(1e-5), TNOM: Given(26.85)})
	want := ".model DX D(IS=1e-14 N=1.02 RS=2 ISR=1e-11 NR=2 CJO=1e-11 VJ=0.7 M=0.5 FC=0.5 TT=5e-09 EG=1.12 XTI=3 BV=50 IBV=1e-05 TNOM=26.85)"
	if err != nil || s != want {
		t.Errorf("got %q, %v\nwant %q", s, err, want)
	}
	if _, err := ModelCard("DX", CardParams{FC: Given(1)}); err == nil || !strings.Contains(err.Error(), "FC") {
		t.Errorf("FC = 1: %v", err)
	}
}

// A parameter's presence, not its value, decides whether it is written:
// TNOM = 0 degC and XTI = 0 are values (the Berkeley SPICE 3 diode model
// reads a missing TNOM as 27 degC and a missing XTI as 3; from memory),
// RS = 0 and TT = 0 too; a parameter not given is left out. A given NaN
// is an error naming the field, not a silent absence.
func TestModelCardWritesGivenZeros(t *testing.T) {
	s, err := ModelCard("D0", CardParams{IS: Given(1e-14), N: Given(1), RS: Given(0), TT: Given(0), EG: Given(1.12), XTI: Given(0), TNOM: Given(0)})
	if want := ".model D0 D(IS=1e-14 N=1 RS=0 TT=0 EG=1.12 XTI=0 TNOM=0)"; err != nil || s != want {
		t.Errorf("got %q, %v\nwant %q", s, err, want)
	}
	s, err = ModelCard("D0", CardParams{IS: Given(1e-14)})
	if want := ".model D0 D(IS=1e-14)"; err != nil || s != want {
		t.Errorf("got %q, %v\nwant %q", s, err, want)
	}
	for _, p := range []CardParams{{TNOM: Given(math.NaN())}, {XTI: Given(math.Inf(-1))}, {IS: Given(0)}, {RS: Given(-1)}} {
		if _, err := ModelCard("D0", p); !errors.Is(err, ErrInput) {
			t.Errorf("%+v: %v", p, err)
		}
	}
}

// TNOMCelsius: 273.15 K is 0 degC by the definition of the Celsius scale
// (BIPM, The International System of Units, 9th ed., 2019, sec. 2.3.1);
// the rounding residue of the subtraction (one step of a float64 near
// 273.15, 5.7e-14) is gone, and TNOMKelvin inverts it.
func TestTNOMCelsius(t *testing.T) {
	for _, c := range []struct{ k, want float64 }{
		{273.15, 0}, {math.Nextafter(273.15, 1000), 0}, {math.Nextafter(273.15, 0), 0},
		{300, 26.85}, {296.15, 23}, {0, -273.15}, {373.15, 100}, {273.1500004, 0.0000004},
	} {
		got := TNOMCelsius(c.k)
		if got != c.want || math.Signbit(got) != math.Signbit(c.want) {
			t.Errorf("TNOMCelsius(%.17g) = %.17g, want %g", c.k, got, c.want)
		}
		if back := TNOMKelvin(got); math.Abs(back-c.k) > 1e-9 {
			t.Errorf("TNOMKelvin(%g) = %.17g, want %.17g", got, back, c.k)
		}
	}
	if !math.IsNaN(TNOMCelsius(math.NaN())) {
		t.Error("NaN in, not NaN out")
	}
	// TNOM is a condition, written whole: a reference at 400 K is
	// TNOM=126.85 (400 - 273.15; SI Brochure, BIPM 2019, sec. 2.3.1), not
	// 126.8 as at the four digits of the fitted values.
	card, err := ModelCard("DX", CardParams{IS: Given(1e-14), N: Given(1.02), TNOM: Given(TNOMCelsius(400))})
	if err != nil || !strings.Contains(card, "TNOM=126.85)") {
		t.Errorf("card %q, %v: want TNOM=126.85", card, err)
	}
}

// BenchmarkFitCardIV: the joint card fit of three 56-point sweeps with
// EG and XTI (the size of a bench characterisation).
func BenchmarkFitCardIV(b *testing.B) {
	want := CardDiode{IS: 2e-14, N: 1.05, RS: 2.5, EG: 1.12, XTI: 3, TNOMK: 300}
	curves := cardCurves(want, []float64{260, 300, 340}, 0.01, 1)
	start := CardDiode{IS: 1e-14, N: 1.2, RS: 1, XTI: 2, TNOMK: 300}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := FitCardIV(context.Background(), curves, start, CardFitOptions{Series: true, Temperature: true}); err != nil {
			b.Fatal(err)
		}
	}
}
