package sessions

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// MaxEchoRunes is how much of one name, title, note, header or cell a
// table shows; the rest is cut and marked.
const MaxEchoRunes = 120

// Printable returns s fit to echo on a terminal, for every front end (the
// command line's tables and messages, the workbench): control characters
// (C0, DEL, C1, line breaks and tabs included) and invisible format
// characters (bidirectional overrides, zero-width marks) are written as
// Go-style escapes (\x1b, \n, \u202e), invalid UTF-8 bytes as \xNN, so
// that text from a file or another user can neither move the cursor,
// recolour the screen nor hide what it says. When maxRunes > 0 the result
// is cut to at most maxRunes runes, the last of them tail (for example
// "…" or "...").
func Printable(s string, maxRunes int, tail string) string {
	var b strings.Builder
	for i := 0; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\r':
			b.WriteString(`\r`)
		case r == '\t':
			b.WriteString(`\t`)
		case r < 0x80 && unicode.IsControl(r):
			fmt.Fprintf(&b, `\x%02x`, r)
		case unicode.IsControl(r) || unicode.Is(unicode.Cf, r):
			fmt.Fprintf(&b, `\u%04x`, r)
		default:
			b.WriteRune(r)
		}
		i += size
	}
	out := b.String()
	if maxRunes <= 0 || utf8.RuneCountInString(out) <= maxRunes {
		return out
	}
	keep := max(maxRunes-utf8.RuneCountInString(tail), 0)
	n := 0
	for i := range out {
		if n == keep {
			return out[:i] + tail
		}
		n++
	}
	return out
}
