package fit

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"junco/model"
	"junco/model/fit/fittest"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// needSimulator skips a test when the circuit simulator is missing (CI
// installs it, so the tests run there).
func needSimulator(t *testing.T) {
	t.Helper()
	if !SimulatorInstalled() {
		t.Skip(SimulatorProgram + " is not installed: the simulator round trip of the model card is skipped (apt-get install ngspice; .ci/run installs it)")
	}
}

// demoCardInputs are the invented demo measurements (junco's own model with
// noise, labelled invented): I-V at 296 K (reference), 273 K and 323 K,
// and the C-V sweep.
func demoCardInputs(t *testing.T) CardInputs {
	t.Helper()
	sets, err := model.DemoMeasurements(1)
	if err != nil {
		t.Fatal(err)
	}
	in := CardInputs{Name: "D7_demo"}
	byID := map[string]*measure.DataSet{}
	for k := range sets {
		byID[sets[k].ID] = &sets[k].DataSet
	}
	in.IV = []*measure.DataSet{byID["iv-296K"], byID["iv-273K"], byID["iv-323K"]}
	in.CV = byID["cv-296K"]
	for _, ds := range append(in.IV, in.CV) {
		if ds == nil || !strings.Contains(ds.SourceFile, "invented") {
			t.Fatalf("demo data set missing or not labelled invented: %+v", ds)
		}
	}
	return in
}

// checkFigures asserts the figures: rms ln(I_sim/I_meas) < 0.05 on
// every sweep (the reference and the other temperatures, which only EG and
// XTI carry there) and C within 3 % at every reverse C-V bias, in the
// simulator.
func checkFigures(t *testing.T, r *CardResult) *CardCheck {
	t.Helper()
	chk, err := CheckCard(context.Background(), r)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range chk.IV {
		t.Logf("%s at %.2f K: rms ln(I_sim/I_meas) = %.4f over %d points", c.File, c.TemperatureK, c.RMSLog, len(c.VoltageV))
		if !(c.RMSLog < CheckMaxRMSLog) || !c.Pass {
			t.Errorf("%s at %.2f K: rms %.4f, limit %g", c.File, c.TemperatureK, c.RMSLog, CheckMaxRMSLog)
		}
	}
	if len(chk.IV) != len(r.Curves) {
		t.Errorf("%d sweeps simulated, %d fitted", len(chk.IV), len(r.Curves))
	}
	if r.Junction != nil {
		if chk.CV == nil {
			t.Fatal("no C-V comparison")
		}
		t.Logf("C-V: %d reverse biases, largest error %.3f %%, rms %.3f %%", len(chk.CV.VoltageV), 100*chk.CV.MaxRel, 100*chk.CV.RMSRel)
		if !(chk.CV.MaxRel <= CheckMaxCVRel) {
			t.Errorf("C-V: largest error %.3f %%, limit 3 %%", 100*chk.CV.MaxRel)
		}
	}
	return chk
}

// The invented demo characterisation, built into a card and run in the
// simulator: DC sweeps at three temperatures and AC capacitance.
func TestCardDemoInSimulator(t *testing.T) {
	needSimulator(t)
	r, err := Card(context.Background(), demoCardInputs(t))
	if err != nil {
		t.Fatal(err)
	}
	t.Log(r.Card)
	for _, name := range []string{"IS", "N", "RS", "CJO", "VJ", "M", "FC", "EG", "XTI", "TNOM"} {
		if _, ok := r.Param(name); !ok {
			t.Errorf("card lacks %s: %s", name, r.Card)
		}
	}
	for _, name := range []string{"BV", "IBV", "TT"} {
		if _, ok := r.Param(name); ok || strings.Contains(r.Card, " "+name+"=") {
			t.Errorf("%s in the card though nothing measured it: %s", name, r.Card)
		}
	}
	// The demo junction is 23 degC (296.15 K): TNOM in degC.
	if p, _ := r.Param("TNOM"); math.Abs(p.Value-23) > 1e-9 {
		t.Errorf("TNOM = %g degC, want 23", p.Value)
	}
	// The demo's C-V is a one-sided abrupt junction: M near 1/2 (Sze &
	// Ng 2007, sec. 2.2), within 3 standard errors.
	if p, _ := r.Param("M"); math.Abs(p.Value-0.5) > 3*p.StdErr {
		t.Errorf("M = %g ± %g, want 1/2 for an abrupt junction", p.Value, p.StdErr)
	}
	checkFigures(t, r)
}

// The command-line test sets (invented, see tui/cli/testdata/fit/
// INVENTED.md): Is = C T^3 exp(-1.12 eV/kT), n = 1, so the card must give
// EG = 1.12 eV and XTI = 3 (Sze & Ng 2007, sec. 2.3, with the SPICE law
// of CardDiode) within 3 standard errors, and the simulator reproduce
// every sweep and the C-V.
func TestCardTestSetsInSimulator(t *testing.T) {
	needSimulator(t)
	dir := "../../tui/cli/testdata/fit/"
	var in CardInputs
	in.Name = "DX"
	for _, f := range []string{"arrhenius/iv-300K.csv", "arrhenius/iv-250K.csv", "arrhenius/iv-350K.csv"} {
		ds, err := Import(nil, dir+f, measure.KindIV, nil)
		if err != nil {
			t.Fatal(err)
		}
		in.IV = append(in.IV, ds)
	}
	cv, err := Import(nil, dir+"cv.tsv", measure.KindCV, nil)
	if err != nil {
		t.Fatal(err)
	}
	in.CV = cv
	r, err := Card(context.Background(), in)
	if err != nil {
		t.Fatal(err)
	}
	t.Log(r.Card)
	eg, _ := r.Param("EG")
	xti, _ := r.Param("XTI")
	if math.Abs(eg.Value-1.12) > 3*eg.StdErr || math.Abs(xti.Value-3) > 3*xti.StdErr {
		t.Errorf("EG = %g ± %g (want 1.12), XTI = %g ± %g (want 3)", eg.Value, eg.StdErr, xti.Value, xti.StdErr)
	}
	if p, _ := r.Param("TNOM"); math.Abs(p.Value-26.85) > 1e-9 {
		t.Errorf("TNOM = %g degC, want 26.85 (300 K)", p.Value)
	}
	checkFigures(t, r)
}

// The other command-line test sets, one sweep each (invented): iv.csv has
// an observable shunt, so the subcircuit is what the simulator runs.
func TestCardSingleTestSetsInSimulator(t *testing.T) {
	needSimulator(t)
	for _, f := range []string{"iv.csv", "wafer/die00.csv", "wafer/die05.csv"} {
		ds, err := Import(nil, "../../tui/cli/testdata/fit/"+f, measure.KindIV, nil)
		if err != nil {
			t.Fatal(err)
		}
		r, err := Card(context.Background(), CardInputs{Name: "DT", IV: []*measure.DataSet{ds}})
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		t.Logf("%s: %s (subckt: %v)", f, r.Card, r.Subckt != "")
		if f == "iv.csv" && r.Subckt == "" {
			t.Errorf("%s: shunt observable, no subcircuit", f)
		}
		if chk := checkFigures(t, r); f == "iv.csv" && chk.Deck != "subckt" {
			t.Errorf("%s: checked the %s", f, chk.Deck)
		}
	}
}

// invented reverse sweep for the breakdown tests: 2 nA leakage and an
// exponential avalanche knee at 42 V (1 uA) with 1 % noise.
func inventedReverse() *measure.DataSet {
	ds := &measure.DataSet{Kind: measure.KindIV, SourceFile: "invented reverse sweep (test only)"}
	ds.VoltageV, ds.CurrentA = fittest.Sweep{From: 0, To: -43, Points: 431, Rel: 0.01, Seed: [2]uint64{9, 9},
		Model: func(v float64) float64 { return -(2e-9 + 1e-6*math.Exp((-v-42)/0.15)) }}.Values()
	return ds
}

// BV and IBV from an (invented) reverse sweep to breakdown; in the
// simulator the card carries IBV at -BV (the simulator places its knee so,
// Nagel 1975), within a factor of 1.5.
func TestCardBreakdownInSimulator(t *testing.T) {
	needSimulator(t)
	in := demoCardInputs(t)
	in.Reverse = inventedReverse()
	r, err := Card(context.Background(), in)
	if err != nil {
		t.Fatal(err)
	}
	bv, ok := r.Param("BV")
	ibv, ok2 := r.Param("IBV")
	if !ok || !ok2 || bv.Value < 40 || bv.Value > 43 {
		t.Fatalf("BV %+v IBV %+v", bv, ibv)
	}
	if !strings.Contains(r.Cautions[0], "breakdown") || len(r.Beyond(-bv.Value-1, math.NaN(), math.NaN())) == 0 {
		t.Errorf("breakdown not flagged first: %v", r.Cautions)
	}
	chk := checkFigures(t, r)
	if chk.BV == nil {
		t.Fatal("no breakdown check")
	}
	t.Logf("at %g V the card carries %g A, IBV %g A", chk.BV.BiasV, chk.BV.SimulatedA, chk.BV.IBV)
	if ratio := chk.BV.SimulatedA / chk.BV.IBV; !(ratio > 1/1.5 && ratio < 1.5) {
		t.Errorf("current at -BV is %g times IBV", ratio)
	}
}

// TT from a recovery measurement: in a transient of the card (current step
// IF -> -IR), the stored charge TT I is gone after ts = TT ln(1 + IF/IR)
// (charge control, Sze & Ng 2007, sec. 2.3.5): without CJO the simulated
// storage time equals the measured one within 1 %.
func TestCardRecoveryInSimulator(t *testing.T) {
	needSimulator(t)
	in := demoCardInputs(t)
	in.CV = nil
	rc, err := ParseRecovery(strings.NewReader("# invented recovery measurement\nforward current: 10 mA\nreverse current = -5 mA\nstorage time: 30 ns\nstorage time error: 1ns\n"), "rec.txt")
	if err != nil {
		t.Fatal(err)
	}
	in.Recovery = rc
	r, err := Card(context.Background(), in)
	if err != nil {
		t.Fatal(err)
	}
	tt, ok := r.Param("TT")
	if !ok || math.Abs(tt.Value-30e-9/math.Log(3)) > 1e-15 || tt.Source != FromRecovery {
		t.Fatalf("TT %+v", tt)
	}
	t.Log(r.Card)
	chk := checkFigures(t, r)
	if chk.TT == nil {
		t.Fatal("no storage-time check")
	}
	t.Logf("storage time: measured %g s, simulated %g s", chk.TT.MeasuredS, chk.TT.SimulatedS)
	if math.Abs(chk.TT.SimulatedS/chk.TT.MeasuredS-1) > 0.01 {
		t.Errorf("simulated ts %g s, measured %g s", chk.TT.SimulatedS, chk.TT.MeasuredS)
	}
}

// Two temperatures determine one combination of EG and XTI: XTI is held
// at 3 and said so, EG fitted; the second temperature still passes.
func TestCardTwoTemperaturesHoldXTI(t *testing.T) {
	needSimulator(t)
	in := demoCardInputs(t)
	in.IV = in.IV[:2]
	r, err := Card(context.Background(), in)
	if err != nil {
		t.Fatal(err)
	}
	xti, ok := r.Param("XTI")
	if !ok || xti.Value != 3 || !math.IsNaN(xti.StdErr) || xti.Source != FromHeldXTI {
		t.Errorf("XTI %+v", xti)
	}
	if eg, ok := r.Param("EG"); !ok || !(eg.StdErr > 0) {
		t.Errorf("EG %+v", eg)
	}
	checkFigures(t, r)
}

func TestThinKeepsEnds(t *testing.T) {
	x := make([]float64, 2*checkMaxPoints+7)
	for k := range x {
		x[k] = float64(k)
	}
	a, b := thin(x, x)
	if len(a) != checkMaxPoints || a[0] != 0 || a[len(a)-1] != x[len(x)-1] || b[1] != a[1] {
		t.Errorf("thinned to %d points, ends %g %g", len(a), a[0], a[len(a)-1])
	}
}

// TT from the diffusion capacitance when no recovery was measured: an
// invented diode (a card diode with 1 % current noise) and an invented C-V
// sweep into forward bias, C = Cj0/(1 - V/Vbi)^m + Cpar + TT dI/dV with
// TT = 50 ns (charge control, Sze & Ng 2007, sec. 2.3.4) and 0.2 % noise.
// The card's TT comes back within 5 %, said to come from the diffusion
// capacitance; in the simulator, the capacitance the card's TT adds at
// forward bias (AC with TT less AC without) matches the measured excess
// over the fitted depletion law within 3 % where it dominates (no RS, so the AC admittance is the
// junction's; the simulator's FC linearisation of the depletion part
// cancels in the difference).
func TestCardTTFromDiffusionCapacitance(t *testing.T) {
	needSimulator(t)
	rng := rand.New(rand.NewPCG(21, 21))
	truth := extract.CardDiode{IS: 1e-14, N: 1, TNOMK: 300}
	iv := &measure.DataSet{Kind: measure.KindIV, SourceFile: "invented I-V (test only)", StatedTemperatureK: 300}
	for v := 0.0; v <= 0.75; v += 0.01 {
		iv.VoltageV = append(iv.VoltageV, v)
		iv.CurrentA = append(iv.CurrentA, truth.Current(v, 300)*(1+0.01*rng.NormFloat64())+1e-12*rng.NormFloat64())
	}
	j := extract.JunctionCV{ZeroBiasCapacitanceF: 40e-12, BuiltInPotentialV: 0.75, GradingCoefficient: 0.5, ParasiticCapacitanceF: 2e-12}
	vt := physics.ThermalVoltage(300)
	cv := &measure.DataSet{Kind: measure.KindCV, SourceFile: "invented C-V (test only)", StatedTemperatureK: 300}
	for k := 0; k <= 60; k++ {
		v := -5 + float64(k)*0.1
		g := (truth.Current(v+vt/4, 300) - truth.Current(v-vt/4, 300)) / (vt / 2)
		cv.VoltageV = append(cv.VoltageV, v)
		cv.CapacitanceF = append(cv.CapacitanceF, (j.Capacitance(v)+50e-9*g)*(1+0.002*rng.NormFloat64()))
	}
	r, err := Card(context.Background(), CardInputs{Name: "DTT", IV: []*measure.DataSet{iv}, CV: cv})
	if err != nil {
		t.Fatal(err)
	}
	tt, ok := r.Param("TT")
	if !ok || tt.Source != FromDiffusionCap || math.Abs(tt.Value/50e-9-1) > 0.05 {
		t.Fatalf("TT %+v; notes %v", tt, r.Notes)
	}
	t.Logf("TT = %.4g ± %.2g s; %s", tt.Value, tt.StdErr, r.Card)
	checkFigures(t, r)
	var vs, excess []float64
	for k, v := range cv.VoltageV {
		if v > 0.55 && v < 0.75 { // where the diffusion part dominates
			vs = append(vs, v)
			excess = append(excess, cv.CapacitanceF[k]-r.Junction.Capacitance(v))
		}
	}
	dir := t.TempDir()
	with, err := runAC(context.Background(), dir, r.Card, "D1 a 0 DTT", 300, vs)
	if err != nil {
		t.Fatal(err)
	}
	noTT := strings.Replace(r.Card, " TT="+g4(tt.Value), "", 1)
	without, err := runAC(context.Background(), dir, noTT, "D1 a 0 DTT", 300, vs)
	if err != nil || noTT == r.Card {
		t.Fatal(err, noTT)
	}
	for k := range vs {
		d := with[k] - without[k]
		t.Logf("%.2f V: diffusion capacitance simulated %.4g F, measured excess %.4g F", vs[k], d, excess[k])
		if math.Abs(d/excess[k]-1) > 0.03 {
			t.Errorf("forward %.2f V: simulated %g F, measured %g F", vs[k], d, excess[k])
		}
	}
}

// One sweep only: nothing but IS, N, RS (and TNOM) in the card; the notes
// say what is missing and why; breakdown flagged as not measured.
func TestCardLeavesOutWhatNothingMeasured(t *testing.T) {
	in := demoCardInputs(t)
	in.IV, in.CV = in.IV[:1], nil
	r, err := Card(context.Background(), in)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"CJO", "VJ", "M", "FC", "EG", "XTI", "BV", "IBV", "TT"} {
		if _, ok := r.Param(name); ok || strings.Contains(r.Card, " "+name+"=") {
			t.Errorf("%s in the card: %s", name, r.Card)
		}
	}
	notes := strings.Join(r.Notes, "\n")
	for _, want := range []string{"CJO, VJ, M not in the card", "EG and XTI not in the card", "BV, IBV not in the card", "TT not in the card"} {
		if !strings.Contains(notes, want) {
			t.Errorf("no note %q in\n%s", want, notes)
		}
	}
	if !strings.HasPrefix(r.Cautions[0], "BREAKDOWN NOT MEASURED") || r.Cautions[len(r.Cautions)-1] != model.Caution {
		t.Errorf("cautions: %v", r.Cautions)
	}
	if got := r.Beyond(-10, math.NaN(), 400); len(got) != 2 {
		t.Errorf("beyond: %v", got)
	}
	if got := r.Beyond(0.5, 1e-4, r.Curves[0].Temperature.K); len(got) != 0 {
		t.Errorf("inside the ranges: %v", got)
	}
}

func TestCardNoSimulator(t *testing.T) {
	t.Setenv("PATH", t.TempDir())
	in := demoCardInputs(t)
	in.IV = in.IV[:1]
	r, err := Card(context.Background(), in)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := CheckCard(context.Background(), r); !errors.Is(err, ErrNoSimulator) || !strings.Contains(err.Error(), "not installed") {
		t.Errorf("err = %v", err)
	}
}

func TestParseRecoveryErrors(t *testing.T) {
	for _, c := range []struct{ text, want string }{
		{"forward current: 10 mA\nreverse current: 5 mA\n", `no "storage time"`},
		{"forward current 10 mA\n", "expected"},
		{"colour: red\n", "unknown key"},
		{"storage time: 3 parsecs\n", "storage time"},
		{"forward current: 0 mA\n", "positive"},
		{strings.Repeat("# x\n", MaxRecoveryBytes/4+10), "longer than"},
	} {
		if _, err := ParseRecovery(strings.NewReader(c.text), "rec.txt"); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: err = %v, want %q", c.text[:min(len(c.text), 30)], err, c.want)
		}
	}
}

func TestCardInputErrors(t *testing.T) {
	ctx := context.Background()
	if _, err := Card(ctx, CardInputs{Name: "D"}); err == nil || !strings.Contains(err.Error(), "forward I-V") {
		t.Errorf("no I-V: %v", err)
	}
	in := demoCardInputs(t)
	in.Name = "1bad"
	if _, err := Card(ctx, in); err == nil || !strings.Contains(err.Error(), "name") {
		t.Errorf("bad name: %v", err)
	}
	in = demoCardInputs(t)
	lit := *in.IV[0]
	lit.CurrentA = append([]float64(nil), lit.CurrentA...)
	for k := range lit.CurrentA {
		lit.CurrentA[k] -= 1e-3 // an invented photocurrent of 1 mA
	}
	in.IV = []*measure.DataSet{&lit}
	if _, err := Card(ctx, in); err == nil || !strings.Contains(err.Error(), "lit sweep") {
		t.Errorf("lit sweep: %v", err)
	}
	in.IV = []*measure.DataSet{in.CV}
	if _, err := Card(ctx, in); err == nil || !strings.Contains(err.Error(), "not an I-V sweep") {
		t.Errorf("C-V as I-V: %v", err)
	}
}

// The package's own evaluation of a card (extract.CardDiode: the SPICE
// temperature law, RS, ISR with Kgen and VJ(T)) against the simulator
// itself, within 0.1 % at TNOM and at 50 K and 60 K from it (the
// simulator's gmin of 1e-12 S is below that at these currents).
func TestCardDiodeMatchesSimulator(t *testing.T) {
	needSimulator(t)
	r := &CardResult{Name: "DQ", Params: []CardParam{{Name: "IS", Value: 3e-14}, {Name: "N", Value: 1.03}, {Name: "RS", Value: 4},
		{Name: "ISR", Value: 2e-11}, {Name: "NR", Value: 2}, {Name: "VJ", Value: 0.75}, {Name: "M", Value: 0.45},
		{Name: "EG", Value: 1.15}, {Name: "XTI", Value: 4}, {Name: "TNOM", Value: 26.85}}}
	if err := r.render(); err != nil {
		t.Fatal(err)
	}
	var d = cardDiodeOf(r)
	vs := []float64{0.35, 0.45, 0.55, 0.65, 0.75, 0.9}
	dir := t.TempDir()
	for _, c := range []struct{ tk, tol float64 }{{300, 1e-3}, {250, 1e-3}, {360, 1e-3}} {
		sim, err := runOps(context.Background(), dir, "x", r.Card, "D1 a 0 DQ", c.tk, vs)
		if err != nil {
			t.Fatal(err)
		}
		for k, v := range vs {
			own := d.Current(v, c.tk)
			if math.Abs(sim[k]/own-1) > c.tol {
				t.Errorf("T = %g K, V = %g: simulator %g A, own %g A", c.tk, v, sim[k], own)
			}
		}
	}
}
