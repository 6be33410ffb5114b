package tui

import (
	"errors"
	"fmt"
	"reflect"
	"strconv"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
)

// fieldState is what a field shows: the text as the user typed it and,
// when that text is not in force, why.
type fieldState struct {
	text string
	err  string
	// kept is set when the value in force is the one from before the
	// text was edited (the text typed is not accepted).
	kept bool
}

// formModel is the guided definition: steps of fields that edit a
// model.Spec. The spec in force is always one model.Evaluate accepts; a
// field whose text is not accepted keeps its last good value in force and
// says so.
type formModel struct {
	e     env
	defs  []fieldDef
	steps []stepDef
	fs    []fieldState
	spec  model.Spec    // in force
	res   *model.Result // evaluation of spec
	// initErr is set when the initial spec could not be evaluated at all
	// and defaults were put in force instead.
	initErr string

	step, cur int
	typing    bool
	ed        lineEditor
	before    fieldState
	beforeSp  model.Spec
	beforeRes *model.Result
	note      string

	rev  int // bumps whenever spec changes
	w, h int
}

func newForm(e env, initial model.Spec) formModel {
	f := formModel{e: e, defs: fieldDefs(), steps: stepDefs()}
	f.fs = make([]fieldState, len(f.defs))
	for i, d := range f.defs {
		f.fs[i].text = fieldText(d, initial)
	}
	f.spec = initial
	res, err := model.Evaluate(initial)
	if err != nil {
		// Put defaults in force for each field Validate names and mark it.
		def := model.DefaultSpec()
		var ve *model.ValidationError
		if errors.As(err, &ve) {
			for _, fe := range ve.Fields {
				i := f.index(fe.Field)
				if i < 0 {
					continue
				}
				f.copyField(i, &f.spec, def)
				f.fs[i].err = f.describe(i, fe)
			}
			res, err = model.Evaluate(f.spec)
		}
		if err != nil {
			f.initErr = "the junction given cannot be evaluated (" + err.Error() + "); the defaults are in force"
			f.spec = def
			res, _ = model.Evaluate(def)
			for i, d := range f.defs {
				if fieldText(d, def) != f.fs[i].text && f.fs[i].err == "" {
					f.fs[i].err = "not applied: " + err.Error()
				}
			}
		}
	}
	f.res = res
	f.cur = f.firstOf(0)
	return f
}

// copyField copies one field's value from src into dst.
func (f formModel) copyField(i int, dst *model.Spec, src model.Spec) {
	d := f.defs[i]
	if d.choice {
		d.setStr(dst, d.str(src))
		return
	}
	v, set := d.num(src)
	d.setNum(dst, v, set)
}

func (f formModel) index(id string) int {
	for i, d := range f.defs {
		if d.id == id {
			return i
		}
	}
	return -1
}

// stepFields lists the visible fields of a step.
func (f formModel) stepFields(step int) []int {
	var out []int
	for i, d := range f.defs {
		if d.step == step && d.visible(f.spec) {
			out = append(out, i)
		}
	}
	return out
}

func (f formModel) firstOf(step int) int {
	if fl := f.stepFields(step); len(fl) > 0 {
		return fl[0]
	}
	return -1
}

// bad lists the fields whose text is not in force.
func (f formModel) bad() []int {
	var out []int
	for i, s := range f.fs {
		if s.err != "" && f.defs[i].visible(f.spec) {
			out = append(out, i)
		}
	}
	return out
}

func (f *formModel) SetSize(w, h int) { f.w, f.h = max(w, 0), max(h, 0) }

func (f *formModel) setEnv(e env) { f.e = e }

// Update handles a key for the focused definition panel.
func (f formModel) Update(msg tea.Msg) (formModel, tea.Cmd) {
	km, ok := msg.(tea.KeyMsg)
	if !ok {
		return f, nil
	}
	f.note = ""
	k := f.e.keys
	if f.typing {
		return f.updateTyping(km), nil
	}
	if f.cur < 0 || f.cur >= len(f.defs) {
		f.cur = f.firstOf(f.step)
	}
	s := km.String()
	switch {
	case keyIs(km, k.Step):
		n, _ := strconv.Atoi(s)
		f.gotoStep(n - 1)
	case keyIs(km, k.NextStep):
		f.gotoStep(f.step + 1)
	case keyIs(km, k.PrevStep):
		f.gotoStep(f.step - 1)
	case keyIs(km, k.Down):
		f.move(1)
	case keyIs(km, k.Up):
		f.move(-1)
	case f.cur < 0:
	case keyIs(km, k.RestoreDefault):
		f.restoreDefault(f.cur)
	case f.defs[f.cur].choice && keyIs(km, k.Change):
		dir := 1
		if s == "left" || s == "h" {
			dir = -1
		}
		f.cycle(f.cur, dir)
	case f.defs[f.cur].choice && keyIs(km, k.Edit):
		f.move(1)
	case !f.defs[f.cur].choice && keyIs(km, k.Edit):
		f.startTyping()
	}
	return f, nil
}

func (f *formModel) startTyping() {
	i := f.cur
	f.typing = true
	f.ed = newLineEditor(f.fs[i].text)
	f.before = f.fs[i]
	f.beforeSp = f.spec
	f.beforeRes = f.res
}

func (f formModel) updateTyping(km tea.KeyMsg) formModel {
	k := f.e.keys
	i := f.cur
	switch {
	case keyIs(km, k.Cancel):
		f.typing = false
		f.fs[i] = f.before
		if !reflect.DeepEqual(f.spec, f.beforeSp) {
			f.spec, f.res = f.beforeSp, f.beforeRes
			f.rev++
		}
		f.note = "typing cancelled; the value before it is back in force"
		return f
	case keyIs(km, k.Apply), km.String() == "tab", km.String() == "down":
		f.finishTyping()
		f.move(1)
		return f
	case km.String() == "shift+tab" || km.String() == "up":
		f.finishTyping()
		f.move(-1)
		return f
	}
	_, changed := f.ed.handle(km)
	if changed {
		f.tryNumber(i, f.ed.value())
		f.keepBefore()
	}
	return f
}

// keepBefore puts the value from before the typing back in force while the
// text typed so far is not accepted: a valid prefix met on the way (the
// "80" of "80F", the "-200" of "-200kV") never stays in force.
func (f *formModel) keepBefore() {
	f.fs[f.cur].kept = f.fs[f.cur].err != ""
	if f.fs[f.cur].err == "" || reflect.DeepEqual(f.spec, f.beforeSp) {
		return
	}
	f.spec, f.res = f.beforeSp, f.beforeRes
	f.rev++
}

// finishTyping ends text entry. Text that is not accepted stays on screen,
// marked, and the value from before the typing is back in force: a valid
// prefix met on the way (the "2" of "2 furlongs") never stays in force.
func (f *formModel) finishTyping() {
	f.typing = false
	f.keepBefore()
}

func (f *formModel) gotoStep(n int) {
	if n < 0 || n >= len(f.steps) {
		return
	}
	f.step = n
	f.cur = f.firstOf(n)
}

// move goes to the next or previous field, across step boundaries.
func (f *formModel) move(dir int) {
	var order []int
	for st := range f.steps {
		order = append(order, f.stepFields(st)...)
	}
	pos := -1
	for j, i := range order {
		if i == f.cur {
			pos = j
		}
	}
	pos += dir
	if pos < 0 || pos >= len(order) {
		return
	}
	f.cur = order[pos]
	f.step = f.defs[f.cur].step
}

// tryNumber parses text for number field i and puts it in force when the
// whole junction stays valid; otherwise it records why not.
func (f *formModel) tryNumber(i int, text string) {
	d := f.defs[i]
	f.fs[i].text = text
	cand := f.spec
	v, set, err := d.Parse(text)
	if err != nil {
		f.fs[i].err = err.Error()
		return
	}
	d.setNum(&cand, v, set)
	f.commit(i, cand)
}

// commit validates and evaluates a candidate spec changed in field i.
func (f *formModel) commit(i int, cand model.Spec) bool {
	d := f.defs[i]
	if err := cand.Validate(); err != nil {
		var ve *model.ValidationError
		if !errors.As(err, &ve) {
			f.fs[i].err = err.Error()
			return false
		}
		if fe, ok := ve.For(d.id); ok {
			f.fs[i].err = f.describe(i, fe)
			return false
		}
		var others []string
		for _, fe := range ve.Fields {
			if j := f.index(fe.Field); j >= 0 {
				others = append(others, f.defs[j].Title+" "+fe.Value+" (allowed "+fe.Allowed+")")
			}
		}
		f.fs[i].err = "not applied: with this value " + strings.Join(others, "; ") + " would be out of range"
		return false
	}
	res, err := model.Evaluate(cand)
	if err != nil {
		f.fs[i].err = "not applied: the model cannot evaluate this junction: " + err.Error()
		return false
	}
	f.fs[i].err = ""
	if !reflect.DeepEqual(cand, f.spec) {
		f.spec, f.res = cand, res
		f.rev++
	}
	return true
}

// describe words a field error for the panel: the value, the allowed
// range and why (the field is named by its row).
func (f formModel) describe(i int, fe model.FieldError) string {
	return fmt.Sprintf("%s: %s is not allowed (allowed %s): %s", f.defs[i].Title, fe.Value, fe.Allowed, fe.Why)
}

// cycle steps a choice field through its options.
func (f *formModel) cycle(i, dir int) {
	d := f.defs[i]
	opts := d.options(f.spec)
	if len(opts) == 0 {
		return
	}
	cur := optionIndex(opts, d.str(f.spec))
	next := (cur + dir + len(opts)) % len(opts)
	if cur < 0 {
		next = 0
	}
	f.setChoice(i, opts[next].Value)
}

func optionIndex(opts []option, v string) int {
	for j, o := range opts {
		if strings.EqualFold(o.Value, v) {
			return j
		}
	}
	return -1
}

func (f *formModel) setChoice(i int, v string) {
	d := f.defs[i]
	before, cand := f.spec, f.spec
	d.setStr(&cand, v)
	// A choice the changed junction no longer offers (a species of
	// another material) falls back to the usual one, the empty choice.
	var reset []string
	for j, o := range f.defs {
		if j == i || !o.choice {
			continue
		}
		cur := o.str(cand)
		opts := o.options(cand)
		if cur == "" || optionIndex(opts, cur) >= 0 || optionIndex(opts, "") < 0 {
			continue
		}
		reset = append(reset, o.Label+" "+cur)
		o.setStr(&cand, "")
	}
	prev := f.fs[i].text
	f.fs[i].text = v
	if !f.commit(i, cand) {
		f.fs[i].text = prev
		f.note = "not changed: " + f.fs[i].err
		f.fs[i].err = ""
		return
	}
	// The other choices that changed show what is in force now.
	for j, o := range f.defs {
		if j != i && o.choice && o.str(f.spec) != o.str(before) {
			f.fs[j] = fieldState{text: o.str(f.spec)}
		}
	}
	if len(reset) > 0 {
		f.note = strings.Join(reset, ", ") + " not known in the new " + d.Label + ": the usual one is in force"
	}
	if f.cur >= 0 && !f.defs[f.cur].visible(f.spec) {
		f.cur = f.firstOf(f.step)
	}
}

func (f *formModel) restoreDefault(i int) {
	d := f.defs[i]
	def := model.DefaultSpec()
	if d.choice {
		f.setChoice(i, d.str(def))
		return
	}
	f.tryNumber(i, fieldText(d, def))
	if f.fs[i].err == "" {
		f.note = d.label + " back to its default"
	}
}

// View draws the panel.
func (f formModel) View() string {
	return strings.Join(f.lines(), "\n")
}

func (f formModel) lines() []string {
	w, h := f.w, f.h
	if w < 10 || h < 1 {
		return block(nil, w, h, "")
	}
	st, g := f.e.st, f.e.g
	var head []string
	head = append(head, f.stepBar(w))
	sd := f.steps[min(max(f.step, 0), len(f.steps)-1)]
	head = append(head, st.strong.Paint(cut(fmt.Sprintf("Step %d of %d: %s", f.step+1, len(f.steps), sd.title), w, g.ellipsis)))
	if h >= 14 {
		for _, l := range wrapText(sd.intro, w) {
			head = append(head, st.muted.Paint(l))
		}
	}
	if f.initErr != "" {
		for _, l := range wrapText(g.bad+" "+f.initErr, w) {
			head = append(head, st.err.Paint(l))
		}
	}
	head = append(head, "")

	labelW, inputW, nowW := f.cols(w)

	var body []string
	focusLine, focusEnd := 0, 0
	for _, i := range f.stepFields(f.step) {
		d, fs := f.defs[i], f.fs[i]
		focused := i == f.cur
		if d.Section != "" {
			body = append(body, "", "  "+st.heading.Paint(d.Section))
		}
		mark := " "
		if focused {
			mark = st.accent.Paint(g.cursor)
		}
		label := padRight(d.label, labelW, g.ellipsis)
		if focused {
			label = st.strong.Paint(label)
		}
		var val string
		rowNowW := nowW
		switch {
		case focused && f.typing:
			val = "[" + f.ed.view(inputW, st.selected, " ") + "]"
		case d.choice:
			shown := choiceLabel(d, f.spec)
			if focused {
				shown = g.left + " " + shown + " " + g.right
			}
			// A choice with no value in force beside it may use that
			// column too; one with a value takes of that column what its
			// label needs while the value still fits.
			cw := inputW
			if now := f.nowText(i); now == "" {
				cw = inputW + nowW
			} else if sw := width(shown); sw > inputW {
				cw = max(inputW, min(sw, inputW+nowW-width(now)))
				rowNowW -= cw - inputW
			}
			val = " " + padRight(shown, cw, g.ellipsis) + " "
		default:
			t := fs.text
			if t == "" && d.Zero != "" {
				t = "(" + d.Zero + ")"
			}
			v := padRight(t, inputW, g.ellipsis)
			if focused {
				v = st.selected.Paint(v)
			}
			val = " " + v + " "
		}
		now := f.nowText(i)
		var nowP string
		if fs.err != "" {
			nowP = st.err.Paint(cut(g.bad+" kept "+now, rowNowW, g.ellipsis))
		} else {
			nowP = st.muted.Paint(cut(now, rowNowW, g.ellipsis))
		}
		if focused {
			focusLine = len(body)
		}
		body = append(body, mark+" "+label+" "+val+" "+nowP)
		if fs.err != "" {
			inForce := ". In force: " + now + "."
			if fs.kept {
				inForce = ". In force: " + now + ", the value from before editing."
			}
			for _, l := range wrapText(fs.err+inForce, max(w-4, 8)) {
				body = append(body, "    "+st.err.Paint(l))
			}
		}
		if focused {
			for _, l := range wrapText(f.detail(i), max(w-4, 8)) {
				body = append(body, "    "+st.faint.Paint(l))
			}
			focusEnd = len(body)
		}
	}
	if f.note != "" {
		body = append(body, "")
		for _, l := range wrapText(f.note, w-2) {
			body = append(body, "  "+st.warn.Paint(l))
		}
	}
	if f.res != nil {
		var parts []string
		for _, key := range f.steps[min(max(f.step, 0), len(f.steps)-1)].glance {
			for _, q := range f.res.Quantities {
				if q.Key == key {
					parts = append(parts, q.Symbol+" "+q.Text(4, f.e.ascii))
				}
			}
		}
		if len(parts) > 0 {
			body = append(body, "")
			glance := "now: " + strings.Join(parts, "  "+g.dot+"  ")
			for _, l := range wrapText(glance, w-2) {
				body = append(body, "  "+st.ok.Paint(l))
			}
		}
	}
	// Scroll the body so that the focused field and its notes show.
	room := h - len(head)
	if room < 1 {
		head = head[:max(h-1, 0)]
		room = h - len(head)
	}
	off := 0
	if focusEnd > room {
		off = min(focusLine, focusEnd-room)
	}
	if off > 0 && off < len(body) {
		body = body[off:]
	}
	return block(append(head, body...), w, h, g.ellipsis)
}

// Widths of the definition's columns: the text box, and the floors the
// input and the value in force shrink to in a narrow panel.
const (
	formInputW    = 18
	formInputMinW = 12
	formNowMinW   = 8
)

// labelWidth is the width of the longest field label: the label column is
// that wide in every step, so that no label is cut and the columns stay put.
func (f formModel) labelWidth() int {
	n := 0
	for _, d := range f.defs {
		n = max(n, width(d.label))
	}
	return n
}

// nowWidth is the width of the widest value in force of every step (so
// that the panel keeps its width from step to step). A value kept while
// the text is not accepted is marked in this column too, and given whole
// in the error line under the field.
func (f formModel) nowWidth() int {
	n := formNowMinW
	for i, d := range f.defs {
		if d.visible(f.spec) {
			n = max(n, width(f.nowText(i)))
		}
	}
	return n
}

// need is the width at which the panel shows every label, a full text box
// and every value in force.
func (f formModel) need() int { return 6 + f.labelWidth() + formInputW + f.nowWidth() }

// formMinW is the narrowest the definition panel is made beside a focused
// panel: labels then cut, and the value in force gives way to the text.
const formMinW = 28

// cols sizes the label, input and value columns for width w (a row is
// 6 + labelW + inputW + nowW cells): the labels whole, the input box then
// the value narrowed in a narrow panel; when even that does not fit, the
// value in force is left out (the error line under a field still gives it)
// and only then are labels cut.
func (f formModel) cols(w int) (labelW, inputW, nowW int) {
	labelW = f.labelWidth()
	avail := w - 6 - labelW // room for the input and the value
	inputW = min(formInputW, max(formInputMinW, avail-min(f.nowWidth(), avail/2)))
	nowW = avail - inputW
	if nowW >= formNowMinW {
		return labelW, inputW, nowW
	}
	inputW = min(formInputW, max(formInputMinW, avail))
	labelW = min(labelW, max(8, w-6-inputW))
	return labelW, inputW, max(0, w-6-labelW-inputW)
}

// stepBar draws the numbered steps, the current one marked, steps with a
// field not in force flagged.
func (f formModel) stepBar(w int) string {
	st := f.e.st
	badStep := map[int]bool{}
	for _, i := range f.bad() {
		badStep[f.defs[i].step] = true
	}
	render := func(short bool) (string, int) {
		var parts []string
		n := 0
		for i, s := range f.steps {
			name := s.name
			if short && i != f.step {
				name = ""
			}
			txt := strconv.Itoa(i + 1)
			if name != "" {
				txt += " " + name
			}
			if badStep[i] {
				txt += "!"
			}
			var p string
			if i == f.step {
				txt = "[" + txt + "]"
				p = st.tabOn.Paint(txt)
			} else if badStep[i] {
				p = st.err.Paint(txt)
			} else {
				p = st.tabOff.Paint(txt)
			}
			n += width(txt) + 1
			parts = append(parts, p)
		}
		return strings.Join(parts, " "), n - 1
	}
	s, n := render(false)
	if n > w {
		s, n = render(true)
	}
	if n > w {
		return cut(s, w, "")
	}
	return s
}

func choiceLabel(d fieldDef, s model.Spec) string {
	v := d.str(s)
	opts := d.options(s)
	if j := optionIndex(opts, v); j >= 0 {
		return opts[j].Label
	}
	if v == "" {
		return "(none)"
	}
	return v
}

// nowText is the value in force of field i, in trade units: for an empty
// field its Zero word, with the value the model derives (Shows) when there
// is one; for a choice the result it Shows, if any.
func (f formModel) nowText(i int) string {
	d := f.defs[i]
	var shown *model.Quantity
	if d.Shows != "" && f.res != nil {
		for j := range f.res.Quantities {
			if f.res.Quantities[j].Key == d.Shows {
				shown = &f.res.Quantities[j]
			}
		}
	}
	if d.choice {
		if shown != nil {
			return shown.Symbol + " " + shown.Text(4, f.e.ascii)
		}
		return ""
	}
	v, set := d.num(f.spec)
	if !set {
		if shown != nil {
			return d.Zero + ": " + model.Format(d.Kind, shown.Value, 4, f.e.ascii)
		}
		return d.Zero
	}
	return model.Format(d.Kind, v, 4, f.e.ascii)
}

// detail is the help line under the focused field: what it is, its unit,
// default and allowed range.
func (f formModel) detail(i int) string {
	d := f.defs[i]
	def := model.DefaultSpec()
	parts := []string{d.Hint}
	if d.choice {
		parts = append(parts, "default "+choiceLabel(d, def))
	} else {
		unit, _ := model.TradeUnit(d.Kind)
		parts = append(parts, "a bare number is in "+unit)
		if v, set := d.num(def); set {
			parts = append(parts, "default "+model.Format(d.Kind, v, 3, f.e.ascii))
		} else {
			parts = append(parts, "empty: "+d.Zero)
		}
		if allowed, _, ok := model.FieldAllowed(f.spec, d.id); ok {
			parts = append(parts, "allowed "+allowed)
		}
	}
	return strings.Join(parts, " "+f.e.g.dot+" ")
}
