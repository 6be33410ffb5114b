package model

import (
	"encoding/json"
	"math"
	"reflect"
	"strings"
	"testing"
)

// specJSONKeys lists the JSON keys of every member of Spec by reflection,
// members of a nested struct as "outer.inner".
func specJSONKeys(t reflect.Type, prefix string) []string {
	var keys []string
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		if name == "" || name == "-" {
			continue
		}
		if f.Type.Kind() == reflect.Struct {
			keys = append(keys, specJSONKeys(f.Type, prefix+name+".")...)
			continue
		}
		keys = append(keys, prefix+name)
	}
	return keys
}

// specMember reads one member of a Spec through its JSON encoding, the way
// a session stores it ("effects.x" for a nested one); nil when omitted.
func specMember(t *testing.T, s Spec, key string) json.RawMessage {
	t.Helper()
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	var top map[string]json.RawMessage
	if err := json.Unmarshal(b, &top); err != nil {
		t.Fatal(err)
	}
	outer, inner, nested := strings.Cut(key, ".")
	if !nested {
		return top[key]
	}
	if top[outer] == nil {
		return nil // an omitted nested object (dark light)
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(top[outer], &m); err != nil {
		t.Fatal(err)
	}
	return m[inner]
}

// Every Spec member (found by reflection, so a member added later without
// a catalogue entry fails here) is in the catalogue exactly once; every
// entry has a flag, a label and help, a unit kind when it is a value; and
// each entry's accessors reach the member its key names (set through the
// accessor, seen in the JSON under that key).
func TestCatalogueCoversSpec(t *testing.T) {
	cat := Catalogue()
	byKey := map[string]CatalogueField{}
	flags := map[string]bool{}
	for _, f := range cat {
		if _, dup := byKey[f.Key]; dup {
			t.Errorf("key %q twice", f.Key)
		}
		byKey[f.Key] = f
		if f.Flag == "" || f.Label == "" || f.Help == "" {
			t.Errorf("%s: flag %q, label %q, help %q: each is needed", f.Key, f.Flag, f.Label, f.Help)
		}
		if flags[f.Flag] {
			t.Errorf("flag %q twice", f.Flag)
		}
		flags[f.Flag] = true
	}
	keys := specJSONKeys(reflect.TypeOf(Spec{}), "")
	if len(keys) != len(cat) {
		t.Errorf("Spec has %d members, the catalogue %d entries", len(keys), len(cat))
	}
	for _, k := range keys {
		if _, ok := byKey[k]; !ok {
			t.Errorf("Spec member %q is not in the catalogue", k)
		}
	}
	for _, f := range cat {
		s := DefaultSpec()
		before := string(specMember(t, s, f.Key))
		switch f.Class {
		case ClassValue:
			f.SetValue(&s, 12345.5)
			if v, ok := f.Value(s); !ok || v != 12345.5 {
				t.Errorf("%s: Value after SetValue = %v, %v", f.Key, v, ok)
			}
			if got := string(specMember(t, s, f.Key)); got != "12345.5" {
				t.Errorf("%s: SetValue wrote %q under its key (before %q)", f.Key, got, before)
			}
		case ClassText:
			f.SetText(&s, "zz-marker")
			if got := string(specMember(t, s, f.Key)); got != `"zz-marker"` || f.Text(s) != "zz-marker" {
				t.Errorf("%s: SetText wrote %q under its key", f.Key, got)
			}
		case ClassEffect:
			f.SetOff(&s, true)
			if got := string(specMember(t, s, f.Key)); got != "true" || !f.Off(s) {
				t.Errorf("%s: SetOff wrote %q under its key", f.Key, got)
			}
		}
	}
}

// Flags of value and text fields are the names Validate reports, so that
// an error names the flag the user typed: a NaN through each value
// accessor comes back from Validate under the entry's flag.
func TestCatalogueFlagsAreValidationNames(t *testing.T) {
	for _, f := range Catalogue() {
		if f.Class != ClassValue {
			continue
		}
		s := DefaultSpec()
		if f.Flag == FieldGradient {
			s.Profile = "linear"
		}
		f.SetValue(&s, math.NaN())
		ve, ok := s.Validate().(*ValidationError)
		if !ok {
			t.Errorf("%s = NaN: Validate gave no field error", f.Flag)
			continue
		}
		if _, found := ve.For(f.Flag); !found {
			t.Errorf("%s = NaN: Validate reported %v, not the flag's name", f.Flag, ve.Fields)
		}
	}
}
