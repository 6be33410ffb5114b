package tui

import (
	"slices"

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
	// Solver switches the charts between the analytic model and the
	// drift-diffusion solver.
	Solver key.Binding
	// Sessions. Save and SaveAs are off in review mode, where CopyOwn
	// takes their keys; Note adds a session note, or in review mode a
	// review note.
	Save, SaveAs, Browse, Note, CopyOwn key.Binding
	// Share shares the saved session read-only with other users of the
	// server.
	Share key.Binding

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
	// Reading a chart: the cursor walks the points (one, or a twentieth of
	// the sweep at a time); zoom and pan act on both axes or on one; LogX
	// switches a log x axis where the x values allow one.
	Cursor, CursorPrev, CursorNext, CursorJumpPrev, CursorJumpNext key.Binding
	ZoomIn, ZoomOut, ZoomInX, ZoomOutX, ZoomInY, ZoomOutY          key.Binding
	PanLeft, PanRight, PanUp, PanDown, ResetView, LogX             key.Binding

	// Confirmation.
	Yes, No key.Binding
	// SaveFirst saves before quitting (quit question).
	SaveFirst key.Binding

	// Dialogs with text fields.
	Submit, NextField, PrevField, Dismiss key.Binding

	// Choice when the revision an edit started from is no longer the
	// newest.
	SaveNext, SaveCopy, ShowNewer key.Binding

	// Offer of a crash-recovery draft.
	DraftRestore, DraftDiscard, DraftLater key.Binding

	// Session browser: the list (typing filters it).
	ListUp, ListDown, Open, Revisions, ClearFilter, Close key.Binding
	// Revision history of a session.
	Mark, DiffPair, DiffCurrent, RestoreRev, OpenRev, Back key.Binding

	// Measurements: Import opens the import screen, Fit the fit screen.
	Import, Fit key.Binding
	// Import preview: add the data set, add it and fit it, edit the path.
	AddData, AddFit, EditPath key.Binding
	// Fit screen: refit with the window typed, choose the I-V data set.
	Refit, PrevData, NextData, KeepFit key.Binding
	// LinLog switches the current axis of the I-V fit between log and
	// linear.
	LinLog key.Binding
	// Arrhenius opens the temperature analysis of the I-V data sets.
	Arrhenius key.Binding
	// Batch opens the batch fit of a directory of I-V files.
	Batch key.Binding
	// Card shows the model card built from the session's data sets.
	Card key.Binding

	// review is set in review mode: the help leaves out the keys that
	// would change something (they are refused with a reason).
	review bool
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
		Quit:      b([]string{"q"}, "q", "quit"), // ctrl+c: Model.interrupt
		Pin:       b([]string{"p"}, "p", "pin as reference"),
		Unpin:     b([]string{"u"}, "u", "drop the pin"),
		ASCII:     b([]string{"a"}, "a", "ASCII/Unicode drawing"),
		Solver:    b([]string{"m"}, "m", "solver on/off"),
		Save:      b([]string{"ctrl+s"}, "ctrl+s", "save session"),
		SaveAs:    b([]string{"S"}, "S", "save as a new session"),
		Browse:    b([]string{"ctrl+o"}, "ctrl+o", "sessions and revisions"),
		Note:      b([]string{"n"}, "n", "add a note"),
		Share:     b([]string{"ctrl+r"}, "ctrl+r", "share for review"),
		CopyOwn:   key.NewBinding(key.WithKeys("ctrl+s", "S"), key.WithHelp("ctrl+s", "copy into your own sessions"), key.WithDisabled()),

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
		Top:        b([]string{"home", "g"}, "home/g", "top"),
		Bottom:     b([]string{"end", "G"}, "end/G", "bottom"),

		PrevChart: b([]string{"left", "h", "["}, "←/h", "previous chart"),
		NextChart: b([]string{"right", "l", "]"}, "→/l", "next chart"),
		Sweep:     b([]string{"r", "enter"}, "r", "edit the sweep"),

		Cursor:         b([]string{"c"}, "c", "cursor on/off"),
		CursorPrev:     b([]string{","}, ",", "cursor to the previous point"),
		CursorNext:     b([]string{"."}, ".", "cursor to the next point"),
		CursorJumpPrev: b([]string{"<"}, "<", "cursor back 1/20 of the sweep"),
		CursorJumpNext: b([]string{">"}, ">", "cursor on 1/20 of the sweep"),
		ZoomIn:         b([]string{"+", "="}, "+", "zoom in (at the cursor)"),
		ZoomOut:        b([]string{"-", "_"}, "-", "zoom out"),
		ZoomInX:        b([]string{"z"}, "z", "zoom in, x only"),
		ZoomOutX:       b([]string{"Z"}, "Z", "zoom out, x only"),
		ZoomInY:        b([]string{"y"}, "y", "zoom in, y only"),
		ZoomOutY:       b([]string{"Y"}, "Y", "zoom out, y only"),
		PanLeft:        b([]string{"H", "shift+left"}, "H", "pan left"),
		PanRight:       b([]string{"L", "shift+right"}, "L", "pan right"),
		PanUp:          b([]string{"K", "shift+up"}, "K", "pan up"),
		PanDown:        b([]string{"J", "shift+down"}, "J", "pan down"),
		ResetView:      b([]string{"0"}, "0", "whole chart"),
		LogX:           b([]string{"x"}, "x", "log x axis on/off"),

		Yes:       b([]string{"y", "Y"}, "y", "yes, quit"),
		No:        b([]string{"n", "N", "esc"}, "n/esc", "no, stay"),
		SaveFirst: b([]string{"s"}, "s", "save first"),

		Submit:    b([]string{"enter"}, "enter", "done"),
		NextField: b([]string{"tab", "down"}, "tab/↓", "next box"),
		PrevField: b([]string{"shift+tab", "up"}, "shift+tab/↑", "previous box"),
		Dismiss:   b([]string{"esc"}, "esc", "cancel, nothing lost"),

		SaveNext:  b([]string{"n"}, "n", "save as the next revision anyway"),
		SaveCopy:  b([]string{"c"}, "c", "save as a copy under a new name"),
		ShowNewer: b([]string{"d"}, "d", "what the newer revision changed"),

		DraftRestore: b([]string{"r"}, "r", "restore the draft"),
		DraftDiscard: b([]string{"d"}, "d", "discard the draft"),
		DraftLater:   b([]string{"q"}, "q", "quit, keep the draft"),

		ListUp:      b([]string{"up"}, "↑", "previous session"),
		ListDown:    b([]string{"down"}, "↓", "next session"),
		Open:        b([]string{"enter"}, "enter", "open the newest revision"),
		Revisions:   b([]string{"tab", "right"}, "tab/→", "revisions of the session"),
		ClearFilter: b([]string{"ctrl+u"}, "ctrl+u", "clear the filter"),
		Close:       b([]string{"esc"}, "esc", "close"),

		Mark:        b([]string{" ", "m"}, "space", "mark as the older side"),
		DiffPair:    b([]string{"d"}, "d", "diff marked (or previous) with selected"),
		DiffCurrent: b([]string{"c"}, "c", "diff selected with your current edits"),
		RestoreRev:  b([]string{"r"}, "r", "restore as the newest revision"),
		OpenRev:     b([]string{"enter"}, "enter", "open this revision"),
		Back:        b([]string{"esc", "left", "shift+tab"}, "esc", "back"),

		Import:    b([]string{"i"}, "i", "import a measurement"),
		Fit:       b([]string{"f"}, "f", "fit an I-V or C-V measurement"),
		AddData:   b([]string{"enter"}, "enter", "add to the session"),
		AddFit:    b([]string{"f"}, "f", "add and fit"),
		EditPath:  b([]string{"e", "backspace"}, "e", "edit the path"),
		Refit:     b([]string{"enter"}, "enter", "refit in the window"),
		PrevData:  b([]string{"pgup"}, "pgup", "previous data set"),
		NextData:  b([]string{"pgdown"}, "pgdn", "next data set"),
		KeepFit:   b([]string{"ctrl+k"}, "ctrl+k", "keep the fit with the session"),
		LinLog:    b([]string{"ctrl+l"}, "ctrl+l", "linear/log current axis"),
		Arrhenius: b([]string{"A"}, "A", "activation energy from the I-V data sets"),
		Batch:     b([]string{"B"}, "B", "batch fit of a directory of I-V files"),
		Card:      b([]string{"M"}, "M", "model card from the session's data sets"),
	}
	return k
}

// forMode switches the session keys for review mode (read-only): saving
// is off and its keys copy the session into the reviewer's own sessions;
// n adds a review note instead of a session note.
func (k KeyMap) forMode(readOnly bool) KeyMap {
	k.review = readOnly
	k.Save.SetEnabled(!readOnly)
	k.SaveAs.SetEnabled(!readOnly)
	k.CopyOwn.SetEnabled(readOnly)
	k.Share.SetEnabled(!readOnly)
	k.Import.SetEnabled(!readOnly)
	if readOnly {
		k.Note.SetHelp("n", "add a review note")
	} else {
		k.Note.SetHelp("n", "add a note")
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
		&k.CursorLeftRight, &k.ScrollUp, &k.ScrollDown, &k.PrevChart, &k.NextChart,
		&k.NextField, &k.PrevField, &k.ListUp, &k.ListDown, &k.Revisions} {
		fix(b)
	}
	return k
}

// globalBindings are the bindings shown in every panel's help.
func (k KeyMap) globalBindings() []key.Binding {
	if k.review {
		return []key.Binding{k.NextPanel, k.PrevPanel, k.ASCII, k.Solver, k.Help, k.Quit}
	}
	return []key.Binding{k.NextPanel, k.PrevPanel, k.Pin, k.Unpin, k.ASCII, k.Solver, k.Help, k.Quit}
}

// defineBindings are the keys of the definition panel.
func (k KeyMap) defineBindings() []key.Binding {
	if k.review {
		return []key.Binding{k.Up, k.Down, k.Step, k.NextStep, k.PrevStep}
	}
	return []key.Binding{k.Up, k.Down, k.Change, k.Edit, k.Step, k.NextStep, k.PrevStep, k.RestoreDefault}
}

// chartBindings are the keys of the charts panel.
func (k KeyMap) chartBindings() []key.Binding {
	if k.review {
		return append([]key.Binding{k.PrevChart, k.NextChart}, k.chartViewBindings()...)
	}
	return append([]key.Binding{k.PrevChart, k.NextChart, k.Sweep}, k.chartViewBindings()...)
}

// chartViewBindings are the keys that read a chart: cursor, zoom, pan.
func (k KeyMap) chartViewBindings() []key.Binding {
	return []key.Binding{k.Cursor, k.CursorPrev, k.CursorNext, k.CursorJumpPrev, k.CursorJumpNext,
		k.ZoomIn, k.ZoomOut, k.ZoomInX, k.ZoomOutX, k.ZoomInY, k.ZoomOutY,
		k.PanLeft, k.PanRight, k.PanUp, k.PanDown, k.ResetView, k.LogX}
}

// sessionBindings are the session keys, shown in every panel's full help.
func (k KeyMap) sessionBindings() []key.Binding {
	return []key.Binding{k.Save, k.SaveAs, k.CopyOwn, k.Browse, k.Note, k.Share}
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
	if k.review {
		return []key.Binding{k.Down, k.Step, k.NextPanel, k.Note, k.CopyOwn, k.Help, k.Quit}
	}
	return []key.Binding{k.Down, k.Edit, k.Change, k.Step, k.NextPanel, k.Pin, k.Help, k.Quit, k.Save, k.CopyOwn}
}

func (h formHelp) FullHelp() [][]key.Binding {
	k := h.k
	return [][]key.Binding{
		k.defineBindings(),
		{k.Apply, k.Cancel, k.ApplyNext, k.ApplyPrev, k.CursorLeftRight, k.ClearToStart},
		k.globalBindings(),
		k.sessionBindings(),
	}
}

// sheetHelp is the help of the results panel.
type sheetHelp struct{ k KeyMap }

func (h sheetHelp) ShortHelp() []key.Binding {
	k := h.k
	if k.review {
		return []key.Binding{k.ScrollDown, k.PageDown, k.NextPanel, k.Note, k.CopyOwn, k.Help, k.Quit}
	}
	return []key.Binding{k.ScrollDown, k.PageDown, k.NextPanel, k.Pin, k.Unpin, k.Help, k.Quit, k.Save, k.CopyOwn}
}

func (h sheetHelp) FullHelp() [][]key.Binding {
	k := h.k
	return [][]key.Binding{{k.ScrollUp, k.ScrollDown, k.PageUp, k.PageDown, k.Top, k.Bottom}, k.globalBindings(), k.sessionBindings()}
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
	if k.review {
		return []key.Binding{k.NextChart, k.PrevChart, k.Cursor, k.ZoomIn, k.Solver, k.NextPanel, k.Note, k.CopyOwn, k.Help, k.Quit}
	}
	return []key.Binding{k.NextChart, k.PrevChart, k.Cursor, k.ZoomIn, k.Sweep, k.Solver, k.NextPanel, k.Pin, k.Help, k.Quit, k.Save, k.CopyOwn}
}

func (h chartHelp) FullHelp() [][]key.Binding {
	k := h.k
	return [][]key.Binding{k.chartBindings(), k.globalBindings(), k.sessionBindings()}
}

// helpGroup is one titled column of the help screen.
type helpGroup struct {
	title string
	b     []key.Binding
}

// screenHelp is a screen's key map as the help screen lists it: the
// FullHelp of each screen's own key map (one definition of its keys:
// the map the screen's update and footer use), every key it acts on.
type screenHelp interface{ FullHelp() [][]key.Binding }

// helpGroups lists every binding of the workbench by where it applies:
// the panels' bindings from KeyMap, then each screen's from its own key
// map. The help screen shows them all.
func (m Model) helpGroups() []helpGroup {
	k := m.e.keys
	g := []helpGroup{
		{"Everywhere", k.globalBindings()},
		{"Sessions", k.sessionBindings()},
		{"Define", k.defineBindings()},
	}
	if !k.review {
		g = append(g, helpGroup{"Typing a value", []key.Binding{k.Apply, k.Cancel, k.ApplyNext, k.ApplyPrev, k.CursorLeftRight, k.ClearToStart}})
	}
	g = append(g,
		helpGroup{"Results", []key.Binding{k.ScrollUp, k.ScrollDown, k.PageUp, k.PageDown, k.Top, k.Bottom}},
		helpGroup{"Charts", k.chartBindings()},
		helpGroup{"Measurements", []key.Binding{k.Import, k.Fit, k.Arrhenius, k.Batch, k.Card}},
	)
	var screens []struct {
		title string
		keys  screenHelp
	}
	add := func(title string, keys screenHelp) {
		screens = append(screens, struct {
			title string
			keys  screenHelp
		}{title, keys})
	}
	if k.Import.Enabled() {
		add("Import", (&importScreen{}).importKeys(k))
	}
	add("Fit", (&fitScreen{}).fitKeys(k))
	add("Activation energy", k.arrheniusKeys())
	add("Batch fit", k.batchKeys())
	add("Model card", k.cardKeys())
	add("Session list", k.browseKeys())
	add("Revisions", k.historyKeys())
	add("Comparison", k.diffKeys())
	add("Dialogs", k.dialogKeys())
	add("Questions", (&confirmScreen{what: "yes, the question's action"}).confirmKeys(k))
	add("Quit question", m.quitKeys())
	add("Newer revision", k.staleKeys())
	add("Recovery draft", k.draftKeys())
	add("Help", k.helpKeys())
	for _, s := range screens {
		g = append(g, helpGroup{s.title, slices.Concat(s.keys.FullHelp()...)})
	}
	return g
}
