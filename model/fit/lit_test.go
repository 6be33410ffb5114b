package fit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/physics"
	"junco/physics/extract"
)

// litTruth is an invented lit diode (of the order of a silicon cell);
// writeLit writes invented data from it: the model's curve plus 0.02 %
// noise, in the load sign or (generator) the delivered current.
var litTruth = extract.LitDiode{PhotocurrentA: 0.5, SaturationCurrentA: 1e-8, IdealityFactor: 1.35, SeriesResistanceOhm: 0.05, ShuntResistanceOhm: 80}

func writeLit(t testing.TB, path string, generator bool, seed uint64) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 5))
	vt := physics.ThermalVoltage(300)
	var b strings.Builder
	b.WriteString("# invented lit sweep (test data, not a measurement)\n# temperature: 300 K\nV,I (mA)\n")
	for k := 0; k <= 70; k++ {
		v := -0.05 + 0.7*float64(k)/70
		i := litTruth.Current(v, vt) + 1e-4*rng.NormFloat64()
		if generator {
			i = -i
		}
		fmt.Fprintf(&b, "%.4f,%.8e\n", v, i*1e3)
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

// A lit file is recognised in either sign, a dark one is not; the lit fit
// of the file recovers the invented truth within the tolerances
// (ln Is 0.10, n 2 %, Rs 10 %, Rsh 30 %, Iph 0.5 %), says which sign it
// assumed, and its record and view carry the five parameters.
func TestLitRoutingAndFit(t *testing.T) {
	dir := t.TempDir()
	dark := filepath.Join(dir, "dark.csv")
	writeIV(t, dark, "V,I (A)\n", testDiode, 300, 0, 1)
	ds, err := Import(nil, dark, "", nil)
	if err != nil {
		t.Fatal(err)
	}
	if IsLit(ds) {
		t.Errorf("dark sweep taken as lit: %+v", RecogniseLit(ds))
	}
	for _, gen := range []bool{false, true} {
		p := filepath.Join(dir, fmt.Sprintf("lit-%v.csv", gen))
		writeLit(t, p, gen, 2)
		ds, err := Import(nil, p, "", nil)
		if err != nil {
			t.Fatal(err)
		}
		rec := RecogniseLit(ds)
		want := extract.SignLoad
		if gen {
			want = extract.SignGenerator
		}
		if !rec.Lit || rec.Sign != want {
			t.Fatalf("generator %v: %+v", gen, rec)
		}
		r, err := LitIV(ds, LitOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if r.Temperature.Source != SourceComment || !strings.Contains(r.Notes[0], want.String()) {
			t.Errorf("temperature %+v, notes %q", r.Temperature, r.Notes)
		}
		d := r.Fit.Diode
		if math.Abs(math.Log(d.SaturationCurrentA/litTruth.SaturationCurrentA)) > 0.1 ||
			math.Abs(d.IdealityFactor/litTruth.IdealityFactor-1) > 0.02 ||
			math.Abs(d.SeriesResistanceOhm/litTruth.SeriesResistanceOhm-1) > 0.1 ||
			math.Abs(d.ShuntResistanceOhm/litTruth.ShuntResistanceOhm-1) > 0.3 ||
			math.Abs(d.PhotocurrentA/litTruth.PhotocurrentA-1) > 0.005 {
			t.Errorf("generator %v: fitted %+v, truth %+v", gen, d, litTruth)
		}
		rc := LitRecord(r)
		if rc.Method != MethodIVLit || len(rc.Params) != 5 || rc.Params[0].Name != "Iph" {
			t.Errorf("record %+v", rc)
		}
		v, err := NewLitView(ds, LitOptions{})
		if err != nil {
			t.Fatal(err)
		}
		// The fitted current is drawn in the file's sign; the delivered
		// power peaks at the fit's maximum-power point.
		i0 := v.Curve.Series[0].Y[0]
		if (i0 > 0) != gen {
			t.Errorf("generator %v: fitted current at the lowest bias %g has the wrong sign", gen, i0)
		}
		pk := 0.0
		for _, p := range v.Power.Series[1].Y {
			pk = math.Max(pk, p)
		}
		if !(v.MaxPowerW >= pk) || v.MaxPowerW > pk*1.01 || len(v.Rows) != 5 || len(v.Figures) != 5 {
			t.Errorf("max power %g W, sampled peak %g W, rows %d", v.MaxPowerW, pk, len(v.Rows))
		}
	}
}
