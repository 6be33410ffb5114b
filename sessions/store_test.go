package sessions

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"
)

func TestDefaultRoot(t *testing.T) {
	env := func(m map[string]string) func(string) string { return func(k string) string { return m[k] } }
	cases := []struct {
		env  map[string]string
		want string
	}{
		{map[string]string{"XDG_DATA_HOME": "/data/x", "HOME": "/home/u"}, filepath.Join("/data/x", "junco")},
		{map[string]string{"XDG_DATA_HOME": "relative/x", "HOME": "/home/u"}, filepath.Join("/home/u", ".local", "share", "junco")},
		{map[string]string{"HOME": "/home/u"}, filepath.Join("/home/u", ".local", "share", "junco")},
	}
	for _, c := range cases {
		got, err := DefaultRoot(env(c.env))
		if err != nil || got != c.want {
			t.Errorf("DefaultRoot(%v) = %q, %v; want %q", c.env, got, err, c.want)
		}
	}
	if _, err := DefaultRoot(env(nil)); err == nil || !strings.Contains(err.Error(), "--data DIR") {
		t.Errorf("no environment: %v", err)
	}
}

func TestSaveOpenHistory(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	doc.Meta.Created = time.Time{}
	r1, err := s.Save("d7", doc, 0)
	if err != nil {
		t.Fatal(err)
	}
	if r1.Number != 1 || filepath.Base(r1.Path) != "rev-000001.json" {
		t.Errorf("first revision: %+v", r1)
	}
	if !doc.Meta.Created.IsZero() {
		t.Error("Save changed the caller's document")
	}
	got, rev, err := s.Open("d7", 0)
	if err != nil {
		t.Fatal(err)
	}
	if rev.Number != 1 || got.Meta.ToolVersion != "test" || got.Meta.Created.IsZero() || !got.Meta.Created.Equal(got.Meta.Modified) {
		t.Errorf("stamps: rev %d meta %+v", rev.Number, got.Meta)
	}
	got.Spec.Temperature = 350
	got.Reviews = append(got.Reviews, ReviewNote{Author: "K. Lund", Time: fixedTime, Text: "fine"})
	r2, err := s.Save("d7", got, 1)
	if err != nil || r2.Number != 2 {
		t.Fatalf("second save: %+v %v", r2, err)
	}
	hist, probs, err := s.History("d7")
	if err != nil || len(probs) != 0 || len(hist) != 2 {
		t.Fatalf("history: %v %v %v", hist, probs, err)
	}
	if hist[0].Meta.Created != hist[1].Meta.Created || !hist[1].Meta.Modified.After(hist[0].Meta.Modified) || hist[1].Meta.BasedOn != 1 {
		t.Errorf("history metadata: %+v / %+v", hist[0].Meta, hist[1].Meta)
	}
	old, _, err := s.Open("d7", 1)
	if err != nil || old.Spec.Temperature != 310 {
		t.Errorf("revision 1 changed: %v %v", old.Spec.Temperature, err)
	}
	// Files on disk: exactly the two revisions, nothing temporary left.
	ents, _ := os.ReadDir(filepath.Join(s.Root(), "sessions", "d7"))
	var names []string
	for _, e := range ents {
		names = append(names, e.Name())
	}
	if !reflect.DeepEqual(names, []string{"rev-000001.json", "rev-000002.json"}) {
		t.Errorf("session directory holds %q", names)
	}
	if _, _, err := s.Open("d7", 3); !isNotFound(err) {
		t.Errorf("missing revision: %v", err)
	}
	if _, _, err := s.Open("nope", 0); !isNotFound(err) {
		t.Errorf("missing session: %v", err)
	}
}

func TestStaleSave(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	if _, err := s.Save("d7", doc, 0); err != nil {
		t.Fatal(err)
	}
	// Two editors start from revision 1; the first saves.
	a, _, _ := s.Open("d7", 1)
	b, _, _ := s.Open("d7", 1)
	a.Notes = append(a.Notes, "editor A")
	b.Notes = append(b.Notes, "editor B")
	if _, err := s.Save("d7", a, 1); err != nil {
		t.Fatal(err)
	}
	_, err := s.Save("d7", b, 1)
	var se *StaleError
	if !errors.As(err, &se) || se.Base != 1 || se.Latest != 2 {
		t.Fatalf("stale save: %v", err)
	}
	if !strings.Contains(err.Error(), "revision 2, newer than revision 1") {
		t.Errorf("message: %v", err)
	}
	// Choice 1: save as the next revision anyway.
	r, err := s.SaveNext("d7", b, 1)
	if err != nil || r.Number != 3 {
		t.Fatalf("save next: %+v %v", r, err)
	}
	got, _, _ := s.Open("d7", 3)
	if got.Notes[len(got.Notes)-1] != "editor B" || got.Meta.BasedOn != 1 {
		t.Errorf("revision 3: notes %q, based on %d", got.Notes, got.Meta.BasedOn)
	}
	a2, _, _ := s.Open("d7", 2)
	if a2.Notes[len(a2.Notes)-1] != "editor A" {
		t.Errorf("editor A's revision was changed: %q", a2.Notes)
	}
	// Choice 2: save as a copy under a new name.
	if r, err := s.Save("d7-editor-b", b, 0); err != nil || r.Number != 1 {
		t.Errorf("save copy: %+v %v", r, err)
	}
	// A new session over an existing name is stale too.
	if _, err := s.Save("d7", doc, 0); !errors.As(err, &se) || se.Latest != 3 {
		t.Errorf("new session over existing: %v", err)
	}
	// A base beyond the newest revision does not exist.
	if _, err := s.Save("d7", doc, 9); !isNotFound(err) {
		t.Errorf("base 9: %v", err)
	}
	// Names differing only in case are refused.
	var ee *ExistsError
	if _, err := s.Save("D7", doc, 0); !errors.As(err, &ee) {
		t.Errorf("case collision: %v", err)
	}
}

func TestSaveRejectsInvalidDocument(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	doc.Spec.DonorDensity = -1
	_, err := s.Save("bad", doc, 0)
	var ie *InvalidError
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "(nd)") {
		t.Errorf("invalid spec saved: %v", err)
	}
	if _, err := os.Stat(filepath.Join(s.Root(), "sessions", "bad")); !os.IsNotExist(err) {
		t.Errorf("a rejected save left a directory: %v", err)
	}
}

func TestTrashAndRestore(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	s.Save("d7", doc, 0)
	s.SaveNext("d7", doc, 1)
	e, err := s.Trash("d7")
	if err != nil || e.Revisions != 2 {
		t.Fatalf("trash: %+v %v", e, err)
	}
	if _, _, err := s.Open("d7", 0); !isNotFound(err) {
		t.Errorf("trashed session still opens: %v", err)
	}
	list, _, _ := s.List()
	if len(list) != 0 {
		t.Errorf("trashed session listed: %v", list)
	}
	tr, probs, err := s.Trashed()
	if err != nil || len(probs) != 0 || len(tr) != 1 || tr[0].Session != "d7" || tr[0].Revisions != 2 {
		t.Errorf("trash list: %+v %v %v", tr, probs, err)
	}
	// A new session of the same name blocks the restore...
	s.Save("d7", doc, 0)
	var ee *ExistsError
	if _, err := s.Restore("d7"); !errors.As(err, &ee) {
		t.Errorf("restore over a live session: %v", err)
	}
	// ...until it is trashed too; then the newest trashed copy returns.
	if _, err := s.Trash("d7"); err != nil {
		t.Fatal(err)
	}
	back, err := s.Restore("d7")
	if err != nil {
		t.Fatal(err)
	}
	if back.Revisions != 1 {
		t.Errorf("restored the older trash entry: %+v", back)
	}
	if _, err := s.Trash("d7"); err != nil {
		t.Fatal(err)
	}
	tr, _, _ = s.Trashed()
	if len(tr) != 2 {
		t.Fatalf("both trash entries must stay: %+v", tr)
	}
	if _, err := s.Restore("d7"); err != nil {
		t.Fatal(err)
	}
	if n, _ := s.Latest("d7"); n != 1 {
		t.Errorf("restored latest %d", n)
	}
	if _, err := s.Restore("never"); !isNotFound(err) {
		t.Errorf("restore of unknown: %v", err)
	}
	if _, err := s.Trash("never"); !isNotFound(err) {
		t.Errorf("trash of unknown: %v", err)
	}
}

func TestRestoreRevision(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	s.Save("d7", doc, 0)
	d2 := doc.Clone()
	d2.Spec.Temperature = 400
	s.Save("d7", d2, 1)
	r, err := s.RestoreRevision("d7", 1)
	if err != nil || r.Number != 3 {
		t.Fatalf("restore revision: %+v %v", r, err)
	}
	got, _, _ := s.Open("d7", 3)
	if got.Spec.Temperature != 310 || got.Meta.Origin != "restored from revision 1" || got.Meta.BasedOn != 1 {
		t.Errorf("restored: T %v origin %q based on %d", got.Spec.Temperature, got.Meta.Origin, got.Meta.BasedOn)
	}
	if mid, _, _ := s.Open("d7", 2); mid.Spec.Temperature != 400 {
		t.Error("revision 2 was changed")
	}
	if _, err := s.RestoreRevision("d7", 9); !isNotFound(err) {
		t.Errorf("restore of a missing revision: %v", err)
	}
}

func TestImport(t *testing.T) {
	s := newTestStore(t)
	data := mustEncode(t, exampleDocument())
	r, err := s.Import(data, filepath.Join("mail", "colleague-d7.json"), "")
	if err != nil || r.Session != "colleague-d7" {
		t.Fatalf("import: %+v %v", r, err)
	}
	got, _, _ := s.Open("colleague-d7", 0)
	if got.Meta.Origin != "imported from colleague-d7.json" || got.Meta.Author != "A. Ferreira" {
		t.Errorf("import record: %+v", got.Meta)
	}
	var ee *ExistsError
	if _, err := s.Import(data, "colleague-d7.json", ""); !errors.As(err, &ee) || !strings.Contains(err.Error(), "--as NAME") {
		t.Errorf("import over an existing session: %v", err)
	}
	if r, err := s.Import(data, "colleague-d7.json", "d7-copy"); err != nil || r.Session != "d7-copy" {
		t.Errorf("import --as: %+v %v", r, err)
	}
	if _, err := s.Import(data, "my session.json", ""); err == nil || !strings.Contains(err.Error(), "--as NAME") {
		t.Errorf("unusable file name: %v", err)
	}
	bad := bytes.Replace(data, []byte(`"temperature_K": 310`), []byte(`"temperature_K": -4`), 1)
	_, err = s.Import(bad, "broken.json", "")
	var ie *InvalidError
	if !errors.As(err, &ie) || !strings.HasPrefix(err.Error(), "broken.json: ") {
		t.Errorf("invalid import: %v", err)
	}
	if _, _, err := s.Open("broken", 0); !isNotFound(err) {
		t.Errorf("an invalid import was stored: %v", err)
	}
}

func TestDrafts(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	if err := s.SaveDraft("d7", DraftKey{Editor: "alice"}, 0, doc); err != nil {
		t.Fatal(err)
	}
	doc.Notes = append(doc.Notes, "typed since")
	if err := s.SaveDraft("d7", DraftKey{Editor: "alice"}, 0, doc); err != nil {
		t.Fatal(err)
	}
	if err := s.SaveDraft("d7", DraftKey{Editor: "bob"}, 2, exampleDocument()); err != nil {
		t.Fatal(err)
	}
	ds, probs, err := s.Drafts()
	if err != nil || len(probs) != 0 || len(ds) != 2 {
		t.Fatalf("drafts: %v %v %v", ds, probs, err)
	}
	var alice *Draft
	for i := range ds {
		if ds[i].Editor == "alice" {
			alice = &ds[i]
		}
	}
	if alice == nil || alice.Session != "d7" || alice.Document.Notes[len(alice.Document.Notes)-1] != "typed since" {
		t.Fatalf("alice's draft: %+v", alice)
	}
	// A damaged draft is reported, the good one still offered.
	os.WriteFile(filepath.Join(s.Root(), "drafts", "d7", "bob.json"), []byte(`{"session": "d7", `), 0o644)
	ds, probs, _ = s.Drafts()
	if len(ds) != 1 || len(probs) != 1 || !strings.Contains(probs[0].Error(), "bob.json") {
		t.Errorf("damaged draft: %v / %v", ds, probs)
	}
	if err := s.DiscardDraft("d7", DraftKey{Editor: "alice"}); err != nil {
		t.Fatal(err)
	}
	if err := s.DiscardDraft("d7", DraftKey{Editor: "alice"}); err != nil {
		t.Errorf("discarding twice: %v", err)
	}
	ds, _, _ = s.Drafts()
	if len(ds) != 0 {
		t.Errorf("draft survived discard: %v", ds)
	}
}

// TestDamagedFiles: each kind of damage is named with its file, the file
// is left untouched, and every other session still lists and opens.
func TestDamagedFiles(t *testing.T) {
	s := newTestStore(t)
	doc := exampleDocument()
	for _, n := range []string{"good", "truncated", "garbage", "empty", "newer", "badspec", "middle"} {
		if _, err := s.Save(n, doc, 0); err != nil {
			t.Fatal(err)
		}
	}
	s.SaveNext("middle", doc, 1)
	s.SaveNext("middle", doc, 2)
	dir := func(n string) string { return filepath.Join(s.Root(), "sessions", n) }
	rev1 := func(n string) string { return filepath.Join(dir(n), "rev-000001.json") }
	full, _ := os.ReadFile(rev1("good"))
	damage := map[string][]byte{
		"truncated": full[:len(full)/3*2],
		"garbage":   []byte("\x00\x01binary\xff"),
		"empty":     {},
		"newer":     bytes.Replace(full, []byte(`"schema": 2`), []byte(`"schema": 3`), 1),
		"badspec":   bytes.Replace(full, []byte(`"material": "si"`), []byte(`"material": "unobtainium"`), 1),
	}
	for n, b := range damage {
		os.Chmod(rev1(n), 0o644)
		if err := os.WriteFile(rev1(n), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	// Damage in the middle of a history: revision 2 of 3.
	mid := filepath.Join(dir("middle"), "rev-000002.json")
	os.Chmod(mid, 0o644)
	os.WriteFile(mid, full[:100], 0o644)
	// Stray entries.
	os.WriteFile(filepath.Join(dir("good"), "notes.txt"), []byte("x"), 0o644)
	os.Mkdir(filepath.Join(s.Root(), "sessions", "bad name"), 0o755)
	os.WriteFile(filepath.Join(s.Root(), "sessions", "loose.json"), []byte("{}"), 0o644)
	os.Mkdir(filepath.Join(s.Root(), "sessions", "unfinished"), 0o755)

	before := map[string][]byte{}
	for n := range damage {
		before[n], _ = os.ReadFile(rev1(n))
	}

	list, probs, err := s.List()
	if err != nil {
		t.Fatal(err)
	}
	var names, damaged []string
	for _, l := range list {
		names = append(names, l.Name)
		if len(l.Damaged) > 0 {
			damaged = append(damaged, l.Name)
			if l.Latest.Number != 0 || l.Damaged[0].Path != rev1(l.Name) {
				t.Errorf("%s: newest readable revision %d, damaged %v; want none and revision 1", l.Name, l.Latest.Number, l.Damaged)
			}
		}
	}
	// Damaged sessions are listed, marked. The header of "truncated" and
	// "badspec" reads (listing reads only the header); opening them
	// reports the damage.
	if want := []string{"badspec", "empty", "garbage", "good", "middle", "newer", "truncated"}; !reflect.DeepEqual(names, want) {
		t.Errorf("listed %q, want %q", names, want)
	}
	if want := []string{"empty", "garbage", "newer"}; !reflect.DeepEqual(damaged, want) {
		t.Errorf("marked damaged %q, want %q", damaged, want)
	}
	joined := ""
	for _, p := range probs {
		joined += p.Error() + "\n"
	}
	for _, want := range []string{
		rev1("garbage"), rev1("empty"), rev1("newer"), "schema 3 is newer",
		filepath.Join(dir("good"), "notes.txt"), "bad name", "loose.json",
	} {
		if !strings.Contains(joined, want) {
			t.Errorf("problems lack %q:\n%s", want, joined)
		}
	}
	if strings.Contains(joined, "unfinished") {
		t.Errorf("an empty session directory is not a problem:\n%s", joined)
	}

	wantOpen := map[string]string{
		"truncated": "truncated",
		"garbage":   "line 1, column 1",
		"empty":     "empty document",
		"newer":     "schema 3 is newer",
		"badspec":   `(material) = "unobtainium"`,
	}
	for n, msg := range wantOpen {
		_, _, err := s.Open(n, 0)
		var de *DamagedError
		if !errors.As(err, &de) || de.Path != rev1(n) || !strings.Contains(err.Error(), msg) || !strings.Contains(err.Error(), "left as it is") {
			t.Errorf("open %s: %v (want %q naming %s)", n, err, msg, rev1(n))
		}
	}
	if _, _, err := s.Open("good", 0); err != nil {
		t.Errorf("good session: %v", err)
	}
	// History of "middle": revisions 1 and 3 listed, 2 reported.
	hist, hp, err := s.History("middle")
	if err != nil || len(hist) != 2 || hist[0].Number != 1 || hist[1].Number != 3 || len(hp) != 1 || hp[0].Path != mid {
		t.Errorf("history around a damaged revision: %v %v %v", hist, hp, err)
	}
	if _, _, err := s.Open("middle", 3); err != nil {
		t.Errorf("revision after the damaged one: %v", err)
	}
	// Nothing was changed or repaired.
	for n, b := range before {
		now, _ := os.ReadFile(rev1(n))
		if !bytes.Equal(now, b) {
			t.Errorf("%s was modified", rev1(n))
		}
	}
	// A new revision can be saved over a damaged latest one.
	if r, err := s.SaveNext("garbage", doc, 1); err != nil || r.Number != 2 {
		t.Errorf("save after damage: %+v %v", r, err)
	}
}

func TestUnreadableFile(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("permissions do not apply to root")
	}
	s := newTestStore(t)
	s.Save("locked", exampleDocument(), 0)
	p := filepath.Join(s.Root(), "sessions", "locked", "rev-000001.json")
	os.Chmod(p, 0)
	defer os.Chmod(p, 0o644)
	_, _, err := s.Open("locked", 0)
	var de *DamagedError
	if !errors.As(err, &de) || de.Path != p || !strings.Contains(err.Error(), "permission denied") {
		t.Errorf("unreadable: %v", err)
	}
}

// TestListHeaders: listing reads only a revision's first bytes when they
// hold the header, falls back to the whole file when the header is long,
// and refuses a title with control characters rather than print it.
func TestListHeaders(t *testing.T) {
	s := newTestStore(t)
	long := exampleDocument()
	long.Meta.Origin = strings.Repeat("imported from a long path segment/", 250) // beyond the 4 KiB prefix
	if len(long.Meta.Origin) <= headerPrefix {
		t.Fatal("origin not long enough to exceed the header prefix")
	}
	if _, err := s.Save("long", long, 0); err != nil {
		t.Fatal(err)
	}
	s.Save("short", exampleDocument(), 0)
	list, probs, err := s.List()
	if err != nil || len(probs) != 0 || len(list) != 2 || list[0].Latest.Meta.Origin != long.Meta.Origin || list[1].Latest.Meta.Title != long.Meta.Title {
		t.Fatalf("list: %+v %v %v", list, probs, err)
	}
	p := filepath.Join(s.Root(), "sessions", "short", "rev-000001.json")
	b, _ := os.ReadFile(p)
	os.Chmod(p, 0o644)
	os.WriteFile(p, bytes.Replace(b, []byte("p+n test diode D7"), []byte(`p+n \u001b[31mred`), 1), 0o644)
	list, probs, _ = s.List()
	if len(list) != 2 || len(list[1].Damaged) != 1 || list[1].Latest.Meta.Title != "" || len(probs) != 1 || !strings.Contains(probs[0].Error(), "control character") {
		t.Errorf("escape in a title: %+v %v", list, probs)
	}
}
