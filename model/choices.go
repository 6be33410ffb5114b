package model

import (
	"math"
	"strings"

	"junco/model/units"
	"junco/physics"
)

// This file holds what the interactive workbench needs from model beyond
// evaluation and curves: trade units as numbers, the allowed range of each
// field as Validate states it, and the choices of the choice fields.

// TradeUnit returns the unit a value of kind k is typed and shown in by
// default and the SI value of one such unit (units.TradeUnit).
func TradeUnit(k Kind) (unit string, si float64) { return units.TradeUnit(k) }

// EditText writes an SI value as the text a user would type to give it
// again, in the kind's trade unit (units.EditText).
func EditText(k Kind, v float64) string { return units.EditText(k, v) }

// FieldAllowed returns the allowed range or set of a Spec field and the
// reason for it, in Validate's words. It asks Validate about a deliberately
// impossible value of the field, so the limits live in one place.
// ok is false for an unknown field name.
func FieldAllowed(s Spec, field string) (allowed, why string, ok bool) {
	f, found := CatalogueByFlag(field)
	switch {
	case !found || f.Class == ClassEffect:
		return "", "", false
	case f.Class == ClassText:
		f.SetText(&s, "?")
	case field == FieldGradient:
		s.Profile = "linear"
		f.SetValue(&s, math.NaN())
	default:
		f.SetValue(&s, math.NaN())
	}
	err := s.Validate()
	ve, isVE := err.(*ValidationError)
	if !isVE {
		return "", "", false
	}
	fe, found := ve.For(field)
	if !found {
		return "", "", false
	}
	return fe.Allowed, fe.Why, true
}

// MaterialChoice is one built-in semiconductor: its lookup key and its
// display name.
type MaterialChoice struct {
	Key, Name string
}

// MaterialChoices lists the built-in semiconductors in key order.
func MaterialChoices() []MaterialChoice {
	var out []MaterialChoice
	for _, k := range physics.MaterialKeys() {
		m, err := physics.MaterialByName(k)
		if err != nil {
			continue
		}
		out = append(out, MaterialChoice{Key: m.Key, Name: m.Name})
	}
	return out
}

// DopantChoices lists the donor (donor = true) or acceptor species known
// in a material, sorted, and the species assumed when none is given. An
// unknown material gives no choices.
func DopantChoices(material string, donor bool) (names []string, usual string) {
	m, err := physics.MaterialByName(material)
	if err != nil {
		return nil, ""
	}
	usual = m.DefaultAcceptor
	if donor {
		usual = m.DefaultDonor
	}
	return m.DopantNames(donor), strings.ToLower(usual)
}

// materialChoices is the choice list of the material field: the built-in
// semiconductors, each by its name.
func materialChoices(Spec) []Choice {
	var out []Choice
	for _, c := range MaterialChoices() {
		out = append(out, Choice{c.Key, c.Name})
	}
	return out
}

// speciesChoices is the choice list of a species field: the donors
// (donor = true) or acceptors of a material, the usual one first as the
// empty choice.
func speciesChoices(material string, donor bool) []Choice {
	names, usual := DopantChoices(material, donor)
	out := []Choice{{"", "usual (" + usual + ")"}}
	for _, n := range names {
		out = append(out, Choice{n, n})
	}
	return out
}
