// Package fittest makes the invented data files that the tests of the fit
// layer and of its front ends fit: a model's curve sampled over a bias
// sweep with fixed-seed noise. They are test data, not measurements. It is
// imported by tests only and imports nothing of the project.
package fittest

import (
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Sweep is an invented sweep: Points biases evenly from From to To (V),
// at each the model's value with one draw of normal noise, written as
// text rows under Head.
type Sweep struct {
	// Head holds the comment lines and the header row, each ended by a
	// newline.
	Head string
	// From and To are the first and last bias, V; Points their number
	// (at least 2).
	From, To float64
	Points   int
	// Model is the noiseless value at bias v, in SI units (A, F).
	Model func(v float64) float64
	// Rel is the relative (multiplicative) noise, Abs the absolute noise
	// in SI units, each one standard deviation; one of them is used, Rel
	// when it is not zero.
	Rel, Abs float64
	// Negate writes the value with its sign changed (after the noise): the
	// generator sign of a lit curve.
	Negate bool
	// Seed seeds the noise (PCG).
	Seed [2]uint64
	// Scale converts the SI value to the column's unit (1e3 for mA, 1e12
	// for pF); 0 means 1.
	Scale float64
	// Row formats a row from the bias and the scaled value, with any
	// fixed columns after them, e.g. "%.4f,%.6e,0\n".
	Row string
}

// Values returns the biases (V) and the noisy values (SI, sign changed
// with Negate), for a data set made in memory.
func (s Sweep) Values() (vs, ys []float64) {
	rng := rand.New(rand.NewPCG(s.Seed[0], s.Seed[1]))
	vs, ys = make([]float64, s.Points), make([]float64, s.Points)
	for k := range vs {
		v := s.From + (s.To-s.From)*float64(k)/float64(s.Points-1)
		y := s.Model(v)
		if s.Rel != 0 {
			y *= 1 + s.Rel*rng.NormFloat64()
		} else {
			y += s.Abs * rng.NormFloat64()
		}
		if s.Negate {
			y = -y
		}
		vs[k], ys[k] = v, y
	}
	return vs, ys
}

// Text returns the file's text: Head, then a row per point with the value
// in the column's unit.
func (s Sweep) Text() string {
	scale := s.Scale
	if scale == 0 {
		scale = 1
	}
	vs, ys := s.Values()
	var b strings.Builder
	b.WriteString(s.Head)
	for k, v := range vs {
		fmt.Fprintf(&b, s.Row, v, ys[k]*scale)
	}
	return b.String()
}

// Write writes the file at path (creating its folder) and returns path.
func (s Sweep) Write(t testing.TB, path string) string {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(s.Text()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}
