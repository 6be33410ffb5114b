package tui

import (
	"slices"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
)

// The screens over the panels (help, dialogs, the session browser, the
// measurement screens) are components on a stack in Model: the top one
// gets the keys and is drawn between the header and the footer; esc (or
// its own close key) takes it off and shows the one below, the panels
// when none is left. Each screen is a small type with its own key map, an
// update and a draw; it opens with push and closes with close.

// screen is one component of the stack.
type screen interface {
	// update handles a key while the screen is on top: the screen
	// changes itself and the workbench through m (push, close, note).
	update(m *Model, km tea.KeyMsg) tea.Cmd
	// draw draws the screen in w x h, the terminal less the header and
	// the footer, laid out for that size.
	draw(m Model, w, h int) []string
	// footer is the keys the footer names: the short help of the
	// screen's key map.
	footer(m Model) []key.Binding
}

// tallFooter is a screen whose footer takes up to footerLines lines
// (fewer on a short terminal) where one does not hold the note and every
// key of the screen: the batch screen, whose keys all stay in view at 80
// columns.
type tallFooter interface {
	screen
	footerLines() int
}

// listener is a screen that takes the messages other than keys while it
// is on the stack, on top or not, bottom first: the fit screen draws its
// chart again for a new terminal size, the batch screen takes its run's
// progress.
type listener interface {
	listen(m *Model, msg tea.Msg) tea.Cmd
}

// interrupter is a screen that answers ctrl+c itself (see interrupt):
// done says the answer is complete; otherwise the workbench asks to quit
// as q does.
type interrupter interface {
	interrupt(m *Model) (cmd tea.Cmd, done bool)
}

// push opens s over the screens shown. The stack's slice is never shared
// with an earlier value of the Model; the screens are pointers, so an
// earlier value sees their later changes (a program keeps only the
// newest Model).
func (m *Model) push(s screen) { m.stack = append(slices.Clip(m.stack), s) }

// close takes s and every screen over it off the stack (nothing when s
// is not on it).
func (m *Model) close(s screen) {
	if i := slices.Index(m.stack, s); i >= 0 {
		m.stack = slices.Clip(m.stack[:i])
	}
}

// replace closes s and opens n in its place.
func (m *Model) replace(s, n screen) {
	m.close(s)
	m.push(n)
}

// closeAll shows the panels.
func (m *Model) closeAll() { m.stack = nil }

// top returns the screen on top (nil: the panels are shown).
func (m Model) top() screen {
	if len(m.stack) == 0 {
		return nil
	}
	return m.stack[len(m.stack)-1]
}

// find returns the screen of type T nearest the top of m's stack.
func find[T screen](m Model) (T, bool) {
	for i := len(m.stack) - 1; i >= 0; i-- {
		if s, ok := m.stack[i].(T); ok {
			return s, true
		}
	}
	var zero T
	return zero, false
}

// screenKey gives a key to the screen on top.
func (m Model) screenKey(s screen, km tea.KeyMsg) (tea.Model, tea.Cmd) {
	cmd := s.update(&m, km)
	return m, cmd
}

// broadcast hands a message other than a key to every listener on the
// stack, bottom first.
func (m *Model) broadcast(msg tea.Msg) tea.Cmd {
	var cmds []tea.Cmd
	for _, s := range slices.Clone(m.stack) {
		if l, ok := s.(listener); ok {
			cmds = append(cmds, l.listen(m, msg))
		}
	}
	return tea.Batch(cmds...)
}

// scrollKeys are the keys of a screen that scrolls a long text: the
// help, a comparison, the model card.
type scrollKeys struct{ Down, Up, PageDown, PageUp, Top, Bottom key.Binding }

// list is the scroll keys in the order the help names them.
func (k scrollKeys) list() []key.Binding {
	return []key.Binding{k.Down, k.Up, k.PageDown, k.PageUp, k.Top, k.Bottom}
}

func (k KeyMap) scrollKeys() scrollKeys {
	return scrollKeys{Down: k.ScrollDown, Up: k.ScrollUp, PageDown: k.PageDown, PageUp: k.PageUp, Top: k.Top, Bottom: k.Bottom}
}

// scroll moves *off by km (page lines to a page) and holds it within 0
// to end, the offset that shows the end; it reports whether km is a
// scroll key.
func (k scrollKeys) scroll(off *int, km tea.KeyMsg, page, end int) bool {
	switch {
	case keyIs(km, k.Down):
		*off++
	case keyIs(km, k.Up):
		*off--
	case keyIs(km, k.PageDown):
		*off += page
	case keyIs(km, k.PageUp):
		*off -= page
	case keyIs(km, k.Top):
		*off = 0
	case keyIs(km, k.Bottom):
		*off = end
	default:
		return false
	}
	*off = min(max(*off, 0), end)
	return true
}
