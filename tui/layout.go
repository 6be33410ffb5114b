// Layout of the main screen: which panels show at a terminal size, how wide
// each is (the focused one gets the width it needs), and the header, body
// and footer lines.

package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
)

// Layouts by terminal size.
type layout int

const (
	layoutStack layout = iota // one panel at a time, switched by tab
	layoutPair                // definition beside results or charts
	layoutTrio                // definition, results and charts together
)

func pickLayout(w, h int) layout {
	switch {
	case w >= 160 && h >= 44:
		return layoutTrio
	case w >= 110 && h >= 28:
		return layoutPair
	}
	return layoutStack
}

// visible reports whether a panel shows in the current layout.
func (m Model) visible(p panel) bool {
	switch pickLayout(m.w, m.h) {
	case layoutTrio:
		return true
	case layoutPair:
		return p == panelDefine || p == m.rightPanel()
	}
	return p == m.focus
}

func (m Model) rightPanel() panel {
	if m.focus == panelResults || m.focus == panelCharts {
		return m.focus
	}
	return m.right
}

// geometry returns the panels' content boxes (width, height) for the
// current size; a panel not shown gets 0 x 0.
func (m Model) geometry() (fw, fh, sw, sh, cw, ch int) {
	w, bodyH := m.w, m.h-2
	if w < minWidth || m.h < minHeight {
		return
	}
	switch pickLayout(m.w, m.h) {
	case layoutTrio:
		lw := min(max(62, m.form.need()), w-1-m.sheet.minNeed())
		rw := w - lw - 1
		fw, fh = lw, bodyH-1
		need := m.sheetNeed(rw)
		sheetH := min(need+1, bodyH*55/100)
		sw, sh = rw, sheetH-1
		cw, ch = rw, bodyH-sheetH-1
	case layoutPair:
		// The focused panel gets the width it needs, the other keeps at
		// least sideMinW.
		lw := min(64, max(54, w*48/100))
		switch m.focus {
		case panelDefine:
			// The side panel keeps what it needs: the sheet its values
			// (with the changes against a pin), the charts a readable plot.
			side := m.sheet.minNeed()
			if m.rightPanel() == panelCharts {
				side = chartSideMinW
			}
			lw = min(max(lw, m.form.need()), w-1-side)
		case panelResults:
			lw = w - 1 - min(max(w-1-lw, m.sheet.need()), w-1-formMinW)
		}
		rw := w - lw - 1
		fw, fh = lw, bodyH-1
		if m.rightPanel() == panelCharts {
			cw, ch = rw, bodyH-1
		} else {
			sw, sh = rw, bodyH-1
		}
	default:
		switch m.focus {
		case panelDefine:
			fw, fh = w, bodyH-1
		case panelResults:
			sw, sh = w, bodyH-1
		default:
			cw, ch = w, bodyH-1
		}
	}
	return
}

// chartSideMinW is the narrowest the charts are made beside a focused
// definition panel.
const chartSideMinW = 40

func (m Model) sheetNeed(w int) int {
	if m.sheet.w == w && m.sheet.built != nil {
		return len(m.sheet.head) + len(m.sheet.built) // built for this width by the last change
	}
	s := m.sheet
	s.w = w
	return len(s.headLines()) + len(s.allLines())
}

// relayout hands every panel its size; the charts redraw when theirs
// changes.
func (m *Model) relayout() tea.Cmd {
	fw, fh, sw, sh, cw, ch := m.geometry()
	m.geo = [6]int{fw, fh, sw, sh, cw, ch}
	m.form.SetSize(fw, fh)
	m.sheet.setFocused(m.focus == panelResults)
	m.sheet.SetSize(sw, sh)
	m.help.Width = max(m.w, 0)
	return m.chart.SetSize(cw, ch)
}

// header is the title line: the panels, the session and its state.
func (m Model) header() string {
	st, g := m.e.st, m.e.g
	left := st.accent.Paint("junco") + " "
	lw := width("junco ")
	if m.sess.readOnly {
		b := "review (read-only)"
		left += st.caution.Paint("["+b+"]") + " "
		lw += width(b) + 3
	}
	for p := panel(0); p < panelCount; p++ {
		t := p.title()
		if p == m.focus && m.top() == nil {
			left += st.tabOn.Paint("[" + t + "]")
		} else {
			left += st.tabOff.Paint(" " + t + " ")
		}
		lw += width(t) + 2
	}
	var tags []string
	if m.demo {
		tags = append(tags, st.warn.Paint("invented demo data"))
	}
	if m.pin != nil {
		tags = append(tags, st.pinned.Paint("pinned"))
	}
	if m.Dirty() {
		tags = append(tags, st.warn.Paint(g.unsaved+" unsaved"))
	}
	right := strings.Join(tags, " "+g.dot+" ")
	room := m.w - lw - 2
	name, short := m.name, m.short
	if m.sess.name != "" {
		short = fmt.Sprintf("%s rev %d", m.sess.name, m.sess.rev)
		name = short
		if t := m.title(); t != "" {
			name += ": " + t
		}
	}
	nameW := room - width(right) - 3
	if width(name) > nameW {
		name = short
	}
	if nameW >= 8 {
		right = st.strong.Paint(cut(name, nameW, g.ellipsis)) + "  " + right
	}
	if width(right) > room {
		right = cut(right, max(room, 0), "")
	}
	gap := m.w - lw - width(right)
	if gap < 1 {
		return cut(left, m.w, "")
	}
	return left + strings.Repeat(" ", gap) + right
}

// shortHelp is the one-line help of bindings in w cells: as many entries
// as fit whole, then an ellipsis when some are left out.
func shortHelp(hm help.Model, bindings []key.Binding, w int) string {
	return helpLines(hm, bindings, "", w, 1)[0]
}

// helpLines is the help of bindings after lead (a note, already painted,
// or "") in at most n lines of w cells: entries whole, a line broken
// between entries, then an ellipsis when some are left out.
func helpLines(hm help.Model, bindings []key.Binding, lead string, w, n int) []string {
	sep := hm.Styles.ShortSeparator.Inline(true).Render(hm.ShortSeparator)
	tail := " " + hm.Styles.Ellipsis.Inline(true).Render(hm.Ellipsis)
	var lines []string
	line, lw, keys := lead, width(lead), 0 // keys: entries on the line
	for _, kb := range bindings {
		if !kb.Enabled() {
			continue
		}
		item := hm.Styles.ShortKey.Inline(true).Render(kb.Help().Key) + " " + hm.Styles.ShortDesc.Inline(true).Render(kb.Help().Desc)
		if keys > 0 {
			item = sep + item
		}
		if lw+width(item) <= w {
			line, lw, keys = line+item, lw+width(item), keys+1
			continue
		}
		if len(lines)+1 < n && lw > 0 {
			lines = append(lines, line)
			item = strings.TrimPrefix(item, sep)
			line, lw, keys = item, width(item), 1
			continue
		}
		if keys > 0 && lw+width(tail) <= w {
			line += tail
		}
		break
	}
	return append(lines, line)
}

// body lays the panels out.
func (m Model) body() []string {
	st, g := m.e.st, m.e.g
	fw, fh, sw, sh, cw, ch := m.geo[0], m.geo[1], m.geo[2], m.geo[3], m.geo[4], m.geo[5]
	head := func(p panel, w int) string {
		t := p.title()
		switch p {
		case panelDefine:
			t = "Define the junction"
			if m.sess.readOnly {
				t += " " + g.dot + " read-only"
			}
		case panelResults:
			t = "Results"
			if m.pin != nil {
				t += " " + g.dot + " with changes against the pin"
			}
		case panelCharts:
			t = "Charts"
		}
		if p == m.focus {
			return rule(t, w, glyphs{hbar: g.hbarHeavy}, st.heading)
		}
		return rule(t, w, g, st.headingOff)
	}
	pane := func(p panel, w, h int, content []string) []string {
		return block(append([]string{head(p, w)}, content...), w, h+1, g.ellipsis)
	}
	bodyH := m.h - 2
	switch pickLayout(m.w, m.h) {
	case layoutTrio:
		left := pane(panelDefine, fw, fh, m.form.lines())
		right := append(pane(panelResults, sw, sh, m.sheet.lines()), pane(panelCharts, cw, ch, m.chart.lines())...)
		return block(joinColumns(st.faint.Paint(g.vbar), left, right), m.w, bodyH, "")
	case layoutPair:
		left := pane(panelDefine, fw, fh, m.form.lines())
		var right []string
		if cw > 0 {
			right = pane(panelCharts, cw, ch, m.chart.lines())
		} else {
			right = pane(panelResults, sw, sh, m.sheet.lines())
		}
		return block(joinColumns(st.faint.Paint(g.vbar), left, right), m.w, bodyH, "")
	}
	switch {
	case fw > 0:
		return pane(panelDefine, fw, fh, m.form.lines())
	case sw > 0:
		return pane(panelResults, sw, sh, m.sheet.lines())
	}
	return pane(panelCharts, cw, ch, m.chart.lines())
}
