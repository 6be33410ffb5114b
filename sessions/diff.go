package sessions

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"junco/model"
	"junco/sessions/internal/strictjson"
)

// Change is one row of a comparison between two documents: the section,
// the quantity with its symbol, the old and new values in trade units,
// and the change (a difference, a percentage, a factor, or a word such as
// "added").
type Change struct {
	Section  string
	Quantity string
	Old      string
	New      string
	Delta    string
}

// Sections of a comparison, in order.
const (
	SectionMeta         = "record"
	SectionInputs       = "inputs"
	SectionSweeps       = "sweeps"
	SectionResults      = "results"
	SectionMeasurements = "measurements"
	SectionExtractions  = "extractions"
	SectionReferences   = "references"
	SectionNotes        = "notes"
	SectionReviews      = "review notes"
)

// specField describes a model.Spec member for display: its JSON key, label
// (with the flag name), kind, and what a zero or absent value means. The
// fields come from the one catalogue, model.Catalogue.
type specField struct {
	key    string
	label  string
	kind   model.Kind
	text   bool   // a text field, shown quoted
	effect bool   // an effect switch: true (off) or absent (on)
	zero   string // shown for absent, and for 0 where zeroEmpty ("" = show the number)
	// zeroEmpty: a zero member is the empty value (a long region); where
	// it is not, 0 is a value (a contact velocity of 0 is a passivated
	// surface, not an ohmic contact).
	zeroEmpty bool
}

// specFields lists the Spec members junco knows, in display order, from
// model.Catalogue: the label is the catalogue's with the flag in brackets.
func specFields() []specField {
	cat := model.Catalogue()
	out := make([]specField, 0, len(cat))
	for _, f := range cat {
		out = append(out, specField{key: f.Key, label: f.Label + " (" + f.Flag + ")", kind: f.Kind,
			text: f.Class == model.ClassText, effect: f.Class == model.ClassEffect, zero: f.Zero, zeroEmpty: f.ZeroIsEmpty()})
	}
	return out
}

// specMembers returns the JSON members of a Spec as raw values; members of
// nested objects (the effect switches) appear as "effects.no_breakdown".
func specMembers(s model.Spec) map[string]json.RawMessage {
	top := map[string]json.RawMessage{}
	b, err := strictjson.Encode(s)
	if err != nil {
		return top
	}
	_ = json.Unmarshal(b, &top)
	out := map[string]json.RawMessage{}
	for k, v := range top {
		var inner map[string]json.RawMessage
		if bytes.HasPrefix(bytes.TrimSpace(v), []byte("{")) && json.Unmarshal(v, &inner) == nil {
			for ik, iv := range inner {
				out[k+"."+ik] = iv
			}
			continue
		}
		out[k] = v
	}
	return out
}

// SpecRow is one input of a Spec formatted for display.
type SpecRow struct {
	Key, Label, Value string
}

// SpecRows formats every member of a Spec in trade units, known members
// first in display order, then any others by their JSON text.
func SpecRows(s model.Spec, ascii bool) []SpecRow {
	m := specMembers(s)
	var out []SpecRow
	known := map[string]bool{}
	for _, f := range specFields() {
		known[f.key] = true
		out = append(out, SpecRow{Key: f.key, Label: f.label, Value: f.format(m[f.key], ascii)})
	}
	for _, k := range sortedKeys(m) {
		if !known[k] {
			out = append(out, SpecRow{Key: k, Label: k, Value: compactJSON(m[k])})
		}
	}
	return out
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

func compactJSON(raw json.RawMessage) string {
	if raw == nil {
		return "(absent)"
	}
	var b bytes.Buffer
	if json.Compact(&b, raw) != nil {
		return string(raw)
	}
	return b.String()
}

func (f specField) format(raw json.RawMessage, ascii bool) string {
	if f.effect {
		if string(raw) == "true" {
			return "off"
		}
		return "on"
	}
	if raw == nil || string(raw) == "null" {
		if f.zero != "" {
			return f.zero
		}
		if f.text {
			return `""`
		}
		return "0"
	}
	if f.text {
		var s string
		if json.Unmarshal(raw, &s) != nil {
			return compactJSON(raw)
		}
		if s == "" && f.zero != "" {
			return f.zero
		}
		return s
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(string(raw)), 64)
	if err != nil {
		return compactJSON(raw)
	}
	if v == 0 && f.zero != "" && f.zeroEmpty {
		return f.zero
	}
	return model.Format(f.kind, v, 4, ascii)
}

// empty reports whether a stored member (raw, read as v) is the field's
// empty value, shown by its Zero word.
func (f specField) empty(raw json.RawMessage, v float64) bool {
	return f.zero != "" && (raw == nil || string(raw) == "null" || (f.zeroEmpty && v == 0))
}

func (f specField) number(raw json.RawMessage) (float64, bool) {
	if f.text || f.effect || raw == nil {
		return 0, false
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(string(raw)), 64)
	return v, err == nil
}

// Delta describes the change from a to b of a quantity of kind k: an
// absolute difference for temperatures, voltages and energies, a
// percentage when the ratio lies within a factor of ten, a factor
// otherwise.
func Delta(k model.Kind, a, b float64, ascii bool) string {
	switch {
	case math.IsNaN(a) && math.IsNaN(b):
		return ""
	case math.IsNaN(a):
		return "now defined"
	case math.IsNaN(b):
		return "no longer defined"
	}
	switch k {
	case model.Temperature, model.Voltage, model.Energy:
		d := model.Format(k, b-a, 3, ascii)
		if b-a > 0 {
			d = "+" + d
		}
		return d
	}
	if a == 0 || b == 0 || (a < 0) != (b < 0) {
		return "from " + model.Format(k, a, 3, ascii)
	}
	r := b / a
	if r >= 0.1 && r <= 10 {
		return fmt.Sprintf("%+.3g %%", (r-1)*100)
	}
	return "x" + strconv.FormatFloat(r, 'g', 3, 64)
}

// Diff compares two documents and returns their differences: the record
// (title, author), every changed input in trade units, the sweeps, every
// changed result (both Specs evaluated with model.Evaluate), and the
// measurements, extractions, references, notes and review notes that were
// added, removed or changed, and the kept batch tables in summary
// (diffBatches). Identical documents give no rows.
func Diff(a, b *Document, ascii bool) []Change {
	var out []Change
	add := func(sec, q, o, n, d string) {
		out = append(out, Change{Section: sec, Quantity: q, Old: o, New: n, Delta: d})
	}
	if a.Meta.Title != b.Meta.Title {
		add(SectionMeta, "title", a.Meta.Title, b.Meta.Title, "changed")
	}
	if a.Meta.Author != b.Meta.Author {
		add(SectionMeta, "author", a.Meta.Author, b.Meta.Author, "changed")
	}

	// Inputs.
	ma, mb := specMembers(a.Spec), specMembers(b.Spec)
	known := map[string]bool{}
	for _, f := range specFields() {
		known[f.key] = true
		ra, rb := ma[f.key], mb[f.key]
		if bytes.Equal(ra, rb) {
			continue
		}
		d := "changed"
		va, oka := f.number(ra)
		vb, okb := f.number(rb)
		if ra == nil {
			va, oka = 0, !f.text && !f.effect
		}
		if rb == nil {
			vb, okb = 0, !f.text && !f.effect
		}
		// An empty side ("from doping", "long") is no number to differ
		// from: its value in force is not the 0 stored.
		if oka && okb && !f.empty(ra, va) && !f.empty(rb, vb) {
			d = Delta(f.kind, va, vb, ascii)
		}
		add(SectionInputs, f.label, f.format(ra, ascii), f.format(rb, ascii), d)
	}
	for _, k := range sortedKeys(merge(ma, mb)) {
		if !known[k] && !bytes.Equal(ma[k], mb[k]) {
			add(SectionInputs, k, compactJSON(ma[k]), compactJSON(mb[k]), "changed")
		}
	}

	// Sweeps.
	sw := func(q string, k model.Kind, x, y float64) {
		if x != y {
			add(SectionSweeps, q, model.Format(k, x, 4, ascii), model.Format(k, y, 4, ascii), Delta(k, x, y, ascii))
		}
	}
	sw("bias sweep from", model.Voltage, a.Sweeps.Bias.From, b.Sweeps.Bias.From)
	sw("bias sweep to", model.Voltage, a.Sweeps.Bias.To, b.Sweeps.Bias.To)
	sw("bias sweep step", model.Voltage, a.Sweeps.Bias.Step, b.Sweeps.Bias.Step)
	sw("temperature sweep from", model.Temperature, a.Sweeps.Temperature.From, b.Sweeps.Temperature.From)
	sw("temperature sweep to", model.Temperature, a.Sweeps.Temperature.To, b.Sweeps.Temperature.To)
	sw("temperature sweep step", model.Temperature, a.Sweeps.Temperature.Step, b.Sweeps.Temperature.Step)
	if a.Sweeps.Chart != b.Sweeps.Chart {
		add(SectionSweeps, "chart", a.Sweeps.Chart, b.Sweeps.Chart, "changed")
	}

	// Results.
	out = append(out, diffResults(a.Spec, b.Spec, ascii)...)

	// Measurements by ID.
	diffByID(a.Measurements, b.Measurements, func(m Measurement) string { return m.ID },
		func(id string, x, y *Measurement) {
			switch {
			case x == nil:
				add(SectionMeasurements, id, "", dataSetSummary(*y), "added")
			case y == nil:
				add(SectionMeasurements, id, dataSetSummary(*x), "", "removed")
			default:
				ex, _ := strictjson.Encode(x)
				ey, _ := strictjson.Encode(y)
				if !bytes.Equal(ex, ey) {
					d := "values changed"
					if x.Len() != y.Len() {
						d = fmt.Sprintf("%+d points", y.Len()-x.Len())
					}
					add(SectionMeasurements, id, dataSetSummary(*x), dataSetSummary(*y), d)
				}
			}
		})

	// Extractions by ID, parameter by parameter.
	diffByID(a.Extractions, b.Extractions, func(x Extraction) string { return x.ID },
		func(id string, x, y *Extraction) {
			switch {
			case x == nil:
				add(SectionExtractions, id+" ("+y.Method+")", "", fmt.Sprintf("%d parameters", len(y.Parameters)), "added")
				return
			case y == nil:
				add(SectionExtractions, id+" ("+x.Method+")", fmt.Sprintf("%d parameters", len(x.Parameters)), "", "removed")
				return
			}
			if x.Method != y.Method || x.Measurement != y.Measurement {
				add(SectionExtractions, id, x.Method+" on "+x.Measurement, y.Method+" on "+y.Measurement, "changed")
			}
			diffByID(x.Parameters, y.Parameters, func(p Parameter) string { return p.Name },
				func(name string, p, q *Parameter) {
					label := id + ": " + name
					switch {
					case p == nil:
						add(SectionExtractions, label, "", FormatParameter(*q, ascii), "added")
					case q == nil:
						add(SectionExtractions, label, FormatParameter(*p, ascii), "", "removed")
					case FormatParameter(*p, ascii) != FormatParameter(*q, ascii) || p.Value != q.Value:
						d := "changed"
						if p.Value != 0 && q.Value != 0 {
							d = Delta(model.Dimensionless, p.Value, q.Value, ascii)
						}
						add(SectionExtractions, label, FormatParameter(*p, ascii), FormatParameter(*q, ascii), d)
					}
				})
		})

	// References by name.
	diffByID(a.References, b.References, func(r Reference) string { return r.Name },
		func(name string, x, y *Reference) {
			switch {
			case x == nil:
				add(SectionReferences, name, "", "pinned", "added")
			case y == nil:
				add(SectionReferences, name, "pinned", "", "removed")
			default:
				ex, _ := strictjson.Encode(x)
				ey, _ := strictjson.Encode(y)
				if !bytes.Equal(ex, ey) {
					add(SectionReferences, name, "pinned "+x.Pinned.Format("2006-01-02 15:04"), "pinned "+y.Pinned.Format("2006-01-02 15:04"), "changed")
				}
			}
		})

	// Notes, by lines kept, added and removed.
	if !slices.Equal(a.Notes, b.Notes) {
		added, removed := lineChanges(a.Notes, b.Notes)
		add(SectionNotes, "notes", fmt.Sprintf("%d lines", len(a.Notes)), fmt.Sprintf("%d lines", len(b.Notes)), fmt.Sprintf("%d added, %d removed", added, removed))
	}
	// Review notes: new ones listed, others counted.
	if !slices.Equal(a.Reviews, b.Reviews) {
		seen := map[ReviewNote]bool{}
		for _, r := range a.Reviews {
			seen[r] = true
		}
		kept := 0
		for _, r := range b.Reviews {
			if seen[r] {
				kept++
				continue
			}
			add(SectionReviews, r.Author+", "+r.Time.Format("2006-01-02 15:04"), "", oneLine(r.Text, 60), "added")
		}
		if kept < len(a.Reviews) {
			add(SectionReviews, "review notes", fmt.Sprintf("%d notes", len(a.Reviews)), fmt.Sprintf("%d notes", len(b.Reviews)), fmt.Sprintf("%d removed", len(a.Reviews)-kept))
		}
	}
	return append(out, diffBatches(a.Batches, b.Batches, ascii)...)
}

// diffResults evaluates both specs and lists the results that differ.
func diffResults(sa, sb model.Spec, ascii bool) []Change {
	ra, ea := model.Evaluate(sa)
	rb, eb := model.Evaluate(sb)
	if ea != nil || eb != nil {
		msg := func(err error) string {
			if err != nil {
				return "not computable: " + err.Error()
			}
			return "computed"
		}
		if (ea == nil) == (eb == nil) && ea.Error() == eb.Error() {
			return nil
		}
		return []Change{{Section: SectionResults, Quantity: "evaluation", Old: msg(ea), New: msg(eb), Delta: "changed"}}
	}
	var out []Change
	for _, q := range ra.Quantities {
		vb, ok := rb.Get(q.Key)
		if !ok {
			out = append(out, Change{Section: SectionResults, Quantity: ResultLabel(q), Old: q.Text(4, ascii), New: "(absent)", Delta: "removed"})
			continue
		}
		if vb == q.Value || (math.IsNaN(vb) && math.IsNaN(q.Value)) {
			continue
		}
		out = append(out, Change{Section: SectionResults, Quantity: ResultLabel(q),
			Old: q.Text(4, ascii), New: model.Format(q.Kind, vb, 4, ascii), Delta: Delta(q.Kind, q.Value, vb, ascii)})
	}
	return out
}

// ResultLabel is the label and symbol a diff or report gives a result.
func ResultLabel(q model.Quantity) string {
	return strings.TrimSpace(q.Label) + " " + q.Symbol
}

func merge[V any](a, b map[string]V) map[string]V {
	out := make(map[string]V, len(a)+len(b))
	for k, v := range a {
		out[k] = v
	}
	for k, v := range b {
		out[k] = v
	}
	return out
}

// diffByID pairs the elements of two lists by key, in the order of the
// first list followed by the new ones of the second.
func diffByID[T any](a, b []T, key func(T) string, fn func(id string, x, y *T)) {
	ib := map[string]int{}
	for i := range b {
		ib[key(b[i])] = i
	}
	ia := map[string]bool{}
	for i := range a {
		k := key(a[i])
		ia[k] = true
		if j, ok := ib[k]; ok {
			fn(k, &a[i], &b[j])
		} else {
			fn(k, &a[i], nil)
		}
	}
	for j := range b {
		if k := key(b[j]); !ia[k] {
			fn(k, nil, &b[j])
		}
	}
}

func dataSetSummary(m Measurement) string {
	var cols []string
	for _, c := range m.ValueColumns() {
		if c.Values != nil {
			cols = append(cols, c.Key)
		}
	}
	return fmt.Sprintf("%s from %s, %d points (%s)", m.Kind, m.SourceFile, m.Len(), strings.Join(cols, ", "))
}

// FormatParameter writes an extracted value with its standard error, e.g.
// "1.200e-14 A ± 3.0e-16 A (2.5 %)".
func FormatParameter(p Parameter, ascii bool) string {
	pm := "±"
	if ascii {
		pm = "+/-"
	}
	v := FormatWithUnit(p.Value, p.Unit)
	if p.StdError == nil {
		return v + " (not estimated)"
	}
	s := v + " " + pm + " " + FormatWithUnit(*p.StdError, p.Unit)
	if p.Value != 0 {
		s += fmt.Sprintf(" (%.2g %%)", math.Abs(*p.StdError/p.Value)*100)
	}
	return s
}

// FormatWithUnit writes v with four significant figures and its unit, as
// diffs and reports show parameters of a fit.
func FormatWithUnit(v float64, unit string) string {
	s := strconv.FormatFloat(v, 'g', 4, 64)
	if unit != "" {
		s += " " + unit
	}
	return s
}

// lineChanges counts lines of b not in a (added) and of a not in b
// (removed), as multisets.
func lineChanges(a, b []string) (added, removed int) {
	count := map[string]int{}
	for _, l := range a {
		count[l]++
	}
	for _, l := range b {
		if count[l] > 0 {
			count[l]--
		} else {
			added++
		}
	}
	for _, n := range count {
		removed += n
	}
	return
}

func oneLine(s string, n int) string {
	s = strings.Join(strings.Fields(s), " ")
	if r := []rune(s); len(r) > n {
		return string(r[:n-3]) + "..."
	}
	return s
}

// WriteChanges renders changes as an aligned text table with the columns
// section, quantity, old, new, change.
func WriteChanges(w io.Writer, changes []Change) {
	rows := [][]string{{"section", "quantity", "old", "new", "change"}}
	for _, c := range changes {
		rows = append(rows, []string{c.Section, c.Quantity, c.Old, c.New, c.Delta})
	}
	WriteTable(w, rows)
}

// WriteTable writes rows as columns separated by two spaces, padded to
// the widest cell (counted in runes). Every cell is made Printable and
// cut to MaxEchoRunes.
func WriteTable(w io.Writer, rows [][]string) {
	if len(rows) == 0 {
		return
	}
	clean := make([][]string, len(rows))
	width := make([]int, len(rows[0]))
	for j, r := range rows {
		clean[j] = make([]string, len(r))
		for i, c := range r {
			c = Printable(c, MaxEchoRunes, "...")
			clean[j][i] = c
			if i < len(width) {
				width[i] = max(width[i], len([]rune(c)))
			}
		}
	}
	for _, r := range clean {
		var line strings.Builder
		for i, c := range r {
			if i > 0 {
				line.WriteString("  ")
			}
			line.WriteString(c)
			if i < len(r)-1 && i < len(width) {
				line.WriteString(strings.Repeat(" ", width[i]-len([]rune(c))))
			}
		}
		io.WriteString(w, strings.TrimRight(line.String(), " ")+"\n")
	}
}
