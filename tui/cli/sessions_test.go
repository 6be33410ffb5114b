package cli

import (
	"bytes"
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"junco/model"
	"junco/sessions"
	"junco/sessions/report"
)

// sess runs `junco sessions ARGS --data dir` and returns the exit code and
// the output streams.
func sess(t *testing.T, dir string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := runSessions(context.Background(), append(args, "--data", dir), &out, &errb)
	return code, out.String(), errb.String()
}

// seeded makes a store with session d7 at revisions 1 (300 K) and 2
// (350 K, -3 V) saved through the calc helper.
func seeded(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	s := model.DefaultSpec()
	if rev, err := saveSpecFromCalc(dir, "d7", s, "ana", false, io.Discard); err != nil || rev != 1 {
		t.Fatalf("first save: %d %v", rev, err)
	}
	s.Temperature = 350
	s.Bias = -3
	if rev, err := saveSpecFromCalc(dir, "d7", s, "ben", false, io.Discard); err != nil || rev != 2 {
		t.Fatalf("second save: %d %v", rev, err)
	}
	return dir
}

func TestSessionsListShowHistory(t *testing.T) {
	dir := t.TempDir()
	if code, out, _ := sess(t, dir, "list"); code != 0 || !strings.Contains(out, "no sessions") {
		t.Errorf("empty list: %d %q", code, out)
	}
	dir = seeded(t)
	code, out, errs := sess(t, dir, "list")
	if code != 0 || errs != "" {
		t.Fatalf("list: %d %q", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 2 || !strings.HasPrefix(lines[1], "d7  ") || !strings.Contains(lines[1], " 2 ") || !strings.Contains(lines[1], "ana") {
		t.Errorf("list output:\n%s", out)
	}
	code, out, _ = sess(t, dir, "history", "d7")
	if code != 0 || !strings.Contains(out, "ben") || strings.Count(strings.TrimSpace(out), "\n") != 2 {
		t.Errorf("history: %d\n%s", code, out)
	}
	code, out, _ = sess(t, dir, "show", "d7", "--rev", "1", "--ascii")
	res, err := model.Evaluate(model.DefaultSpec())
	if err != nil {
		t.Fatal(err)
	}
	if code != 0 || !strings.Contains(out, "revision 1") || !strings.Contains(out, res.Text(true)) || !strings.Contains(out, "300.0 K") {
		t.Errorf("show: %d\n%s", code, out)
	}
}

func TestSessionsDiff(t *testing.T) {
	dir := seeded(t)
	code, out, errs := sess(t, dir, "diff", "d7", "1", "2")
	if code != 0 {
		t.Fatalf("diff: %d %s", code, errs)
	}
	ra, _ := model.Evaluate(model.DefaultSpec())
	s2 := model.DefaultSpec()
	s2.Temperature, s2.Bias = 350, -3
	rb, _ := model.Evaluate(s2)
	vbiA, _ := ra.Get("built_in_potential_V")
	vbiB, _ := rb.Get("built_in_potential_V")
	for _, want := range []string{"temperature T (temp)", "300.0 K", "350.0 K", "+50.0 K", "-3.000 V",
		model.Format(model.Voltage, vbiA, 4, false), model.Format(model.Voltage, vbiB, 4, false)} {
		if !strings.Contains(out, want) {
			t.Errorf("diff lacks %q:\n%s", want, out)
		}
	}
	if code, out, _ := sess(t, dir, "diff", "d7", "2", "2"); code != 0 || !strings.Contains(out, "same inputs") {
		t.Errorf("diff of a revision with itself: %d %q", code, out)
	}
	if code, _, errs := sess(t, dir, "diff", "d7", "1", "x"); code != exitUsage || !strings.Contains(errs, `revision "x"`) {
		t.Errorf("bad revision: %d %q", code, errs)
	}
	if code, _, errs := sess(t, dir, "diff", "d7", "1", "9"); code != exitFailure || !strings.Contains(errs, "no revision 9") {
		t.Errorf("missing revision: %d %q", code, errs)
	}
}

func TestSessionsExport(t *testing.T) {
	dir := seeded(t)
	code, out, errs := sess(t, dir, "export", "d7", "--format", "md")
	if code != 0 || !strings.HasPrefix(out, "# d7") || !strings.Contains(out, report.Caution) || strings.Contains(out, ".svg") {
		t.Errorf("md to stdout: %d %q\n%.300s", code, errs, out)
	}
	outDir := filepath.Join(t.TempDir(), "report")
	code, out, errs = sess(t, dir, "export", "d7", "--rev", "1", "--format", "md", "--out", outDir)
	if code != 0 {
		t.Fatalf("md to dir: %d %s", code, errs)
	}
	for _, f := range []string{"d7-r1.md", "d7-r1-iv.svg", "d7-r1-inv-c2.svg", "d7-r1-bands.svg"} {
		if _, err := os.Stat(filepath.Join(outDir, f)); err != nil {
			t.Errorf("%s not written: %v", f, err)
		}
		if !strings.Contains(out, f) {
			t.Errorf("written file %s not reported", f)
		}
	}
	// Exporting again into the same directory replaces nothing.
	before, _ := os.ReadFile(filepath.Join(outDir, "d7-r1.md"))
	if code, _, errs := sess(t, dir, "export", "d7", "--rev", "1", "--format", "md", "--out", outDir); code != exitFailure || !strings.Contains(errs, "exists") {
		t.Errorf("second export: %d %q", code, errs)
	}
	if after, _ := os.ReadFile(filepath.Join(outDir, "d7-r1.md")); !bytes.Equal(before, after) {
		t.Error("an export replaced a file")
	}
	csvDir := filepath.Join(t.TempDir(), "csv")
	if code, _, errs := sess(t, dir, "export", "d7", "--format", "csv", "--out", csvDir); code != 0 {
		t.Fatalf("csv: %d %s", code, errs)
	}
	iv, err := os.ReadFile(filepath.Join(csvDir, "d7-r2-iv.csv"))
	if err != nil || !strings.HasPrefix(string(iv), "bias_V,current_total_A,") {
		t.Errorf("iv csv: %v %.80q", err, iv)
	}
	code, out, _ = sess(t, dir, "export", "d7", "--format", "json")
	doc, err := sessions.Decode([]byte(out))
	if code != 0 || err != nil || doc.Spec.Temperature != 350 {
		t.Errorf("json: %d %v", code, err)
	}
	for _, c := range []struct {
		args []string
		msg  string
	}{
		{[]string{"export", "d7"}, "--format is required"},
		{[]string{"export", "d7", "--format", "pdf"}, `"pdf"`},
		{[]string{"export", "d7", "--format", "csv"}, "--out DIR"},
	} {
		if code, _, errs := sess(t, dir, c.args...); code != exitUsage || !strings.Contains(errs, c.msg) {
			t.Errorf("%v: %d %q", c.args, code, errs)
		}
	}
}

func TestSessionsImportTrashRestore(t *testing.T) {
	dir := seeded(t)
	_, js, _ := sess(t, dir, "export", "d7", "--format", "json")
	file := filepath.Join(t.TempDir(), "from-lab-b.json")
	os.WriteFile(file, []byte(js), 0o644)
	if code, out, errs := sess(t, dir, "import", file); code != 0 || !strings.Contains(out, `"from-lab-b", revision 1`) {
		t.Errorf("import: %d %q %q", code, out, errs)
	}
	if code, _, errs := sess(t, dir, "import", file); code != exitFailure || !strings.Contains(errs, "already exists") {
		t.Errorf("import twice: %d %q", code, errs)
	}
	if code, out, _ := sess(t, dir, "import", file, "--as", "lab-b-copy"); code != 0 || !strings.Contains(out, "lab-b-copy") {
		t.Errorf("import --as: %d %q", code, out)
	}
	bad := filepath.Join(t.TempDir(), "bad.json")
	os.WriteFile(bad, []byte(strings.Replace(js, `"material": "si"`, `"material": "tin"`, 1)), 0o644)
	if code, _, errs := sess(t, dir, "import", bad); code != exitFailure || !strings.Contains(errs, bad) || !strings.Contains(errs, `"tin"`) {
		t.Errorf("invalid import: %d %q", code, errs)
	}

	if code, out, _ := sess(t, dir, "trash", "d7"); code != 0 || !strings.Contains(out, "2 revisions") {
		t.Errorf("trash: %d %q", code, out)
	}
	if code, out, _ := sess(t, dir, "trash"); code != 0 || !strings.Contains(out, "d7") {
		t.Errorf("trash list: %d %q", code, out)
	}
	if code, _, errs := sess(t, dir, "show", "d7"); code != exitFailure || !strings.Contains(errs, `no session named "d7"`) {
		t.Errorf("show trashed: %d %q", code, errs)
	}
	if code, out, _ := sess(t, dir, "restore", "d7"); code != 0 || !strings.Contains(out, "restored") {
		t.Errorf("restore: %d %q", code, out)
	}
	if code, out, _ := sess(t, dir, "restore", "d7", "--rev", "1"); code != 0 || !strings.Contains(out, "as revision 3") {
		t.Errorf("restore --rev: %d %q", code, out)
	}
	_, js3, _ := sess(t, dir, "export", "d7", "--format", "json")
	doc, err := sessions.Decode([]byte(js3))
	if err != nil || doc.Spec.Temperature != 300 || doc.Meta.Origin != "restored from revision 1" {
		t.Errorf("revision 3: %v %+v", err, doc)
	}
}

func TestSessionsErrors(t *testing.T) {
	dir := seeded(t)
	cases := []struct {
		args []string
		code int
		msg  string
	}{
		{nil, exitUsage, "Usage: junco sessions"},
		{[]string{"frobnicate"}, exitUsage, `unknown command "frobnicate"`},
		{[]string{"show"}, exitUsage, "expected a session NAME"},
		{[]string{"diff", "d7", "1"}, exitUsage, "expected NAME A B"},
		{[]string{"show", "d7", "--rev", "-1"}, exitUsage, "--rev -1"},
		{[]string{"show", "d7", "--bogus"}, exitUsage, "flag provided but not defined"},
		{[]string{"show", "../etc"}, exitFailure, "path separator"},
		{[]string{"show", "nope"}, exitFailure, `no session named "nope"`},
		{[]string{"history", ".hidden"}, exitFailure, "starts with '.'"},
		{[]string{"import", "missing.json"}, exitFailure, "missing.json"},
		{[]string{"restore", "never"}, exitFailure, "nothing of that name is in the trash"},
	}
	for _, c := range cases {
		var out, errb bytes.Buffer
		args := c.args
		if len(args) > 0 {
			args = append(append([]string{}, args...), "--data", dir)
		}
		code := runSessions(context.Background(), args, &out, &errb)
		if code != c.code || !strings.Contains(errb.String(), c.msg) {
			t.Errorf("%v: exit %d, stderr %q; want %d with %q", c.args, code, errb.String(), c.code, c.msg)
		}
	}
	// A damaged newest revision: show warns, naming the file relative to
	// the store, and shows the newest readable revision; list marks the
	// session; asking for the damaged revision itself fails.
	saveSpecFromCalc(dir, "other", model.DefaultSpec(), "ana", false, io.Discard)
	p := filepath.Join(dir, "sessions", "d7", "rev-000002.json")
	rel := filepath.Join("sessions", "d7", "rev-000002.json")
	os.Chmod(p, 0o644)
	os.WriteFile(p, []byte("{\"schema\": 1, \"meta\": "), 0o644)
	code, out, errs := sess(t, dir, "show", "d7")
	if code != 0 || !strings.Contains(out, "d7, revision 1") || !strings.Contains(errs, rel) || !strings.Contains(errs, "truncated") || strings.Contains(errs, dir) {
		t.Errorf("show damaged: %d %q %q", code, out, errs)
	}
	if code, _, errs := sess(t, dir, "show", "d7", "--rev", "2"); code != exitFailure || !strings.Contains(errs, rel) || strings.Contains(errs, dir) {
		t.Errorf("show the damaged revision: %d %q", code, errs)
	}
	code, out, errs = sess(t, dir, "list")
	if code != 0 || !strings.Contains(out, "other") || !strings.Contains(out, "d7     1!") || !strings.Contains(out, "! damaged") || !strings.Contains(errs, rel) || strings.Contains(out+errs, dir) {
		t.Errorf("list with damage: %d %q %q", code, out, errs)
	}
	if code, out, _ := sess(t, dir, "show", "d7", "--rev", "1"); code != 0 || !strings.Contains(out, "revision 1") {
		t.Errorf("older revision of a damaged session: %d", code)
	}
	// The next save from the newest readable revision takes the next free
	// number.
	if rev, err := saveSpecFromCalc(dir, "d7", model.DefaultSpec(), "ana", false, io.Discard); err != nil || rev != 3 {
		t.Errorf("save after the damage: revision %d, %v; want 3", rev, err)
	}
}

func TestCalcSessionOptions(t *testing.T) {
	o, rest, err := calcSessionOptions([]string{"--na", "1e17", "--session", "d7", "-save=d8", "--data", "/x", "--temp=300K", "--author", "ana", "--json"})
	if err != nil {
		t.Fatal(err)
	}
	if o != (calcSessionArgs{Session: "d7", Save: "d8", DataDir: "/x", Author: "ana"}) {
		t.Errorf("options %+v", o)
	}
	if want := []string{"--na", "1e17", "--temp=300K", "--json"}; !reflect.DeepEqual(rest, want) {
		t.Errorf("rest %q, want %q", rest, want)
	}
	if _, _, err := calcSessionOptions([]string{"--save"}); err == nil || !strings.Contains(err.Error(), "--save needs a value") {
		t.Errorf("missing value: %v", err)
	}
	_, rest, _ = calcSessionOptions([]string{"--", "--session", "x"})
	if !reflect.DeepEqual(rest, []string{"--", "--session", "x"}) {
		t.Errorf("after --: %q", rest)
	}
}

func TestLoadAndSaveSpecForCalc(t *testing.T) {
	dir := seeded(t)
	spec, err := loadSpecForCalc(dir, "d7")
	if err != nil || spec.Temperature != 350 || spec.Bias != -3 {
		t.Errorf("load by name: %+v %v", spec, err)
	}
	_, js, _ := sess(t, dir, "export", "d7", "--rev", "1", "--format", "json")
	file := filepath.Join(t.TempDir(), "sent.json")
	os.WriteFile(file, []byte(js), 0o644)
	spec, err = loadSpecForCalc(dir, file)
	if err != nil || spec.Temperature != 300 {
		t.Errorf("load by file: %+v %v", spec, err)
	}
	os.WriteFile(file, []byte(strings.Replace(js, `"schema": 2`, `"schema": 4`, 1)), 0o644)
	if _, err := loadSpecForCalc(dir, file); err == nil || !strings.Contains(err.Error(), file) || !strings.Contains(err.Error(), "schema 4 is newer") {
		t.Errorf("newer file: %v", err)
	}
	if _, err := loadSpecForCalc(dir, "nope"); err == nil {
		t.Error("missing session loaded")
	}
	// The rest of the session survives a calc save; bad specs are refused.
	spec.Area = 2e-6
	rev, err := saveSpecFromCalc(dir, "d7", spec, "carla", false, io.Discard)
	if err != nil || rev != 3 {
		t.Fatalf("save next: %d %v", rev, err)
	}
	bad := spec
	bad.Temperature = 1
	_, err = saveSpecFromCalc(dir, "d7", bad, "carla", false, io.Discard)
	var ie *sessions.InvalidError
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "(temp)") {
		t.Errorf("invalid spec saved: %v", err)
	}
	if _, err := saveSpecFromCalc(dir, "a/b", spec, "x", false, io.Discard); err == nil {
		t.Error("bad name accepted")
	}
}
