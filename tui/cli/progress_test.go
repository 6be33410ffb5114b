package cli

import (
	"bytes"
	"strings"
	"testing"

	"junco/model"
)

// The progress line names the point just finished in its own quantity: a
// bias in volts for a sweep, a wavelength in metres (nm) for --qe. Before,
// the wavelength went through the bias and printed as "at 700.0 nV".
func TestProgressLineUnits(t *testing.T) {
	var b bytes.Buffer
	p := newProgressPrinter(&b, "QE")
	p.update(model.NumericProgress{Stage: "qe", Done: 1, Total: 1, Wavelength: 700e-9})
	if got := b.String(); !strings.Contains(got, "at 700.0 nm") {
		t.Errorf("QE progress %q, want the wavelength 700.0 nm", got)
	}
	b.Reset()
	p = newProgressPrinter(&b, "I-V")
	p.update(model.NumericProgress{Stage: "iv", Done: 1, Total: 1, Bias: 0.65})
	if got := b.String(); !strings.Contains(got, "at 650.0 mV") {
		t.Errorf("I-V progress %q, want the bias 650.0 mV", got)
	}
}
