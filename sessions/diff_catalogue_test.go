package sessions

import (
	"strings"
	"testing"
	"time"

	"junco/model"
)

// Every catalogue entry has a diff label naming its flag, and a changed
// effect switch shows under that label as on -> off (it used to show under
// its raw JSON key).
func TestDiffLabelsFromCatalogue(t *testing.T) {
	labels := map[string]string{}
	for _, f := range specFields() {
		labels[f.key] = f.label
	}
	for _, f := range model.Catalogue() {
		l, ok := labels[f.Key]
		if !ok || !strings.Contains(l, "("+f.Flag+")") {
			t.Errorf("%s: diff label %q, want one naming --%s", f.Key, l, f.Flag)
		}
	}
	now := time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)
	a := NewDocument("d", "ana", model.DefaultSpec(), now)
	sb := model.DefaultSpec()
	sb.Effects.NoBreakdown = true
	b := NewDocument("d", "ana", sb, now)
	var found bool
	for _, c := range Diff(a, b, true) {
		if c.Section == SectionInputs && c.Quantity == "effect: avalanche breakdown (no-breakdown)" {
			found = c.Old == "on" && c.New == "off"
		}
	}
	if !found {
		t.Errorf("no-breakdown change not shown as on -> off: %+v", Diff(a, b, true))
	}
}

// A contact recombination velocity of 0 (a passivated surface) is a value,
// not the absent velocity of an ohmic contact: the rows say "0.000e0
// cm/s"-like text, not "ohmic", while an absent velocity says "ohmic" and a
// zero width, the empty value of a width, says "long".
func TestSpecRowsZeroIsAValueWhereItIsOne(t *testing.T) {
	s := model.DefaultSpec()
	zero := 0.0
	s.PContactVelocity = &zero
	rows := map[string]string{}
	for _, r := range SpecRows(s, true) {
		rows[r.Key] = r.Value
	}
	if got, want := rows["p_contact_recombination_m_per_s"], model.Format(model.Velocity, 0, 4, true); got != want {
		t.Errorf("Sp = 0: row %q, want %q", got, want)
	}
	if got := rows["n_contact_recombination_m_per_s"]; got != "ohmic" {
		t.Errorf("Sn absent: row %q, want ohmic", got)
	}
	if got := rows["p_width_m"]; got != "long" {
		t.Errorf("Wp = 0: row %q, want long", got)
	}
}
