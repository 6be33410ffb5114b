package sessions

import (
	"bytes"
	"strings"
	"testing"
	"unicode/utf8"
)

// TestPrintable: terminal control sequences, line breaks, bidirectional
// overrides and broken UTF-8 come out as visible escapes; long text is
// cut to the limit with its mark.
func TestPrintable(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"d7", "d7"},
		{"p+n \x1b[31mred\x1b[0m", `p+n \x1b[31mred\x1b[0m`},
		{"two\nlines\r\tand tab", `two\nlines\r\tand tab`},
		{"bell\a del\x7f", `bell\x07 del\x7f`},
		{"c1 \u009b2J", `c1 \u009b2J`},
		{"evil\u202egnp.exe", `evil\u202egnp.exe`},
		{"broken \xff byte", `broken \xff byte`},
		{"µA and ° stay", "µA and ° stay"},
	} {
		if got := Printable(c.in, 0, ""); got != c.want {
			t.Errorf("Printable(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	long := strings.Repeat("é", 500)
	got := Printable(long, 20, "…")
	if utf8.RuneCountInString(got) != 20 || !strings.HasSuffix(got, "…") {
		t.Errorf("cut to %d runes: %q", utf8.RuneCountInString(got), got)
	}
	if got := Printable("short", 20, "…"); got != "short" {
		t.Errorf("short text changed: %q", got)
	}
}

// TestWriteTableEscapesAndCuts: a table never passes a control sequence
// through and cuts long cells.
func TestWriteTableEscapesAndCuts(t *testing.T) {
	var b bytes.Buffer
	WriteTable(&b, [][]string{{"NAME", "TITLE"}, {"x", "\x1b]0;owned\x07" + strings.Repeat("a", 400)}})
	out := b.String()
	if strings.ContainsAny(out, "\x1b\x07") {
		t.Errorf("the table passed control characters: %q", out)
	}
	for _, l := range strings.Split(strings.TrimSpace(out), "\n") {
		if n := utf8.RuneCountInString(l); n > MaxEchoRunes+10 {
			t.Errorf("a line of %d runes: long cells are not cut", n)
		}
	}
}
