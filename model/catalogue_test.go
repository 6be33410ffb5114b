package model

import (
	"encoding/json"
	"math"
	"reflect"
	"strings"
	"testing"

	"junco/physics"
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

// What the workbench's form takes from the catalogue is complete: every
// entry has a title, a hint and one of the groups; every group has an
// entry and glance keys that Evaluate gives; a refinement names an effect
// switch and applies only while that effect is on; a text entry offers a
// list of choices holding the default junction's word; only an entry with
// an empty value (Zero) has words for it, and each is read as empty, while
// an entry without one refuses the empty text.
func TestCatalogueFormAttributes(t *testing.T) {
	groups := InputGroups()
	res, err := Evaluate(DefaultSpec())
	if err != nil {
		t.Fatal(err)
	}
	used := map[InputGroup]bool{}
	for _, f := range Catalogue() {
		if f.Title == "" || f.Hint == "" {
			t.Errorf("%s: title %q, hint %q: both are needed", f.Flag, f.Title, f.Hint)
		}
		if f.Group < 0 || int(f.Group) >= len(groups) {
			t.Errorf("%s: group %d is not one of the %d groups", f.Flag, f.Group, len(groups))
		}
		used[f.Group] = true
		if f.Parent != "" {
			p, ok := CatalogueByFlag(f.Parent)
			if !ok || p.Class != ClassEffect {
				t.Errorf("%s refines %q, not an effect switch", f.Flag, f.Parent)
				continue
			}
			s := DefaultSpec()
			if !f.Applies(s) {
				t.Errorf("%s: does not apply with its effect on", f.Flag)
			}
			p.SetOff(&s, true)
			if f.Applies(s) {
				t.Errorf("%s: applies with its effect %s off", f.Flag, f.Parent)
			}
		}
		switch f.Class {
		case ClassText:
			ch := f.Choices(DefaultSpec())
			found := false
			for _, c := range ch {
				found = found || c.Value == f.Text(DefaultSpec())
				if c.Label == "" {
					t.Errorf("%s: choice %q has no label", f.Flag, c.Value)
				}
			}
			if !found {
				t.Errorf("%s: the default %q is not among the choices %v", f.Flag, f.Text(DefaultSpec()), ch)
			}
		case ClassValue:
			if f.Zero == "" && len(f.Aliases) > 0 {
				t.Errorf("%s: words %v for an empty value it does not have", f.Flag, f.Aliases)
			}
			for _, w := range append([]string{""}, f.Aliases...) {
				_, given, err := f.Parse(w)
				if f.Zero == "" && err == nil {
					t.Errorf("%s: the empty text accepted for a field that needs a value", f.Flag)
				}
				if f.Zero != "" && (given || err != nil) {
					t.Errorf("%s: %q not read as the empty value (%v, %v)", f.Flag, w, given, err)
				}
			}
			if v, given, err := f.Parse("2 " + DefaultUnit(f.Kind)); err != nil || !given || v <= 0 {
				t.Errorf("%s: \"2 %s\" read as %g, %v, %v", f.Flag, DefaultUnit(f.Kind), v, given, err)
			}
		}
	}
	for _, g := range groups {
		if !used[g.Group] {
			t.Errorf("group %q has no field", g.Name)
		}
		if g.Name == "" || g.Title == "" || g.Intro == "" || len(g.Glance) == 0 {
			t.Errorf("group %d: name %q, title %q, intro %q, glance %v: each is needed", g.Group, g.Name, g.Title, g.Intro, g.Glance)
		}
		for _, k := range g.Glance {
			if _, ok := res.Get(k); !ok {
				t.Errorf("group %q: glance key %q is not a result", g.Name, k)
			}
		}
	}
}

// The effect switches of the catalogue are the effects: every switch of
// model.Effects (found by reflection) is one catalogue entry, linked to
// one switch of physics.Effects, and every switch of physics.Effects has
// one entry. The zero Effects (every switch absent) is
// physics.RealisticEffects, IdealEffects turns every physics switch off,
// and each entry turned off alone turns exactly its own physics switch off.
func TestEffectsFromCatalogue(t *testing.T) {
	var entries []CatalogueField
	for _, f := range Catalogue() {
		if f.Class == ClassEffect {
			entries = append(entries, f)
		}
	}
	boolFields := func(v reflect.Value) []string {
		var out []string
		for i := 0; i < v.NumField(); i++ {
			if v.Field(i).Kind() == reflect.Bool {
				out = append(out, v.Type().Field(i).Name)
			}
		}
		return out
	}
	if n := len(boolFields(reflect.ValueOf(Effects{}))); n != len(entries) {
		t.Errorf("model.Effects has %d switches, the catalogue %d effect entries", n, len(entries))
	}
	physSwitches := boolFields(reflect.ValueOf(physics.Effects{}))
	if len(physSwitches) != len(entries) {
		t.Errorf("physics.Effects has %d switches, the catalogue %d effect entries", len(physSwitches), len(entries))
	}
	if got, want := (Effects{}).Physics(), physics.RealisticEffects(); got != want {
		t.Errorf("no switch set: %+v, want the realistic set %+v", got, want)
	}
	ideal := reflect.ValueOf(IdealEffects().Physics())
	for _, name := range physSwitches {
		if ideal.FieldByName(name).Bool() {
			t.Errorf("IdealEffects leaves physics switch %s on", name)
		}
	}
	owner := map[string]string{}
	for _, f := range entries {
		var s Spec
		f.SetOff(&s, true)
		pe := reflect.ValueOf(s.Effects.Physics())
		var off []string
		for _, name := range physSwitches {
			if !pe.FieldByName(name).Bool() {
				off = append(off, name)
			}
		}
		if len(off) != 1 {
			t.Errorf("%s off turns %v off, want exactly one physics switch", f.Flag, off)
			continue
		}
		if o, dup := owner[off[0]]; dup {
			t.Errorf("%s and %s both turn %s off", o, f.Flag, off[0])
		}
		owner[off[0]] = f.Flag
	}
}

// A numeric result says which switched-off effects the solver contains
// all the same, from the catalogue's InSolver: each such switch off alone
// gives the numeric-effects flag naming what the solver keeps, and a
// switch the solver follows (breakdown) gives none.
func TestNumericEffectsFlagFromCatalogue(t *testing.T) {
	message := func(s Spec) (string, bool) {
		d, err := BuildNumericDevice(s, NumericSpec{}, -1)
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range d.Flags {
			if f.Code == FlagNumericEffects {
				return f.Message, true
			}
		}
		return "", false
	}
	if m, ok := message(DefaultSpec()); ok {
		t.Errorf("every effect on: flag %q", m)
	}
	n := 0
	for _, f := range Catalogue() {
		if f.Class != ClassEffect {
			continue
		}
		s := DefaultSpec()
		f.SetOff(&s, true)
		m, ok := message(s)
		switch {
		case f.InSolver == "" && ok:
			t.Errorf("%s off: flag %q for an effect the solver follows", f.Flag, m)
		case f.InSolver != "" && (!ok || !strings.Contains(m, "contains "+f.InSolver+":")):
			t.Errorf("%s off: flag %q (%v), want it to name %q alone", f.Flag, m, ok, f.InSolver)
		}
		if f.InSolver != "" {
			n++
		}
	}
	if n == 0 {
		t.Error("no effect entry is marked as always in the solver")
	}
}
