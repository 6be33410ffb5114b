package tui

import (
	"regexp"
	"strings"
	"testing"
)

// The flag marks beside a value are never cut (the demo's ionised
// acceptors carry three flags) and, with a pin, the change column never
// runs into them: at every size a mark ends before a space.
func TestSheetMarksWholeAndApart(t *testing.T) {
	for _, size := range goldenSizes {
		m := newTest(t, size[0], size[1])
		m = press(m, "tab", "p")
		m = editField(m, "5", 0, "310")
		m = press(m, "enter", "tab")
		s := plain(m)
		if !strings.Contains(s, "[1,2,3]") {
			t.Errorf("%dx%d: the three flags of Na- are not all marked:\n%s", size[0], size[1], s)
		}
		if l := regexp.MustCompile(`\[[0-9,]+\][^ \n]`).FindString(s); l != "" {
			t.Errorf("%dx%d: a mark runs into the next column: %q\n%s", size[0], size[1], l, s)
		}
	}
}

// With a pin, the definition panel focused beside the charts at 120x40
// still gets the width it needs: the pinned sheet's columns (not shown)
// do not narrow it, and no value or label in it is cut.
func TestDefineBesideChartsWithPin(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "tab", "tab", "p", "tab", "5")
	if m.focus != panelDefine || m.rightPanel() != panelCharts || m.pin == nil {
		t.Fatalf("focus %v, right %v, pin %v", m.focus, m.rightPanel(), m.pin != nil)
	}
	lines := strings.Split(plain(m), "\n")
	for _, l := range lines[1 : len(lines)-1] {
		left, _, _ := strings.Cut(l, "│")
		if strings.Contains(left, "…") {
			t.Errorf("the definition panel cuts %q:\n%s", left, plain(m))
		}
	}
}
