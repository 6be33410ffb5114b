package tui

import (
	"strings"
	"testing"
)

// In the help, space and pgdn move a page, G and end go to the end, g and
// home back to the top.
func TestHelpPagesAndEnds(t *testing.T) {
	for _, size := range [][2]int{{80, 24}, {120, 40}} {
		m := press(newTest(t, size[0], size[1]), "?")
		page := m.h - 4
		end := len(m.helpLines(m.w)) - (m.h - 2)
		if m = press(m, "space"); onTop[helpScreen](m).off != page {
			t.Errorf("%v: space moved the help to %d, want a page (%d)", size, onTop[helpScreen](m).off, page)
		}
		if m = press(m, "pgdown"); onTop[helpScreen](m).off != min(2*page, end) {
			t.Errorf("%v: pgdn moved the help to %d, want %d", size, onTop[helpScreen](m).off, min(2*page, end))
		}
		m = press(m, "g", "G")
		if onTop[helpScreen](m).off != end || end <= 0 {
			t.Errorf("%v: G moved the help to %d, want its end %d", size, onTop[helpScreen](m).off, end)
		}
		if v := plain(m); strings.Contains(v, "more below") {
			t.Errorf("%v: at the end the help still says there is more below", size)
		}
		if m = press(m, "j", "j"); onTop[helpScreen](m).off != end {
			t.Errorf("%v: j past the end scrolled to %d", size, onTop[helpScreen](m).off)
		}
		if m = press(m, "home"); onTop[helpScreen](m).off != 0 {
			t.Errorf("%v: home left the help at %d", size, onTop[helpScreen](m).off)
		}
		if m = press(m, "end", "k"); onTop[helpScreen](m).off != end-1 {
			t.Errorf("%v: end then k is at %d, want %d", size, onTop[helpScreen](m).off, end-1)
		}
	}
}

// The step keys answer in every panel: from Results or Charts they show
// Define at that step, and the keys after them act there.
func TestStepKeysFromEveryPanel(t *testing.T) {
	for _, from := range []string{"tab", "tab tab"} {
		m := newTest(t, 80, 24)
		m = press(m, strings.Fields(from)...)
		m = press(m, "2")
		if m.focus != panelDefine || m.form.step != 1 {
			t.Fatalf("after %s, 2: focus %d step %d, want Define step 2", from, m.focus, m.form.step+1)
		}
		m = press(m, "down", "enter")
		if !m.form.typing || m.chart.editing {
			t.Errorf("after %s, 2, down, enter: typing %v in Define, sweep editor open %v", from, m.form.typing, m.chart.editing)
		}
	}
}

// The model card scrolls within its text as the help does: G and end show
// its last line, and k from there moves one line back (not from far
// beyond the end).
func TestCardScrollStopsAtTheEnd(t *testing.T) {
	m := press(newTest(t, 80, 24), "M")
	c := onTop[cardScreen](m)
	end := len(c.lines(m, m.w)) - (m.h - 3)
	if end <= 1 {
		t.Fatalf("the card is %d lines past the screen: too short to test", end)
	}
	if m = press(m, "G"); c.top != end || !strings.Contains(plain(m), c.lines(m, m.w)[len(c.lines(m, m.w))-1]) {
		t.Errorf("G scrolled the card to %d, want its end %d", c.top, end)
	}
	if m = press(m, "j", "k"); c.top != end-1 {
		t.Errorf("j past the end then k: %d, want %d", c.top, end-1)
	}
}
