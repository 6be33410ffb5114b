package tui

import (
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
)

// runes is one read carrying several printable keys, as the terminal
// library reports typeahead and key repeat.
func oneRead(s string) tea.KeyMsg { return tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(s)} }

func feed(m Model, msg tea.Msg) Model {
	tm, cmd := m.Update(msg)
	return drain(tm.(Model), cmd)
}

// Five j keys in one read scroll the results five lines, as five reads do.
func TestKeysInOneReadEachAct(t *testing.T) {
	base := newTest(t, 80, 24)
	for base.focus != panelResults {
		base = press(base, "tab")
	}
	one := base
	for range 5 {
		one = feed(one, oneRead("j"))
	}
	if one.sheet.scroll == 0 {
		t.Fatal("five single j keys did not scroll the results; the test set-up is wrong")
	}
	together := feed(base, oneRead("jjjjj"))
	if together.sheet.scroll != one.sheet.scroll {
		t.Errorf("jjjjj in one read scrolled to %d, five single keys to %d", together.sheet.scroll, one.sheet.scroll)
	}

	help := feed(base, oneRead("?"))
	if shown(help) != "help" {
		t.Fatal("? did not open the help")
	}
	help = feed(help, oneRead(strings.Repeat("j", 20)))
	if onTop[helpScreen](help).off != 20 {
		t.Errorf("twenty j in one read moved the help %d lines, want 20", onTop[helpScreen](help).off)
	}
}

// Text typed in one read lands whole in a text field (the temperature of
// step 5), as typed key by key.
func TestTypeaheadIntoTextField(t *testing.T) {
	m := newTest(t, 80, 24)
	m = press(m, "5", "enter", "ctrl+u")
	if !m.form.typing {
		t.Fatal("enter on the temperature did not start typing")
	}
	m = feed(m, oneRead("350"))
	if got := m.form.ed.value(); got != "350" {
		t.Errorf("typed 350 in one read, field holds %q", got)
	}
	if m.Spec().Temperature != 350 {
		t.Errorf("temperature in force %g K, want 350", m.Spec().Temperature)
	}
}
