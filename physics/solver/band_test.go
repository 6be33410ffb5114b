package solver

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The banded LU must reproduce a dense LU solve (gonum's mat.Dense.Solve,
// LAPACK dgetrf/dgetrs) on random banded systems, including one whose
// diagonal is zero so that partial pivoting is required.
func TestBandLUMatchesDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tc := range []struct {
		n, kl, ku int
		zeroDiag  bool
	}{{12, 5, 5, false}, {30, 5, 5, true}, {7, 2, 1, false}, {40, 1, 3, true}} {
		b := newBandLU(tc.n, tc.kl, tc.ku)
		dense := mat.NewDense(tc.n, tc.n, nil)
		for i := 0; i < tc.n; i++ {
			for j := max(0, i-tc.kl); j <= min(tc.n-1, i+tc.ku); j++ {
				v := rng.Float64()*2 - 1
				if i == j && tc.zeroDiag {
					v = 0
				}
				b.set(i, j, v)
				dense.Set(i, j, v)
			}
		}
		rhs := make([]float64, tc.n)
		for i := range rhs {
			rhs[i] = rng.Float64()
		}
		var want mat.VecDense
		if err := want.SolveVec(dense, mat.NewVecDense(tc.n, append([]float64(nil), rhs...))); err != nil {
			t.Fatalf("dense solve: %v", err)
		}
		if err := b.factor(); err != nil {
			t.Fatalf("band factor: %v", err)
		}
		got := append([]float64(nil), rhs...)
		b.solve(got)
		for i := range got {
			if math.Abs(got[i]-want.AtVec(i)) > 1e-10*math.Max(1, math.Abs(want.AtVec(i))) {
				t.Errorf("n=%d kl=%d ku=%d: x[%d] = %g, dense %g", tc.n, tc.kl, tc.ku, i, got[i], want.AtVec(i))
			}
		}
	}
}

// A singular band matrix must be reported, not solved.
func TestBandLUSingular(t *testing.T) {
	b := newBandLU(4, 1, 1)
	b.set(0, 0, 1)
	b.set(1, 1, 1)
	b.set(3, 3, 1) // row 2 is zero
	if err := b.factor(); err == nil {
		t.Fatal("factor of a matrix with a zero row succeeded")
	}
}

// Thomas algorithm against the dense solve on a diagonally dominant system.
func TestTridiagonal(t *testing.T) {
	n := 9
	a, b, c, d := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	dense := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		b[i] = 4 + float64(i)
		dense.Set(i, i, b[i])
		if i > 0 {
			a[i] = -1 - 0.1*float64(i)
			dense.Set(i, i-1, a[i])
		}
		if i < n-1 {
			c[i] = -2 + 0.05*float64(i)
			dense.Set(i, i+1, c[i])
		}
		d[i] = math.Sin(float64(i))
	}
	var want mat.VecDense
	if err := want.SolveVec(dense, mat.NewVecDense(n, append([]float64(nil), d...))); err != nil {
		t.Fatal(err)
	}
	if err := solveTridiagonal(a, b, c, d, make([]float64, n)); err != nil {
		t.Fatal(err)
	}
	for i := range d {
		if math.Abs(d[i]-want.AtVec(i)) > 1e-13 {
			t.Errorf("x[%d] = %g, dense %g", i, d[i], want.AtVec(i))
		}
	}
}
