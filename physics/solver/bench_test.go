package solver

import (
	"context"
	"fmt"
	"testing"
)

// benchDevice is a silicon 1e16/1e15 cm^-3 step diode, 10 + 20 um.
func benchDevice(b testing.TB) Device {
	return stepDiode(material(b, "si"), 300, 1e16*cm3, 1e15*cm3, 10*um, 20*um)
}

// Equilibrium (nonlinear Poisson, damped Newton) of a 2000-node device.
func BenchmarkEquilibrium2000(b *testing.B) {
	s := newSolver(b, benchDevice(b), Options{Mesh: MeshOptions{Nodes: 2000}})
	b.ResetTimer()
	for range b.N {
		if _, _, err := s.solveEquilibrium(); err != nil {
			b.Fatal(err)
		}
	}
}

// New: automatic mesh and node parameters.
func BenchmarkNew(b *testing.B) {
	d := benchDevice(b)
	for range b.N {
		if _, err := New(d, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// An 81-point forward sweep 0 to 0.8 V in 10 mV steps on the automatic
// mesh, full results at every point.
func BenchmarkSweep81(b *testing.B) {
	s := newSolver(b, benchDevice(b), Options{})
	if _, err := s.Equilibrium(); err != nil {
		b.Fatal(err)
	}
	biases := make([]float64, 81)
	for i := range biases {
		biases[i] = 0.01 * float64(i)
	}
	b.ReportMetric(float64(len(s.Nodes())), "nodes")
	b.ResetTimer()
	for range b.N {
		if _, err := s.Sweep(context.Background(), biases, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// A 50-point C-V sweep 0 to -4.9 V (each point two solves dV = 5 mV apart).
func BenchmarkCV50(b *testing.B) {
	s := newSolver(b, benchDevice(b), Options{})
	if _, err := s.Equilibrium(); err != nil {
		b.Fatal(err)
	}
	biases := make([]float64, 50)
	for i := range biases {
		biases[i] = -0.1 * float64(i)
	}
	b.ReportMetric(float64(len(s.Nodes())), "nodes")
	b.ResetTimer()
	for range b.N {
		if _, err := s.CV(context.Background(), biases, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// One coupled Newton step (assembly, banded LU, solve) at 0.5 V for 1k to
// 8k nodes: the ns/node metric must stay flat (linear cost).
func BenchmarkNewtonStep(b *testing.B) {
	for _, n := range []int{1000, 2000, 4000, 8000} {
		b.Run(fmt.Sprintf("nodes=%d", n), func(b *testing.B) {
			s := newSolver(b, benchDevice(b), Options{Mesh: MeshOptions{Nodes: n}})
			tr, err := s.newTracker()
			if err != nil {
				b.Fatal(err)
			}
			if err := tr.advance(context.Background(), 0.5); err != nil {
				b.Fatal(err)
			}
			st, w := tr.cur.clone(), s.newWork()
			b.ResetTimer()
			for range b.N {
				s.assemble(st, w)
				if err := w.band.factor(); err != nil {
					b.Fatal(err)
				}
				for r := range w.dlt {
					w.dlt[r] = -w.f[r]
				}
				w.band.solve(w.dlt)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/node")
		})
	}
}

// A 40-point forward sweep 20 mV to 0.8 V in 20 mV steps of a silicon p+n
// diode (1e19/1e16 cm^-3, 5 + 100 um) on 1k to 16k nodes (the automatic
// spacing scaled): the ns/node/point metric must stay flat
// (linear cost, including the final polishing of the carriers). The
// Newton iterations and polishing sweeps per point are reported too: they
// do not depend on the load of the machine.
func BenchmarkSweepNodes(b *testing.B) {
	for _, n := range []int{1000, 2000, 4000, 8000, 16000} {
		b.Run(fmt.Sprintf("nodes=%d", n), func(b *testing.B) {
			d := stepDiode(material(b, "si"), 300, 1e19*cm3, 1e16*cm3, 5*um, 100*um)
			s := newSolver(b, d, Options{Mesh: MeshOptions{Nodes: n}})
			if _, err := s.Equilibrium(); err != nil {
				b.Fatal(err)
			}
			const points = 40
			iters, polish := 0, 0
			b.ResetTimer()
			for range b.N {
				tr, err := s.newTracker()
				if err != nil {
					b.Fatal(err)
				}
				for k := 1; k <= points; k++ {
					if err := tr.advance(context.Background(), 0.02*float64(k)); err != nil {
						b.Fatal(err)
					}
					s.result(tr.cur, tr.w, tr.iters, tr.upd, tr.res)
				}
				iters += tr.totalIters
				polish += tr.w.polishSweeps
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n*points), "ns/node/point")
			b.ReportMetric(float64(iters)/float64(b.N*points), "newton/point")
			b.ReportMetric(float64(polish)/float64(b.N*points), "polish/point")
		})
	}
}

// One reverse-bias solve as `junco solve --na 1e19 --nd 1e16 --bias -5V`
// does it (silicon p+n step, 8.2 + 204 um, automatic mesh refined for
// 5 V): mesh and node parameters, equilibrium, the bias point and one C-V
// point. The abrupt step's heavy side (Debye length 1.3 nm) sets the
// node count, reported as nodes.
func BenchmarkSolveOneSided(b *testing.B) {
	d := stepDiode(material(b, "si"), 300, 1e19*cm3, 1e16*cm3, 8.21*um, 204*um)
	nodes := 0
	for range b.N {
		s, err := New(d, Options{Mesh: MeshOptions{MaxReverseBias: 5}})
		if err != nil {
			b.Fatal(err)
		}
		if _, err := s.Solve(-5); err != nil {
			b.Fatal(err)
		}
		if _, err := s.CV(context.Background(), []float64{-5}, nil); err != nil {
			b.Fatal(err)
		}
		nodes = len(s.Nodes())
	}
	b.ReportMetric(float64(nodes), "nodes")
}
