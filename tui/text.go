package tui

import (
	"strings"

	"github.com/charmbracelet/x/ansi"
)

// width is the number of terminal cells s occupies (escape codes ignored).
func width(s string) int { return ansi.StringWidth(s) }

// padRight pads s with spaces to w cells, truncating with tail when longer.
func padRight(s string, w int, tail string) string {
	if w <= 0 {
		return ""
	}
	n := width(s)
	if n > w {
		if width(tail) >= w {
			tail = ""
		}
		return ansi.Truncate(s, w, tail)
	}
	return s + strings.Repeat(" ", w-n)
}

// padLeft right-aligns s in w cells.
func padLeft(s string, w int) string {
	n := width(s)
	if n >= w {
		return s
	}
	return strings.Repeat(" ", w-n) + s
}

// cut truncates s to w cells with tail.
func cut(s string, w int, tail string) string {
	if w <= 0 {
		return ""
	}
	if width(s) <= w {
		return s
	}
	if width(tail) >= w {
		tail = ""
	}
	return ansi.Truncate(s, w, tail)
}

// wrapText breaks plain text into lines of at most w cells at spaces,
// breaking words longer than a line.
func wrapText(s string, w int) []string {
	if w < 1 {
		w = 1
	}
	var out []string
	for _, para := range strings.Split(s, "\n") {
		line := ""
		for _, word := range strings.Fields(para) {
			for width(word) > w {
				if line != "" {
					out = append(out, line)
					line = ""
				}
				head := ansi.Truncate(word, w, "")
				if head == "" {
					head = string([]rune(word)[:1])
				}
				out = append(out, head)
				word = word[len(head):]
			}
			switch {
			case line == "":
				line = word
			case width(line)+1+width(word) <= w:
				line += " " + word
			default:
				out = append(out, line)
				line = word
			}
		}
		out = append(out, line)
	}
	return out
}

// block fits lines into exactly w x h cells: every line padded or cut to
// w, missing lines blank, extra lines dropped.
func block(lines []string, w, h int, tail string) []string {
	if h < 0 {
		h = 0
	}
	out := make([]string, h)
	for i := 0; i < h; i++ {
		if i < len(lines) {
			out[i] = padRight(lines[i], w, tail)
		} else {
			out[i] = strings.Repeat(" ", max(w, 0))
		}
	}
	return out
}

// joinColumns sets blocks of equal height side by side with a separator.
func joinColumns(sep string, cols ...[]string) []string {
	h := 0
	for _, c := range cols {
		h = max(h, len(c))
	}
	out := make([]string, h)
	for i := range out {
		var b strings.Builder
		for j, c := range cols {
			if j > 0 {
				b.WriteString(sep)
			}
			if i < len(c) {
				b.WriteString(c[i])
			}
		}
		out[i] = b.String()
	}
	return out
}

// rule draws a heading rule: "── title ─────" across w cells.
func rule(title string, w int, g glyphs, paint ink) string {
	if w <= 0 {
		return ""
	}
	lead := g.hbar + g.hbar + " "
	t := lead + title + " "
	if width(t) > w {
		return paint.Paint(cut(t, w, g.ellipsis))
	}
	return paint.Paint(t + strings.Repeat(g.hbar, w-width(t)))
}

// flagText is a flag as a screen shows it: "code: message", or only the
// message when it already begins with the code's words ("high injection:
// ..." for high-injection), so that no label is read twice.
func flagText(code, msg string) string {
	words := strings.ReplaceAll(code, "-", " ")
	if len(msg) >= len(words) && strings.EqualFold(msg[:len(words)], words) {
		return msg
	}
	return code + ": " + msg
}
