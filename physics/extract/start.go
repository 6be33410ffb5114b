package extract

import (
	"context"
	"fmt"
	"math"
	"sort"
)

// slidingSlopes visits the least-squares slope b of y = a + b x over every
// window of k consecutive points, x[s:s+k] for s = 0 .. len(x)-k, in one
// pass: the window's sums of dx, dy, dx^2 and dx dy (dx = x - x0, dy =
// y - y0, shifted to a point (x0, y0) near the window for numerical
// stability) are updated by adding the point that enters and removing the
// one that leaves, and recomputed from scratch every k windows so that
// rounding cannot accumulate. The slope is
//
//	b = (Sxy - Sx Sy / k) / (Sxx - Sx^2 / k),
//
// the same estimator as fitLine with unit weights (identity of the
// centred and the raw sums of squares), in O(len(x)) time instead of
// O(len(x) k). A window whose x spread vanishes to working precision
// (Sxx - Sx^2/k <= 1e-12 Sxx) has no slope and is not visited. The
// context is checked at every recomputation; its error is returned.
// Source: Draper & Smith, Applied Regression Analysis, 3rd ed. (1998),
// ch. 1 (the slope from sums); the add-remove update is common practice.
func slidingSlopes(ctx context.Context, x, y []float64, k int, visit func(s int, b float64)) error {
	m := len(x)
	if k < 2 || m < k || len(y) != m {
		return nil
	}
	n := float64(k)
	var x0, y0, sx, sy, sxx, sxy float64
	for s := 0; s+k <= m; s++ {
		if s%k == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
			x0, y0 = x[s], y[s]
			sx, sy, sxx, sxy = 0, 0, 0, 0
			for j := s; j < s+k; j++ {
				dx, dy := x[j]-x0, y[j]-y0
				sx += dx
				sy += dy
				sxx += dx * dx
				sxy += dx * dy
			}
		} else {
			dx, dy := x[s-1]-x0, y[s-1]-y0
			sx -= dx
			sy -= dy
			sxx -= dx * dx
			sxy -= dx * dy
			dx, dy = x[s+k-1]-x0, y[s+k-1]-y0
			sx += dx
			sy += dy
			sxx += dx * dx
			sxy += dx * dy
		}
		cxx := sxx - sx*sx/n
		if !(cxx > 1e-12*sxx) {
			continue
		}
		visit(s, (sxy-sx*sy/n)/cxx)
	}
	return nil
}

// LinearRegion finds the most nearly ideal part of a forward I-V curve: it
// slides a window of max(5, N/8) consecutive points (sorted by V) along
// ln I vs V, fits a straight line to each, and keeps the steepest one. The
// line ln I = ln Is + V/(n Vt) gives
//
//	n = 1/(Vt slope),  Is = exp(intercept).
//
// The "-1" of exp(V/(n Vt)) - 1 is taken out by dividing I by
// 1 - exp(-V/(n Vt)) with the current estimate of n (a few passes), so
// low-bias points are not mistaken for a steeper slope.
// Each pass is one sweep with running sums (slidingSlopes), so the cost
// grows linearly with N; the chosen window is then refitted directly.
// Units: v in V (sorted ascending, V > 0), i in A (> 0), vt in V; returns
// Is in A, n, and the bias window of the chosen points. Valid where the
// steepest part of the curve is neither shunt- nor Rs-limited (the usual
// "linear region" of the semilog plot).
// Source: Schroder, Semiconductor Material and Device Characterization, 3rd
// ed. (2006), sec. 4.2 (ideality factor and saturation current from the
// semilog plot).
func LinearRegion(v, i []float64, vt float64) (is, n float64, win Window, err error) {
	return linearRegion(context.Background(), v, i, vt)
}

func linearRegion(ctx context.Context, v, i []float64, vt float64) (is, n float64, win Window, err error) {
	m := len(v)
	if m != len(i) {
		return 0, 0, Window{}, inputErr("current", len(i), fmt.Sprintf("%d values", m), "one current per voltage")
	}
	k := max(5, m/8)
	if m < k {
		return 0, 0, Window{}, tooFew("points", m, 5, "the linear region needs at least 5 forward points")
	}
	y := make([]float64, m)
	for j := range i {
		if !(i[j] > 0) || !(v[j] > 0) {
			return 0, 0, Window{}, inputErr(fmt.Sprintf("point %d", j), fmt.Sprintf("V=%g, I=%g", v[j], i[j]), "V > 0 and I > 0", "the semilog plot needs positive forward current")
		}
		y[j] = fastLog(i[j])
	}
	yc := make([]float64, m)
	copy(yc, y)
	var bf lineFit
	bs := 0
	for pass := 0; pass < 4; pass++ {
		best := math.Inf(-1)
		found := -1
		err := slidingSlopes(ctx, v, yc, k, func(s int, b float64) {
			// Sorted V: a window with equal end voltages has no slope.
			if v[s+k-1] > v[s] && b > best {
				best, found = b, s
			}
		})
		if err != nil {
			return 0, 0, Window{}, err
		}
		ok := false
		if found >= 0 {
			bf, ok = fitLine(v[found:found+k], yc[found:found+k], nil)
			bs = found
		}
		if !ok || !(bf.b > 0) {
			return 0, 0, Window{}, inputErr("current", "not increasing", "ln I rising with V", "no part of the curve rises with bias; is this forward data?")
		}
		if pass == 3 {
			break // the last line is fitted: no further pass reads yc
		}
		// Remove the "-1" of exp(V/(n Vt)) - 1, which steepens the curve
		// below a few n Vt: ln(I/(1 - exp(-V/(n Vt)))) = ln Is + V/(n Vt).
		a := 1 / bf.b
		for j := range yc {
			yc[j] = y[j] - lnOneMinusExp(v[j]/a)
		}
	}
	return math.Exp(bf.a), 1 / (vt * bf.b), Window{v[bs], v[bs+k-1]}, nil
}

// lnOneMinusExp returns ln(1 - e^-x) for x > 0: above x = 9.2, where
// e^-x < 1.1e-4, by the series -(e + e^2/2 + e^3/3 + e^4/4), e = e^-x
// (Taylor series of ln(1 - e); the next term is below 4e-21, about 3e-17
// of the value); below, as fastLog(-expm1(-x)).
func lnOneMinusExp(x float64) float64 {
	if x > 9.2 {
		e := math.Exp(-x)
		return -e * (1 + e*(0.5+e*(1.0/3+e*0.25)))
	}
	return fastLog(-math.Expm1(-x))
}

// CheungResult holds the Cheung-Cheung estimates.
type CheungResult struct {
	SeriesResistanceOhm, IdealityFactor float64 // Rs in ohm, n
	StdErrRs, StdErrN                   float64 // standard errors from the line fit
	Points                              int     // points on the Cheung-Cheung line
}

// CheungCheung estimates the series resistance from the high-current part
// of a forward I-V curve using
//
//	dV/d(ln I) = I Rs + n Vt,
//
// a straight line in I whose slope is Rs and intercept n Vt. The derivative
// is a local least-squares slope of V against ln I over +-h neighbours
// (h = max(2, N/40)), computed for all points in one pass with running
// sums (slidingSlopes). Units: v in V, i in A (sorted by V, I > 0), vt in
// V. Valid where the shunt current is negligible (upper part of the
// curve).
// Source: S. K. Cheung and N. W. Cheung, Appl. Phys. Lett. 49, 85 (1986),
// eq. (4).
func CheungCheung(v, i []float64, vt float64) (CheungResult, error) {
	return cheungCheung(context.Background(), v, i, vt)
}

func cheungCheung(ctx context.Context, v, i []float64, vt float64) (CheungResult, error) {
	m := len(v)
	if m != len(i) {
		return CheungResult{}, inputErr("current", len(i), fmt.Sprintf("%d values", m), "one current per voltage")
	}
	h := max(2, m/40)
	if m < 2*h+3 {
		return CheungResult{}, tooFew("points", m, 2*h+3, "the Cheung-Cheung derivative needs a few points on each side")
	}
	y := make([]float64, m)
	for j := range i {
		if !(i[j] > 0) {
			return CheungResult{}, inputErr(fmt.Sprintf("point %d", j), i[j], "I > 0", "ln I needs positive current")
		}
		y[j] = fastLog(i[j])
	}
	xs, hs := make([]float64, 0, m), make([]float64, 0, m)
	// The window centred on point j starts at s = j - h.
	err := slidingSlopes(ctx, y, v, 2*h+1, func(s int, b float64) {
		xs = append(xs, i[s+h])
		hs = append(hs, b)
	})
	if err != nil {
		return CheungResult{}, err
	}
	f, ok := fitLine(xs, hs, nil)
	if !ok || len(xs) < 3 {
		return CheungResult{}, tooFew("points", len(xs), 3, "the Cheung-Cheung line needs distinct currents")
	}
	return CheungResult{SeriesResistanceOhm: f.b, IdealityFactor: f.a / vt,
		StdErrRs: math.Sqrt(f.vb), StdErrN: math.Sqrt(f.va) / vt, Points: len(xs)}, nil
}

// directEstimates combines LinearRegion, CheungCheung (on the points above
// the linear region) and the low-bias excess current into start values.
func directEstimates(ctx context.Context, v, i []float64, vt float64) (DirectEstimates, error) {
	is, n, win, err := linearRegion(ctx, v, i, vt)
	if err != nil {
		return DirectEstimates{}, err
	}
	de := DirectEstimates{SaturationCurrentA: is, IdealityFactor: n, LinearWindow: win,
		SeriesResistanceOhm: math.NaN(), ShuntResistanceOhm: math.Inf(1)}
	// Cheung-Cheung on the points from the middle of the linear window up.
	mid := 0.5 * (win.MinV + win.MaxV)
	lo := sort.SearchFloat64s(v, mid)
	if len(v)-lo >= 7 {
		c, err := cheungCheung(ctx, v[lo:], i[lo:], vt)
		if ctxErr := ctx.Err(); ctxErr != nil {
			return DirectEstimates{}, ctxErr
		}
		if err == nil && c.SeriesResistanceOhm > 0 {
			de.SeriesResistanceOhm = c.SeriesResistanceOhm
		}
	}
	// Shunt from the excess current below the linear window.
	a := n * vt
	var r []float64
	for k := range v {
		if v[k] >= win.MinV {
			break
		}
		ex := i[k] - is*math.Expm1(v[k]/a)
		if ex > 0.5*i[k] {
			r = append(r, v[k]/ex)
		}
	}
	if len(r) >= 3 {
		de.ShuntResistanceOhm = median(r)
	}
	return de, nil
}
