package cli

import (
	"strings"
	"testing"
)

// A bias sweep is held to the bias range of a Spec (-100 kV to 20 V),
// as --bias is: `calc --sweep 0:1e30:1e26` (100001 points, within the
// point cap) used to print currents of 6e29 A at 1e30 V instead of an
// error naming the field and the range.
func TestCalcSweepOutsideBiasRange(t *testing.T) {
	for _, sweep := range []string{"0:1e30:1e26", "0:30:1", "-200kV:0:1kV"} {
		code, out, errs := runCLI(t, "calc", "--sweep", sweep)
		if code != exitUsage || out != "" || !strings.Contains(errs, "--sweep") || !strings.Contains(errs, "-100 kV to 20 V") {
			t.Errorf("--sweep %s: exit %d, stderr %q; want 2 naming --sweep and -100 kV to 20 V", sweep, code, errs)
		}
	}
	if code, _, errs := runCLI(t, "calc", "--sweep", "-100kV:20V:1kV", "--csv"); code != 0 {
		t.Errorf("a sweep at the ends of the range: exit %d: %s", code, errs)
	}
}
