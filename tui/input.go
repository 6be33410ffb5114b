package tui

import tea "github.com/charmbracelet/bubbletea"

// Input handling shared by every screen: several keys in one read, and
// ctrl+c.

// eachKey acts on every key of a read that carried several (typeahead, key
// repeat over SSH, a script typing): the terminal library reports such a run
// of printable keys as one message, which matches no single-key binding.
// Each key goes through Update on its own, as if typed one by one, so text
// fields get the same characters and every other key acts. A bracketed
// paste stays whole.
func (m Model) eachKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	var cur tea.Model = m
	cmds := make([]tea.Cmd, 0, len(km.Runes))
	for _, r := range km.Runes {
		one := tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}, Alt: km.Alt}
		if r == ' ' {
			one = tea.KeyMsg{Type: tea.KeySpace, Runes: []rune{r}, Alt: km.Alt}
		}
		var cmd tea.Cmd
		cur, cmd = cur.Update(one)
		cmds = append(cmds, cmd)
	}
	return cur, tea.Batch(cmds...)
}

// interrupt is ctrl+c, on every screen, handled here once: a screen
// that answers it itself (an interrupter) does so first (the batch stops
// its run keeping the finished rows, the quit question quits at once
// writing the draft, the draft offer quits leaving the drafts for the
// next start); otherwise, or after, the workbench asks to quit as q does.
func (m Model) interrupt() (tea.Model, tea.Cmd) {
	if s, ok := m.top().(interrupter); ok {
		if cmd, done := s.interrupt(&m); done {
			return m, cmd
		}
	}
	return m.quit()
}
