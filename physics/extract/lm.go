package extract

import (
	"context"
	"math"
)

// cancelCheckEvery is how many points a model evaluation computes between
// checks of its context (a power of two).
const cancelCheckEvery = 4096

// lmProblem is a nonlinear least-squares problem min sum r_i(theta)^2 with
// m residuals and p parameters. eval fills r (length m) and, when jac is not
// nil, the row-major Jacobian dr_i/dtheta_j (m x p); it reports false when
// the model is not finite at theta (the step is then rejected).
//
// When jacobian is set, eval is only asked for residuals (jac nil) and
// jacobian fills the Jacobian at the theta of the last successful eval
// (it may reuse what that eval computed): the Jacobian of a step that is
// rejected is then never formed.
type lmProblem struct {
	m, p     int
	eval     func(theta, r, jac []float64) bool
	jacobian func(theta, jac []float64)
}

// evalJ evaluates the residuals and the Jacobian at theta.
func (pr *lmProblem) evalJ(theta, r, jac []float64) bool {
	if pr.jacobian == nil {
		return pr.eval(theta, r, jac)
	}
	if !pr.eval(theta, r, nil) {
		return false
	}
	pr.jacobian(theta, jac)
	return true
}

type lmResult struct {
	theta     []float64
	cost      float64   // sum of squared residuals at theta
	resid     []float64 // the residuals at theta (m)
	jtj       []float64 // J^T J at theta, p x p
	cov       []float64 // s^2 (J^T J)^-1, p x p; nil when singular
	iter      int
	converged bool
}

// levenberg minimises the problem by the Levenberg-Marquardt method with
// Marquardt's diagonal scaling: each step solves
// (J^T J + lambda diag(J^T J)) d = -J^T r, accepting it when the cost falls
// and adapting lambda. Steps are limited to maxStep in every component
// (parameters are logarithms here, so this bounds each factor change).
// Source: Levenberg, Q. Appl. Math. 2, 164 (1944); Marquardt, J. SIAM 11,
// 431 (1963); Nocedal & Wright, Numerical Optimization, 2nd ed. (2006),
// sec. 10.3. The context is checked before every evaluation; a cancelled
// context ends the iteration with ctx.Err() (eval may also return false
// when it sees the cancellation part-way).
func levenberg(ctx context.Context, pr lmProblem, theta0 []float64, maxIter int) (lmResult, error) {
	m, p := pr.m, pr.p
	// One allocation for the work arrays; the Jacobian of a trial step
	// needs its own array only when eval forms it (no jacobian).
	njt := m * p
	if pr.jacobian != nil {
		njt = 0
	}
	buf := make([]float64, 4*p+2*m+m*p+njt+2*p*p)
	take := func(n int) []float64 {
		s := buf[:n:n]
		buf = buf[n:]
		return s
	}
	theta, trial, g, d := take(p), take(p), take(p), take(p)
	copy(theta, theta0)
	r, rt := take(m), take(m)
	jac, jt := take(m*p), take(njt)
	a, aa := take(p*p), take(p*p)
	if err := ctx.Err(); err != nil {
		return lmResult{}, err
	}
	if !pr.evalJ(theta, r, jac) {
		if err := ctx.Err(); err != nil {
			return lmResult{}, err
		}
		return lmResult{}, ErrNoConvergence
	}
	cost := sumSq(r)
	if math.IsNaN(cost) || math.IsInf(cost, 0) {
		return lmResult{}, ErrNoConvergence
	}
	lambda := 1e-3
	const maxStep = 3.0
	res := lmResult{}
	iter := 0
	for ; iter < maxIter; iter++ {
		normal(jac, r, m, p, a, g)
		accepted := false
		for lambda <= 1e14 {
			copy(aa, a)
			dmax := 0.0
			for j := 0; j < p; j++ {
				dmax = math.Max(dmax, a[j*p+j])
			}
			for j := 0; j < p; j++ {
				aa[j*p+j] += lambda * math.Max(a[j*p+j], 1e-12*dmax+1e-300)
			}
			for j := range g {
				d[j] = -g[j]
			}
			if !cholSolve(aa, d, p) {
				lambda *= 10
				continue
			}
			big := 0.0
			for _, v := range d {
				big = math.Max(big, math.Abs(v))
			}
			if big > maxStep {
				for j := range d {
					d[j] *= maxStep / big
				}
			}
			for j := range trial {
				trial[j] = theta[j] + d[j]
			}
			if err := ctx.Err(); err != nil {
				return lmResult{}, err
			}
			var jtrial []float64
			if pr.jacobian == nil {
				jtrial = jt
			}
			if pr.eval(trial, rt, jtrial) {
				ct := sumSq(rt)
				if ct <= cost && !math.IsNaN(ct) {
					if pr.jacobian != nil {
						pr.jacobian(trial, jac) // the step is taken: jac is not needed
					} else {
						jac, jt = jt, jac
					}
					small := big < 1e-10 || cost-ct <= 1e-13*cost
					theta, trial = trial, theta
					r, rt = rt, r
					cost = ct
					lambda = math.Max(lambda/5, 1e-12)
					accepted = true
					if small {
						res.converged = true
					}
					break
				}
			}
			lambda *= 5
		}
		if !accepted {
			// No descent direction improves the cost: theta is a minimum to
			// working precision.
			res.converged = true
		}
		if res.converged {
			break
		}
	}
	normal(jac, r, m, p, a, g)
	res.theta, res.cost, res.iter, res.resid = theta, cost, iter+1, r
	res.jtj = append([]float64(nil), a...)
	if m > p {
		if inv, ok := cholInverse(a, p); ok {
			s2 := cost / float64(m-p)
			for k := range inv {
				inv[k] *= s2
			}
			res.cov = inv
		}
	}
	return res, nil
}

func sumSq(r []float64) float64 {
	s := 0.0
	for _, v := range r {
		s += v * v
	}
	return s
}

// normal forms a = J^T J and g = J^T r.
func normal(jac, r []float64, m, p int, a, g []float64) {
	if p == 4 {
		normal4(jac, r, m, a, g)
		return
	}
	for k := range a {
		a[k] = 0
	}
	for k := range g {
		g[k] = 0
	}
	for i := 0; i < m; i++ {
		row := jac[i*p : i*p+p]
		for j := 0; j < p; j++ {
			g[j] += row[j] * r[i]
			for k := 0; k <= j; k++ {
				a[j*p+k] += row[j] * row[k]
			}
		}
	}
	for j := 0; j < p; j++ {
		for k := 0; k < j; k++ {
			a[k*p+j] = a[j*p+k]
		}
	}
}

// cholSolve solves a x = b in place (b becomes x) for symmetric positive
// definite a (p x p, overwritten by its Cholesky factor). It reports false
// when a is not positive definite.
func cholSolve(a, b []float64, p int) bool {
	if !chol(a, p) {
		return false
	}
	for i := 0; i < p; i++ {
		s := b[i]
		for k := 0; k < i; k++ {
			s -= a[i*p+k] * b[k]
		}
		b[i] = s / a[i*p+i]
	}
	for i := p - 1; i >= 0; i-- {
		s := b[i]
		for k := i + 1; k < p; k++ {
			s -= a[k*p+i] * b[k]
		}
		b[i] = s / a[i*p+i]
	}
	return true
}

// chol replaces the lower triangle of a by L with a = L L^T.
func chol(a []float64, p int) bool {
	for j := 0; j < p; j++ {
		s := a[j*p+j]
		for k := 0; k < j; k++ {
			s -= a[j*p+k] * a[j*p+k]
		}
		if !(s > 0) || math.IsInf(s, 0) {
			return false
		}
		l := math.Sqrt(s)
		a[j*p+j] = l
		for i := j + 1; i < p; i++ {
			t := a[i*p+j]
			for k := 0; k < j; k++ {
				t -= a[i*p+k] * a[j*p+k]
			}
			a[i*p+j] = t / l
		}
	}
	return true
}

// cholInverse returns the inverse of the symmetric positive definite matrix
// a (left unchanged) scaled by its diagonal for conditioning, or false when
// it is singular to working precision.
func cholInverse(a []float64, p int) ([]float64, bool) {
	sc := make([]float64, p)
	w := make([]float64, p*p)
	for j := 0; j < p; j++ {
		if !(a[j*p+j] > 0) {
			return nil, false
		}
		sc[j] = 1 / math.Sqrt(a[j*p+j])
	}
	for i := 0; i < p; i++ {
		for j := 0; j < p; j++ {
			w[i*p+j] = a[i*p+j] * sc[i] * sc[j]
		}
	}
	if !chol(w, p) {
		return nil, false
	}
	// Reject near-singular matrices: the scaled matrix has unit diagonal,
	// so its smallest pivot squared bounds the reciprocal condition number.
	for j := 0; j < p; j++ {
		if w[j*p+j]*w[j*p+j] < 1e-13 {
			return nil, false
		}
	}
	inv := make([]float64, p*p)
	col := make([]float64, p)
	for j := 0; j < p; j++ {
		for i := range col {
			col[i] = 0
		}
		col[j] = 1
		for i := 0; i < p; i++ {
			s := col[i]
			for k := 0; k < i; k++ {
				s -= w[i*p+k] * col[k]
			}
			col[i] = s / w[i*p+i]
		}
		for i := p - 1; i >= 0; i-- {
			s := col[i]
			for k := i + 1; k < p; k++ {
				s -= w[k*p+i] * col[k]
			}
			col[i] = s / w[i*p+i]
		}
		for i := 0; i < p; i++ {
			inv[i*p+j] = col[i] * sc[i] * sc[j]
		}
	}
	return inv, true
}

// Correlation is the correlation coefficient r between two fitted
// parameters, from the covariance matrix: r = C_ab / sqrt(C_aa C_bb).
// Reported when |r| > 0.9, where the two are poorly separated by the data
// (common practice; Bates & Watts 1988, sec. 2.3).
type Correlation struct {
	A, B string  // parameter names
	R    float64 // correlation coefficient, -1..1
}

// strongCorrelations lists pairs with |r| > 0.9 from a p x p covariance.
func strongCorrelations(cov []float64, names []string) []Correlation {
	p := len(names)
	if cov == nil {
		return nil
	}
	var out []Correlation
	for i := 0; i < p; i++ {
		for j := i + 1; j < p; j++ {
			den := math.Sqrt(cov[i*p+i] * cov[j*p+j])
			if !(den > 0) {
				continue
			}
			r := cov[i*p+j] / den
			if math.Abs(r) > 0.9 {
				out = append(out, Correlation{A: names[i], B: names[j], R: r})
			}
		}
	}
	return out
}

// normal4 is normal for p = 4 with the ten sums of J^T J and the four of
// J^T r in registers; it adds the same products in the same order, so the
// result is the same to the last bit.
func normal4(jac, r []float64, m int, a, g []float64) {
	var a00, a10, a11, a20, a21, a22, a30, a31, a32, a33, g0, g1, g2, g3 float64
	jac = jac[:4*m]
	r = r[:m]
	for i, ri := range r {
		row := jac[4*i : 4*i+4 : 4*i+4]
		j0, j1, j2, j3 := row[0], row[1], row[2], row[3]
		g0 += j0 * ri
		a00 += j0 * j0
		g1 += j1 * ri
		a10 += j1 * j0
		a11 += j1 * j1
		g2 += j2 * ri
		a20 += j2 * j0
		a21 += j2 * j1
		a22 += j2 * j2
		g3 += j3 * ri
		a30 += j3 * j0
		a31 += j3 * j1
		a32 += j3 * j2
		a33 += j3 * j3
	}
	copy(a[:16], []float64{
		a00, a10, a20, a30,
		a10, a11, a21, a31,
		a20, a21, a22, a32,
		a30, a31, a32, a33})
	g[0], g[1], g[2], g[3] = g0, g1, g2, g3
}
