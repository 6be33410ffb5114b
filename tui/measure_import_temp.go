package tui

import (
	"fmt"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
)

// startImportTemperature opens the temperature field of the import
// preview (t). A file that states its temperature (a column or a comment)
// keeps it: the fit layer's rule puts the file first.
func (m *Model) startImportTemperature() {
	ds := m.imp.ds
	if len(ds.TemperatureK) > 0 || (ds.StatedTemperatureK > 0 && !ds.TemperatureTyped) {
		m.imp.tErr = "the file states its temperature, which every fit uses"
		return
	}
	v := ""
	if ds.TemperatureTyped {
		v = model.Format(model.Temperature, ds.StatedTemperatureK, 5, true)
	}
	m.imp.temp, m.imp.editing, m.imp.tErr = newLineEditor(v), true, ""
}

// importTemperatureKey edits the typed temperature: enter applies it (an
// empty field removes it), esc leaves the field unchanged.
func (m *Model) importTemperatureKey(km tea.KeyMsg) {
	k := m.e.keys
	switch {
	case keyIs(km, k.Dismiss):
		m.imp.editing, m.imp.tErr = false, ""
	case keyIs(km, k.Submit):
		s := m.imp.temp.value()
		if s == "" {
			m.imp.ds.StatedTemperatureK, m.imp.ds.TemperatureTyped = 0, false
			m.imp.editing, m.imp.tErr = false, ""
			return
		}
		t, err := model.ParseValue(model.Temperature, s)
		switch {
		case err != nil:
			m.imp.tErr = "temperature: " + err.Error()
		case !(t >= 1 && t <= 2000):
			m.imp.tErr = fmt.Sprintf("temperature %s: allowed 1..2000 K", s)
		default:
			m.imp.ds.StatedTemperatureK, m.imp.ds.TemperatureTyped = t, true
			m.imp.editing, m.imp.tErr = false, ""
		}
	default:
		m.imp.temp.handle(km)
	}
}

// importTemperatureLines show the temperature a fit of the previewed data
// will use and where it comes from (the fit layer's rule with the
// junction's temperature as the fallback), and the field when typing.
func (m Model) importTemperatureLines(w int) []string {
	st, g := m.e.st, m.e.g
	t, _ := fit.TemperatureRule{FallbackK: m.form.spec.Temperature, FallbackSource: fit.SourceJunction}.Choose(m.imp.ds)
	val := model.Format(model.Temperature, t.K, 5, m.e.ascii)
	var line string
	switch t.Source {
	case fit.SourceColumn:
		line = val + " (mean of the file's temperature column)"
	case fit.SourceComment:
		line = val + " (stated in a comment of the file)"
	case fit.SourceOption:
		line = val + " (typed; t changes it)"
	default:
		line = "not stated in the file: the junction's " + val + " is assumed; t types one"
	}
	out := []string{cut("  temperature  "+line, w, g.ellipsis)}
	if t.Source == fit.SourceJunction {
		out[0] = st.warn.Paint(out[0])
	}
	if m.imp.editing {
		out = append(out, "  type it      "+st.text.Paint("["+m.imp.temp.view(12, st.selected, " ")+"]")+st.muted.Paint("  e.g. 250 K or 27 C; enter applies, esc leaves it"))
	}
	if m.imp.tErr != "" {
		out = append(out, st.err.Paint(cut("  "+g.bad+" "+m.imp.tErr, w, g.ellipsis)))
	}
	return out
}
