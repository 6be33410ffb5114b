package tui

import (
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/model/fit"
	"junco/model/measure"
	"junco/sessions"
)

// maxPathRunes bounds the path typed on the import screen.
const maxPathRunes = 1024

// importScreen is the import screen: a path, and the preview of the data
// set read from it (nothing is added before it is accepted).
type importScreen struct {
	ed  lineEditor
	ds  *measure.DataSet
	err string
	// choices are the names the last tab completion found (more: how
	// many more were left out).
	choices []string
	more    int
	// temp is the temperature field of the preview (t), typing while
	// editing; tErr says why a typed value was refused.
	temp    lineEditor
	editing bool
	tErr    string
}

// openImport shows the import screen (refused in review mode).
func (m *Model) openImport() {
	if m.sess.readOnly {
		m.note = "read-only review: measurements cannot be added; ctrl+s copies the session to your sessions"
		return
	}
	// The folder of the last path is offered again; what is typed goes
	// after it (ctrl+u clears it).
	dir := ""
	if last := m.importPath; strings.Contains(last, "/") {
		dir = last[:strings.LastIndex(last, "/")+1]
	}
	m.push(&importScreen{ed: newLineEditorN(dir, maxPathRunes)})
}

// importKeys is the key map of the import screen: the path, then the
// preview.
type importKeys struct {
	Read, Complete, Add, AddFit, EditPath, Temperature, Dismiss key.Binding
	preview                                                     bool
}

func (s *importScreen) importKeys(k KeyMap) importKeys {
	return importKeys{Read: key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "read and preview")),
		Complete: key.NewBinding(key.WithKeys("tab"), key.WithHelp("tab", "complete the name")),
		Add:      k.AddData, AddFit: k.AddFit, EditPath: k.EditPath,
		Temperature: key.NewBinding(key.WithKeys("t"), key.WithHelp("t", "type the temperature")),
		Dismiss:     k.Dismiss, preview: s.ds != nil}
}

func (k importKeys) ShortHelp() []key.Binding {
	if k.preview {
		return []key.Binding{k.Add, k.AddFit, k.EditPath, k.Temperature, k.Dismiss}
	}
	return []key.Binding{k.Read, k.Complete, k.Dismiss}
}

// FullHelp is every key of the import screen, for the help screen.
func (k importKeys) FullHelp() [][]key.Binding {
	return [][]key.Binding{{k.Read, k.Complete, k.Add, k.AddFit, k.EditPath, k.Temperature, k.Dismiss}}
}

func (s *importScreen) footer(m Model) []key.Binding { return s.importKeys(m.e.keys).ShortHelp() }

func (s *importScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := s.importKeys(m.e.keys)
	defer func() { m.importPath = s.ed.value() }()
	switch {
	case keyIs(km, k.Dismiss) && !(s.ds != nil && s.editing):
		m.close(s)
		m.note = "import cancelled: nothing was added"
	case s.ds != nil && s.editing:
		s.temperatureKey(m, km)
	case s.ds != nil:
		switch {
		case keyIs(km, k.Temperature):
			s.startTemperature()
		case keyIs(km, k.Add):
			s.accept(m)
		case keyIs(km, k.AddFit):
			if i := s.accept(m); i >= 0 {
				m.openFit(i)
			}
		case keyIs(km, k.EditPath):
			s.ds = nil
		}
	case keyIs(km, k.Read):
		path := strings.TrimSpace(s.ed.value())
		ds, err := fit.Import(m.sess.files, path, "", m.sess.now)
		s.ds, s.err = ds, ""
		if err != nil {
			s.ds, s.err = nil, err.Error()
		}
	case keyIs(km, k.Complete):
		out, choices, more, err := completePath(m.sess.files, s.ed.value())
		s.choices, s.more, s.err = choices, more, ""
		if err != nil {
			s.err = "no completion: " + err.Error()
		}
		s.ed.set(out)
	default:
		if _, changed := s.ed.handle(km); changed {
			s.err, s.choices, s.more = "", nil, 0
		}
	}
	return nil
}

// accept adds the previewed data set to the session and closes the
// screen; it returns the data set's index among the measurements, or -1
// (the screen stays, saying why) when the session has no room for it.
func (s *importScreen) accept(m *Model) int {
	if err := m.roomFor(*s.ds); err != nil {
		s.err = err.Error()
		return -1
	}
	m.close(s)
	return m.addMeasurement(*s.ds)
}

// pointLimiter is a file access that caps the points a workbench holds
// in all (a served user's inbox: sessions.ServedMaxPoints).
type pointLimiter interface{ PointLimit() int }

// roomFor refuses a data set the session cannot take: beyond
// sessions.MaxDataSets data sets (the save would be refused), or, served,
// beyond the points the server holds for one workbench.
func (m *Model) roomFor(ds measure.DataSet) error {
	if n := len(m.sess.meas); n >= sessions.MaxDataSets {
		return fmt.Errorf("not added: the session holds %d data sets, the most one keeps (MaxDataSets)", n)
	}
	pl, ok := m.sess.files.(pointLimiter)
	if !ok {
		return nil
	}
	held := 0
	for _, x := range m.sess.meas {
		held += x.Len()
	}
	if limit := pl.PointLimit(); held+ds.Len() > limit {
		return fmt.Errorf("not added: the session holds %d points and this data set %d, over the %d points the server holds for one workbench; save this session and start another for more data", held, ds.Len(), limit)
	}
	return nil
}

// addMeasurement adds a data set to the session under a new ID (from its
// file's name) and returns its index among the measurements.
func (m *Model) addMeasurement(ds measure.DataSet) int {
	ds.SourceFile = filepath.Base(ds.SourceFile)
	id := measurementID(ds.SourceFile, string(ds.Kind), func(id string) bool {
		for _, x := range m.sess.meas {
			if x.ID == id {
				return true
			}
		}
		return false
	})
	m.sess.meas = append(m.sess.meas, sessions.Measurement{ID: id, DataSet: ds})
	m.note = fmt.Sprintf("added %s (%d points) to the session; ctrl+s saves it", id, ds.Len())
	return len(m.sess.meas) - 1
}

// view draws the path and the preview or the error.
func (s *importScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	fw := m.frameWidth(w)
	var body []string
	body = append(body, wrapped("The path of a CSV or text sweep (bias with current or capacitance; units from the header).", fw, st.muted, "")...)
	if m.sess.filesNote != "" {
		body = append(body, wrapped(m.sess.filesNote, fw, st.muted, "")...)
	}
	body = append(body, "", "file ["+st.text.Paint(s.ed.view(max(fw-7, 1), st.selected, " "))+"]")
	if len(s.choices) > 0 {
		list := strings.Join(s.choices, "  ")
		if s.more > 0 {
			list += fmt.Sprintf("  (%d more)", s.more)
		}
		body = append(body, wrapped(list, fw, st.muted, "      ")...)
	}
	switch {
	case s.err != "":
		body = append(body, "")
		body = append(body, wrapped(g.bad+" "+s.err, fw, st.err, "  ")...)
		body = append(body, wrapped("Nothing was imported.", fw, st.muted, "  ")...)
	case s.ds != nil:
		body = append(body, "")
		body = append(body, previewLines(s.ds, fw, m.e)...)
		body = append(body, s.temperatureLines(m, fw)...)
	}
	return m.frame("Import a measurement", body, w, h)
}

// previewLines describe an imported data set: kind, columns and units,
// rows, problems.
func previewLines(ds *measure.DataSet, w int, e env) []string {
	st, g := e.st, e.g
	var out []string
	kind := "I-V"
	if ds.Kind == measure.KindCV {
		kind = "C-V"
	}
	out = append(out, st.ok.Paint(g.good+" ")+st.strong.Paint(fmt.Sprintf("%s sweep: %d points of %d data rows", kind, ds.Len(), ds.DataRows)))
	col := func(role string, idx int, unit string) {
		if idx <= 0 {
			return
		}
		name := ""
		if idx-1 < len(ds.Columns.Header) {
			name = " " + strconv.Quote(ds.Columns.Header[idx-1])
		}
		if unit == "" {
			unit = "SI (none stated)"
		}
		out = append(out, cut(fmt.Sprintf("  %-12s column %d%s, unit %s", role, idx, name, unit), w, g.ellipsis))
	}
	col("voltage", ds.Columns.Voltage, ds.Units.Voltage)
	col("current", ds.Columns.Current, ds.Units.Current)
	col("capacitance", ds.Columns.Capacitance, ds.Units.Capacitance)
	col("frequency", ds.Columns.Frequency, ds.Units.Frequency)
	col("temperature", ds.Columns.Temperature, ds.Units.Temperature)
	col("compliance", ds.Columns.Compliance, "")
	if ds.ProblemRows == 0 {
		out = append(out, "  no rows left out")
	} else {
		counts := map[measure.ProblemKind]int{}
		for _, p := range ds.Problems {
			counts[p.Kind]++
		}
		var parts []string
		for _, k := range []measure.ProblemKind{measure.ProblemCompliance, measure.ProblemNonFinite, measure.ProblemOverflow, measure.ProblemMissing} {
			if counts[k] > 0 {
				parts = append(parts, fmt.Sprintf("%d %s", counts[k], strings.ReplaceAll(string(k), "_", "-")))
			}
		}
		out = append(out, st.warn.Paint(cut(fmt.Sprintf("  %d rows left out: %s", ds.ProblemRows, strings.Join(parts, ", ")), w, g.ellipsis)))
		for i, p := range ds.Problems {
			if i == 3 {
				out = append(out, st.muted.Paint(fmt.Sprintf("    and %d more", ds.ProblemRows-3)))
				break
			}
			out = append(out, st.muted.Paint(cut(fmt.Sprintf("    line %d column %d: %s %q", p.Line, p.Column, strings.ReplaceAll(string(p.Kind), "_", "-"), p.Value), w, g.ellipsis)))
		}
	}
	return out
}

// ivMeasurements returns the indices of the session's I-V data sets.
func (m Model) ivMeasurements() []int {
	var out []int
	for i, x := range m.sess.meas {
		if x.Kind == measure.KindIV {
			out = append(out, i)
		}
	}
	return out
}
