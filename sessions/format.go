package sessions

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"junco/sessions/internal/strictjson"
)

// MaxDocumentBytes bounds the size of a document junco reads, so that a
// damaged or hostile file cannot exhaust memory. A session with 100 data
// sets of 100,000 points of four columns stays well below it.
const MaxDocumentBytes = 512 << 20

// SchemaError is a document whose schema version this junco cannot read.
type SchemaError struct {
	Found     int // the version in the document; 0 when missing
	Missing   bool
	Supported int // the newest version this junco reads
}

func (e *SchemaError) Error() string {
	switch {
	case e.Missing:
		return "no \"schema\" field: this is not a junco session document"
	case e.Found > e.Supported:
		return fmt.Sprintf("schema %d is newer than this junco reads (schema %d and older); open it with a newer junco — nothing was read or changed", e.Found, e.Supported)
	default:
		return fmt.Sprintf("schema %d is not a junco session format (the first is schema 1)", e.Found)
	}
}

// Encode validates doc and returns its JSON: pretty-printed, keys in
// field order, numeric rows one per line, ending with a newline. The
// document must carry Schema == SchemaVersion, and its JSON must stay
// within MaxDocumentBytes (what junco reads back).
func Encode(doc *Document) ([]byte, error) {
	if err := doc.Validate(); err != nil {
		return nil, err
	}
	data, err := strictjson.EncodeSize(doc, sizeHint(doc))
	if err == nil && len(data) > MaxDocumentBytes {
		return nil, fmt.Errorf("the session would be %d MiB: at most %d MiB (MaxDocumentBytes) can be read back; keep fewer data sets or batch tables", len(data)>>20, MaxDocumentBytes>>20)
	}
	return data, err
}

// sizeHint estimates the encoded size of a document: about 26 bytes per
// stored number plus room for the rest.
func sizeHint(doc *Document) int {
	n := 64 << 10
	for _, m := range doc.Measurements {
		for _, c := range m.ValueColumns() {
			n += 26 * len(c.Values)
		}
		n += 256 * len(m.Problems)
	}
	for _, b := range doc.Batches {
		n += 600 * len(b.Rows)
	}
	return n
}

// Decode reads a session document strictly: the schema version is checked
// first (newer versions are refused with a *SchemaError, older ones
// migrated), then the JSON is decoded with unknown fields, duplicate keys
// and wrong types reported (*UnknownFieldsError, *SyntaxError,
// *TypeError), and finally the document, including its Spec, is validated
// (*InvalidError). Nothing is repaired.
func Decode(data []byte) (*Document, error) {
	doc := new(Document)
	if err := decodeVersioned(data, currentMigrator(), doc); err != nil {
		return nil, err
	}
	migrateCVRecords(doc)
	if err := doc.Validate(); err != nil {
		return nil, err
	}
	return doc, nil
}

// decodeVersioned decodes data into target (a pointer to the document type
// of version m.current), migrating older versions through m's steps.
func decodeVersioned(data []byte, m migrator, target any) error {
	if len(data) > MaxDocumentBytes {
		return fmt.Errorf("%d bytes is larger than the %d MiB a session may have", len(data), MaxDocumentBytes>>20)
	}
	v, err := peekSchema(data)
	if err != nil {
		return err
	}
	switch {
	case v > m.current:
		return &SchemaError{Found: v, Supported: m.current}
	case v < 1:
		return &SchemaError{Found: v, Supported: m.current}
	case v < m.current:
		data, err = m.upgrade(data, v)
		if err != nil {
			return err
		}
	}
	return strictjson.Decode(data, target)
}

// peekSchema returns the "schema" member of the top-level object, reading
// no further than needed (junco writes it first).
func peekSchema(data []byte) (int, error) {
	r := strictjson.NewReader(data)
	if c, ok := r.Peek(); !ok {
		return 0, r.Syntax("empty document")
	} else if c != '{' {
		return 0, r.Syntax("a session document is a JSON object and starts with '{'")
	}
	version, found := 0, false
	errFound := errors.New("found")
	err := r.Members(func(key string) error {
		if key != "schema" {
			return r.Skip()
		}
		if err := r.Value("schema", &version); err != nil {
			return err
		}
		found = true
		return errFound
	})
	if err != nil && err != errFound {
		return 0, err
	}
	if !found {
		return 0, &SchemaError{Missing: true}
	}
	return version, nil
}

// header is the start of a document that listing needs.
type header struct {
	Schema int
	Meta   Meta
}

// errShort means a prefix ended before the header was complete.
var errShort = errors.New("header not complete in the bytes read")

// decodeHeader reads the schema and meta members from the start of a
// document without reading the rest. It returns errShort when prefix ends
// before both are read and more of the file exists (partial is true).
// Documents of another schema version, or with the members in another
// order, fall back to the caller's full decode (errShort as well).
func decodeHeader(prefix []byte, partial bool) (header, error) {
	var h header
	r := strictjson.NewReader(prefix)
	if c, ok := r.Peek(); !ok || c != '{' {
		if !ok && partial {
			return h, errShort
		}
		return h, r.Syntax("a session document is a JSON object and starts with '{'")
	}
	got := 0
	done := errors.New("done")
	err := r.Members(func(key string) error {
		switch key {
		case "schema":
			if err := r.Value("schema", &h.Schema); err != nil {
				return err
			}
			if h.Schema != SchemaVersion {
				return errShort
			}
		case "meta":
			if err := r.Value("meta", &h.Meta); err != nil {
				return err
			}
		default:
			return errShort
		}
		got++
		if got == 2 {
			return done
		}
		return nil
	})
	switch {
	case err == done:
		if u := r.Unknown(); len(u) > 0 {
			return h, &UnknownFieldsError{Fields: u}
		}
		return h, nil
	case err == nil:
		// The object ended without both members: the full decode names
		// what is wrong.
		return h, errShort
	case partial:
		var se *SyntaxError
		if err == errShort || errors.As(err, &se) {
			return h, errShort
		}
	}
	return h, err
}

// ---------------------------------------------------------------- migration

// migration upgrades a document of schema From to From+1, working on the
// generic JSON tree (objects as map[string]any, numbers as json.Number so
// that no digit is lost).
type migration struct {
	From  int
	Note  string // what changed, for the record
	Apply func(doc map[string]any) error
}

// migrator knows the current version and the steps that lead to it.
type migrator struct {
	current int
	steps   []migration
}

// currentMigrator returns the migrations of this junco. A change of the
// format bumps SchemaVersion and adds the step from the previous version
// here, with a frozen sample of the old version in testdata
// (schema1-frozen.json).
func currentMigrator() migrator {
	return migrator{current: SchemaVersion, steps: []migration{
		{From: 1, Note: "kept batch tables: \"batches\" added, empty", Apply: func(doc map[string]any) error {
			if _, ok := doc["batches"]; ok {
				return errors.New("a schema 1 document has no \"batches\" member: the schema number is wrong")
			}
			doc["batches"] = []any{}
			return nil
		}},
	}}
}

// MigrationError reports a document that could not be upgraded.
type MigrationError struct {
	From, To int
	Err      error
}

func (e *MigrationError) Error() string {
	return fmt.Sprintf("upgrading schema %d to %d: %v", e.From, e.To, e.Err)
}

func (e *MigrationError) Unwrap() error { return e.Err }

// upgrade converts data of schema version from to m.current and returns
// the JSON of the result.
func (m migrator) upgrade(data []byte, from int) ([]byte, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	var tree map[string]any
	if err := dec.Decode(&tree); err != nil {
		// A damaged file: the strict reader says where (line, column,
		// truncated), as it does for a document of the current schema.
		if serr := strictjson.NewReader(data).Skip(); serr != nil {
			return nil, serr
		}
		return nil, &MigrationError{From: from, To: m.current, Err: err}
	}
	for v := from; v < m.current; v++ {
		var step *migration
		for i := range m.steps {
			if m.steps[i].From == v {
				step = &m.steps[i]
				break
			}
		}
		if step == nil {
			return nil, &MigrationError{From: v, To: v + 1, Err: errors.New("this junco has no migration for it")}
		}
		if err := step.Apply(tree); err != nil {
			return nil, &MigrationError{From: v, To: v + 1, Err: err}
		}
		tree["schema"] = json.Number(fmt.Sprint(v + 1))
	}
	out, err := json.Marshal(tree)
	if err != nil {
		return nil, &MigrationError{From: from, To: m.current, Err: err}
	}
	return out, nil
}
