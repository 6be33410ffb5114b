package tui

import (
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/charmbracelet/bubbles/key"
)

// Every key a screen's own key map binds appears in the help screen's
// group of that screen: the groups come from the key maps (FullHelp), so
// a key added to a screen's map and left out of its FullHelp fails here.
// The maps are read by reflection (every key.Binding field), not from a
// second list of keys.
func TestHelpGroupsHoldEveryScreensKeys(t *testing.T) {
	m := newTest(t, 120, 40)
	k := m.e.keys
	maps := []struct {
		title string
		keys  any
	}{
		{"Batch fit", k.batchKeys()},
		{"Import", (&importScreen{}).importKeys(k)},
		{"Fit", (&fitScreen{}).fitKeys(k)},
		{"Activation energy", k.arrheniusKeys()},
		{"Model card", k.cardKeys()},
		{"Session list", k.browseKeys()},
		{"Revisions", k.historyKeys()},
		{"Comparison", k.diffKeys()},
		{"Dialogs", k.dialogKeys()},
		{"Questions", (&confirmScreen{what: "yes, the question's action"}).confirmKeys(k)},
		{"Quit question", m.quitKeys()},
		{"Newer revision", k.staleKeys()},
		{"Recovery draft", k.draftKeys()},
		{"Help", k.helpKeys()},
	}
	groups := map[string][]key.Binding{}
	for _, g := range m.helpGroups() {
		groups[g.title] = g.b
	}
	for _, mp := range maps {
		shown, ok := groups[mp.title]
		if !ok {
			t.Errorf("the help has no group %q", mp.title)
			continue
		}
		var inHelp []string
		for _, b := range shown {
			if b.Enabled() {
				inHelp = append(inHelp, b.Keys()...)
			}
		}
		for name, b := range bindingFields(reflect.ValueOf(mp.keys)) {
			if !b.Enabled() && mp.title != "Fit" { // the fit screen's LinLog is off outside I-V
				continue
			}
			for _, key := range b.Keys() {
				if !slices.Contains(inHelp, key) {
					t.Errorf("%s: %s's key %q is not in the help (help has %q)", mp.title, name, key, inHelp)
				}
			}
		}
	}
}

// bindingFields are the key.Binding fields of a key map struct, embedded
// structs (scrollKeys) included, by name.
func bindingFields(v reflect.Value) map[string]key.Binding {
	out := map[string]key.Binding{}
	for i := 0; i < v.NumField(); i++ {
		f, ft := v.Field(i), v.Type().Field(i)
		switch {
		case ft.Type == reflect.TypeOf(key.Binding{}):
			out[ft.Name] = f.Interface().(key.Binding)
		case ft.Anonymous && f.Kind() == reflect.Struct:
			for n, b := range bindingFields(f) {
				out[n] = b
			}
		}
	}
	return out
}

// The help screen names the batch screen's keys (walk dies, [ ], w,
// enter, f, tab, ctrl+e, ctrl+k, pgup/pgdn, esc) at 80 columns.
func TestHelpScreenNamesBatchKeys(t *testing.T) {
	m := newTest(t, 80, 24)
	text := flat(strings.Join(m.helpLines(80), "\n"))
	for _, want := range []string{"Batch fit", "arrows walk dies", "[ ] parameter mapped", "w next wafer", "enter open die",
		"enter fit the folder", "f add the open die", "tab keys to the map or the folder", "ctrl+e export CSV",
		"ctrl+k keep the table", "pgup/pgdn show the kept tables", "esc close, back to the map"} {
		if !strings.Contains(text, want) {
			t.Errorf("the help lacks %q", want)
		}
	}
}
