// Package sessions keeps junco's characterisation records: what was
// assumed (the junction specification and its sweeps), what was measured
// (imported data sets), what was extracted (parameters with standard
// errors), pinned references, notes and review notes, by whom and when.
//
// A session is a JSON document (see Document) with a schema version;
// older schemas are migrated on reading, newer ones refused. A Store keeps
// every saved revision of every session as its own immutable file, writes
// atomically, claims revision numbers exclusively so that concurrent
// writers never lose a revision, moves deleted sessions to a restorable
// trash and keeps crash-recovery drafts. Diff compares two revisions,
// input by input and result by result; the export functions write a
// Markdown report with SVG figures and text charts, CSV tables of every
// curve, and the JSON document itself.
//
// Errors a user can cause (bad names, damaged files, stale revisions,
// invalid documents) are returned as typed errors whose messages name the
// file or field, the value, what is allowed and why. Nothing in this
// package panics on user input.
package sessions

import (
	"strings"
	"time"

	"junco/model"
	"junco/model/measure"
	"junco/sessions/internal/strictjson"
)

// SchemaVersion is the version of the session format this package writes.
// Version 1 is the first released format; version 2 adds the kept batch
// tables ("batches"). Documents with a higher version are refused (see
// SchemaError), lower ones are migrated (format.go).
const SchemaVersion = 2

// Document is one session: the record of a characterisation. Values are
// SI; JSON keys name their unit where a value has one. The JSON members
// appear in this field order.
type Document struct {
	// Schema is the format version; Save sets it to SchemaVersion.
	Schema int  `json:"schema"`
	Meta   Meta `json:"meta"`
	// Spec is the junction as the user defined it (it carries the enabled
	// model effects, when model.Spec has them).
	Spec   model.Spec `json:"spec"`
	Sweeps Sweeps     `json:"sweeps"`
	// Measurements are the imported data sets, in import order.
	Measurements []Measurement `json:"measurements"`
	// Extractions are parameter fits made from the measurements.
	Extractions []Extraction `json:"extractions"`
	// References are junctions pinned for comparison, with their results
	// as computed when they were pinned.
	References []Reference `json:"references"`
	// Notes is free text, one element per line so revisions diff line by
	// line (see SetNotes and NotesText).
	Notes []string `json:"notes"`
	// Reviews are the review notes of colleagues, oldest first.
	Reviews []ReviewNote `json:"review_notes"`
	// Batches are the batch tables kept with the session (schema 2), in
	// the order kept.
	Batches []Batch `json:"batches"`
}

// Meta describes a document: who made it, when, with which tool version.
type Meta struct {
	Title  string `json:"title"`
	Author string `json:"author"`
	// Created is when the session's first revision was made; Modified when
	// this revision was saved (UTC).
	Created  time.Time `json:"created"`
	Modified time.Time `json:"modified"`
	// SavedBy is who saved this revision (the store's user).
	SavedBy string `json:"saved_by"`
	// ToolVersion is the junco version that saved this revision.
	ToolVersion string `json:"tool_version"`
	// BasedOn is the revision the editor started from (0: none). After a
	// save despite a newer revision it differs from Number-1.
	BasedOn int `json:"based_on_revision"`
	// Origin says where this revision came from when it was not edited:
	// "imported from FILE", "restored from revision N".
	Origin string `json:"origin,omitempty"`
	// Note is the note given with this save (it is also among the
	// document's Notes, dated and signed); "" when none was given.
	Note string `json:"note,omitempty"`
}

// Remark is what a list of revisions shows for one: the note given with
// its save and where it came from, joined by "; " ("" when neither).
func (m Meta) Remark() string {
	var parts []string
	for _, p := range []string{m.Note, m.Origin} {
		if p = strings.TrimSpace(p); p != "" {
			parts = append(parts, p)
		}
	}
	return strings.Join(parts, "; ")
}

// Sweeps are the user's chart and sweep choices.
type Sweeps struct {
	// Bias is the I-V and C-V sweep, V.
	Bias Sweep `json:"bias_V"`
	// Temperature is the temperature sweep, K. The forward voltage is
	// followed over it at the Spec's reference forward current.
	Temperature Sweep `json:"temperature_K"`
	// Chart is the curve shown first (a curve ID, see ChartIDs).
	Chart string `json:"chart"`
}

// Sweep runs from From to To in steps of Step, in the unit its key names.
type Sweep struct {
	From float64 `json:"from"`
	To   float64 `json:"to"`
	Step float64 `json:"step"`
}

// Range converts a sweep to the model's range type.
func (s Sweep) Range() model.Range { return model.Range{From: s.From, To: s.To, Step: s.Step} }

// ChartIDs lists the curve IDs a session may choose as its chart, as
// model's curve functions name them.
func ChartIDs() []string {
	return []string{"iv", "cv", "inv-c2", "ideality", "charge", "field", "potential", "bands",
		"minority", "diffusion-current", "is-t", "vf-t"}
}

// Measurement is one imported data set (package model/measure's DataSet,
// whose members appear inline in the JSON) under an ID that extractions
// refer to.
type Measurement struct {
	// ID names the data set within the session (the rules of session
	// names, e.g. "iv-25C").
	ID string `json:"id"`
	measure.DataSet
}

// Extraction is one parameter fit: the method, the data set it used, the
// parameters with their standard errors.
type Extraction struct {
	ID     string `json:"id"`
	Method string `json:"method"` // e.g. "iv-single-diode", "mott-schottky"
	// Measurement is the ID of the measurement used ("" when none).
	Measurement string      `json:"measurement_id"`
	Performed   time.Time   `json:"performed"`
	Parameters  []Parameter `json:"parameters"`
	// Notes explain decisions of the fit, one per element.
	Notes []string `json:"notes"`
}

// Parameter is one extracted value with its unit and standard error.
type Parameter struct {
	Name  string  `json:"name"` // e.g. "Is", "n", "Rs"
	Unit  string  `json:"unit"` // e.g. "A", "", "ohm"
	Value float64 `json:"value"`
	// StdError is the standard error in the same unit; nil when the
	// parameter was held fixed or is not observable.
	StdError *float64 `json:"std_error"`
}

// Reference is a pinned junction: a name, its Spec and its results as
// model.Evaluate gave them when pinned.
type Reference struct {
	Name    string        `json:"name"`
	Pinned  time.Time     `json:"pinned"`
	Spec    model.Spec    `json:"spec"`
	Results []ResultValue `json:"results"`
}

// ResultValue is one result quantity under its model key (which names the
// unit, e.g. "built_in_potential_V"); Value is nil where the quantity does
// not apply.
type ResultValue struct {
	Key   string   `json:"key"`
	Value *float64 `json:"value"`
}

// ReviewNote is one colleague's remark on the session.
type ReviewNote struct {
	Author string    `json:"author"`
	Time   time.Time `json:"time"`
	Text   string    `json:"text"`
}

// NewDocument returns a document for spec with the default sweeps, titled
// title, by author, created at now.
func NewDocument(title, author string, spec model.Spec, now time.Time) *Document {
	iv := model.DefaultIVRange()
	return &Document{
		Schema: SchemaVersion,
		Meta:   Meta{Title: title, Author: author, Created: now.UTC(), Modified: now.UTC()},
		Spec:   spec,
		Sweeps: Sweeps{
			Bias:        Sweep{From: iv.From, To: iv.To, Step: iv.Step},
			Temperature: Sweep{From: 250, To: 400, Step: 10},
			Chart:       "iv",
		},
	}
}

// Pin computes spec's results with model.Evaluate and returns them as a
// reference named name, pinned at now.
func Pin(name string, spec model.Spec, now time.Time) (Reference, error) {
	res, err := model.Evaluate(spec)
	if err != nil {
		return Reference{}, err
	}
	ref := Reference{Name: name, Pinned: now.UTC(), Spec: spec}
	for _, q := range res.Quantities {
		rv := ResultValue{Key: q.Key}
		if v := q.Value; v == v && v-v == 0 { // finite
			rv.Value = &v
		}
		ref.Results = append(ref.Results, rv)
	}
	return ref, nil
}

// SetNotes stores text as the notes, one element per line.
func (d *Document) SetNotes(text string) {
	d.Notes = nil
	if text == "" {
		return
	}
	start := 0
	for i := 0; i < len(text); i++ {
		if text[i] == '\n' {
			d.Notes = append(d.Notes, trimCR(text[start:i]))
			start = i + 1
		}
	}
	if start < len(text) {
		d.Notes = append(d.Notes, trimCR(text[start:]))
	}
}

func trimCR(s string) string {
	if n := len(s); n > 0 && s[n-1] == '\r' {
		return s[:n-1]
	}
	return s
}

// NotesText returns the notes as one text, lines joined by newlines.
func (d *Document) NotesText() string {
	out := ""
	for i, l := range d.Notes {
		if i > 0 {
			out += "\n"
		}
		out += l
	}
	return out
}

// Clone returns a deep copy of d.
func (d *Document) Clone() *Document {
	c := *d
	c.Spec = cloneSpec(d.Spec)
	c.Measurements = cloneSlice(d.Measurements, func(m Measurement) Measurement {
		m.Units.Assumed = cloneSlice(m.Units.Assumed, nil)
		m.Columns.Header = cloneSlice(m.Columns.Header, nil)
		m.VoltageV = cloneSlice(m.VoltageV, nil)
		m.CurrentA = cloneSlice(m.CurrentA, nil)
		m.CapacitanceF = cloneSlice(m.CapacitanceF, nil)
		m.FrequencyHz = cloneSlice(m.FrequencyHz, nil)
		m.TemperatureK = cloneSlice(m.TemperatureK, nil)
		m.Problems = cloneSlice(m.Problems, nil)
		return m
	})
	c.Extractions = cloneSlice(d.Extractions, func(x Extraction) Extraction {
		x.Parameters = cloneSlice(x.Parameters, func(p Parameter) Parameter { p.StdError = clonePtr(p.StdError); return p })
		x.Notes = cloneSlice(x.Notes, nil)
		return x
	})
	c.References = cloneSlice(d.References, func(r Reference) Reference {
		r.Spec = cloneSpec(r.Spec)
		r.Results = cloneSlice(r.Results, func(v ResultValue) ResultValue { v.Value = clonePtr(v.Value); return v })
		return r
	})
	c.Notes = cloneSlice(d.Notes, nil)
	c.Reviews = cloneSlice(d.Reviews, nil)
	c.Batches = cloneBatches(d.Batches)
	return &c
}

// cloneSpec deep-copies a Spec through its JSON form, so that fields added
// to model.Spec later are copied too. A Spec that cannot be encoded (NaN)
// is copied shallowly; Validate rejects it anyway.
func cloneSpec(s model.Spec) model.Spec {
	b, err := strictjson.Encode(s)
	if err != nil {
		return s
	}
	var out model.Spec
	if strictjson.Decode(b, &out) != nil {
		return s
	}
	return out
}

func clonePtr[T any](p *T) *T {
	if p == nil {
		return nil
	}
	v := *p
	return &v
}

func cloneSlice[T any](s []T, f func(T) T) []T {
	if s == nil {
		return nil
	}
	out := make([]T, len(s))
	for i, v := range s {
		if f != nil {
			v = f(v)
		}
		out[i] = v
	}
	return out
}
