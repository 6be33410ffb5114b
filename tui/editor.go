package tui

import (
	"strings"
	"unicode"

	tea "github.com/charmbracelet/bubbletea"
)

// maxInputRunes bounds what one field accepts, so a runaway paste cannot
// grow a field without limit.
const maxInputRunes = 64

// lineEditor is a one-line text editor with a cursor. It draws no cursor
// blink (no timer repaints) and holds no style of its own.
type lineEditor struct {
	text []rune
	pos  int
	// limit bounds the text, in runes (0: maxInputRunes).
	limit int
}

func newLineEditor(s string) lineEditor { return newLineEditorN(s, maxInputRunes) }

// newLineEditorN is an editor for at most n runes.
func newLineEditorN(s string, n int) lineEditor {
	e := lineEditor{limit: n}
	e.set(s)
	return e
}

func (e lineEditor) max() int {
	if e.limit > 0 {
		return e.limit
	}
	return maxInputRunes
}

func (e *lineEditor) set(s string) {
	e.text = []rune(s)
	if len(e.text) > e.max() {
		e.text = e.text[:e.max()]
	}
	e.pos = len(e.text)
}

func (e lineEditor) value() string { return string(e.text) }

// handle applies a key to the text. It reports whether the key was an
// editing key (consumed) and whether the text changed.
func (e *lineEditor) handle(msg tea.KeyMsg) (consumed, changed bool) {
	switch msg.Type {
	case tea.KeyRunes, tea.KeySpace:
		var add []rune
		for _, r := range msg.Runes {
			if unicode.IsPrint(r) {
				add = append(add, r)
			}
		}
		if msg.Type == tea.KeySpace && len(add) == 0 {
			add = []rune{' '}
		}
		room := e.max() - len(e.text)
		if room <= 0 || len(add) == 0 {
			return true, false
		}
		if len(add) > room {
			add = add[:room]
		}
		t := make([]rune, 0, len(e.text)+len(add))
		t = append(t, e.text[:e.pos]...)
		t = append(t, add...)
		t = append(t, e.text[e.pos:]...)
		e.text = t
		e.pos += len(add)
		return true, true
	case tea.KeyBackspace:
		if e.pos == 0 {
			return true, false
		}
		e.text = append(e.text[:e.pos-1:e.pos-1], e.text[e.pos:]...)
		e.pos--
		return true, true
	case tea.KeyDelete:
		if e.pos >= len(e.text) {
			return true, false
		}
		e.text = append(e.text[:e.pos:e.pos], e.text[e.pos+1:]...)
		return true, true
	case tea.KeyLeft:
		if e.pos > 0 {
			e.pos--
		}
		return true, false
	case tea.KeyRight:
		if e.pos < len(e.text) {
			e.pos++
		}
		return true, false
	case tea.KeyHome, tea.KeyCtrlA:
		e.pos = 0
		return true, false
	case tea.KeyEnd, tea.KeyCtrlE:
		e.pos = len(e.text)
		return true, false
	case tea.KeyCtrlU:
		changed = e.pos > 0
		e.text = append([]rune(nil), e.text[e.pos:]...)
		e.pos = 0
		return true, changed
	case tea.KeyCtrlK:
		changed = e.pos < len(e.text)
		e.text = append([]rune(nil), e.text[:e.pos]...)
		return true, changed
	case tea.KeyCtrlW:
		if e.pos == 0 {
			return true, false
		}
		i := e.pos
		for i > 0 && e.text[i-1] == ' ' {
			i--
		}
		for i > 0 && e.text[i-1] != ' ' {
			i--
		}
		e.text = append(append([]rune(nil), e.text[:i]...), e.text[e.pos:]...)
		e.pos = i
		return true, true
	}
	return false, false
}

// view draws the text in a box of width w with the cursor cell painted by
// cur, scrolling horizontally to keep the cursor visible.
func (e lineEditor) view(w int, cur ink, pad string) string {
	if w < 1 {
		w = 1
	}
	start := 0
	if e.pos >= w {
		start = e.pos - w + 1
	}
	var b strings.Builder
	for i := start; i < start+w; i++ {
		ch := pad
		if i < len(e.text) {
			ch = string(e.text[i])
		}
		if i == e.pos {
			if ch == pad {
				ch = " "
			}
			b.WriteString(cur.Paint(ch))
			continue
		}
		b.WriteString(ch)
	}
	return b.String()
}
