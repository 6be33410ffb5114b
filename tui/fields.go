package tui

import (
	"junco/model"
)

// option is one value of a choice field.
type option = model.Choice

// fieldDef is one input of the guided definition: an entry of the
// junction's catalogue (model.Catalogue), which says what it edits in
// model.Spec, its words, unit, group and choices. The form has no list of
// fields of its own: a field added to the catalogue appears here.
type fieldDef struct {
	model.CatalogueField
	id    string // the entry's flag, the name model.Validate reports
	label string // the entry's title, indented under the switch it refines
	step  int    // the entry's group
	// choice is set for a word chosen from a list (a text field or an
	// effect switch); otherwise the field is a number typed in units.
	choice bool
}

func (d fieldDef) visible(s model.Spec) bool { return d.Applies(s) }

// num returns a number field's value in force and whether one is given
// (false: the field is empty and its Zero word is in force).
func (d fieldDef) num(s model.Spec) (float64, bool) { return d.Value(s) }

// setNum sets a number field, or empties it (set false).
func (d fieldDef) setNum(s *model.Spec, v float64, set bool) {
	if set {
		d.SetValue(s, v)
		return
	}
	d.Clear(s)
}

// options, str and setStr read and set a choice field.
func (d fieldDef) options(s model.Spec) []option  { return d.Choices(s) }
func (d fieldDef) str(s model.Spec) string        { return d.Choice(s) }
func (d fieldDef) setStr(s *model.Spec, v string) { d.SetChoice(s, v) }

// stepDef is one step of the guided definition: a group of the catalogue.
type stepDef struct {
	name  string // short, for the step bar
	title string
	intro string
	// glance lists the result quantities shown under the step.
	glance []string
}

func stepDefs() []stepDef {
	var out []stepDef
	for _, g := range model.InputGroups() {
		out = append(out, stepDef{name: g.Name, title: g.Title, intro: g.Intro, glance: g.Glance})
	}
	return out
}

// fieldDefs builds the form's fields from the catalogue, in its order.
func fieldDefs() []fieldDef {
	cat := model.Catalogue()
	out := make([]fieldDef, 0, len(cat))
	for _, c := range cat {
		label := c.Title
		if c.Parent != "" {
			label = "  " + label
		}
		out = append(out, fieldDef{CatalogueField: c, id: c.Flag, label: label, step: int(c.Group), choice: c.Class != model.ClassValue})
	}
	return out
}

// fieldText returns the text a field starts with for a spec.
func fieldText(d fieldDef, s model.Spec) string {
	if d.choice {
		return d.str(s)
	}
	v, set := d.num(s)
	if !set {
		return ""
	}
	return model.EditText(d.Kind, v)
}
