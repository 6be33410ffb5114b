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
