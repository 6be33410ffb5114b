package solver

import (
	"math"
	"testing"

	"junco/physics"
)

// At every abrupt doping step the automatic mesh puts the step at the
// middle of a cell no wider than 0.2 of the heavy side's extrinsic Debye
// length sqrt(eps kT/(q^2 N)) (Sze & Ng 2007, eq. 2.27) plus one grading
// step (15 %: the cell holding the step is placed by equidistribution),
// on the automatic node count and on 16,000 nodes; with a forced coarse
// count (60 nodes) the step is still centred. Neighbouring cells differ
// by at most ~15 % plus the fading shift that centres the step (at most
// 1/16 of a cell: factor 1.25 overall; the grading rule, common
// practice). Cases: the p+n
// step Si 1e19/1e16 cm^-3 and a p 1e17 / n 1e16 / n+ 1e19 device whose
// high-low step is no junction.
func TestMeshResolvesAbruptSteps(t *testing.T) {
	si := material(t, "si")
	vt := physics.ThermalVoltage(300)
	ld := func(n float64) float64 { return math.Sqrt(si.Permittivity() * vt / (physics.Q * n)) }
	hl := Device{Material: si, Temperature: 300, Length: 30 * um, Profile: Profile{
		Acceptors: []Shape{Uniform{Concentration: 1e17 * cm3, From: math.Inf(-1), To: 5 * um}},
		Donors: []Shape{Uniform{Concentration: 1e16 * cm3, From: 5 * um, To: math.Inf(1)},
			Uniform{Concentration: 1e19 * cm3, From: 25 * um, To: math.Inf(1)}},
	}}
	cases := []struct {
		name  string
		dev   Device
		steps []float64 // positions, m
		heavy []float64 // heavy side's doping at each, m^-3
	}{
		{"p+n 1e19/1e16", stepDiode(si, 300, 1e19*cm3, 1e16*cm3, 8*um, 200*um), []float64{8 * um}, []float64{1e19 * cm3}},
		{"p/n/n+ 1e17/1e16/1e19", hl, []float64{5 * um, 25 * um}, []float64{1e17 * cm3, 1.001e19 * cm3}},
	}
	for _, c := range cases {
		for _, nodes := range []int{0, 16000, 60} {
			s := newSolver(t, c.dev, Options{Mesh: MeshOptions{Nodes: nodes, MaxReverseBias: 5}})
			x := s.Nodes()
			for i, st := range c.steps {
				k := 0
				for k+1 < len(x) && x[k+1] < st {
					k++
				}
				h := x[k+1] - x[k]
				if off := math.Abs(0.5*(x[k]+x[k+1]) - st); off > 1e-9*h {
					t.Errorf("%s, nodes %d: step at %.6g um is %.3g of its cell (%.3g nm) off the cell's middle", c.name, nodes, st/um, off/h, h*1e9)
				}
				if limit := 1.15 * meshStepDebye * ld(c.heavy[i]); nodes != 60 && h > limit {
					t.Errorf("%s, nodes %d: cell at the step at %.6g um is %.3g nm, over %.3g nm (0.2 L_D of the heavy side)", c.name, nodes, st/um, h*1e9, limit*1e9)
				}
			}
			worst := 0.0
			for i := 2; i < len(x); i++ {
				r := (x[i] - x[i-1]) / (x[i-1] - x[i-2])
				worst = math.Max(worst, math.Max(r, 1/r))
			}
			if nodes != 60 && worst > 1.25 {
				t.Errorf("%s, nodes %d: neighbouring cells differ by a factor %.3f", c.name, nodes, worst)
			}
			t.Logf("%s, nodes %d: %d nodes, worst neighbour ratio %.3f", c.name, nodes, len(x), worst)
		}
	}
}

// comb is a test shape: Concentration on the second quarter of every
// period between From and To, zero elsewhere (many abrupt steps at O(1)
// cost per evaluation).
type comb struct {
	Concentration, Period, From, To float64
}

func (c comb) At(x float64) float64 {
	if x < c.From || x >= c.To {
		return 0
	}
	f := math.Mod(x-c.From, c.Period) / c.Period
	if f >= 0.25 && f < 0.5 {
		return c.Concentration
	}
	return 0
}

func (c comb) Knots() []float64 {
	var k []float64
	for a := c.From; a < c.To; a += c.Period {
		k = append(k, a+0.25*c.Period, a+0.5*c.Period)
	}
	return k
}

func (c comb) Validate() error { return nil }

// A profile that asks for more cells than the cap (4000 thin n+ layers in
// the n region, each edge an abrupt step wanting cells of 0.2 L_D(1e19)) still gives a
// mesh of at most MaxNodes nodes, flagged as capped, with the auxiliary
// grid's smallest spacing coarsened from the finest tried (the grid stays
// within its budget of meshAuxBudget points per node of the cap).
func TestMeshAuxiliaryBudget(t *testing.T) {
	si := material(t, "si")
	const layers = 4000
	length := 200 * um
	p := StepProfile(1e16*cm3, 1e16*cm3, 10*um)
	p.Donors = append(p.Donors, comb{Concentration: 1e19 * cm3, Period: 180 * um / layers, From: 20 * um, To: length})
	d := Device{Material: si, Temperature: 300, Length: length, Profile: p}
	s := newSolver(t, d, Options{Mesh: MeshOptions{MaxNodes: 2000}})
	if n := len(s.Nodes()); n > 2000 {
		t.Errorf("%d nodes, cap 2000", n)
	}
	capped := false
	for _, f := range s.Flags() {
		capped = capped || f.Code == FlagMeshCapped
	}
	if !capped {
		t.Error("the capped mesh is not flagged")
	}
	e := &meshEnv{length: length, prof: p, eps: si.Permittivity(), vt: physics.ThermalVoltage(300), ni: si.Ni(300), temp: 300,
		lDiff: func(float64, float64) float64 { return 0 }}
	e.minFloor, e.maxFloor = meshFloors(length, MeshOptions{MaxNodes: 2000})
	e.steps = e.findSteps()
	if len(e.steps) < 2*layers-2 {
		t.Fatalf("%d steps found, want about %d", len(e.steps), 2*layers)
	}
	x, wanted := e.autoMesh(MeshOptions{MaxNodes: 2000}, nil)
	t.Logf("floor %.3g m (finest %.3g, coarsest %.3g), %d nodes, %d cells wanted", e.floor, e.minFloor, e.maxFloor, len(x), wanted)
	if !(e.floor > e.minFloor) || len(x) > 2000 || wanted < 2000 {
		t.Errorf("floor %.3g m (finest %.3g), %d nodes, %d cells wanted", e.floor, e.minFloor, len(x), wanted)
	}
}
