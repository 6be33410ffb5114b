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
func (s *importScreen) startTemperature() {
	ds := s.ds
	if len(ds.TemperatureK) > 0 || (ds.StatedTemperatureK > 0 && !ds.TemperatureTyped) {
		s.tErr = "the file states its temperature, which every fit uses"
		return
	}
	v := ""
	if ds.TemperatureTyped {
		v = model.Format(model.Temperature, ds.StatedTemperatureK, 5, true)
	}
	s.temp, s.editing, s.tErr = newLineEditor(v), true, ""
}

// temperatureKey edits the typed temperature: enter applies it (an
// empty field removes it), esc leaves the field unchanged.
func (s *importScreen) temperatureKey(m *Model, km tea.KeyMsg) {
	k := m.e.keys
	switch {
	case keyIs(km, k.Dismiss):
		s.editing, s.tErr = false, ""
	case keyIs(km, k.Submit):
		v := s.temp.value()
		if v == "" {
			s.ds.StatedTemperatureK, s.ds.TemperatureTyped = 0, false
			s.editing, s.tErr = false, ""
			return
		}
		t, err := model.ParseValue(model.Temperature, v)
		switch {
		case err != nil:
			s.tErr = "temperature: " + err.Error()
		case !(t >= 1 && t <= 2000):
			s.tErr = fmt.Sprintf("temperature %s: allowed 1..2000 K", v)
		default:
			s.ds.StatedTemperatureK, s.ds.TemperatureTyped = t, true
			s.editing, s.tErr = false, ""
		}
	default:
		s.temp.handle(km)
	}
}

// temperatureLines show the temperature a fit of the previewed data
// will use and where it comes from (the fit layer's rule with the
// junction's temperature as the fallback), and the field when typing.
func (s *importScreen) temperatureLines(m Model, w int) []string {
	st, g := m.e.st, m.e.g
	t, _ := m.junctionRule().Choose(s.ds)
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
	if s.editing {
		out = append(out, "  type it      "+st.text.Paint("["+s.temp.view(12, st.selected, " ")+"]")+st.muted.Paint("  e.g. 250 K or 27 C; enter applies, esc leaves it"))
	}
	if s.tErr != "" {
		out = append(out, st.err.Paint(cut("  "+g.bad+" "+s.tErr, w, g.ellipsis)))
	}
	return out
}
