package tui

import (
	"github.com/charmbracelet/bubbles/key"
)

// KeyMap holds every key binding of the workbench. Each panel shows the
// part that concerns it (see the *Help types). Disabled bindings neither
// match nor appear in help.
type KeyMap struct {
	// Everywhere (outside text entry).
	NextPanel, PrevPanel key.Binding
	Help, Quit           key.Binding
	Pin, Unpin           key.Binding
	ASCII                key.Binding
	// Reserved for sessions (saving and browsing come later): disabled.
	Save, Browse key.Binding

	// Definition panel.
	Up, Down        key.Binding
	Change          key.Binding // left/right on a choice
	Edit            key.Binding
	Step            key.Binding // 1-5
	NextStep        key.Binding
	PrevStep        key.Binding
	RestoreDefault  key.Binding
	Apply, Cancel   key.Binding // while typing
	ApplyNext       key.Binding // tab while typing
	ApplyPrev       key.Binding // shift+tab while typing
	CursorLeftRight key.Binding // while typing
	ClearToStart    key.Binding // while typing

	// Results panel.
	ScrollUp, ScrollDown key.Binding
	PageUp, PageDown     key.Binding
	Top, Bottom          key.Binding

	// Charts panel.
	PrevChart, NextChart key.Binding
	Sweep                key.Binding

	// Confirmation.
	Yes, No key.Binding
}

// DefaultKeyMap returns the workbench's key bindings.
func DefaultKeyMap() KeyMap {
	b := func(keys []string, k, desc string) key.Binding {
		return key.NewBinding(key.WithKeys(keys...), key.WithHelp(k, desc))
	}
	k := KeyMap{
		NextPanel: b([]string{"tab"}, "tab", "next panel"),
		PrevPanel: b([]string{"shift+tab"}, "shift+tab", "previous panel"),
		Help:      b([]string{"?"}, "?", "help and guide"),
		Quit:      b([]string{"q", "ctrl+c"}, "q", "quit"),
		Pin:       b([]string{"p"}, "p", "pin as reference"),
		Unpin:     b([]string{"u"}, "u", "drop the pin"),
		ASCII:     b([]string{"a"}, "a", "ASCII/Unicode drawing"),
		Save:      key.NewBinding(key.WithKeys("ctrl+s"), key.WithHelp("ctrl+s", "save session"), key.WithDisabled()),
		Browse:    key.NewBinding(key.WithKeys("ctrl+o"), key.WithHelp("ctrl+o", "open session"), key.WithDisabled()),

		Up:              b([]string{"up", "k"}, "↑/k", "previous field"),
		Down:            b([]string{"down", "j"}, "↓/j", "next field"),
		Change:          b([]string{"left", "right", "h", "l", " "}, "←/→", "change a choice"),
		Edit:            b([]string{"enter"}, "enter", "type a value"),
		Step:            b([]string{"1", "2", "3", "4", "5"}, "1-5", "go to step"),
		NextStep:        b([]string{"pgdown", "]"}, "]/pgdn", "next step"),
		PrevStep:        b([]string{"pgup", "["}, "[/pgup", "previous step"),
		RestoreDefault:  b([]string{"x", "delete"}, "x", "restore default"),
		Apply:           b([]string{"enter"}, "enter", "apply, next field"),
		Cancel:          b([]string{"esc"}, "esc", "cancel typing"),
		ApplyNext:       b([]string{"tab", "down"}, "tab/↓", "apply, next field"),
		ApplyPrev:       b([]string{"shift+tab", "up"}, "shift+tab/↑", "apply, previous field"),
		CursorLeftRight: b([]string{"left", "right", "home", "end"}, "←/→", "move in the text"),
		ClearToStart:    b([]string{"ctrl+u"}, "ctrl+u", "clear the text"),

		ScrollUp:   b([]string{"up", "k"}, "↑/k", "scroll up"),
		ScrollDown: b([]string{"down", "j"}, "↓/j", "scroll down"),
		PageUp:     b([]string{"pgup"}, "pgup", "page up"),
		PageDown:   b([]string{"pgdown", " "}, "pgdn", "page down"),
		Top:        b([]string{"home", "g"}, "home", "top"),
		Bottom:     b([]string{"end", "G"}, "end", "bottom"),

		PrevChart: b([]string{"left", "h", "["}, "←/h", "previous chart"),
		NextChart: b([]string{"right", "l", "]"}, "→/l", "next chart"),
		Sweep:     b([]string{"r", "enter"}, "r", "edit the sweep"),

		Yes: b([]string{"y", "Y"}, "y", "yes, quit"),
		No:  b([]string{"n", "N", "esc"}, "n/esc", "no, stay"),
	}
	return k
}

// asciiHelp rewrites the arrow glyphs in help texts for ASCII terminals.
func (k KeyMap) forASCII(ascii bool) KeyMap {
	if !ascii {
		return k
	}
	fix := func(b *key.Binding) {
		h := b.Help()
		r := []rune(h.Key)
		out := make([]rune, 0, len(r))
		for _, c := range r {
			switch c {
			case '↑':
				out = append(out, []rune("up")...)
			case '↓':
				out = append(out, []rune("dn")...)
			case '←':
				out = append(out, []rune("lt")...)
			case '→':
				out = append(out, []rune("rt")...)
			default:
				out = append(out, c)
			}
		}
		b.SetHelp(string(out), h.Desc)
	}
	for _, b := range []*key.Binding{&k.Up, &k.Down, &k.Change, &k.ApplyNext, &k.ApplyPrev,
		&k.CursorLeftRight, &k.ScrollUp, &k.ScrollDown, &k.PrevChart, &k.NextChart} {
		fix(b)
	}
	return k
}

// globalBindings are the bindings shown in every panel's help.
func (k KeyMap) globalBindings() []key.Binding {
	return []key.Binding{k.NextPanel, k.PrevPanel, k.Pin, k.Unpin, k.ASCII, k.Help, k.Quit, k.Save, k.Browse}
}

// formHelp is the help of the definition panel; typing selects the
// bindings of text entry.
type formHelp struct {
	k      KeyMap
	typing bool
}

func (h formHelp) ShortHelp() []key.Binding {
	k := h.k
	if h.typing {
		return []key.Binding{k.Apply, k.Cancel, k.ApplyNext, k.ClearToStart}
	}
	return []key.Binding{k.Down, k.Edit, k.Change, k.Step, k.NextPanel, k.Pin, k.Help, k.Quit}
}

func (h formHelp) FullHelp() [][]key.Binding {
	k := h.k
	return [][]key.Binding{
		{k.Up, k.Down, k.Change, k.Edit, k.Step, k.NextStep, k.PrevStep, k.RestoreDefault},
		{k.Apply, k.Cancel, k.ApplyNext, k.ApplyPrev, k.CursorLeftRight, k.ClearToStart},
		k.globalBindings(),
	}
}

// sheetHelp is the help of the results panel.
type sheetHelp struct{ k KeyMap }

func (h sheetHelp) ShortHelp() []key.Binding {
	k := h.k
	return []key.Binding{k.ScrollDown, k.PageDown, k.NextPanel, k.Pin, k.Unpin, k.Help, k.Quit}
}

func (h sheetHelp) FullHelp() [][]key.Binding {
	k := h.k
	return [][]key.Binding{{k.ScrollUp, k.ScrollDown, k.PageUp, k.PageDown, k.Top, k.Bottom}, k.globalBindings()}
}

// chartHelp is the help of the charts panel; typing selects the bindings
// of the sweep editor.
type chartHelp struct {
	k      KeyMap
	typing bool
}

func (h chartHelp) ShortHelp() []key.Binding {
	k := h.k
	if h.typing {
		return []key.Binding{k.Apply, k.Cancel, k.ApplyNext, k.ClearToStart}
	}
	return []key.Binding{k.NextChart, k.PrevChart, k.Sweep, k.NextPanel, k.Pin, k.Help, k.Quit}
}

func (h chartHelp) FullHelp() [][]key.Binding {
	k := h.k
	return [][]key.Binding{{k.PrevChart, k.NextChart, k.Sweep}, k.globalBindings()}
}

// allHelp is the full key list of the help screen, one column per panel.
type allHelp struct{ k KeyMap }

func (h allHelp) ShortHelp() []key.Binding { return h.k.globalBindings() }

func (h allHelp) FullHelp() [][]key.Binding {
	k := h.k
	return [][]key.Binding{
		k.globalBindings(),
		{k.Up, k.Down, k.Change, k.Edit, k.Step, k.NextStep, k.PrevStep, k.RestoreDefault},
		{k.Apply, k.Cancel, k.ApplyNext, k.ApplyPrev, k.CursorLeftRight, k.ClearToStart},
		{k.ScrollUp, k.ScrollDown, k.PageUp, k.PageDown, k.Top, k.Bottom, k.PrevChart, k.NextChart, k.Sweep},
	}
}
