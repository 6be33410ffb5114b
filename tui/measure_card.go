package tui

import (
	"context"
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
	"junco/physics"
)

// cardScreen is the model-card screen: the card built from the
// session's data sets (fit.Card), read only, scrolled by top.
type cardScreen struct {
	res *fit.CardResult
	err string
	top int
}

// openCard builds the model card from the session's data sets and shows
// it: the forward I-V sets (the one nearest the junction's temperature is
// the reference, TNOM), the first reverse-only I-V set as the breakdown
// sweep, the first C-V set. A file without a temperature takes the
// junction's (the fit layer's rule).
func (m *Model) openCard() {
	sets := make([]fit.NamedDataSet, 0, len(m.sess.meas))
	for i := range m.sess.meas {
		sets = append(sets, fit.NamedDataSet{Name: m.sess.meas[i].ID, DataSet: &m.sess.meas[i].DataSet})
	}
	in, err := fit.CardInputsFrom(fit.CardName(m.name), sets, m.form.spec.Temperature)
	if err != nil {
		m.note = "no forward I-V data set in the session: i imports one (the model card needs forward I-V)"
		return
	}
	c := &cardScreen{}
	res, err := fit.Card(context.Background(), in)
	if err != nil {
		c.err = err.Error()
	}
	c.res = res
	m.push(c)
}

// cardKeys is the key map of the model-card screen.
type cardKeys struct {
	scrollKeys
	Close key.Binding
}

func (k KeyMap) cardKeys() cardKeys { return cardKeys{scrollKeys: k.scrollKeys(), Close: k.Close} }

func (k cardKeys) ShortHelp() []key.Binding { return []key.Binding{k.Down, k.Up, k.Close} }

// FullHelp is every key of the model card, for the help screen.
func (k cardKeys) FullHelp() [][]key.Binding {
	return [][]key.Binding{append(k.scrollKeys.list(), k.Close)}
}

func (c *cardScreen) footer(m Model) []key.Binding { return m.e.keys.cardKeys().ShortHelp() }

func (c *cardScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.cardKeys()
	end := max(0, len(c.lines(*m, m.w))-(m.h-2-1))
	if !k.scroll(&c.top, km, 10, end) && keyIs(km, k.Close) {
		m.close(c)
	}
	return nil
}

// draw draws the title and the card's lines from the scroll.
func (c *cardScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	head := rule("Model card from the session's data sets", w, glyphs{hbar: g.hbarHeavy}, st.heading)
	out := c.lines(m, w)
	top := min(c.top, max(0, len(out)-(h-1)))
	return block(append([]string{head}, out[top:]...), w, h, g.ellipsis)
}

// lines are the card for width w: the sweeps used, the parameters with
// their standard errors and sources, the ranges and cautions, the card
// itself (continued with "+" lines to fit the width), the subcircuit and
// notes.
func (c *cardScreen) lines(m Model, w int) []string {
	st, g := m.e.st, m.e.g
	var out []string
	if c.err != "" {
		out = append(out, st.err.Paint(g.bad+" no model card:"))
		out = append(out, wrapped(c.err, w, st.err, "  ")...)
	}
	if r := c.res; r != nil {
		for _, s := range r.Curves {
			ref := ""
			if s.Reference {
				ref = " (reference, TNOM)"
			}
			out = append(out, cut(fmt.Sprintf("%s  %s%s  %s .. %s  rms ln %.3f", s.File, s.Temperature, ref,
				model.Format(model.Voltage, s.Window.MinV, 3, m.e.ascii), model.Format(model.Voltage, s.Window.MaxV, 3, m.e.ascii), s.RMSLog), w, g.ellipsis))
		}
		out = append(out, "", st.strong.Paint(cut(fmt.Sprintf("%-5s %-13s %-10s %s", "", "value", "std. error", "from"), w, g.ellipsis)))
		for _, p := range r.Params {
			se := "-"
			if physics.Finite(p.StdErr) {
				se = fmt.Sprintf("%.3g", p.StdErr)
			}
			out = append(out, cut(fmt.Sprintf("%-5s %-13s %-10s %s", p.Name, strings.TrimSpace(fmt.Sprintf("%.5g %s", p.Value, p.Unit)), se, p.Source), w, g.ellipsis))
		}
		out = append(out, "")
		for _, s := range r.Cautions {
			out = append(out, wrapped(s, w, st.err, "* ")...)
		}
		out = append(out, cardWrap(r.Card, w)...)
		if r.Subckt != "" {
			out = append(out, "", st.muted.Paint("* the shunt matters: this subcircuit holds it"))
			for _, l := range strings.Split(r.Subckt, "\n") {
				out = append(out, cardWrap(l, w)...)
			}
		}
		out = append(out, "")
		for _, n := range r.Notes {
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
	}
	return out
}

// cardWrap breaks a card line at blanks into lines of at most w columns,
// the continuations starting with "+ " (SPICE's continuation), so the
// text stays a valid card when copied.
func cardWrap(line string, w int) []string {
	if len(line) <= w || w < 20 {
		return []string{line}
	}
	var out []string
	cur := ""
	for _, f := range strings.Fields(line) {
		switch {
		case cur == "":
			cur = f
		case len(cur)+1+len(f) > w:
			out = append(out, cur)
			cur = "+ " + f
		default:
			cur += " " + f
		}
	}
	return append(out, cur)
}
