package cli

import (
	"strings"
	"testing"
)

// The summaries of `junco --help` and `junco fit --help` name every fit
// subcommand the command tree defines (fitSubs), card included, so that a
// subcommand added there cannot be missing from them.
func TestHelpSummariesListEveryFitSubcommand(t *testing.T) {
	var names []string
	for _, s := range fitSubs() {
		names = append(names, s.name())
	}
	if !strings.Contains(strings.Join(names, " "), "card") {
		t.Fatalf("fitSubs names %v: no card", names)
	}
	code, root, errs := runCLI(t, "--help")
	if want := "junco fit " + strings.Join(names, "|") + " ..."; code != exitOK || !strings.Contains(root, want) {
		t.Errorf("junco --help: exit %d, no %q in\n%s%s", code, want, root, errs)
	}
	code, page, errs := runCLI(t, "fit", "--help")
	if code != exitOK {
		t.Fatalf("junco fit --help: exit %d: %s", code, errs)
	}
	for _, n := range names {
		if !strings.Contains(page, "\n  junco fit "+n+" ") {
			t.Errorf("junco fit --help has no summary of %q:\n%s", n, page)
		}
	}
}

// The root's help names every sessions command the tree defines, each of
// which answers --help.
func TestHelpSummaryListsEverySessionsCommand(t *testing.T) {
	code, root, errs := runCLI(t, "--help")
	if code != exitOK {
		t.Fatalf("junco --help: exit %d: %s", code, errs)
	}
	for _, s := range sessionsSubs() {
		name := strings.Fields(s.use)[0]
		if !strings.Contains(root, "|"+name+"|") && !strings.Contains(root, " "+name+"|") && !strings.Contains(root, "|"+name+" ") {
			t.Errorf("junco --help does not name sessions %s", name)
		}
		if c, _, e := runCLI(t, "sessions", name, "--help"); c != exitOK {
			t.Errorf("junco sessions %s --help: exit %d: %s", name, c, e)
		}
	}
}
