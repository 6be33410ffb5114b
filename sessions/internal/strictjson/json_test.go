package strictjson

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"
)

type rec struct {
	Name  string      `json:"name"`
	Rows  [][]float64 `json:"rows,omitempty"`
	Count int         `json:"count"`
}

// Round trip, and the layout the format promises: one table row per line.
func TestRoundTripAndLayout(t *testing.T) {
	in := rec{Name: "d7", Rows: [][]float64{{0.1, 1e-9}, {0.2, 2e-8}}, Count: 2}
	b, err := Encode(in)
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(b), "\n"); n < 6 {
		t.Errorf("expected one row per line, got %d lines:\n%s", n, b)
	}
	var out rec
	if err := Decode(b, &out); err != nil {
		t.Fatal(err)
	}
	if out.Name != in.Name || out.Count != 2 || len(out.Rows) != 2 || out.Rows[1][1] != 2e-8 {
		t.Errorf("round trip gave %+v", out)
	}
}

// The strict rules: unknown keys by path, duplicate keys, fractions for
// integers, NaN on encoding.
func TestStrictRules(t *testing.T) {
	var r rec
	err := Decode([]byte(`{"name":"x","count":1,"colour":2}`), &r)
	var uf *UnknownFieldsError
	if !errors.As(err, &uf) || len(uf.Fields) != 1 || uf.Fields[0] != "$.colour" {
		t.Errorf("unknown key: %v", err)
	}
	var se *SyntaxError
	if err := Decode([]byte(`{"name":"x","name":"y"}`), &r); !errors.As(err, &se) {
		t.Errorf("duplicate key: %v", err)
	}
	var te *TypeError
	if err := Decode([]byte(`{"count":1.5}`), &r); !errors.As(err, &te) || te.Path != "$.count" {
		t.Errorf("fraction for int: %v", err)
	}
	if _, err := Encode(rec{Rows: [][]float64{{math.NaN()}}}); err == nil {
		t.Error("NaN encoded")
	}
}

// A Reader takes one member and leaves the rest unread.
func TestReaderTakesOneMember(t *testing.T) {
	r := NewReader([]byte(`{"schema": 3, "rest": [1, 2, {"deep": true}]} trailing`))
	var v int
	stop := errors.New("stop")
	err := r.Members(func(key string) error {
		if key != "schema" {
			return r.Skip()
		}
		if err := r.Value(key, &v); err != nil {
			return err
		}
		return stop
	})
	if err != stop || v != 3 {
		t.Errorf("schema %d, err %v", v, err)
	}
}

type withZero struct {
	Name  string `json:"name"`
	Inner struct {
		X float64 `json:"x,omitempty"`
	} `json:"inner,omitzero"`
}

// omitzero leaves a zero struct out, as encoding/json does since Go 1.24,
// and writes it when any member is set.
func TestOmitZero(t *testing.T) {
	b, err := Encode(withZero{Name: "a"})
	if err != nil || strings.Contains(string(b), "inner") {
		t.Errorf("zero struct written: %s (%v)", b, err)
	}
	w := withZero{Name: "a"}
	w.Inner.X = 2
	b, err = Encode(w)
	if err != nil || !strings.Contains(string(b), `"x": 2`) {
		t.Errorf("set struct: %s (%v)", b, err)
	}
	var back withZero
	if err := Decode(b, &back); err != nil || back.Inner.X != 2 {
		t.Errorf("round trip %+v (%v)", back, err)
	}
}

// Invisible format characters are written escaped (a right-to-left
// override U+202E, a zero-width space U+200B, a byte-order mark U+FEFF, a
// language tag U+E0001 beyond the BMP as a surrogate pair, RFC 8259 sec.
// 7), so a document printed to a terminal cannot reorder what it shows;
// the text decodes back unchanged and is also what encoding/json reads.
func TestFormatCharactersEscaped(t *testing.T) {
	type doc struct {
		Name string `json:"name"`
	}
	in := doc{Name: "rlo\u202egnp.csv zw\u200bsp \ufeffbom tag\U000E0001 µm"}
	data, err := Encode(in)
	if err != nil {
		t.Fatal(err)
	}
	for _, raw := range []string{"\u202e", "\u200b", "\ufeff", "\U000E0001"} {
		if strings.Contains(string(data), raw) {
			t.Errorf("%q written raw in %s", raw, data)
		}
	}
	if !strings.Contains(string(data), `\u202e`) || !strings.Contains(string(data), `\udb40\udc01`) || !strings.Contains(string(data), "µm") {
		t.Errorf("escapes or plain text wrong: %s", data)
	}
	var back, std doc
	if err := Decode(data, &back); err != nil || back != in {
		t.Errorf("decoded %q, %v", back.Name, err)
	}
	if err := json.Unmarshal(data, &std); err != nil || std != in {
		t.Errorf("encoding/json read %q, %v", std.Name, err)
	}
}
