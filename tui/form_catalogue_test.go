package tui

import (
	"math"
	"reflect"
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"

	"junco/model"
)

// The form is the catalogue: every catalogue entry is a field of the form
// and every field of the form is a catalogue entry, in the catalogue's
// order, with its flag as id, its title as label, its group as step and
// its class deciding between a typed number and a choice; the steps are
// the catalogue's groups, each with at least one field.
func TestFormFieldsAreTheCatalogue(t *testing.T) {
	cat := model.Catalogue()
	defs := fieldDefs()
	if len(defs) != len(cat) {
		t.Fatalf("the form has %d fields, the catalogue %d entries", len(defs), len(cat))
	}
	fromCat := map[string]bool{}
	for _, c := range cat {
		fromCat[c.Flag] = true
	}
	for i, d := range defs {
		c := cat[i]
		if !fromCat[d.id] {
			t.Errorf("form field %q is not a catalogue entry", d.id)
		}
		if d.id != c.Flag || strings.TrimSpace(d.label) != c.Title || d.step != int(c.Group) || d.Kind != c.Kind {
			t.Errorf("form field %d is %q %q step %d kind %v; the catalogue's entry %q %q group %d kind %v",
				i, d.id, d.label, d.step, d.Kind, c.Flag, c.Title, c.Group, c.Kind)
		}
		if d.choice != (c.Class != model.ClassValue) {
			t.Errorf("%s: choice %v for class %d", d.id, d.choice, c.Class)
		}
		if i > 0 && d.step < defs[i-1].step {
			t.Errorf("%s (step %d) after %s (step %d): the groups are out of order", d.id, d.step, defs[i-1].id, defs[i-1].step)
		}
	}
	steps, groups := stepDefs(), model.InputGroups()
	if len(steps) != len(groups) {
		t.Fatalf("%d steps, %d groups", len(steps), len(groups))
	}
	for i, g := range groups {
		if int(g.Group) != i || steps[i].name != g.Name || steps[i].title != g.Title {
			t.Errorf("step %d %q is not group %d %q", i, steps[i].name, g.Group, g.Name)
		}
		n := 0
		for _, d := range defs {
			if d.step == i {
				n++
			}
		}
		if n == 0 {
			t.Errorf("group %q has no field", g.Name)
		}
	}
}

// testJunctions are junctions for which, between them, every catalogue
// field applies: a graded profile lit by monochromatic light through a
// thin p side (the illuminated side and irradiance count), and the same
// dark with long regions (the layer thicknesses count).
func testJunctions() []model.Spec {
	dark := model.DefaultSpec()
	dark.Profile = "linear"
	lit := dark
	lit.PWidth = 5e-6
	lit.Light = model.Light{Wavelength: 650e-9, Absorption: 3e5, PowerDensity: 100}
	return []model.Spec{lit, dark}
}

func openSpec(s model.Spec) Model {
	return start(New(Options{Renderer: plainRenderer(), Width: 200, Height: 60, Spec: &s}))
}

// Every catalogue field is reached by walking the form with the arrow keys
// and edits the member its entry names: a choice steps to the catalogue's
// next choice and back; a number out of every range (1e300) is refused,
// keeps the value from before and names the field; the empty text and each
// of the entry's words for the empty value are read as the empty value and
// empty the field, or are refused keeping the value from before (an empty
// gradient of a graded profile, a long illuminated side); the field's own
// text gives its value back.
func TestEveryCatalogueFieldEditsInTheForm(t *testing.T) {
	specFor := map[string]model.Spec{}
	seen := map[string]bool{}
	for _, spec := range testJunctions() {
		for _, c := range model.Catalogue() {
			if _, ok := specFor[c.Flag]; !ok && c.Applies(spec) {
				specFor[c.Flag] = spec
			}
		}
		m := openSpec(spec)
		if err := m.form.initErr; err != "" {
			t.Fatalf("test junction not accepted: %s", err)
		}
		m = press(m, "1")
		for range 3 * len(m.form.defs) {
			seen[m.form.defs[m.form.cur].id] = true
			m = press(m, "down")
		}
	}
	for _, c := range model.Catalogue() {
		if !seen[c.Flag] {
			t.Errorf("%s: not reached by walking the form", c.Flag)
		}
	}

	for _, c := range model.Catalogue() {
		spec, ok := specFor[c.Flag]
		if !ok {
			t.Errorf("%s applies to none of the test junctions", c.Flag)
			continue
		}
		t.Run(c.Flag, func(t *testing.T) {
			m := press(openSpec(spec), string(rune('1'+int(c.Group))))
			m = goToField(t, m, c.Flag)
			i := m.form.index(c.Flag)
			before := m.Spec()
			if c.Class != model.ClassValue {
				opts := c.Choices(before)
				j := optionIndex(opts, c.Choice(before))
				m = press(m, "right")
				if strings.HasPrefix(m.form.note, "not changed") {
					t.Logf("%s: %s", c.Flag, m.form.note)
					return
				}
				want := opts[(j+1)%len(opts)].Value
				if j < 0 {
					want = opts[0].Value
				}
				if got := c.Choice(m.Spec()); got != want {
					t.Errorf("right: %q in force, want the next choice %q", got, want)
				}
				m = goToField(t, press(m, string(rune('1'+int(c.Group)))), c.Flag)
				m = press(m, "left")
				if got := c.Choice(m.Spec()); got != c.Choice(before) {
					t.Errorf("right then left: %q in force, want %q back", got, c.Choice(before))
				}
				return
			}
			typeIn := func(m Model, text string) Model {
				m = press(m, "enter", "ctrl+u")
				m = typeText(m, text)
				return goToField(t, press(press(m, "enter"), string(rune('1'+int(c.Group)))), c.Flag)
			}
			m = typeIn(m, "1e300")
			if !reflect.DeepEqual(m.Spec(), before) {
				t.Errorf("1e300 put in force")
			}
			if fs := m.form.fs[i]; !fs.kept || !strings.Contains(fs.err, c.Title) {
				t.Errorf("1e300: kept %v, error %q does not name %q", fs.kept, fs.err, c.Title)
			}
			if c.Zero != "" {
				for _, w := range append([]string{""}, c.Aliases...) {
					if _, given, err := c.Parse(w); given || err != nil {
						t.Errorf("%q is not read as the empty value: given %v, %v", w, given, err)
					}
					m = typeIn(m, w)
					_, given := c.Value(m.Spec())
					fs := m.form.fs[i]
					if given && !(reflect.DeepEqual(m.Spec(), before) && fs.kept && fs.err != "") {
						t.Errorf("%q: neither empty nor refused (error %q)", w, fs.err)
					}
				}
			}
			m = typeIn(m, fieldText(m.form.defs[i], before))
			v0, g0 := c.Value(before)
			v1, g1 := c.Value(m.Spec())
			if g0 != g1 || math.Abs(v1-v0) > 1e-9*math.Abs(v0) {
				t.Errorf("its own text %q gave %g (%v), want %g (%v)", fieldText(m.form.defs[i], before), v1, g1, v0, g0)
			}
		})
	}
}

// Every choice of every catalogue choice field is shown whole when focused
// at each golden size, beside the value in force it shows (a long material
// name takes room from that column while the value still fits).
func TestChoiceLabelsWhole(t *testing.T) {
	for _, size := range goldenSizes {
		for _, base := range testJunctions() {
			for _, c := range model.Catalogue() {
				if c.Class == model.ClassValue || !c.Applies(base) {
					continue
				}
				for _, o := range c.Choices(base) {
					s := base
					c.SetChoice(&s, o.Value)
					if s.Validate() != nil {
						continue
					}
					m := start(New(Options{Renderer: plainRenderer(), Width: size[0], Height: size[1], Spec: &s}))
					if m.form.initErr != "" {
						continue
					}
					m = goToField(t, press(m, string(rune('1'+int(c.Group)))), c.Flag)
					f := m.form
					f.SetSize(f.w, 400)
					v := flat(ansi.Strip(f.View()))
					if !strings.Contains(v, o.Label) {
						t.Errorf("%v %s = %q: label %q cut:\n%s", size, c.Flag, o.Value, o.Label, ansi.Strip(f.View()))
					}
					if now := f.nowText(f.cur); now != "" && !strings.Contains(v, now) {
						t.Errorf("%v %s = %q: value in force %q cut", size, c.Flag, o.Value, now)
					}
				}
			}
		}
	}
}
