package extract

import (
	"math"
	"math/rand/v2"
	"testing"

	"junco/physics"
)

// arrheniusSet draws Is(T) = C T^3 exp(-Ea/kT) at 250..400 K with ln Is
// scattered by scatter (normal) while each point claims the standard error
// claimed*Is. Invented data; the truth is Ea.
func arrheniusSet(rng *rand.Rand, ea, scatter, claimed float64) []ArrheniusPoint {
	var pts []ArrheniusPoint
	for tk := 250.0; tk <= 400; tk += 25 {
		is := 1e2 * math.Pow(tk, 3) * math.Exp(-ea*physics.Q/(physics.KB*tk)+scatter*rng.NormFloat64())
		pts = append(pts, ArrheniusPoint{TemperatureK: tk, SaturationCurrentA: is, StdErrA: claimed * is})
	}
	return pts
}

// propagatedSE is the standard error of Ea the point errors alone give:
// sqrt(1/Sxx_w) k/q for the weighted line in 1/T (Draper & Smith 1998,
// ch. 9; identity of weighted least squares).
func propagatedSE(pts []ArrheniusPoint) float64 {
	var sw, sx float64
	w := make([]float64, len(pts))
	for k, p := range pts {
		r := p.SaturationCurrentA / p.StdErrA
		w[k] = r * r
		sw += w[k]
		sx += w[k] / p.TemperatureK
	}
	xm, sxx := sx/sw, 0.0
	for k, p := range pts {
		d := 1/p.TemperatureK - xm
		sxx += w[k] * d * d
	}
	return math.Sqrt(1/sxx) * physics.KB / physics.Q
}

// The standard error of Ea is the propagated one times
// sqrt(max(1, reduced chi-square)) (Birge, Phys. Rev. 40, 207 (1932)):
// never narrowed below the point errors, widened when the points scatter
// more than their errors allow, so that |Ea - truth| < 2 se in about 95 %
// of repeated experiments whether or not the point errors are honest
// (checked over 400 simulated sets: at least 90 %).
func TestFitArrheniusChiSquareScaling(t *testing.T) {
	const ea = 1.12
	rng := rand.New(rand.NewPCG(21, 4))
	for _, c := range []struct {
		name             string
		scatter, claimed float64
	}{{"honest errors", 0.05, 0.05}, {"errors understated 5x", 0.25, 0.05}, {"errors overstated 4x", 0.05, 0.2}} {
		covered, n := 0, 400
		for trial := 0; trial < n; trial++ {
			pts := arrheniusSet(rng, ea, c.scatter, c.claimed)
			f, err := FitArrhenius(pts, ArrheniusOptions{})
			if err != nil {
				t.Fatal(err)
			}
			prop := propagatedSE(pts)
			want := prop * math.Sqrt(math.Max(1, f.ReducedChiSquare))
			if math.Abs(f.StdErrEV/want-1) > 1e-9 {
				t.Fatalf("%s: se %g eV, want %g (propagated %g, chi2 %g)", c.name, f.StdErrEV, want, prop, f.ReducedChiSquare)
			}
			if math.Abs(f.ActivationEnergyEV-ea) < 2*f.StdErrEV {
				covered++
			}
		}
		if frac := float64(covered) / float64(n); frac < 0.90 {
			t.Errorf("%s: truth within 2 se in %.0f %% of sets, want >= 90 %%", c.name, 100*frac)
		}
	}
	// Unweighted points have no chi-square.
	pts := arrheniusSet(rng, ea, 0.05, 0)
	for k := range pts {
		pts[k].StdErrA = 0
	}
	if f, err := FitArrhenius(pts, ArrheniusOptions{}); err != nil || !math.IsNaN(f.ReducedChiSquare) || !(f.StdErrEV > 0) {
		t.Errorf("unweighted: %+v, %v", f, err)
	}
}
