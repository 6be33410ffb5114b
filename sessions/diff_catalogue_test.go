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
