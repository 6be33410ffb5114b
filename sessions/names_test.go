package sessions

import (
	"errors"
	"strings"
	"testing"
)

func TestValidateName(t *testing.T) {
	for _, ok := range []string{"d7", "D7-iv_25C.v2", "a", strings.Repeat("x", 64), "0", "run.1", "console", "nul-test"} {
		if err := ValidateName(ok); err != nil {
			t.Errorf("%q rejected: %v", ok, err)
		}
	}
	cases := []struct{ name, why string }{
		{"", "empty"},
		{".", "refers to a directory"},
		{"..", "refers to a directory"},
		{"../etc", "path separator"},
		{"a/b", "path separator"},
		{`a\b`, "path separator"},
		{"/etc/passwd", "absolute path"},
		{`\\server\share`, "absolute path"},
		{"C:evil", "drive letter"},
		{"a\x00b", "NUL"},
		{"a\nb", "control character"},
		{"a\x7fb", "control character"},
		{".hidden", "starts with '.'"},
		{"-rf", "starts with '-'"},
		{"trailing.", "ends with '.'"},
		{strings.Repeat("x", 65), "65 characters"},
		{"with space", `contains ' '`},
		{"ünï", "contains 'ü'"},
		{"a*b", "contains '*'"},
		{"\xff", "UTF-8"},
		{"CON", "device name"},
		{"com1.json", "device name"},
	}
	for _, c := range cases {
		err := ValidateName(c.name)
		var ne *NameError
		if !errors.As(err, &ne) {
			t.Errorf("%q: accepted or wrong error type (%v)", c.name, err)
			continue
		}
		if !strings.Contains(err.Error(), c.why) || !strings.Contains(err.Error(), "allowed 1 to 64") {
			t.Errorf("%q: message %q lacks %q or the rule", c.name, err, c.why)
		}
	}
}

// TestStoreRejectsBadNames: every entry point refuses an unsafe name
// before touching the file system.
func TestStoreRejectsBadNames(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	for _, bad := range []string{"../x", "/abs", "a/b", "..", "", "a\x00"} {
		checks := map[string]error{}
		_, checks["Save"] = s.Save(bad, doc, 0)
		_, checks["SaveNext"] = s.SaveNext(bad, doc, 0)
		_, _, checks["Open"] = s.Open(bad, 0)
		_, _, checks["History"] = s.History(bad)
		_, checks["Trash"] = s.Trash(bad)
		_, checks["Restore"] = s.Restore(bad)
		_, checks["RestoreRevision"] = s.RestoreRevision(bad, 1)
		checks["SaveDraft"] = s.SaveDraft(bad, DraftKey{Editor: "ed"}, 0, doc)
		checks["SaveDraft editor"] = s.SaveDraft("ok", DraftKey{Editor: bad}, 0, doc)
		checks["DiscardDraft"] = s.DiscardDraft(bad, DraftKey{Editor: "ed"})
		_, checks["Import as"] = s.Import(mustEncode(t, doc), "x.json", bad+"/")
		for op, err := range checks {
			var ne *NameError
			if !errors.As(err, &ne) {
				t.Errorf("%s(%q): got %v, want a *NameError", op, bad, err)
			}
		}
	}
	list, probs, err := s.List()
	if err != nil || len(list) != 0 || len(probs) != 0 {
		t.Errorf("store not empty after rejected names: %v %v %v", list, probs, err)
	}
}

func mustEncode(t testing.TB, doc *Document) []byte {
	t.Helper()
	c := *doc
	c.Schema = SchemaVersion
	b, err := Encode(&c)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
