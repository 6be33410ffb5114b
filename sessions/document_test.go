package sessions

import (
	"bytes"
	"errors"
	"flag"
	"junco/sessions/internal/strictjson"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata (not the frozen ones)")

// TestRoundTripProperty: random valid documents encode, decode and
// compare equal, and encoding is stable (encode(decode(b)) == b).
func TestRoundTripProperty(t *testing.T) {
	r := rand.New(rand.NewPCG(2025, 314))
	for i := range 300 {
		doc := randomDocument(r)
		if err := doc.Validate(); err != nil {
			t.Fatalf("case %d: generator made an invalid document: %v", i, err)
		}
		data, err := Encode(doc)
		if err != nil {
			t.Fatalf("case %d: encode: %v", i, err)
		}
		got, err := Decode(data)
		if err != nil {
			t.Fatalf("case %d: decode: %v\n%s", i, err, data)
		}
		if !reflect.DeepEqual(normalise(doc), normalise(got)) {
			t.Fatalf("case %d: round trip differs\nwant %#v\ngot  %#v", i, doc, got)
		}
		again, err := Encode(got)
		if err != nil || !bytes.Equal(again, data) {
			t.Fatalf("case %d: second encoding differs (err %v)", i, err)
		}
	}
}

// normalise maps empty slices to nil (JSON writes both as []).
func normalise(d *Document) *Document {
	c := d.Clone()
	nilIfEmpty(&c.Measurements)
	nilIfEmpty(&c.Extractions)
	nilIfEmpty(&c.References)
	nilIfEmpty(&c.Notes)
	nilIfEmpty(&c.Reviews)
	nilIfEmpty(&c.Batches)
	for i := range c.Batches {
		b := &c.Batches[i]
		nilIfEmpty(&b.Limits)
		nilIfEmpty(&b.Notes)
		nilIfEmpty(&b.Rows)
		for k := range b.Rows {
			nilIfEmpty(&b.Rows[k].Infinite)
		}
	}
	for i := range c.Measurements {
		m := &c.Measurements[i]
		nilIfEmpty(&m.Units.Assumed)
		nilIfEmpty(&m.Columns.Header)
		nilIfEmpty(&m.CurrentA)
		nilIfEmpty(&m.CapacitanceF)
		nilIfEmpty(&m.FrequencyHz)
		nilIfEmpty(&m.TemperatureK)
		nilIfEmpty(&m.Problems)
	}
	for i := range c.Extractions {
		nilIfEmpty(&c.Extractions[i].Parameters)
		nilIfEmpty(&c.Extractions[i].Notes)
	}
	for i := range c.References {
		nilIfEmpty(&c.References[i].Results)
	}
	return c
}

func nilIfEmpty[T any](s *[]T) {
	if len(*s) == 0 {
		*s = nil
	}
}

func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update once to create it)", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from the output; if the format change is deliberate, bump SchemaVersion if old readers would fail, then run go test -update\n--- got\n%s", path, got)
	}
}

// TestGoldenEncoding pins the exact JSON layout of a document.
func TestGoldenEncoding(t *testing.T) {
	data, err := Encode(exampleDocument())
	if err != nil {
		t.Fatal(err)
	}
	golden(t, "golden-session.json", data)
	// Layout properties reviewers rely on.
	s := string(data)
	for _, want := range []string{
		"{\n  \"schema\": 2,\n  \"meta\": {\n",
		"\n      \"voltage_V\": [0.1, 0.2, 0.3],\n",
		"\"acceptor_density_per_m3\": 1e+25,",
		"\"notes\": [\n    \"Wafer 12, die 7.\",\n",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("encoding lacks %q", want)
		}
	}
}

// TestFrozenSchema1 reads the frozen schema-1 file (written once, never
// regenerated) into the current in-memory form.
func TestFrozenSchema1(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("testdata", "schema1-frozen.json"))
	if err != nil {
		t.Fatal(err)
	}
	got, err := Decode(data)
	if err != nil {
		t.Fatalf("frozen schema-1 file no longer reads: %v", err)
	}
	want := exampleDocument()
	if !reflect.DeepEqual(normalise(got), normalise(want)) {
		t.Errorf("frozen schema-1 file decodes to\n%#v\nwant\n%#v", got, want)
	}
}

// docV2 and docV3 are synthetic future formats used to prove that the
// migration chain works: schema 2 renames "notes" to "notebook" and adds
// "lab"; schema 3 turns "lab" into an object.
type docV2 struct {
	Schema   int            `json:"schema"`
	Meta     map[string]any `json:"meta"`
	Spec     map[string]any `json:"spec"`
	Sweeps   map[string]any `json:"sweeps"`
	Meas     []any          `json:"measurements"`
	Extr     []any          `json:"extractions"`
	Refs     []any          `json:"references"`
	Notebook []string       `json:"notebook"`
	Reviews  []any          `json:"review_notes"`
	Lab      string         `json:"lab"`
}

type docV3 struct {
	docV2
	Lab struct {
		Name string `json:"name"`
	} `json:"lab"`
}

func syntheticMigrator(upTo int) migrator {
	m := migrator{current: upTo, steps: []migration{
		{From: 1, Note: "notes become notebook; lab added", Apply: func(d map[string]any) error {
			d["notebook"] = d["notes"]
			delete(d, "notes")
			d["lab"] = "unknown"
			return nil
		}},
		{From: 2, Note: "lab becomes an object", Apply: func(d map[string]any) error {
			name, ok := d["lab"].(string)
			if !ok {
				return errors.New("lab is not text")
			}
			d["lab"] = map[string]any{"name": name}
			return nil
		}},
	}}
	return m
}

func TestMigrationChain(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("testdata", "schema1-frozen.json"))
	if err != nil {
		t.Fatal(err)
	}
	var v2 docV2
	if err := decodeVersioned(data, syntheticMigrator(2), &v2); err != nil {
		t.Fatalf("1 -> 2: %v", err)
	}
	if v2.Schema != 2 || v2.Lab != "unknown" || len(v2.Notebook) != 2 || v2.Notebook[0] != "Wafer 12, die 7." {
		t.Errorf("1 -> 2 gave schema %d, lab %q, notebook %q", v2.Schema, v2.Lab, v2.Notebook)
	}
	// Numbers survive the generic tree digit for digit.
	if got := v2.Spec["acceptor_density_per_m3"]; got == nil {
		t.Errorf("spec lost its doping: %v", v2.Spec)
	}

	// Two steps: 1 -> 2 -> 3, with the embedded v2 fields shadowed.
	var v3 struct {
		Schema   int      `json:"schema"`
		Notebook []string `json:"notebook"`
		Lab      struct {
			Name string `json:"name"`
		} `json:"lab"`
		Rest map[string]any `json:"-"`
	}
	err = decodeVersioned(data, syntheticMigrator(3), &v3)
	var uf *UnknownFieldsError
	if !errors.As(err, &uf) {
		t.Fatalf("decoding into a partial type must report the fields it lacks, got %v", err)
	}
	var full docV3
	if err := decodeVersioned(data, syntheticMigrator(3), &full); err != nil {
		t.Fatalf("1 -> 3: %v", err)
	}
	if full.Schema != 3 || full.Lab.Name != "unknown" || len(full.Notebook) != 2 {
		t.Errorf("1 -> 3 gave schema %d, lab %+v, notebook %q", full.Schema, full.Lab, full.Notebook)
	}

	// A version with no step is refused, not half-read.
	broken := migrator{current: 3, steps: syntheticMigrator(3).steps[:1]}
	var x docV3
	err = decodeVersioned(data, broken, &x)
	var me *MigrationError
	if !errors.As(err, &me) || me.From != 2 {
		t.Errorf("missing step 2 -> 3: got %v", err)
	}
	// A failing step names the versions.
	failing := migrator{current: 2, steps: []migration{{From: 1, Apply: func(map[string]any) error { return errors.New("no lab") }}}}
	err = decodeVersioned(data, failing, &v2)
	if !errors.As(err, &me) || !strings.Contains(err.Error(), "schema 1 to 2: no lab") {
		t.Errorf("failing step: got %v", err)
	}
	// The current migrator has no steps: schema 1 is the first.
	if m := currentMigrator(); m.current != SchemaVersion || len(m.steps) != SchemaVersion-1 {
		t.Errorf("current migrator: version %d with %d steps", m.current, len(m.steps))
	}
}

func TestDecodeErrors(t *testing.T) {
	good, err := Encode(exampleDocument())
	if err != nil {
		t.Fatal(err)
	}
	g := string(good)
	cases := []struct {
		name string
		data string
		want []string // substrings of the message
		as   any
	}{
		{"empty", "", []string{"empty document"}, new(*SyntaxError)},
		{"not an object", "[1,2]", []string{"JSON object"}, new(*SyntaxError)},
		{"truncated", g[:len(g)/2], []string{"truncated"}, new(*SyntaxError)},
		{"no schema", `{"meta": {}}`, []string{`no "schema" field`}, new(*SchemaError)},
		{"schema 0", strings.Replace(g, `"schema": 2`, `"schema": 0`, 1), []string{"schema 0 is not"}, new(*SchemaError)},
		{"newer schema", strings.Replace(g, `"schema": 2`, `"schema": 7`, 1), []string{"schema 7 is newer", "nothing was read"}, new(*SchemaError)},
		{"unknown fields", strings.Replace(strings.Replace(g, `"title":`, `"colour": "red", "title":`, 1), `"temperature_K": 310`, `"temprature_K": 310, "temperature_K": 310`, 1),
			[]string{"$.meta.colour", "$.spec.temprature_K", "unknown fields"}, new(*UnknownFieldsError)},
		{"key case", strings.Replace(g, `"title":`, `"Title":`, 1), []string{"$.meta.Title"}, new(*UnknownFieldsError)},
		{"duplicate key", strings.Replace(g, `"title":`, `"author": "x", "title":`, 1), []string{`key "author" appears twice`}, new(*SyntaxError)},
		{"null number", strings.Replace(g, `"area_m2": 0.000001`, `"area_m2": null`, 1), []string{"$.spec.area_m2", "null is not allowed"}, new(*TypeError)},
		{"text for number", strings.Replace(g, `"area_m2": 0.000001`, `"area_m2": "1mm2"`, 1), []string{"$.spec.area_m2", "expected a number"}, new(*TypeError)},
		{"fraction for int", strings.Replace(g, `"based_on_revision": 0`, `"based_on_revision": 1.5`, 1), []string{"$.meta.based_on_revision", "whole number"}, new(*TypeError)},
		{"overflow", strings.Replace(g, `"area_m2": 0.000001`, `"area_m2": 1e999`, 1), []string{"$.spec.area_m2", "out of range"}, new(*TypeError)},
		{"bad number", strings.Replace(g, `"area_m2": 0.000001`, `"area_m2": 01`, 1), []string{"expected ','"}, new(*SyntaxError)},
		{"trailing text", g + "{}", []string{"after the end"}, new(*SyntaxError)},
		{"bad utf8", strings.Replace(g, "A. Ferreira", "A. F\xffrreira", 1), []string{"UTF-8"}, new(*SyntaxError)},
		{"bad time", strings.Replace(g, `"created": "2025`, `"created": "yesterday`, 1), []string{"$.meta.created"}, new(*TypeError)},
		{"deep unknown", strings.Replace(g, `"title":`, `"x": `+strings.Repeat("[", 300)+strings.Repeat("]", 300)+`, "title":`, 1), []string{"nested deeper"}, new(*SyntaxError)},
		{"invalid spec", strings.Replace(g, `"temperature_K": 310`, `"temperature_K": 5000`, 1), []string{"$.spec (temp)", "5000 K", "20.0 K to 1000 K"}, new(*InvalidError)},
		{"ragged column", strings.Replace(g, "[2.5e-12, 1.1e-10, 5.2e-9]", "[2.5e-12, 1.1e-10]", 1), []string{"$.measurements[0].current_A", "one per voltage"}, new(*InvalidError)},
		{"unknown chart", strings.Replace(g, `"chart": "iv"`, `"chart": "pie"`, 1), []string{"$.sweeps.chart", `"pie"`}, new(*InvalidError)},
		{"negative std error", strings.Replace(g, `"std_error": 0.004`, `"std_error": -0.004`, 1), []string{"std_error", "non-negative"}, new(*InvalidError)},
		{"dangling data set", strings.Replace(g, `"measurement_id": "iv-25C"`, `"measurement_id": "iv-99C"`, 1), []string{"$.extractions[0].measurement_id"}, new(*InvalidError)},
		{"review without author", strings.Replace(g, `"author": "M. Osei"`, `"author": " "`, 1), []string{"$.review_notes[0].author"}, new(*InvalidError)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.data == g {
				t.Fatal("the case did not change the document (replacement missed)")
			}
			doc, err := Decode([]byte(c.data))
			if err == nil {
				t.Fatalf("accepted: %+v", doc)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("message %q lacks %q", err, w)
				}
			}
			if !errors.As(err, c.as) {
				t.Errorf("error %T is not %T", err, c.as)
			}
		})
	}
}

func TestEncodeRefusesNonFinite(t *testing.T) {
	doc := exampleDocument()
	doc.Measurements[0].CurrentA[1] = 0
	doc.Measurements[0].CurrentA[1] /= doc.Measurements[0].CurrentA[1] // NaN
	_, err := Encode(doc)
	if err == nil || !strings.Contains(err.Error(), "$.measurements[0].current_A[1]") {
		t.Errorf("NaN in a row: got %v", err)
	}
	// The raw encoder names the path too.
	_, err = strictjson.Encode(struct {
		X []float64 `json:"x"`
	}{[]float64{1, doc.Measurements[0].CurrentA[1]}})
	if err == nil || !strings.Contains(err.Error(), "$.x[1]") {
		t.Errorf("raw encoder: got %v", err)
	}
}

func TestNotesLines(t *testing.T) {
	var d Document
	d.SetNotes("one\r\ntwo\n\nfour")
	if want := []string{"one", "two", "", "four"}; !reflect.DeepEqual(d.Notes, want) {
		t.Errorf("SetNotes: %q, want %q", d.Notes, want)
	}
	if got := d.NotesText(); got != "one\ntwo\n\nfour" {
		t.Errorf("NotesText: %q", got)
	}
	d.SetNotes("")
	if d.Notes != nil {
		t.Errorf("empty notes: %q", d.Notes)
	}
}

func TestCloneIsDeep(t *testing.T) {
	a := exampleDocument()
	b := a.Clone()
	b.Measurements[0].VoltageV[0] = 42
	*b.Extractions[0].Parameters[0].StdError = 1
	*b.Spec.PContactVelocity = 3
	b.Notes[0] = "changed"
	if a.Measurements[0].VoltageV[0] == 42 || *a.Extractions[0].Parameters[0].StdError == 1 || *a.Spec.PContactVelocity == 3 || a.Notes[0] == "changed" {
		t.Error("Clone shares memory with the original")
	}
}
