package sessions

import (
	"errors"
	"fmt"
	"slices"
	"strings"
	"unicode"
	"unicode/utf8"

	"junco/model"
	"junco/model/measure"
	"junco/physics"
)

// FieldProblem is one invalid value of a document: where (a JSON path such
// as $.measurements[2].rows[17]), the value, what is allowed and why.
type FieldProblem struct {
	Path    string
	Value   string
	Allowed string
	Why     string
}

func (p FieldProblem) Error() string {
	s := p.Path
	if p.Value != "" {
		s += " = " + p.Value
	}
	if p.Allowed != "" {
		s += ": allowed " + p.Allowed
	}
	if p.Why != "" {
		s += " (" + p.Why + ")"
	}
	return s
}

// InvalidError lists every invalid value of a document.
type InvalidError struct {
	Problems []FieldProblem
}

func (e *InvalidError) Error() string {
	const shown = 10
	parts := make([]string, 0, shown+1)
	for i, p := range e.Problems {
		if i == shown {
			parts = append(parts, fmt.Sprintf("and %d more", len(e.Problems)-shown))
			break
		}
		parts = append(parts, p.Error())
	}
	return "invalid session: " + strings.Join(parts, "; ")
}

// Limits of a document's free-form parts; they keep one document within
// what a workbench can show and a colleague can review.
const (
	maxTitleRunes  = 200
	maxAuthorRunes = 100
	maxLineRunes   = 10000
	maxNoteLines   = 100000
	maxRows        = 1000000
	maxUnitRunes   = 32
	maxParameters  = 100
	maxReferences  = 100
	maxReviewNotes = 10000
)

// Validate checks every part of the document and returns nil or an
// *InvalidError listing each problem. The Spec is checked with
// model.Spec.Validate and never repaired.
func (d *Document) Validate() error {
	ps := d.Meta.problems()
	add := func(path, value, allowed, why string) {
		ps = append(ps, FieldProblem{Path: path, Value: value, Allowed: allowed, Why: why})
	}
	if d.Schema != SchemaVersion {
		add("$.schema", fmt.Sprint(d.Schema), fmt.Sprint(SchemaVersion), "this junco writes and checks schema "+fmt.Sprint(SchemaVersion))
	}
	text := textChecker(add)
	ps = append(ps, specProblems("$.spec", d.Spec)...)
	ps = append(ps, d.Sweeps.problems()...)

	ids := map[string]bool{}
	if len(d.Measurements) > MaxDataSets {
		add("$.measurements", fmt.Sprintf("%d data sets", len(d.Measurements)), fmt.Sprintf("at most %d (MaxDataSets)", MaxDataSets), "keeps one session within memory")
	}
	for i, m := range d.Measurements {
		ps = append(ps, m.problems(fmt.Sprintf("$.measurements[%d]", i), ids)...)
	}
	xids := map[string]bool{}
	for i, x := range d.Extractions {
		p := fmt.Sprintf("$.extractions[%d]", i)
		if err := ValidateName(x.ID); err != nil {
			add(p+".id", fmt.Sprintf("%q", x.ID), nameRule, err.(*NameError).Why)
		} else if xids[x.ID] {
			add(p+".id", fmt.Sprintf("%q", x.ID), "a unique ID", "another extraction has it")
		}
		xids[x.ID] = true
		text(p+".method", x.Method, 64, true, false)
		if x.Measurement != "" && !ids[x.Measurement] {
			add(p+".measurement_id", fmt.Sprintf("%q", x.Measurement), "the ID of a measurement in this session, or empty", "an extraction must say which data it used")
		}
		if len(x.Parameters) > maxParameters {
			add(p+".parameters", fmt.Sprintf("%d", len(x.Parameters)), fmt.Sprintf("at most %d", maxParameters), "a fit has few parameters")
		}
		names := map[string]bool{}
		for j, par := range x.Parameters {
			pp := fmt.Sprintf("%s.parameters[%d]", p, j)
			text(pp+".name", par.Name, 64, true, false)
			if names[par.Name] {
				add(pp+".name", fmt.Sprintf("%q", par.Name), "a unique name", "another parameter of this extraction has it")
			}
			names[par.Name] = true
			text(pp+".unit", par.Unit, maxUnitRunes, false, false)
			if !physics.Finite(par.Value) {
				add(pp+".value", fmt.Sprint(par.Value), "a finite number", "JSON has no NaN or infinity")
			}
			if par.StdError != nil && (!physics.Finite(*par.StdError) || *par.StdError < 0) {
				add(pp+".std_error", fmt.Sprint(*par.StdError), "0 or more, finite, or null", "a standard error is a non-negative spread; null means not estimated")
			}
		}
		for j, n := range x.Notes {
			text(fmt.Sprintf("%s.notes[%d]", p, j), n, maxLineRunes, false, false)
		}
	}
	if len(d.References) > maxReferences {
		add("$.references", fmt.Sprint(len(d.References)), fmt.Sprintf("at most %d", maxReferences), "keeps comparisons readable")
	}
	refs := map[string]bool{}
	for i, r := range d.References {
		p := fmt.Sprintf("$.references[%d]", i)
		text(p+".name", r.Name, 64, true, false)
		if refs[r.Name] {
			add(p+".name", fmt.Sprintf("%q", r.Name), "a unique name", "another reference has it")
		}
		refs[r.Name] = true
		ps = append(ps, specProblems(p+".spec", r.Spec)...)
		for j, v := range r.Results {
			text(fmt.Sprintf("%s.results[%d].key", p, j), v.Key, 64, true, false)
			if v.Value != nil && !physics.Finite(*v.Value) {
				add(fmt.Sprintf("%s.results[%d].value", p, j), fmt.Sprint(*v.Value), "a finite number or null", "JSON has no NaN or infinity")
			}
		}
	}
	if len(d.Notes) > maxNoteLines {
		add("$.notes", fmt.Sprintf("%d lines", len(d.Notes)), fmt.Sprintf("at most %d", maxNoteLines), "keeps the record readable")
	}
	for i, l := range d.Notes {
		text(fmt.Sprintf("$.notes[%d]", i), l, maxLineRunes, false, false)
	}
	if len(d.Reviews) > maxReviewNotes {
		add("$.review_notes", fmt.Sprint(len(d.Reviews)), fmt.Sprintf("at most %d", maxReviewNotes), "keeps the record readable")
	}
	for i, r := range d.Reviews {
		p := fmt.Sprintf("$.review_notes[%d]", i)
		text(p+".author", r.Author, maxAuthorRunes, true, false)
		if r.Time.IsZero() {
			add(p+".time", "unset", "the time the note was written", "a review note is dated")
		}
		text(p+".text", r.Text, maxLineRunes, true, true)
	}
	ps = append(ps, batchProblems(d.Batches)...)
	if len(ps) == 0 {
		return nil
	}
	return &InvalidError{Problems: ps}
}

// textChecker returns a check of a text value: required (non-blank), at
// most maxRunes long, no control characters but tabs (and line breaks
// where multiline).
func textChecker(add func(path, value, allowed, why string)) func(path, s string, maxRunes int, required, multiline bool) {
	return func(path, s string, maxRunes int, required, multiline bool) {
		if required && strings.TrimSpace(s) == "" {
			add(path, `""`, "non-empty text", "a record needs it")
			return
		}
		if n := utf8.RuneCountInString(s); n > maxRunes {
			add(path, fmt.Sprintf("%d characters", n), fmt.Sprintf("at most %d", maxRunes), "keeps the record readable")
		}
		for _, r := range s {
			if unicode.IsControl(r) && r != '\t' && (!multiline || (r != '\n' && r != '\r')) {
				add(path, fmt.Sprintf("%q", s), "printable text", fmt.Sprintf("control character %U is not allowed", r))
				break
			}
		}
	}
}

// MaxDataSets is how many data sets one session keeps (a larger one is
// refused at save, and the workbench adds none beyond).
const MaxDataSets = 1000

// problems checks the metadata; listing uses it on headers, so that no
// title with terminal control characters is ever printed.
func (m Meta) problems() []FieldProblem {
	var ps []FieldProblem
	add := func(path, value, allowed, why string) {
		ps = append(ps, FieldProblem{Path: path, Value: value, Allowed: allowed, Why: why})
	}
	text := textChecker(add)
	text("$.meta.title", m.Title, maxTitleRunes, false, false)
	text("$.meta.author", m.Author, maxAuthorRunes, false, false)
	text("$.meta.saved_by", m.SavedBy, maxAuthorRunes, false, false)
	text("$.meta.tool_version", m.ToolVersion, 64, false, false)
	text("$.meta.origin", m.Origin, maxLineRunes, false, false)
	text("$.meta.note", m.Note, maxLineRunes, false, false)
	if m.BasedOn < 0 {
		add("$.meta.based_on_revision", fmt.Sprint(m.BasedOn), "0 or more", "0 means none")
	}
	return ps
}

// specProblems converts the field errors of model.Spec.Validate.
func specProblems(path string, s model.Spec) []FieldProblem {
	err := s.Validate()
	if err == nil {
		return nil
	}
	var ve *model.ValidationError
	if !errors.As(err, &ve) {
		return []FieldProblem{{Path: path, Why: err.Error()}}
	}
	out := make([]FieldProblem, 0, len(ve.Fields))
	for _, f := range ve.Fields {
		out = append(out, FieldProblem{Path: path + " (" + f.Field + ")", Value: f.Value, Allowed: f.Allowed, Why: f.Why})
	}
	return out
}

func (s Sweeps) problems() []FieldProblem {
	var ps []FieldProblem
	if _, err := s.Bias.Range().Points(); err != nil {
		ps = append(ps, FieldProblem{Path: "$.sweeps.bias_V", Value: fmt.Sprintf("%g to %g step %g", s.Bias.From, s.Bias.To, s.Bias.Step), Allowed: "a finite sweep of at most 100001 points", Why: err.Error()})
	} else {
		for _, v := range []float64{s.Bias.From, s.Bias.To} {
			if v < -1e5 || v > 20 {
				ps = append(ps, FieldProblem{Path: "$.sweeps.bias_V", Value: model.Format(model.Voltage, v, 3, true), Allowed: "-100 kV to 20 V", Why: "the bias range junco accepts for a junction"})
				break
			}
		}
	}
	if _, err := s.Temperature.Range().Points(); err != nil {
		ps = append(ps, FieldProblem{Path: "$.sweeps.temperature_K", Value: fmt.Sprintf("%g to %g step %g", s.Temperature.From, s.Temperature.To, s.Temperature.Step), Allowed: "a finite sweep of at most 100001 points", Why: err.Error()})
	} else {
		for _, v := range []float64{s.Temperature.From, s.Temperature.To} {
			if v < 20 || v > 1000 {
				ps = append(ps, FieldProblem{Path: "$.sweeps.temperature_K", Value: model.Format(model.Temperature, v, 3, true), Allowed: "20 K to 1000 K", Why: "beyond, no material model here is meaningful"})
				break
			}
		}
	}
	if !slices.Contains(ChartIDs(), s.Chart) {
		ps = append(ps, FieldProblem{Path: "$.sweeps.chart", Value: fmt.Sprintf("%q", s.Chart), Allowed: strings.Join(ChartIDs(), ", "), Why: "the curves junco draws"})
	}
	return ps
}

// MeasurementColumn is one value column of a measurement: its JSON name
// (with the SI unit) and its values (nil when the data set has none).
type MeasurementColumn struct {
	Key    string
	Values []float64
}

// ValueColumns lists the value columns of a measurement in a fixed order.
func (m Measurement) ValueColumns() []MeasurementColumn {
	return []MeasurementColumn{
		{"voltage_V", m.VoltageV}, {"current_A", m.CurrentA}, {"capacitance_F", m.CapacitanceF},
		{"frequency_Hz", m.FrequencyHz}, {"temperature_K", m.TemperatureK},
	}
}

func (m Measurement) problems(p string, ids map[string]bool) []FieldProblem {
	var ps []FieldProblem
	add := func(path, value, allowed, why string) {
		ps = append(ps, FieldProblem{Path: path, Value: value, Allowed: allowed, Why: why})
	}
	if err := ValidateName(m.ID); err != nil {
		add(p+".id", fmt.Sprintf("%q", m.ID), nameRule, err.(*NameError).Why)
	} else if ids[m.ID] {
		add(p+".id", fmt.Sprintf("%q", m.ID), "a unique ID", "another data set has it")
	}
	ids[m.ID] = true
	switch m.Kind {
	case measure.KindIV, measure.KindCV:
	default:
		add(p+".kind", fmt.Sprintf("%q", m.Kind), fmt.Sprintf("%q or %q", measure.KindIV, measure.KindCV), "the sweeps junco imports")
	}
	if utf8.RuneCountInString(m.SourceFile) > maxLineRunes || strings.ContainsFunc(m.SourceFile, unicode.IsControl) {
		add(p+".source_file", fmt.Sprintf("%q", m.SourceFile), "a file name of printable characters", "names where the data came from")
	}
	if m.ImportedAt.IsZero() {
		add(p+".imported_at", "unset", "the import time", "a record says when data arrived")
	}
	if !physics.Finite(m.StatedTemperatureK) || m.StatedTemperatureK < 0 || m.StatedTemperatureK > 2000 {
		add(p+".stated_temperature_K", fmt.Sprint(m.StatedTemperatureK), "0 (none) to 2000 K", "a measurement temperature")
	}
	if m.TemperatureTyped && !(m.StatedTemperatureK > 0) {
		add(p+".temperature_typed", "true", "false when stated_temperature_K is 0", "a typed temperature needs its value")
	}
	n := len(m.VoltageV)
	if n == 0 {
		add(p+".voltage_V", "no values", "at least one point", "a sweep has a bias column")
	}
	if n > maxRows {
		add(p+".voltage_V", fmt.Sprintf("%d points", n), fmt.Sprintf("at most %d", maxRows), "keeps one session within memory")
	}
	for _, c := range m.ValueColumns() {
		if c.Values == nil {
			continue
		}
		if len(c.Values) != n {
			add(p+"."+c.Key, fmt.Sprintf("%d values", len(c.Values)), fmt.Sprintf("%d (one per voltage)", n), "the columns of a sweep have equal length")
			continue
		}
		for k, v := range c.Values {
			if !physics.Finite(v) {
				add(fmt.Sprintf("%s.%s[%d]", p, c.Key, k), fmt.Sprint(v), "a finite number", "JSON has no NaN or infinity; the importer leaves such rows out")
				break
			}
		}
	}
	switch m.Kind {
	case measure.KindIV:
		if m.CurrentA == nil {
			add(p+".current_A", "absent", "one current per voltage", "an I-V sweep has a current column")
		}
	case measure.KindCV:
		if m.CapacitanceF == nil {
			add(p+".capacitance_F", "absent", "one capacitance per voltage", "a C-V sweep has a capacitance column")
		}
	}
	if m.DataRows < n || m.ProblemRows < len(m.Problems) || m.ProblemRows < 0 {
		add(p+".data_rows", fmt.Sprintf("%d rows, %d problem rows", m.DataRows, m.ProblemRows), fmt.Sprintf("data_rows >= %d points, problem_rows >= %d listed problems", n, len(m.Problems)), "the counts of the import")
	}
	return ps
}
