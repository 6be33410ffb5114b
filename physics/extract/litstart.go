package extract

import (
	"math"

	"junco/physics"
)

// LitStartValues are the quantities read off a lit curve (load sign
// internally, reported as magnitudes) that FitLit's start points are made
// from.
type LitStartValues struct {
	IscA float64 // |I(0)|, interpolated, A
	VocV float64 // bias where the current changes sign, interpolated (or extrapolated, see Notes), V
	// ShortCircuitOhm is 1/(dI/dV) near zero bias (~ Rsh) and
	// OpenCircuitOhm dV/dI near Voc (~ Rs + n Vt/Isc), both from straight
	// lines through the nearby points.
	ShortCircuitOhm, OpenCircuitOhm float64
	ImpA, VmpV                      float64 // maximum-power point of the data
}

// lerp interpolates (or extrapolates) linearly through (x0, y0), (x1, y1)
// at x; equal abscissae give the mean ordinate.
func lerp(x0, y0, x1, y1, x float64) float64 {
	if x1 == x0 {
		return (y0 + y1) / 2
	}
	return y0 + (y1-y0)*(x-x0)/(x1-x0)
}

// interpAtZeroBias returns the current at V = 0 by linear interpolation
// between the points that bracket it, or by extrapolation from the two
// nearest points (extrapolated = true) when the data do not reach 0 V.
// p is sorted by V with at least two points.
func interpAtZeroBias(p ivPoints) (i0 float64, extrapolated bool) {
	n := len(p.v)
	if n < 2 {
		return math.NaN(), true
	}
	for k := 0; k+1 < n; k++ {
		if p.v[k] <= 0 && p.v[k+1] >= 0 {
			if p.v[k] == 0 && p.v[k+1] == 0 {
				continue
			}
			if p.v[k+1] == 0 {
				return p.i[k+1], false
			}
			return lerp(p.v[k], p.i[k], p.v[k+1], p.i[k+1], 0), false
		}
	}
	if p.v[0] > 0 {
		return lerp(p.v[0], p.i[0], p.v[1], p.i[1], 0), true
	}
	return lerp(p.v[n-2], p.i[n-2], p.v[n-1], p.i[n-1], 0), true
}

// crossing returns the first bias above 0 V where the load-sign current
// changes from negative to not negative, interpolated linearly.
func crossing(p ivPoints) (float64, bool) {
	for k := 0; k+1 < len(p.v); k++ {
		if p.v[k+1] > 0 && p.i[k] < 0 && p.i[k+1] >= 0 {
			return lerp(p.i[k], p.v[k], p.i[k+1], p.v[k+1], 0), true
		}
	}
	return math.NaN(), false
}

// LitDataFigures reads the figures of merit off a lit curve's data (V in V,
// I in A) in the given sign convention (SignAuto: RecogniseLit's, else the
// sign of the current at zero bias): Isc = |I(0)| and Voc by linear
// interpolation between the points around them, the maximum-power point as
// the largest delivered power -V I among the points between 0 V and Voc,
// refined by the parabola through it and its two neighbours when that
// parabola peaks between them (quadratic interpolation; common practice),
// FF = Pmax/(Isc Voc). Results are in the generator sign; a figure that
// cannot be read off (no crossing of zero current: Voc and FF) is NaN.
// Definitions: Sze & Ng 2007, ch. 13.
func LitDataFigures(v, i []float64, sign LitSign) physics.LitFigures {
	pts := finitePoints(v, i, Window{})
	if len(pts.v) < 2 {
		return nanFigures()
	}
	if sign == SignAuto {
		rec := RecogniseLit(pts.v, pts.i)
		sign = rec.Sign
		if !rec.Lit {
			sign = SignLoad
			if i0, _ := interpAtZeroBias(pts); i0 > 0 {
				sign = SignGenerator
			}
		}
	}
	return litDataFigures(toLoad(pts, sign))
}

// litDataFigures is LitDataFigures for sorted load-sign points.
func litDataFigures(p ivPoints) physics.LitFigures {
	f := nanFigures()
	if len(p.v) < 2 {
		return f
	}
	i0, _ := interpAtZeroBias(p)
	f.Isc = -i0
	voc, ok := crossing(p)
	if ok {
		f.Voc = voc
	}
	best := -1
	for k := range p.v {
		if p.v[k] < 0 || (ok && p.v[k] > voc) {
			continue
		}
		if pw := -p.v[k] * p.i[k]; pw > 0 && (best < 0 || pw > -p.v[best]*p.i[best]) {
			best = k
		}
	}
	if best < 0 {
		return f
	}
	f.Vmp, f.Pmax = p.v[best], -p.v[best]*p.i[best]
	if best > 0 && best+1 < len(p.v) {
		x0, x1, x2 := p.v[best-1], p.v[best], p.v[best+1]
		y0, y1, y2 := -x0*p.i[best-1], f.Pmax, -x2*p.i[best+1]
		// Vertex of the parabola through the three points (divided
		// differences).
		d01 := (y1 - y0) / (x1 - x0)
		d12 := (y2 - y1) / (x2 - x1)
		c := (d12 - d01) / (x2 - x0)
		if c < 0 && x0 < x1 && x1 < x2 {
			xv := (x0+x1)/2 - d01/(2*c)
			if xv > x0 && xv < x2 {
				yv := y1 + d01*(xv-x1) + c*(xv-x0)*(xv-x1)
				if yv >= f.Pmax {
					f.Vmp, f.Pmax = xv, yv
				}
			}
		}
	}
	if f.Vmp > 0 {
		f.Imp = f.Pmax / f.Vmp
	}
	if f.Isc > 0 && f.Voc > 0 {
		f.FF = f.Pmax / (f.Isc * f.Voc)
	}
	return f
}

// litStartValues reads the start quantities off sorted load-sign points.
func litStartValues(p ivPoints) (LitStartValues, error) {
	var s LitStartValues
	i0, _ := interpAtZeroBias(p)
	s.IscA = -i0
	if !(s.IscA > 0) {
		return s, inputErr("current", i0, "below 0 A at zero bias in the load sign (above 0 A in the generator sign)", "a lit curve carries a photocurrent at zero bias; check the sign convention")
	}
	n := len(p.v)
	voc, ok := crossing(p)
	if !ok {
		// Extrapolate from the last two points toward zero current.
		a, b := p.v[n-2], p.v[n-1]
		if p.i[n-1] < 0 && p.i[n-1] > p.i[n-2] && b > a {
			voc = lerp(p.i[n-2], a, p.i[n-1], b, 0)
		}
		if !(voc > 0) || math.IsInf(voc, 0) {
			return s, inputErr("current", "no zero crossing", "a current rising toward zero at the highest bias", "the curve does not approach open circuit, so Voc cannot be estimated")
		}
	}
	s.VocV = voc
	// Slope near short circuit: points up to 30 % of Voc (at least 3).
	var xs, ys []float64
	for k := 0; k < n && (p.v[k] <= 0.3*voc || len(xs) < 3); k++ {
		xs, ys = append(xs, p.v[k]), append(ys, p.i[k])
	}
	rmin, rmax := 2*voc/s.IscA, 1e6*voc/s.IscA
	s.ShortCircuitOhm = rmax
	if lf, ok := fitLine(xs, ys, nil); ok && lf.b > 0 {
		s.ShortCircuitOhm = math.Min(math.Max(1/lf.b, rmin), rmax)
	}
	// Slope near open circuit: the four points nearest Voc.
	idx := nearest(p.v, voc, 4)
	xs, ys = xs[:0], ys[:0]
	for _, k := range idx {
		xs, ys = append(xs, p.v[k]), append(ys, p.i[k])
	}
	s.OpenCircuitOhm = 0.1 * voc / s.IscA
	if lf, ok := fitLine(xs, ys, nil); ok && lf.b > 0 {
		s.OpenCircuitOhm = 1 / lf.b
	}
	f := litDataFigures(p)
	s.ImpA, s.VmpV = f.Imp, f.Vmp
	return s, nil
}

// nearest returns the indices of the k values of xs closest to x.
func nearest(xs []float64, x float64, k int) []int {
	var out []int
	used := make([]bool, len(xs))
	for len(out) < k && len(out) < len(xs) {
		b := -1
		for j := range xs {
			if !used[j] && (b < 0 || math.Abs(xs[j]-x) < math.Abs(xs[b]-x)) {
				b = j
			}
		}
		used[b] = true
		out = append(out, b)
	}
	return out
}

// litStarts makes FitLit's start points from the curve's values: for n on
// a grid over 1..2 (and around the explicit estimate below), Rsh from the
// slope at short circuit, Is from Voc (Is = (Isc - Voc/Rsh)/(exp(Voc/(n
// Vt)) - 1)), Rs from the slope at open circuit less the diode's own
// n Vt/(Isc + Is) (and a tenth of that), Iph = Isc (1 + Rs/Rsh); plus the
// explicit five-point method of Phang, Chan & Phillips, Electron. Lett. 20,
// 406 (1984) (from memory):
//
//	n Vt = (Vmp + Roc Imp - Voc) / (ln(Isc - Vmp/Rsh - Imp) - ln(Isc - Voc/Rsh) + Imp/(Isc - Voc/Rsh)),
//	Is = (Isc - Voc/Rsh) exp(-Voc/(n Vt)),  Rs = Roc - (n Vt/Is) exp(-Voc/(n Vt)),
//	Iph = Isc (1 + Rs/Rsh) + Is (exp(Isc Rs/(n Vt)) - 1).
//
// Starts that are not physical (a value not positive or not finite) and
// repeats are dropped.
func litStarts(s LitStartValues, vt float64) []LitDiode {
	isc, voc, rsh, roc := s.IscA, s.VocV, s.ShortCircuitOhm, s.OpenCircuitOhm
	il := isc - voc/rsh
	rsMin := 1e-4 * voc / isc
	var out []LitDiode
	add := func(d LitDiode) {
		for _, o := range out {
			if o == d {
				return
			}
		}
		if d.physical() {
			out = append(out, d)
		}
	}
	grid := func(n float64) {
		a := n * vt
		is := il / math.Expm1(voc/a)
		g := (il+is)/a + 1/rsh
		rs := math.Max(roc-1/g, rsMin)
		for _, r := range []float64{rs, math.Max(rs/10, rsMin)} {
			add(LitDiode{isc * (1 + r/rsh), is, n, r, rsh})
		}
	}
	for _, n := range []float64{1, 1.25, 1.5, 1.75, 2} {
		grid(n)
	}
	// Phang, Chan & Phillips (1984).
	imp, vmp := s.ImpA, s.VmpV
	den := math.Log(isc-vmp/rsh-imp) - math.Log(il) + imp/il
	a := (vmp + roc*imp - voc) / den
	if a > 0 && !math.IsInf(a, 0) {
		is := il * math.Exp(-voc/a)
		rs := math.Max(roc-a/is*math.Exp(-voc/a), rsMin)
		add(LitDiode{isc*(1+rs/rsh) + is*math.Expm1(isc*rs/a), is, a / vt, rs, rsh})
		if n := a / vt; n < 1 || n > 2 {
			// Outside the grid (a module of cells in series, say): a few
			// starts around it as well.
			grid(n * 0.8)
			grid(n * 1.25)
		}
	}
	return out
}
