package cli

import (
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"sync"
	"testing"

	"junco/sessions"
)

// TestCalcSaveNameChecks: a bad --save name is a usage error (exit 2, as
// the README says), the reserved draft name included, and nothing is
// evaluated or stored.
func TestCalcSaveNameChecks(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"a/b", "_unsaved", "_UNSAVED", "..", "-x"} {
		code, out, errs := runCLI(t, "calc", "--save", name, "--data", dir)
		if code != exitUsage || out != "" || !strings.Contains(errs, "--save") {
			t.Errorf("--save %q: exit %d, stdout %q, stderr %q; want exit 2 naming --save", name, code, out, errs)
		}
	}
	if _, err := os.Stat(dir + "/sessions"); err == nil {
		t.Error("a refused name created the sessions folder")
	}
	if code, _, errs := runCLI(t, "calc", "--next-revision", "--data", dir); code != exitUsage || !strings.Contains(errs, "needs --save") {
		t.Errorf("--next-revision alone: %d %q", code, errs)
	}
}

// calcSaveOutcome checks that the session has one revision per save and
// that no save failed.
func calcSaveOutcome(t *testing.T, dir string, codes []int, errs []string) {
	t.Helper()
	for i, c := range codes {
		if c != 0 {
			t.Errorf("save %d: exit %d: %s", i, c, errs[i])
		}
	}
	st, err := sessions.New(dir, sessions.Options{})
	if err != nil {
		t.Fatal(err)
	}
	hist, probs, err := st.History("same")
	if err != nil || len(probs) != 0 || len(hist) != len(codes) {
		t.Fatalf("%d revisions for %d saves (%v %v)", len(hist), len(codes), probs, err)
	}
	temps := map[float64]int{}
	for _, r := range hist {
		doc, _, err := st.Open("same", r.Number)
		if err != nil {
			t.Fatal(err)
		}
		temps[doc.Spec.Temperature]++
	}
	if len(temps) != len(codes) {
		t.Errorf("%d distinct junctions stored for %d saves of distinct junctions", len(temps), len(codes))
	}
}

// TestCalcNextRevisionConcurrent: 20 concurrent `calc --save same
// --next-revision`, each with its own temperature: every one exits 0 and
// stores its own revision (without the flag, about half were refused).
func TestCalcNextRevisionConcurrent(t *testing.T) {
	concurrentSaves(t, func(i int, dir string) (int, string) {
		code, _, errs := runCLI(t, "calc", "--temp", fmt.Sprintf("%dK", 300+i), "--save", "same", "--next-revision", "--data", dir)
		return code, errs
	})
}

// concurrentSaves runs save(i, dir) for 20 values of i at once, each
// meant to store a revision of session "same" in dir with temperature
// 300+i K, and checks the outcome (calcSaveOutcome).
func concurrentSaves(t *testing.T, save func(i int, dir string) (code int, errs string)) {
	t.Helper()
	dir := t.TempDir()
	const n = 20
	codes, errs := make([]int, n), make([]string, n)
	var wg sync.WaitGroup
	for i := range n {
		wg.Go(func() { codes[i], errs[i] = save(i, dir) })
	}
	wg.Wait()
	calcSaveOutcome(t, dir, codes, errs)
}

const calcHelperEnv = "JUNCO_CLI_TEST_CALC"

// TestHelperCalc is not a test: run by TestCalcNextRevisionProcesses in
// a child process, it runs one `junco calc` with the arguments in the
// environment and exits with its status.
func TestHelperCalc(t *testing.T) {
	args := os.Getenv(calcHelperEnv)
	if args == "" {
		t.Skip("helper process only")
	}
	code, _, errs := runCLI(t, strings.Fields(args)...)
	fmt.Fprint(os.Stderr, errs)
	os.Exit(code)
}

// TestCalcNextRevisionProcesses: the same with 20 processes.
func TestCalcNextRevisionProcesses(t *testing.T) {
	if os.Getenv(calcHelperEnv) != "" {
		t.Skip("in a helper")
	}
	if testing.Short() {
		t.Skip("starts 20 processes")
	}
	concurrentSaves(t, func(i int, dir string) (int, string) {
		cmd := exec.Command(os.Args[0], "-test.run=^TestHelperCalc$", "-test.count=1")
		cmd.Env = append(os.Environ(), calcHelperEnv+"=calc --temp "+strconv.Itoa(300+i)+"K --save same --next-revision --data "+dir)
		out, err := cmd.CombinedOutput()
		code := 0
		if ee, ok := err.(*exec.ExitError); ok {
			code = ee.ExitCode()
		} else if err != nil {
			code = -1
		}
		return code, string(out)
	})
}

// TestServeListNamesNoServerPath: over SSH, `sessions list` and its
// warnings name sessions and files relative to the user's own area, never
// by the server's path.
func TestServeListNamesNoServerPath(t *testing.T) {
	ada := newSSHUser(t, "ada")
	addr, data, _ := startJunco(t, ada)
	out, errs, err := sshRun(t, addr, ada, "sessions list")
	if err != nil || strings.Contains(out+errs, data) || !strings.Contains(out, "no sessions yet") {
		t.Errorf("empty list over SSH: %q %q %v", out, errs, err)
	}
	saveFor(t, data, "ada", "d7")
	root, _ := sessions.UserStoreRoot(data, "ada")
	writeTestFile(t, root+"/sessions/stray.txt", []byte("x"))
	out, errs, err = sshRun(t, addr, ada, "sessions list")
	if err != nil || !strings.Contains(out, "d7") || !strings.Contains(errs, "sessions/stray.txt") || strings.Contains(out+errs, data) {
		t.Errorf("list over SSH: %q %q %v", out, errs, err)
	}
}

// TestShowEscapesControlCharacters: a review note written with a terminal
// control sequence is shown escaped by `sessions show`.
func TestShowEscapesControlCharacters(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, "calc", "--save", "d7", "--data", dir); code != 0 {
		t.Fatal(errs)
	}
	st, err := sessions.New(dir, sessions.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := st.AddReviewNote("d7", sessions.ReviewNote{Author: "bob", Text: "ok \x1b]0;owned\x07 \x1b[2J"}); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "sessions", "show", "d7", "--data", dir)
	if code != 0 || strings.ContainsAny(out, "\x1b\x07") || !strings.Contains(out, `ok \x1b]0;owned\x07 \x1b[2J`) {
		t.Errorf("show: exit %d, %q, %q", code, out, errs)
	}
}
