package extract

import "math"

// lineFit is a weighted least-squares straight line y = a + b x.
type lineFit struct {
	a, b       float64 // intercept, slope
	va, vb, ab float64 // variances of a and b, covariance of a and b
	s2         float64 // weighted residual variance, sum w r^2 / (n - 2)
	n          int
}

// fitLine fits y = a + b x by weighted least squares with weights w (nil =
// unit weights), using centred sums for numerical stability. The
// covariances use the residual variance s^2 (weights relative, not absolute).
// Source: Draper & Smith, Applied Regression Analysis, 3rd ed. (1998),
// ch. 1 and 9.
func fitLine(x, y, w []float64) (lineFit, bool) {
	n := len(x)
	if n < 2 || len(y) != n {
		return lineFit{}, false
	}
	sw, sx, sy := 0.0, 0.0, 0.0
	for i := 0; i < n; i++ {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		sw += wi
		sx += wi * x[i]
		sy += wi * y[i]
	}
	if !(sw > 0) {
		return lineFit{}, false
	}
	xm, ym := sx/sw, sy/sw
	sxx, sxy := 0.0, 0.0
	for i := 0; i < n; i++ {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		dx := x[i] - xm
		sxx += wi * dx * dx
		sxy += wi * dx * (y[i] - ym)
	}
	if !(sxx > 0) {
		return lineFit{}, false
	}
	f := lineFit{n: n}
	f.b = sxy / sxx
	f.a = ym - f.b*xm
	if n > 2 {
		ss := 0.0
		for i := 0; i < n; i++ {
			wi := 1.0
			if w != nil {
				wi = w[i]
			}
			r := y[i] - f.a - f.b*x[i]
			ss += wi * r * r
		}
		f.s2 = ss / float64(n-2)
		f.vb = f.s2 / sxx
		f.va = f.s2 * (1/sw + xm*xm/sxx)
		f.ab = -xm * f.s2 / sxx
	} else {
		f.vb, f.va, f.ab = math.NaN(), math.NaN(), math.NaN()
	}
	return f, true
}
