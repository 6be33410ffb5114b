package tui

import (
	"errors"
	"fmt"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
)

// sweepFields names the inputs of the current chart's sweep.
func (c chartModel) sweepFields() (labels []string, kinds []model.Kind, values []float64) {
	switch c.kind().sweep {
	case sweepIV:
		return []string{"from", "to", "step"}, []model.Kind{model.Voltage, model.Voltage, model.Voltage}, []float64{c.iv.From, c.iv.To, c.iv.Step}
	case sweepCV:
		return []string{"from", "to", "step"}, []model.Kind{model.Voltage, model.Voltage, model.Voltage}, []float64{c.cv.From, c.cv.To, c.cv.Step}
	case sweepTemp:
		return []string{"from", "to", "step", "VF at"}, []model.Kind{model.Temperature, model.Temperature, model.Temperature, model.Current},
			[]float64{c.temp.From, c.temp.To, c.temp.Step, c.iF}
	}
	return nil, nil, nil
}

func (c *chartModel) startEditing() {
	_, kinds, vals := c.sweepFields()
	if len(kinds) == 0 {
		c.editErr = "this chart is drawn at the bias set under Define, step 5 (Conditions)"
		return
	}
	c.editing, c.row, c.editErr = true, 0, ""
	c.eds = make([]lineEditor, len(kinds))
	for i := range kinds {
		c.eds[i] = newLineEditor(model.EditText(kinds[i], vals[i]))
	}
}

func (c chartModel) updateEditing(km tea.KeyMsg) (chartModel, tea.Cmd) {
	k := c.e.keys
	s := km.String()
	switch {
	case keyIs(km, k.Cancel):
		c.editing, c.editErr = false, ""
		return c, nil
	case keyIs(km, k.Apply):
		if err := c.applySweep(); err != nil {
			c.editErr = err.Error()
			return c, nil
		}
		c.editing, c.editErr = false, ""
		c.view = fullView()
		return c, c.request()
	case s == "tab" || s == "down":
		c.row = (c.row + 1) % len(c.eds)
		return c, nil
	case s == "shift+tab" || s == "up":
		c.row = (c.row + len(c.eds) - 1) % len(c.eds)
		return c, nil
	}
	if c.row >= 0 && c.row < len(c.eds) {
		c.eds[c.row].handle(km)
	}
	return c, nil
}

// applySweep parses and checks the sweep inputs and puts them in force.
func (c *chartModel) applySweep() error {
	labels, kinds, _ := c.sweepFields()
	// One sweep parser for the command line and the workbench; the step is
	// a difference (10 C is 10 K) and the points are counted before any
	// memory is taken.
	r, err := model.ParseSweepParts(kinds[0], c.eds[0].value(), c.eds[1].value(), c.eds[2].value(), maxChartPoints)
	if err != nil {
		return err
	}
	vals := []float64{r.From, r.To, r.Step}
	for i := 3; i < len(kinds); i++ {
		v, err := model.ParseValue(kinds[i], c.eds[i].value())
		if err != nil {
			return fmt.Errorf("sweep %s: %v", labels[i], err)
		}
		vals = append(vals, v)
	}
	if n, _ := r.Count(maxChartPoints); n < 2 {
		return errors.New("the sweep needs at least two points: widen it or choose a smaller step")
	}
	// The ends must be values the junction accepts.
	field := model.FieldBias
	if c.kind().sweep == sweepTemp {
		field = model.FieldTemperature
	}
	for i, v := range []float64{r.From, r.To} {
		s := c.spec
		if field == model.FieldBias {
			s.Bias = v
		} else {
			s.Temperature = v
		}
		if err := s.Validate(); err != nil {
			var ve *model.ValidationError
			if errors.As(err, &ve) {
				if fe, ok := ve.For(field); ok {
					return fmt.Errorf("sweep %s %s is not allowed: %s (%s)", labels[i], fe.Value, fe.Allowed, fe.Why)
				}
			}
		}
	}
	switch c.kind().sweep {
	case sweepIV:
		c.iv = r
	case sweepCV:
		c.cv = r
	case sweepTemp:
		if !(vals[3] > 0) {
			return fmt.Errorf("VF at %s: the forward current must be positive", model.Format(model.Current, vals[3], 3, c.e.ascii))
		}
		c.temp, c.iF = r, vals[3]
	}
	return nil
}

// sweepLines describes or edits the sweep of the chart (two lines).
func (c chartModel) sweepLines(w int) []string {
	st, g, ascii := c.e.st, c.e.g, c.e.ascii
	var l1, l2 string
	if c.editing {
		labels, _, _ := c.sweepFields()
		var parts []string
		for i, lb := range labels {
			box := c.eds[i].view(10, st.selected, " ")
			if i != c.row {
				box = padRight(c.eds[i].value(), 10, g.ellipsis)
			}
			parts = append(parts, lb+" ["+box+"]")
		}
		l1 = strings.Join(parts, " ")
		l2 = st.faint.Paint("tab next box " + g.dot + " enter apply " + g.dot + " esc cancel")
		if c.editErr != "" {
			l2 = st.err.Paint(g.bad + " " + c.editErr)
		}
		return []string{cut(l1, w, g.ellipsis), cut(l2, w, g.ellipsis)}
	}
	f := func(k model.Kind, v float64) string { return model.Format(k, v, 3, ascii) }
	switch c.kind().sweep {
	case sweepIV:
		l1 = fmt.Sprintf("sweep %s to %s in %s steps", f(model.Voltage, c.iv.From), f(model.Voltage, c.iv.To), f(model.Voltage, c.iv.Step))
	case sweepCV:
		l1 = fmt.Sprintf("sweep %s to %s in %s steps", f(model.Voltage, c.cv.From), f(model.Voltage, c.cv.To), f(model.Voltage, c.cv.Step))
	case sweepTemp:
		l1 = fmt.Sprintf("sweep %s to %s in %s steps, VF at %s", f(model.Temperature, c.temp.From), f(model.Temperature, c.temp.To), f(model.Temperature, c.temp.Step), f(model.Current, c.iF))
	default:
		l1 = "at the bias in force, " + f(model.Voltage, c.spec.Bias) + " (Define, step 5)"
	}
	if c.editErr != "" {
		l2 = st.err.Paint(g.bad + " " + c.editErr)
	}
	if c.kind().sweep != sweepNone {
		// "r: change" beside the sweep, or on the free second line when
		// the sweep fills the first.
		switch more := "  " + g.dot + "  r: change"; {
		case width(l1+more) <= w:
			l1 += more
		case l2 == "":
			l2 = st.muted.Paint("r: change the sweep")
		}
	}
	return []string{st.muted.Paint(cut(l1, w, g.ellipsis)), cut(l2, w, g.ellipsis)}
}
