package cli

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"junco/model/fit"
)

// The README's whole-characterisation example with --recovery and
// --check (invented demo measurements, readmeCardFiles): the storage time
// of the card's transient is reported beside the measured one, in text
// and JSON. By charge control the stored charge TT IF is gone after ts =
// TT ln(1 + IF/IR) (Sze & Ng, Physics of Semiconductor Devices, 3rd ed.,
// 2007, sec. 2.3.5), the measured 30 ns by construction of TT; the card's
// junction (depletion) charge must be removed too before the junction
// voltage falls through 0, so the simulated time is not shorter than that
// (within 1 %, the transient's step is ts/500) and, for this junction,
// not above twice it.
func TestFitCardCheckReportsStorageTime(t *testing.T) {
	if !fit.SimulatorInstalled() {
		t.Skip(fit.SimulatorProgram + " is not installed: the storage-time check is not run here (.ci/run installs it)")
	}
	iv, cv, rev, rec, _ := readmeCardFiles(t, t.TempDir())
	args := append(append([]string{"card", "--name", "D7", "--iv"}, iv...), "--cv", cv, "--reverse", rev, "--recovery", rec, "--check")
	_, out, errs := fitCall(append(args, "--json")...)
	var rep struct {
		Check struct {
			Error       string `json:"error"`
			StorageTime *struct {
				ForwardA   float64 `json:"forward_A"`
				ReverseA   float64 `json:"reverse_A"`
				MeasuredS  float64 `json:"measured_s"`
				SimulatedS float64 `json:"simulated_s"`
			} `json:"storage_time"`
		} `json:"check"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v: %s\n%s", err, errs, out)
	}
	st := rep.Check.StorageTime
	if st == nil {
		t.Fatalf("no check.storage_time (check error %q):\n%s", rep.Check.Error, out)
	}
	t.Logf("storage time: measured %g s, card %g s", st.MeasuredS, st.SimulatedS)
	if st.ForwardA != 10e-3 || st.ReverseA != 5e-3 || math.Abs(st.MeasuredS-30e-9) > 1e-20 {
		t.Errorf("recovery conditions %+v, want IF 10 mA, IR 5 mA, ts 30 ns (the recovery file)", *st)
	}
	if r := st.SimulatedS / st.MeasuredS; !(r > 0.99 && r < 2) {
		t.Errorf("simulated storage time %g s is %g times the measured %g s", st.SimulatedS, r, st.MeasuredS)
	}
	_, text, _ := fitCall(args...)
	if !strings.Contains(text, "  storage time: IF 10.0 mA to IR 5.00 mA: measured 30.0 ns, card ") {
		t.Errorf("no storage-time line in\n%s", text)
	}
}
