package tui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/sessions"
)

// groupBreakdown is the result group whose values call for the safety
// caution.
const groupBreakdown = model.GroupBreakdown

// sheetModel is the results sheet: every quantity of the result grouped,
// with its validity flags, and its change against a pinned reference.
type sheetModel struct {
	e   env
	res *model.Result
	pin *model.Result
	// stale names what is not in force when the result is from the last
	// valid input rather than the text on screen.
	stale []string
	// notes and reviews are the session's notes and review notes.
	notes   []string
	reviews []sessions.ReviewNote
	scroll  int
	w, h    int
	// head is the sheet's status (live or not, the pin), which stays in
	// view; built is the rest of the sheet, which scrolls. Both are for
	// width w, rebuilt (rebuild) whenever the result, pin, width or
	// drawing mode changes.
	head  []string
	built []string
	// whole is set while the sheet has the focus: long labels then wrap
	// rather than being cut. Beside a focused panel the sheet is a glance
	// and keeps one line per value.
	whole bool
}

// setFocused tells the sheet whether it has the focus.
func (s *sheetModel) setFocused(on bool) {
	if s.whole != on {
		s.whole = on
		s.rebuild()
		s.clamp()
	}
}

func (s *sheetModel) SetSize(w, h int) {
	w, h = max(w, 0), max(h, 0)
	if w != s.w {
		s.w = w
		s.rebuild()
	}
	s.h = h
	s.clamp()
}

func (s *sheetModel) setEnv(e env) { s.e = e; s.rebuild() }

// set puts a new result, pin and list of fields not in force.
func (s *sheetModel) set(res, pin *model.Result, stale []string) {
	s.res, s.pin, s.stale = res, pin, stale
	s.rebuild()
	s.clamp()
}

// setNotes puts the session's notes and review notes.
func (s *sheetModel) setNotes(notes []string, reviews []sessions.ReviewNote) {
	s.notes, s.reviews = notes, reviews
	s.rebuild()
	s.clamp()
}

func (s *sheetModel) rebuild() { s.head, s.built = s.headLines(), s.allLines() }

// room is the height the scrolling part of the sheet has.
func (s sheetModel) room() int { return max(s.h-len(s.head), 1) }

func (s *sheetModel) clamp() {
	n := len(s.built)
	if s.scroll > n-s.room() {
		s.scroll = n - s.room()
	}
	if s.scroll < 0 {
		s.scroll = 0
	}
}

// Update scrolls the sheet.
func (s sheetModel) Update(msg tea.Msg) (sheetModel, tea.Cmd) {
	km, ok := msg.(tea.KeyMsg)
	if !ok {
		return s, nil
	}
	k := s.e.keys
	switch {
	case keyIs(km, k.ScrollDown):
		s.scroll++
	case keyIs(km, k.ScrollUp):
		s.scroll--
	case keyIs(km, k.PageDown):
		s.scroll += max(s.room()-2, 1)
	case keyIs(km, k.PageUp):
		s.scroll -= max(s.room()-2, 1)
	case keyIs(km, k.Top):
		s.scroll = 0
	case keyIs(km, k.Bottom):
		s.scroll = 1 << 20
	}
	s.clamp()
	return s, nil
}

// cautionNeeded reports whether the result carries breakdown figures or a
// flag about power or dissipation.
func cautionNeeded(r *model.Result) bool {
	if r == nil {
		return false
	}
	for _, q := range r.Quantities {
		if q.Group == groupBreakdown {
			return true
		}
	}
	for _, f := range r.Flags {
		t := strings.ToLower(f.Code + " " + f.Message)
		if strings.Contains(t, "power") || strings.Contains(t, "dissipat") {
			return true
		}
	}
	return false
}

func hasGroup(r *model.Result, grp string) bool {
	for _, q := range r.Quantities {
		if q.Group == grp {
			return true
		}
	}
	return false
}

// cautionText is the short safety note shown with breakdown and power
// figures.
const cautionText = "Caution: breakdown and dissipation figures are estimates only. " +
	"High-voltage and high-current measurement is hazardous; local codes, lab safety rules " +
	"and the device's rated limits govern."

// View draws the visible part of the sheet.
func (s sheetModel) View() string { return strings.Join(s.lines(), "\n") }

func (s sheetModel) lines() []string {
	all := s.built
	if s.scroll > 0 && s.scroll < len(all) {
		all = all[s.scroll:]
	}
	head := s.head
	if len(head) >= s.h {
		head = head[:max(s.h-1, 0)]
	}
	out := block(append(append([]string(nil), head...), all...), s.w, s.h, s.e.g.ellipsis)
	if s.h > 0 && len(head)+len(all) > s.h {
		more := s.e.st.faint.Paint(cut(fmt.Sprintf("  %s more below (%s)", s.e.g.arrow, "j or pgdn"), s.w, ""))
		out[s.h-1] = padRight(more, s.w, "")
	}
	return out
}

// need is the width at which the sheet shows every label, symbol and
// value whole.
func (s sheetModel) need() int { return s.naturalCols().total() }

// headLines is the sheet's status: from the last valid input or live, and
// the pinned reference. It stays in view when the sheet scrolls.
func (s sheetModel) headLines() []string {
	st, g := s.e.st, s.e.g
	w := s.w
	if w < 10 || s.res == nil {
		return nil
	}
	var out []string
	if len(s.stale) > 0 {
		msg := g.bad + " From the last valid input: not in force " + strings.Join(s.stale, ", ") + " (see Define)"
		for _, l := range wrapText(msg, w) {
			out = append(out, st.err.Paint(l))
		}
	} else {
		out = append(out, st.ok.Paint(cut(g.good+" live: follows every accepted change", w, g.ellipsis)))
	}
	if s.pin != nil {
		for _, l := range wrapText(g.delta+" change against the pinned reference: "+specSummary(s.pin.Spec, s.e.ascii), w) {
			out = append(out, st.pinned.Paint(l))
		}
	}
	return append(out, "")
}

// layoutCols reports the columns of the quantity table for width w.
type sheetCols struct {
	label, sym, val, marks, delta, pct int
}

func (s sheetModel) naturalCols() sheetCols {
	c := sheetCols{label: 20, sym: 6, val: 14, marks: 6}
	if s.res != nil {
		for _, q := range s.res.Quantities {
			c.label = max(c.label, width(q.Label)+1)
			c.sym = max(c.sym, width(q.Symbol)+1)
			c.val = max(c.val, width(q.Text(4, s.e.ascii))+1)
		}
	}
	if s.pin != nil {
		c.delta, c.pct = 14, 10 // "+2.37 nF/cm^2", " +1.2e5%" and gaps
	}
	if s.res != nil {
		// The flag marks and the changes as wide as the longest, with a
		// gap before each column: no column runs into the next.
		flagNo := flagNumbers(s.res)
		for _, q := range s.res.Quantities {
			c.marks = max(c.marks, width(markText(q, flagNo))+1)
			if s.pin != nil {
				d, p := deltaText(q, s.pin, s.e.ascii)
				c.delta, c.pct = max(c.delta, width(d)+1), max(c.pct, width(p)+1)
			}
		}
	}
	return c
}

// flagNumbers numbers the flags of r from 1, so that marks beside values
// point into the list of warnings.
func flagNumbers(r *model.Result) map[string]int {
	flagNo := map[string]int{}
	for i, f := range r.Flags {
		if _, ok := flagNo[f.Code]; !ok {
			flagNo[f.Code] = i + 1
		}
	}
	return flagNo
}

// markText is the marks of q's flags, " [1,2]" ("" without flags).
func markText(q model.Quantity, flagNo map[string]int) string {
	var marks []string
	for _, code := range q.Flags {
		if n, ok := flagNo[code]; ok {
			marks = append(marks, strconv.Itoa(n))
		}
	}
	if len(marks) == 0 {
		return ""
	}
	return " [" + strings.Join(marks, ",") + "]"
}

func (s sheetModel) cols(w int) sheetCols {
	c := s.naturalCols()
	// Too wide: the label column narrows first (long labels then wrap
	// onto a second line), then the symbols, then the labels down to a
	// floor; the values and changes are never cut.
	if over := c.total() - w; over > 0 && s.whole {
		c.label -= min(over, max(c.label-sheetLabelWrapW, 0))
	}
	if over := c.total() - w; over > 0 {
		c.sym -= min(over, max(c.sym-sheetSymMinW, 0))
	}
	if over := c.total() - w; over > 0 {
		c.label -= min(over, max(c.label-sheetLabelMinW, 0))
	}
	// Beside a focused panel the sheet is a glance: rather than labels cut
	// to a few letters it shows symbols and values only.
	if nat := s.naturalCols(); !s.whole && c.label < sheetGlanceLabelW && c.label < nat.label {
		c.label = 0
		c.sym = min(nat.sym, max(c.sym, w-(c.total()-c.sym)))
	}
	return c
}

// sheetGlanceLabelW is the narrowest label column a glance at the sheet
// shows; narrower, the labels are left out.
const sheetGlanceLabelW = 18

// sheetLabelWrapW is the label column the sheet narrows to, wrapping long
// labels, before it shortens symbols.
const sheetLabelWrapW = 18

// Floors of the sheet's label and symbol columns in a narrow panel.
const sheetLabelMinW, sheetSymMinW = 10, 7

// minNeed is the narrowest width at which the sheet shows every value
// whole (labels and symbols cut to their floors).
func (s sheetModel) minNeed() int {
	c := s.naturalCols()
	c.label, c.sym = min(c.label, sheetLabelMinW), min(c.sym, sheetSymMinW)
	return c.total()
}

func (c sheetCols) total() int { return 2 + c.label + c.sym + c.val + c.marks + c.delta + c.pct }

// allLines builds the whole sheet for the width.
func (s sheetModel) allLines() []string {
	st, g := s.e.st, s.e.g
	w := s.w
	if w < 10 || s.res == nil {
		return []string{st.muted.Paint("no result yet")}
	}
	r := s.res
	var out []string
	out = append(out, s.noteLines(w)...)

	flagNo := flagNumbers(r)
	c := s.cols(w)
	twoCol := w >= 2*c.total()+3
	var blocks [][]string
	for _, grp := range r.Groups() {
		blocks = append(blocks, s.group(grp, c, flagNo))
	}
	if twoCol {
		// Split the groups in order where the taller column is shortest.
		best, bestH := 1, 1<<30
		for k := 1; k < len(blocks); k++ {
			l, r := 0, 0
			for i, b := range blocks {
				if i < k {
					l += len(b)
				} else {
					r += len(b)
				}
			}
			if max(l, r) < bestH {
				best, bestH = k, max(l, r)
			}
		}
		var left, right []string
		for i, b := range blocks {
			if i < best {
				left = append(left, b...)
			} else {
				right = append(right, b...)
			}
		}
		colW := c.total()
		left = block(left, colW, max(len(left), len(right)), g.ellipsis)
		out = append(out, joinColumns("   ", left, right)...)
	} else {
		for _, b := range blocks {
			out = append(out, b...)
		}
	}
	if len(r.Flags) > 0 {
		out = append(out, "", st.heading.Paint("Warnings"))
		for i, f := range r.Flags {
			msg := fmt.Sprintf("[%d] %s", i+1, flagText(f.Code, f.Message))
			for j, l := range wrapText(msg, w-6) {
				if j > 0 {
					l = "    " + l
				}
				out = append(out, "  "+st.warn.Paint(l))
			}
		}
	}
	if cautionNeeded(r) && !hasGroup(r, groupBreakdown) {
		out = append(out, "")
		for _, l := range wrapText(g.bad+" "+cautionText, w-2) {
			out = append(out, "  "+st.caution.Paint(l))
		}
	}
	return out
}

// noteLines draws the session notes and the review notes, when there are
// any.
func (s sheetModel) noteLines(w int) []string {
	st := s.e.st
	var out []string
	if len(s.notes) > 0 {
		out = append(out, st.heading.Paint("Session notes"))
		for _, n := range s.notes {
			for j, l := range wrapText(n, max(w-4, 8)) {
				if j > 0 {
					l = "  " + l
				}
				out = append(out, "  "+l)
			}
		}
		out = append(out, "")
	}
	if len(s.reviews) > 0 {
		out = append(out, st.heading.Paint("Review notes"))
		for _, r := range s.reviews {
			for j, l := range wrapText(r.Author+", "+stamp(r.Time)+": "+r.Text, max(w-4, 8)) {
				if j > 0 {
					l = "  " + l
				}
				out = append(out, "  "+st.pinned.Paint(l))
			}
		}
		out = append(out, "")
	}
	return out
}

// group draws one result group.
func (s sheetModel) group(grp string, c sheetCols, flagNo map[string]int) []string {
	st, g, ascii := s.e.st, s.e.g, s.e.ascii
	out := []string{st.heading.Paint(grp)}
	if grp == groupBreakdown {
		for _, l := range wrapText(g.bad+" "+cautionText, max(c.total()-4, 20)) {
			out = append(out, "  "+st.caution.Paint(l))
		}
	}
	for _, q := range s.res.Quantities {
		if q.Group != grp {
			continue
		}
		// A label longer than its column wraps under itself, keeping its
		// indent; only a single word wider than the column is cut.
		indent := q.Label[:len(q.Label)-len(strings.TrimLeft(q.Label, " "))]
		labelLines := []string{strings.TrimLeft(q.Label, " ")}
		if s.whole && width(q.Label) > c.label-1 {
			// Continuation lines are indented two more.
			labelLines = wrapText(labelLines[0], max(c.label-1-len(indent)-2, 4))
		}
		var b strings.Builder
		b.WriteString("  ")
		if c.label > 0 {
			b.WriteString(padRight(indent+labelLines[0], c.label-1, g.ellipsis) + " ")
		}
		b.WriteString(st.muted.Paint(padRight(q.Symbol, c.sym-1, g.ellipsis) + " "))
		b.WriteString(st.strong.Paint(padLeft(q.Text(4, ascii), c.val)))
		b.WriteString(st.warn.Paint(padRight(markText(q, flagNo), c.marks, "]")))
		if s.pin != nil {
			d, p := deltaText(q, s.pin, ascii)
			b.WriteString(st.pinned.Paint(padLeft(d, c.delta)))
			b.WriteString(st.pinned.Paint(padLeft(p, c.pct)))
		}
		out = append(out, b.String())
		for _, l := range labelLines[1:] {
			out = append(out, "  "+padRight(indent+"  "+l, c.label-1, g.ellipsis))
		}
	}
	return out
}

// deltaText formats the change of q against the same quantity of the pin:
// absolute in q's unit and relative in percent.
func deltaText(q model.Quantity, pin *model.Result, ascii bool) (abs, pct string) {
	ref, ok := pin.Get(q.Key)
	if !ok {
		return "new", ""
	}
	if math.IsNaN(q.Value) || math.IsNaN(ref) {
		return "n/a", ""
	}
	d := q.Value - ref
	if d == 0 {
		return "=", ""
	}
	abs = model.Format(q.Kind, d, 3, ascii)
	if d > 0 {
		abs = "+" + abs
	}
	if ref != 0 && !math.IsInf(ref, 0) {
		p := 100 * d / math.Abs(ref)
		switch {
		case math.Abs(p) >= 1e4:
			// +1.2e5%, not +1.2e+05%
			pct = strings.Replace(strings.Replace(fmt.Sprintf("%+.1e%%", p), "e+0", "e", 1), "e+", "e", 1)
		case math.Abs(p) >= 100:
			pct = fmt.Sprintf("%+.0f%%", p)
		default:
			pct = fmt.Sprintf("%+.2g%%", p)
		}
	}
	return abs, pct
}

// specSummary is a one-line description of a junction.
func specSummary(s model.Spec, ascii bool) string {
	prof := "step"
	if s.Profile == "linear" {
		prof = "graded"
	}
	return fmt.Sprintf("%s %s, Na %s, Nd %s, %s, %s, %s", strings.ToUpper(s.Material), prof,
		model.Format(model.Density, s.AcceptorDensity, 3, ascii), model.Format(model.Density, s.DonorDensity, 3, ascii),
		model.Format(model.Area, s.Area, 3, ascii), model.Format(model.Temperature, s.Temperature, 4, ascii),
		model.Format(model.Voltage, s.Bias, 3, ascii))
}
