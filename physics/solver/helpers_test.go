package solver

import (
	"math"
	"testing"

	"junco/physics"
)

// Trade units used to write test devices (exact definitions).
const (
	cm3 = 1e6  // cm^-3 -> m^-3
	um  = 1e-6 // um -> m
)

func material(t testing.TB, name string) *physics.Material {
	t.Helper()
	m, err := physics.MaterialByName(name)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// stepDiode is an abrupt p+n or pn junction, anode at x = 0.
func stepDiode(m *physics.Material, temp, na, nd, lp, ln float64) Device {
	return Device{Material: m, Temperature: temp, Length: lp + ln, Profile: StepProfile(na, nd, lp)}
}

func newSolver(t testing.TB, d Device, o Options) *Solver {
	t.Helper()
	s, err := New(d, o)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// analyticStatic prepares the analytic model of a step diode whose
// quasi-neutral widths are the region lengths minus the depletion edges at
// bias v (computed from the analytic model itself), with ohmic contacts.
func analyticStatic(t testing.TB, m *physics.Material, temp, na, nd, lp, ln, v float64) (*physics.Static, physics.Point) {
	t.Helper()
	d := physics.Device{Material: m, Na: na, Nd: nd, Temperature: temp, Area: 1, Wp: lp, Wn: ln,
		Sp: math.Inf(1), Sn: math.Inf(1)}
	st, err := d.Prepare()
	if err != nil {
		t.Fatal(err)
	}
	dep := st.At(v).Depletion
	d.Wp, d.Wn = lp-dep.Xp, ln-dep.Xn
	if st, err = d.Prepare(); err != nil {
		t.Fatal(err)
	}
	return st, st.At(v)
}

// relErr returns |a/b - 1|.
func relErr(a, b float64) float64 { return math.Abs(a/b - 1) }
