package cli

import (
	"errors"
	"strings"
	"testing"

	"junco/physics/extract"
)

// The history's NOTE column shows the note given with each save, and
// where a revision came from.
func TestSessionsHistoryShowsSaveNotes(t *testing.T) {
	dir := seeded(t)
	st := fitSaveStore(t, dir)
	doc, rev, err := st.Open("d7", 0)
	if err != nil {
		t.Fatal(err)
	}
	doc.Meta.Note = "lifetime from wafer 3"
	if _, err := st.Save("d7", doc, rev.Number); err != nil {
		t.Fatal(err)
	}
	if _, err := st.RestoreRevision("d7", 3); err != nil {
		t.Fatal(err)
	}
	code, out, _ := sess(t, dir, "history", "d7")
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if code != 0 || len(lines) != 5 {
		t.Fatalf("history: %d\n%s", code, out)
	}
	if !strings.HasSuffix(lines[3], "lifetime from wafer 3") {
		t.Errorf("revision 3 does not show its note:\n%s", out)
	}
	if !strings.HasSuffix(lines[4], "restored from revision 3") || strings.Contains(lines[4], "wafer") {
		t.Errorf("revision 4 (restored) must show its origin, not the old save's note:\n%s", out)
	}
}

// A revision written by fit --save-to is an edit of the newest one: it
// carries neither that revision's origin nor its note.
func TestFitSaveToDropsStaleOrigin(t *testing.T) {
	files, store := t.TempDir(), seeded(t)
	st := fitSaveStore(t, store)
	if _, err := st.RestoreRevision("d7", 1); err != nil {
		t.Fatal(err)
	}
	truth := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.5, SeriesResistanceOhm: 10, ShuntResistanceOhm: 1e6}
	p := fitWriteIV(t, files, "invented-die1.csv", truth, 300, 0.02, 1.0, 150, 1)
	if code, _, errs := fitCall("iv", p, "--save-to", "d7", "--data", store); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, rev, err := st.Open("d7", 0)
	if err != nil {
		t.Fatal(err)
	}
	if rev.Number != 4 || doc.Meta.Origin != "" || doc.Meta.Note != "" {
		t.Errorf("revision %d: origin %q, note %q; want revision 4 without either", rev.Number, doc.Meta.Origin, doc.Meta.Note)
	}
}

// With no user in the environment the account name signs saves.
func TestUserNameFallsBackToAccount(t *testing.T) {
	none := func(string) string { return "" }
	if got := userName(none, func() (string, error) { return "ana", nil }); got != "ana" {
		t.Errorf("account fallback: %q, want ana", got)
	}
	if got := userName(none, func() (string, error) { return "", errors.New("no passwd entry") }); got != "" {
		t.Errorf("no account: %q, want empty", got)
	}
	env := func(k string) string {
		if k == "LOGNAME" {
			return "ben"
		}
		return ""
	}
	if got := userName(env, func() (string, error) { return "ana", nil }); got != "ben" {
		t.Errorf("environment first: %q, want ben", got)
	}
}
