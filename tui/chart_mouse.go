package tui

import tea "github.com/charmbracelet/bubbletea"

// The mouse reaches the charts panel only while it has the focus: the
// program asks the terminal for mouse reports then and stops asking when
// the focus leaves, so that elsewhere the terminal's own text selection
// works as usual.

// mouseFor returns the command that switches mouse reporting for a change
// of focus from one panel to another (nil when nothing changes).
func mouseFor(from, to panel) tea.Cmd {
	switch {
	case to == panelCharts && from != panelCharts:
		return tea.EnableMouseCellMotion
	case from == panelCharts && to != panelCharts:
		return tea.DisableMouse
	}
	return nil
}

// chartMouse passes a mouse event over the charts panel to it, in the
// panel's own cells.
func (m Model) chartMouse(msg tea.MouseMsg) Model {
	if m.top() != nil || m.focus != panelCharts || m.chart.editing {
		return m
	}
	col, row, ok := m.chartOrigin()
	if !ok {
		return m
	}
	m.chart.mouse(msg, msg.X-col, msg.Y-row)
	return m
}

// chartOrigin is the screen cell of the first content line of the charts
// panel (below its heading), as body() lays the panels out.
func (m Model) chartOrigin() (col, row int, ok bool) {
	fw, _, _, sh, cw, _ := m.geo[0], m.geo[1], m.geo[2], m.geo[3], m.geo[4], m.geo[5]
	if cw <= 0 {
		return 0, 0, false
	}
	// Row 0 is the header line, then the panel's heading.
	switch pickLayout(m.w, m.h) {
	case layoutTrio:
		return fw + 1, 1 + (sh + 1) + 1, true
	case layoutPair:
		return fw + 1, 2, true
	}
	return 0, 2, true
}
