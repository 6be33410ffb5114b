package solver

import "math"

// solverError is a constant error value of the package's internal solvers.
type solverError string

func (e solverError) Error() string { return string(e) }

// errSingular is returned by the linear solvers for a zero pivot.
const errSingular = solverError("singular Jacobian")

// bandLU is a square banded matrix with kl sub- and ku super-diagonals in
// the column-major band storage of LAPACK's dgbtrf (room for the kl extra
// super-diagonals that partial pivoting creates), and its LU factors.
//
// Method: Gaussian elimination with partial (row) pivoting restricted to
// the band, as LAPACK dgbtf2/dgbtrs (E. Anderson et al., LAPACK Users'
// Guide, 3rd ed., SIAM 1999). Cost O(n kl (kl + ku)) per factorisation and
// O(n (2 kl + ku)) per solve: linear in n.
type bandLU struct {
	n, kl, ku, ld int
	ab            []float64
	piv           []int
}

func newBandLU(n, kl, ku int) *bandLU {
	ld := 2*kl + ku + 1
	return &bandLU{n: n, kl: kl, ku: ku, ld: ld, ab: make([]float64, n*ld), piv: make([]int, n)}
}

// reset zeroes the matrix.
func (b *bandLU) reset() { clear(b.ab) }

// idx returns the storage index of A[i][j] (requires -ku-kl <= j-i <= kl).
func (b *bandLU) idx(i, j int) int { return j*b.ld + b.kl + b.ku + i - j }

// add adds v to A[i][j]; j-i must be within [-ku, kl].
func (b *bandLU) add(i, j int, v float64) { b.ab[b.idx(i, j)] += v }

// set sets A[i][j]; j-i must be within [-ku, kl].
func (b *bandLU) set(i, j int, v float64) { b.ab[b.idx(i, j)] = v }

// get returns A[i][j] within the original band.
func (b *bandLU) get(i, j int) float64 {
	if j-i > b.ku || i-j > b.kl || j < 0 || j >= b.n {
		return 0
	}
	return b.ab[b.idx(i, j)]
}

// scaleRow multiplies row i (original band) by s.
func (b *bandLU) scaleRow(i int, s float64) {
	lo, hi := max(0, i-b.kl), min(b.n-1, i+b.ku)
	base := b.idx(i, lo)
	step := b.ld - 1
	for j := lo; j <= hi; j++ {
		b.ab[base] *= s
		base += step
	}
}

// rowMax returns the largest magnitude in row i of the original band.
func (b *bandLU) rowMax(i int) float64 {
	lo, hi := max(0, i-b.kl), min(b.n-1, i+b.ku)
	m := 0.0
	base := b.idx(i, lo)
	step := b.ld - 1 // moving one column right within a row
	for j := lo; j <= hi; j++ {
		v := b.ab[base]
		if v < 0 {
			v = -v
		}
		if v > m || v != v {
			m = v
		}
		base += step
	}
	return m
}

// factor computes the LU factorisation in place.
func (b *bandLU) factor() error {
	n, kl, ku, ld := b.n, b.kl, b.ku, b.ld
	kv := kl + ku
	ab := b.ab
	// Zero the fill-in rows of the first ku+1 columns (dgbtf2 does the same).
	for j := 0; j < n; j++ {
		for i := 0; i < kl; i++ {
			ab[j*ld+i] = 0
		}
	}
	ju := 0
	for j := 0; j < n; j++ {
		km := min(kl, n-1-j)
		col := j * ld
		// Pivot search in column j, rows j..j+km.
		jp, best := 0, math.Abs(ab[col+kv])
		for t := 1; t <= km; t++ {
			if a := math.Abs(ab[col+kv+t]); a > best {
				jp, best = t, a
			}
		}
		b.piv[j] = j + jp
		if best == 0 || math.IsNaN(best) {
			return errSingular
		}
		ju = max(ju, min(j+ku+jp, n-1))
		if jp != 0 {
			for c := j; c <= ju; c++ {
				p, q := c*ld+kv+j-c, c*ld+kv+j+jp-c
				ab[p], ab[q] = ab[q], ab[p]
			}
		}
		inv := 1 / ab[col+kv]
		for t := 1; t <= km; t++ {
			ab[col+kv+t] *= inv
		}
		for c := j + 1; c <= ju; c++ {
			cc := c * ld
			u := ab[cc+kv+j-c]
			if u == 0 {
				continue
			}
			base := cc + kv + j - c
			for t := 1; t <= km; t++ {
				ab[base+t] -= ab[col+kv+t] * u
			}
		}
	}
	return nil
}

// solve overwrites rhs with the solution of A x = rhs using the factors.
func (b *bandLU) solve(rhs []float64) {
	n, kl, ku, ld := b.n, b.kl, b.ku, b.ld
	kv := kl + ku
	ab := b.ab
	for j := 0; j < n; j++ {
		if p := b.piv[j]; p != j {
			rhs[j], rhs[p] = rhs[p], rhs[j]
		}
		km := min(kl, n-1-j)
		v := rhs[j]
		if v == 0 {
			continue
		}
		col := j * ld
		for t := 1; t <= km; t++ {
			rhs[j+t] -= ab[col+kv+t] * v
		}
	}
	for j := n - 1; j >= 0; j-- {
		col := j * ld
		rhs[j] /= ab[col+kv]
		v := rhs[j]
		if v == 0 {
			continue
		}
		lo := max(0, j-kv)
		for i := lo; i < j; i++ {
			rhs[i] -= ab[col+kv+i-j] * v
		}
	}
}

// solveTridiagonal solves the tridiagonal system with sub-diagonal a
// (a[0] unused), diagonal b and super-diagonal c (c[n-1] unused) for
// right-hand side d, overwriting d with the solution; w is scratch of
// length n. Method: Thomas algorithm (no pivoting; stable for the
// diagonally dominant M-matrices of the box-discretised Poisson and
// Scharfetter-Gummel continuity equations). Source: e.g. G. H. Golub,
// C. F. Van Loan, Matrix Computations, 4th ed. (2013), section 4.3.
func solveTridiagonal(a, b, c, d, w []float64) error {
	n := len(b)
	if b[0] == 0 {
		return errSingular
	}
	w[0] = c[0] / b[0]
	d[0] /= b[0]
	for i := 1; i < n; i++ {
		den := b[i] - a[i]*w[i-1]
		if den == 0 || math.IsNaN(den) {
			return errSingular
		}
		if i < n-1 {
			w[i] = c[i] / den
		}
		d[i] = (d[i] - a[i]*d[i-1]) / den
	}
	for i := n - 2; i >= 0; i-- {
		d[i] -= w[i] * d[i+1]
	}
	return nil
}
