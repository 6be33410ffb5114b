package tui

import (
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"

	"junco/model"
)

// Text that is not accepted never puts a valid prefix of it in force:
// while it is on screen, and after enter, the value in force is the one
// from before editing began, and the panel says so.
func TestInvalidEditKeepsValueFromBefore(t *testing.T) {
	cases := []struct {
		name, step string
		down       int
		text       string
		get        func(model.Spec) float64
	}{
		{"temperature in Fahrenheit", "5", 0, "80F", func(s model.Spec) float64 { return s.Temperature }},
		{"voltage in a temperature", "5", 0, "650mV", func(s model.Spec) float64 { return s.Temperature }},
		{"area in a width", "3", 1, "1mm2", func(s model.Spec) float64 { return s.PWidth }},
		{"bias out of range", "5", 1, "-200kV", func(s model.Spec) float64 { return s.Bias }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := newTest(t, 120, 40)
			before := c.get(m.Spec())
			beforeRes := m.Result()
			m = editField(m, c.step, c.down, c.text)
			if got := c.get(m.Spec()); got != before {
				t.Errorf("typing %q: %g in force, want %g from before editing", c.text, got, before)
			}
			if m.Result() != beforeRes {
				t.Errorf("typing %q: the results were recomputed for a prefix of it", c.text)
			}
			if v := flat(ansi.Strip(m.form.View())); !strings.Contains(v, "the value from before editing") {
				t.Errorf("typing %q: the panel does not say the value from before editing is in force:\n%s", c.text, plain(m))
			}
			m = press(m, "enter")
			if got := c.get(m.Spec()); got != before {
				t.Errorf("after enter on %q: %g in force, want %g", c.text, got, before)
			}
		})
	}
}
