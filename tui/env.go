package tui

import (
	"strings"

	"github.com/charmbracelet/lipgloss"
)

// env is the per-connection value every component is built from: the
// renderer, the drawing mode, the styles and glyphs made for it, and the
// key map. It holds no terminal size (each component keeps its own, set by
// SetSize) and nothing global.
type env struct {
	r     *lipgloss.Renderer
	ascii bool
	color bool
	st    styles
	g     glyphs
	keys  KeyMap
}

func newEnv(r *lipgloss.Renderer, ascii, color bool) env {
	e := env{r: r, ascii: ascii, color: color, keys: DefaultKeyMap()}
	e.st = newStyles(r, color)
	e.g = newGlyphs(ascii)
	return e
}

// ink paints short single-line text with a style's escape sequences,
// computed once: much cheaper than rendering the style for every string.
type ink struct{ pre, suf string }

func inkOf(s lipgloss.Style) ink {
	out := s.Render("X")
	i := strings.Index(out, "X")
	if i < 0 {
		return ink{}
	}
	return ink{pre: out[:i], suf: out[i+1:]}
}

// Paint returns text wrapped in the style's sequences.
func (k ink) Paint(text string) string {
	if k.pre == "" && k.suf == "" || text == "" {
		return text
	}
	return k.pre + text + k.suf
}

// styles are the looks of the workbench, built from one renderer. With
// colour off only bold, faint, underline and reverse remain, so every
// state stays visible on a monochrome terminal.
type styles struct {
	text, muted, faint, accent, strong, heading, headingOff          ink
	err, warn, ok, pinned, selected, keyName, caution, tabOn, tabOff ink
	// series paints the lines of a chart, in drawing order; pinSeries the
	// overlay of the pinned reference.
	series    []ink
	pinSeries ink
	// raw styles for the help component.
	helpKey, helpDesc, helpSep lipgloss.Style
}

// palette entries: dark-background and light-background variants, each as
// true colour, 256-colour and 16-colour values.
func tone(darkTC, dark256, lightTC, light256, ansi string) lipgloss.TerminalColor {
	return lipgloss.CompleteAdaptiveColor{
		Dark:  lipgloss.CompleteColor{TrueColor: darkTC, ANSI256: dark256, ANSI: ansi},
		Light: lipgloss.CompleteColor{TrueColor: lightTC, ANSI256: light256, ANSI: ansi},
	}
}

func newStyles(r *lipgloss.Renderer, color bool) styles {
	base := r.NewStyle()
	fg := func(c lipgloss.TerminalColor) lipgloss.Style {
		if !color {
			return base
		}
		return base.Foreground(c)
	}
	var (
		sage   = tone("#8CBFB2", "109", "#2E6B60", "23", "6")
		slate  = tone("#8B93A1", "246", "#5A6270", "241", "8")
		dim    = tone("#5E6672", "240", "#9AA1AC", "248", "8")
		sand   = tone("#D8B878", "180", "#85621A", "94", "3")
		rose   = tone("#E29A94", "174", "#A4403A", "131", "1")
		moss   = tone("#A3C98E", "150", "#41752F", "64", "2")
		heath  = tone("#B8A2D6", "141", "#5E4A8A", "99", "5")
		cloud  = tone("#D9DEE5", "253", "#2B313B", "236", "7")
		signal = tone("#F0C674", "221", "#7A5200", "94", "11")
	)
	// The chart lines' colours, one per series of a chart (the I-V
	// chart's seven: total, ideal, electron and hole diffusion,
	// diffusion, recombination, shunt; the solver's lines from the last
	// one back) and the pinned line's heath: in 256 colours and in true
	// colour, on dark and light backgrounds, no two are the same or
	// neighbouring shades (TestChartColoursDistinct); in 16 colours they
	// are distinct codes, though bright and plain of one hue (the markers
	// tell them apart). Chosen for this workbench.
	series := []lipgloss.TerminalColor{
		sage,
		tone("#E6D67A", "227", "#7A7000", "100", "3"),
		tone("#7FD36E", "83", "#2F8A1F", "34", "2"),
		tone("#F07CC8", "207", "#A0309A", "127", "13"),
		tone("#F0A45C", "215", "#B86200", "172", "11"),
		tone("#5A9CFF", "75", "#1F3FC0", "20", "4"),
		tone("#F07A7A", "203", "#C02828", "160", "1"),
		tone("#FFFFFF", "231", "#00A5C8", "37", "14"),
	}
	s := styles{
		text:       inkOf(base),
		muted:      inkOf(fg(slate)),
		faint:      inkOf(fg(dim).Faint(!color)),
		accent:     inkOf(fg(sage).Bold(true)),
		strong:     inkOf(fg(cloud).Bold(true)),
		heading:    inkOf(fg(sage).Bold(true)),
		headingOff: inkOf(fg(slate)),
		err:        inkOf(fg(rose).Bold(!color)),
		warn:       inkOf(fg(sand)),
		ok:         inkOf(fg(moss)),
		pinned:     inkOf(fg(heath)),
		selected:   inkOf(base.Reverse(true)),
		keyName:    inkOf(fg(sage)),
		caution:    inkOf(fg(signal).Bold(true)),
		tabOn:      inkOf(fg(sage).Bold(true).Underline(true)),
		tabOff:     inkOf(fg(slate)),
		pinSeries:  inkOf(fg(heath).Faint(!color)),
		helpKey:    fg(sage),
		helpDesc:   fg(slate),
		helpSep:    fg(dim),
	}
	for _, c := range series {
		s.series = append(s.series, inkOf(fg(c)))
	}
	return s
}

// glyphs are the characters the workbench draws with, Unicode or plain
// ASCII.
type glyphs struct {
	ascii                 bool
	cursor, bad, good     string
	vbar, hbar, hbarHeavy string
	left, right, ellipsis string
	dot, delta, arrow     string
	unsaved               string
	markers               []string // one per chart series, distinct without colour
	pinMarker             string
	// point marks measured points; mpp the maximum-power point of a lit
	// fit; plusMinus stands before a standard error.
	point, mpp, plusMinus string
	axisV, axisH, axisO   rune
	tickX, tickY          rune
}

func newGlyphs(ascii bool) glyphs {
	if ascii {
		return glyphs{ascii: true, cursor: ">", bad: "x", good: "+",
			vbar: "|", hbar: "-", hbarHeavy: "=", left: "<", right: ">", ellipsis: "...",
			dot: "-", delta: "d", arrow: "->", unsaved: "*",
			markers:   []string{"*", "o", "+", "x", "#", "%", "@", "="},
			pinMarker: ".", point: "+", mpp: "#", plusMinus: "+/-", axisV: '|', axisH: '-', axisO: '+', tickX: '+', tickY: '+'}
	}
	return glyphs{cursor: "▸", bad: "✗", good: "✓",
		vbar: "│", hbar: "─", hbarHeavy: "━", left: "◂", right: "▸", ellipsis: "…",
		dot: "·", delta: "Δ", arrow: "→", unsaved: "●",
		markers:   []string{"●", "■", "▲", "◆", "▼", "✚", "○", "□"},
		pinMarker: "∘", point: "•", mpp: "◆", plusMinus: "±", axisV: '│', axisH: '─', axisO: '└', tickX: '┬', tickY: '┤'}
}
