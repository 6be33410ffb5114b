package cli

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/user"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"junco/model"
	"junco/sessions"
	"junco/sessions/report"
)

// sessionsHelp is the page of `junco sessions --help`.
const sessionsHelp = `Sessions keep what was assumed, measured and extracted, revision by
revision. Every save is a new revision; nothing is overwritten. Each
command has its own page: junco sessions COMMAND --help.

Every command takes --data DIR (default $XDG_DATA_HOME/junco, else
~/.local/share/junco).`

// sessionsSub is one sessions command: its words, flags beyond --data and
// the positional arguments it takes (at least, at most, and how to say it).
type sessionsSub struct {
	use, short, long string
	extra            []string
	min, max         int
	want             string
}

// sessionsSubs lists the sessions commands in help order (a new list on
// each call: no package state).
func sessionsSubs() []sessionsSub {
	return []sessionsSub{
		{use: "list", short: "sessions with their newest revision", want: "no arguments"},
		{use: "show NAME [--rev N] [--ascii]", short: "inputs, results, data and notes of a revision", extra: []string{"rev", "ascii"}, min: 1, max: 1, want: "a session NAME"},
		{use: "history NAME", short: "every revision: when, by whom, from what", min: 1, max: 1, want: "a session NAME"},
		{use: "diff NAME A B | NAME1[@REV] NAME2[@REV]", short: "changed inputs and results between two revisions or two sessions",
			long: `Show what changed in the inputs, results, data and notes.

  junco sessions diff NAME A B              revision A to revision B of session NAME
  junco sessions diff NAME1[@REV] NAME2[@REV]
                                            session NAME1 to session NAME2, each at
                                            revision REV or, without @REV, its newest

With three arguments the last two are revision numbers of one session; with
two, each is a session (a bare number as the second argument is refused as
a half-given revision pair: write NAME@REV).`,
			extra: []string{"ascii"}, min: 2, max: 3, want: "NAME A B (two revisions of one session) or NAME1[@REV] NAME2[@REV] (two sessions)"},
		{use: "export NAME [--rev N] --format md|csv|json [--out DIR]", short: "a Markdown report with SVG figures, CSV tables of every curve, or the JSON document",
			extra: []string{"rev", "format", "out", "ascii"}, min: 1, max: 1, want: "a session NAME"},
		{use: "import FILE [--as NAME]", short: "store a session file from elsewhere", extra: []string{"as"}, min: 1, max: 1, want: "a FILE"},
		{use: "trash [NAME]", short: "move a session to the trash (no NAME: list the trash)", max: 1, want: "at most a session NAME"},
		{use: "restore NAME [--rev N]", short: "bring a session back from the trash; with --rev N store revision N again as the newest",
			extra: []string{"rev"}, min: 1, max: 1, want: "a session NAME"},
	}
}

// sessionNames is "list|show|...": the sessions commands' names, for the
// root's help.
func sessionNames() string {
	var names []string
	for _, s := range sessionsSubs() {
		names = append(names, strings.Fields(s.use)[0])
	}
	return strings.Join(names, "|")
}

// sessionFlags are the flags shared by the sessions commands.
type sessionFlags struct {
	data   string
	rev    int
	format string
	out    string
	as     string
	ascii  bool
}

func newSessionFlagSet(name string, o *sessionFlags, stderr io.Writer, extra ...string) *flag.FlagSet {
	fs := flag.NewFlagSet("sessions "+name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.StringVar(&o.data, "data", "", "data directory `DIR` (default $XDG_DATA_HOME/junco or ~/.local/share/junco)")
	for _, e := range extra {
		switch e {
		case "rev":
			fs.IntVar(&o.rev, "rev", 0, "revision number `N` (default: the newest)")
		case "format":
			fs.StringVar(&o.format, "format", "", "md, csv or json")
		case "out":
			fs.StringVar(&o.out, "out", "", "directory to write the files into (created if missing; nothing is replaced)")
		case "as":
			fs.StringVar(&o.as, "as", "", "session name to store under (default: the file name without extension)")
		case "ascii":
			fs.BoolVar(&o.ascii, "ascii", false, "plain ASCII output (u for micro)")
		}
	}
	return fs
}

// openStore opens the store at dir, or at the default location, and
// tells on stderr what opening it changed (a store other accounts could
// read is made private).
func openStore(dir, user string, stderr io.Writer) (*sessions.Store, error) {
	if dir == "" {
		d, err := sessions.DefaultRoot(os.Getenv)
		if err != nil {
			return nil, err
		}
		dir = d
	}
	st, err := sessions.New(dir, sessions.Options{ToolVersion: Version, User: user})
	if err != nil {
		return nil, err
	}
	for _, n := range st.Notices() {
		fmt.Fprintf(stderr, "junco: note: %s\n", storeText(st, n))
	}
	return st, nil
}

// storeText makes a message about the store fit to echo: paths in it are
// written relative to the store (over SSH the store's place is the
// server's business, not the user's), and it is made printable.
func storeText(st *sessions.Store, msg string) string {
	root := st.Root()
	msg = strings.ReplaceAll(msg, root+string(filepath.Separator), "")
	msg = strings.ReplaceAll(msg, root, "the session store")
	return sessions.Printable(msg, 0, "")
}

// currentUser names who saves: $USER, $LOGNAME or $USERNAME, else the
// name of the account junco runs under; "" when none is known.
func currentUser() string { return userName(os.Getenv, accountName) }

// userName is currentUser with its sources given (for tests).
func userName(getenv func(string) string, account func() (string, error)) string {
	for _, k := range []string{"USER", "LOGNAME", "USERNAME"} {
		if v := strings.TrimSpace(getenv(k)); v != "" {
			return v
		}
	}
	if account != nil {
		if n, err := account(); err == nil {
			return strings.TrimSpace(n)
		}
	}
	return ""
}

// accountName is the name of the account of this process (os/user).
func accountName() (string, error) {
	u, err := user.Current()
	if err != nil {
		return "", err
	}
	return u.Username, nil
}

// runSessions runs `junco sessions ARGS...` (args are the words after
// "sessions") through the command tree.
func runSessions(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	return execute(ctx, append([]string{"sessions"}, args...), nil, stdout, stderr)
}

// newSessionsCmd is `junco sessions` and its commands.
func newSessionsCmd(e *env) *cobra.Command {
	cmd := &cobra.Command{Use: "sessions COMMAND", Short: "the session store", Long: sessionsHelp}
	commandGroup(cmd, "command")
	cmd.Flags().String("data", "", "session store `DIR` (default $XDG_DATA_HOME/junco, else ~/.local/share/junco)")
	for _, s := range sessionsSubs() {
		cmd.AddCommand(s.command(e))
	}
	return cmd
}

// command builds the cobra command of a sessions command.
func (s sessionsSub) command(e *env) *cobra.Command {
	name, _, _ := strings.Cut(s.use, " ")
	var o sessionFlags
	c := &cobra.Command{Use: s.use, Short: s.short, Long: s.long, Args: cobra.ArbitraryArgs}
	if c.Long == "" {
		c.Long = s.short + "."
	}
	e.lazyFlags(c, func() { c.Flags().AddGoFlagSet(newSessionFlagSet(name, &o, io.Discard, s.extra...)) })
	c.RunE = func(c *cobra.Command, pos []string) error {
		if len(pos) < s.min || len(pos) > s.max {
			return usagef(c, "expected %s, got %d argument(s)", s.want, len(pos))
		}
		return exited(runSessionsCommand(e.ctx, c, name, pos, o, e.stdout, e.stderr))
	}
	return c
}

// runSessionsCommand runs the sessions command name on parsed options.
func runSessionsCommand(ctx context.Context, c *cobra.Command, cmd string, pos []string, o sessionFlags, stdout, stderr io.Writer) int {
	fail := func(err error) int {
		fmt.Fprintf(stderr, "junco sessions %s: %v\n", cmd, err)
		return exitFailure
	}
	usageErr := func(format string, a ...any) int {
		tell(stderr, c, usagef(c, format, a...))
		return exitUsage
	}
	if o.rev < 0 {
		return usageErr("--rev %d: allowed 1 or more (omit for the newest)", o.rev)
	}
	st, err := openStore(o.data, currentUser(), stderr)
	if err != nil {
		return fail(err)
	}
	if err := ctx.Err(); err != nil {
		return fail(err)
	}
	switch cmd {
	case "list":
		return sessionsList(st, stdout, stderr)
	case "show":
		return sessionsShow(st, pos[0], o, stdout, stderr)
	case "history":
		return sessionsHistory(st, pos[0], stdout, stderr)
	case "diff":
		return sessionsDiff(st, pos, o, stdout, stderr, usageErr)
	case "export":
		return sessionsExport(st, pos[0], o, stdout, stderr, usageErr)
	case "import":
		data, err := readLimited(pos[0])
		if err != nil {
			return fail(err)
		}
		r, err := st.Import(data, pos[0], o.as)
		if err != nil {
			return fail(err)
		}
		fmt.Fprintf(stdout, "imported %s as session %q, revision %d\n", pos[0], r.Session, r.Number)
		return exitOK
	case "trash":
		if len(pos) == 0 {
			return sessionsTrashList(st, stdout, stderr)
		}
		e, err := st.Trash(pos[0])
		if err != nil {
			return fail(err)
		}
		fmt.Fprintf(stdout, "moved session %q (%d revisions) to the trash; `junco sessions restore %s` brings it back\n", e.Session, e.Revisions, e.Session)
		return exitOK
	case "restore":
		if o.rev > 0 {
			r, err := st.RestoreRevision(pos[0], o.rev)
			if err != nil {
				return fail(err)
			}
			fmt.Fprintf(stdout, "stored revision %d of %q again as revision %d\n", o.rev, r.Session, r.Number)
			return exitOK
		}
		e, err := st.Restore(pos[0])
		if err != nil {
			return fail(err)
		}
		fmt.Fprintf(stdout, "restored session %q (%d revisions, trashed %s)\n", e.Session, e.Revisions, e.Trashed.Format("2006-01-02 15:04:05 UTC"))
		return exitOK
	}
	return exitOK
}

// readLimited reads a session file given by the user.
func readLimited(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, sessions.MaxDocumentBytes+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(data) > sessions.MaxDocumentBytes {
		return nil, fmt.Errorf("%s: larger than the %d MiB a session may have", path, sessions.MaxDocumentBytes>>20)
	}
	return data, nil
}

func warnProblems(st *sessions.Store, stderr io.Writer, probs []*sessions.DamagedError) {
	for _, p := range probs {
		fmt.Fprintf(stderr, "junco sessions: warning: %s\n", storeText(st, p.Error()))
	}
}

// warnSkipped tells which newer revisions could not be read when the
// newest readable one was opened.
func warnSkipped(st *sessions.Store, stderr io.Writer, rev sessions.Revision) {
	for _, d := range rev.Skipped {
		fmt.Fprintf(stderr, "junco sessions: warning: %s; revision %d, the newest readable, is used\n", storeText(st, d.Error()), rev.Number)
	}
}

func when(t time.Time) string {
	if t.IsZero() {
		return "-"
	}
	return t.UTC().Format("2006-01-02 15:04 UTC")
}

func dash(s string) string {
	if strings.TrimSpace(s) == "" {
		return "-"
	}
	return s
}

// table writes aligned columns (sessions.WriteTable).
func table(w io.Writer, rows [][]string) { sessions.WriteTable(w, rows) }

func sessionsList(st *sessions.Store, stdout, stderr io.Writer) int {
	list, probs, err := st.List()
	if err != nil {
		fmt.Fprintf(stderr, "junco sessions list: %v\n", err)
		return exitFailure
	}
	warnProblems(st, stderr, probs)
	if len(list) == 0 {
		fmt.Fprintln(stdout, "no sessions yet")
		return exitOK
	}
	rows := [][]string{{"NAME", "REV", "SAVED", "AUTHOR", "TITLE"}}
	damaged := false
	for _, s := range list {
		rev := strconv.Itoa(s.Latest.Number)
		switch {
		case len(s.Damaged) > 0 && s.Latest.Number == 0:
			rev, damaged = "!", true
		case len(s.Damaged) > 0:
			rev, damaged = rev+"!", true
		}
		rows = append(rows, []string{s.Name, rev, when(s.Latest.Meta.Modified), dash(s.Latest.Meta.Author), dash(s.Latest.Meta.Title)})
	}
	table(stdout, rows)
	if damaged {
		fmt.Fprintln(stdout, "! damaged: the newer revisions cannot be read (see the warnings); the newest readable one is shown, opened and saved on")
	}
	return exitOK
}

func sessionsTrashList(st *sessions.Store, stdout, stderr io.Writer) int {
	list, probs, err := st.Trashed()
	if err != nil {
		fmt.Fprintf(stderr, "junco sessions trash: %v\n", err)
		return exitFailure
	}
	warnProblems(st, stderr, probs)
	if len(list) == 0 {
		fmt.Fprintln(stdout, "the trash is empty")
		return exitOK
	}
	rows := [][]string{{"NAME", "REVISIONS", "TRASHED"}}
	for _, e := range list {
		rows = append(rows, []string{e.Session, strconv.Itoa(e.Revisions), e.Trashed.Format("2006-01-02 15:04:05 UTC")})
	}
	table(stdout, rows)
	return exitOK
}

func sessionsHistory(st *sessions.Store, name string, stdout, stderr io.Writer) int {
	hist, probs, err := st.History(name)
	warnProblems(st, stderr, probs)
	if err != nil {
		fmt.Fprintf(stderr, "junco sessions history: %v\n", err)
		return exitFailure
	}
	rows := [][]string{{"REV", "SAVED", "BY", "FROM", "TOOL", "BYTES", "NOTE"}}
	for _, r := range hist {
		from := "-"
		if r.Meta.BasedOn > 0 {
			from = strconv.Itoa(r.Meta.BasedOn)
		}
		rows = append(rows, []string{strconv.Itoa(r.Number), when(r.Meta.Modified), dash(r.Meta.SavedBy), from, dash(r.Meta.ToolVersion), strconv.FormatInt(r.Size, 10), dash(r.Meta.Remark())})
	}
	table(stdout, rows)
	return exitOK
}

func sessionsShow(st *sessions.Store, name string, o sessionFlags, stdout, stderr io.Writer) int {
	doc, rev, err := st.Open(name, o.rev)
	if err != nil {
		fmt.Fprintf(stderr, "junco sessions show: %s\n", storeText(st, err.Error()))
		return exitFailure
	}
	warnSkipped(st, stderr, rev)
	m := doc.Meta
	// Every text of the document is echoed through sessions.Printable.
	e := func(s string) string { return sessions.Printable(s, 0, "") }
	fmt.Fprintf(stdout, "%s, revision %d: %s\n", name, rev.Number, e(dash(m.Title)))
	fmt.Fprintf(stdout, "author %s; created %s; saved %s by %s with junco %s\n", e(dash(m.Author)), when(m.Created), when(m.Modified), e(dash(m.SavedBy)), e(dash(m.ToolVersion)))
	if m.Origin != "" {
		fmt.Fprintf(stdout, "origin: %s\n", e(m.Origin))
	}
	fmt.Fprintln(stdout, "\nInputs")
	var rows [][]string
	for _, r := range sessions.SpecRows(doc.Spec, o.ascii) {
		rows = append(rows, []string{"  " + r.Label, r.Value})
	}
	table(stdout, rows)
	fmt.Fprintln(stdout)
	res, err := model.Evaluate(doc.Spec)
	if err != nil {
		fmt.Fprintf(stdout, "Results: not computable: %v\n", err)
	} else {
		fmt.Fprint(stdout, res.Text(o.ascii))
	}
	if len(doc.Measurements) > 0 {
		fmt.Fprintln(stdout, "\nMeasurements")
		for _, ms := range doc.Measurements {
			fmt.Fprintf(stdout, "  %s: %s from %s, %d points, imported %s\n", e(ms.ID), e(string(ms.Kind)), e(ms.SourceFile), ms.Len(), when(ms.ImportedAt))
		}
	}
	if len(doc.Extractions) > 0 {
		fmt.Fprintln(stdout, "\nExtracted parameters")
		for _, x := range doc.Extractions {
			fmt.Fprintf(stdout, "  %s (%s, data %s)\n", e(x.ID), e(x.Method), e(dash(x.Measurement)))
			for _, p := range x.Parameters {
				fmt.Fprintf(stdout, "    %-6s %s\n", e(p.Name), e(sessions.FormatParameter(p, o.ascii)))
			}
		}
	}
	sessionsShowBatches(stdout, doc, o.ascii)
	if len(doc.References) > 0 {
		fmt.Fprintln(stdout, "\nReferences")
		for _, r := range doc.References {
			fmt.Fprintf(stdout, "  %s (pinned %s)\n", e(r.Name), when(r.Pinned))
		}
	}
	if len(doc.Notes) > 0 {
		fmt.Fprintln(stdout, "\nNotes")
		for _, l := range doc.Notes {
			fmt.Fprintln(stdout, "  "+e(l))
		}
	}
	if len(doc.Reviews) > 0 {
		fmt.Fprintln(stdout, "\nReview notes")
		for _, r := range doc.Reviews {
			fmt.Fprintf(stdout, "  %s, %s: %s\n", e(r.Author), when(r.Time), e(r.Text))
		}
	}
	return exitOK
}

// sessionRef is one side of a comparison: a session and a revision (0 =
// the newest).
type sessionRef struct {
	name string
	rev  int
}

// parseDiffRefs reads the arguments of `sessions diff`: NAME A B (two
// revisions of one session) or NAME1[@REV] NAME2[@REV] (two sessions).
func parseDiffRefs(pos []string) ([2]sessionRef, error) {
	var refs [2]sessionRef
	revision := func(s string) (int, error) {
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 {
			return 0, fmt.Errorf("revision %q: allowed a revision number, 1 or more", s)
		}
		return n, nil
	}
	if len(pos) == 3 {
		for i, s := range pos[1:] {
			n, err := revision(s)
			if err != nil {
				return refs, err
			}
			refs[i] = sessionRef{name: pos[0], rev: n}
		}
		return refs, nil
	}
	if _, err := strconv.Atoi(pos[1]); err == nil {
		return refs, fmt.Errorf("expected NAME A B, or NAME1[@REV] NAME2[@REV]: %q after %q reads as half of a revision pair; write %s@%s for a revision", pos[1], pos[0], pos[0], pos[1])
	}
	for i, p := range pos {
		name, rev, hasRev := strings.Cut(p, "@")
		refs[i].name = name
		if hasRev {
			n, err := revision(rev)
			if err != nil {
				return refs, fmt.Errorf("%s: %v", p, err)
			}
			refs[i].rev = n
		}
	}
	return refs, nil
}

func sessionsDiff(st *sessions.Store, pos []string, o sessionFlags, stdout, stderr io.Writer, usageErr func(string, ...any) int) int {
	refs, err := parseDiffRefs(pos)
	if err != nil {
		return usageErr("%v", err)
	}
	var docs [2]*sessions.Document
	var revs [2]int
	for i, r := range refs {
		doc, rev, err := st.Open(r.name, r.rev)
		if err != nil {
			fmt.Fprintf(stderr, "junco sessions diff: %s\n", storeText(st, err.Error()))
			return exitFailure
		}
		warnSkipped(st, stderr, rev)
		docs[i], revs[i] = doc, rev.Number
	}
	changes := sessions.Diff(docs[0], docs[1], o.ascii)
	same := refs[0].name == refs[1].name
	if len(changes) == 0 {
		if same {
			fmt.Fprintf(stdout, "revisions %d and %d of %q have the same inputs, results, data and notes\n", revs[0], revs[1], refs[0].name)
		} else {
			fmt.Fprintf(stdout, "%q (revision %d) and %q (revision %d) have the same inputs, results, data and notes\n", refs[0].name, revs[0], refs[1].name, revs[1])
		}
		return exitOK
	}
	if same {
		fmt.Fprintf(stdout, "%s: revision %d -> %d\n\n", refs[0].name, revs[0], revs[1])
	} else {
		fmt.Fprintf(stdout, "%s revision %d -> %s revision %d\n\n", refs[0].name, revs[0], refs[1].name, revs[1])
	}
	sessions.WriteChanges(stdout, changes)
	return exitOK
}

func sessionsExport(st *sessions.Store, name string, o sessionFlags, stdout, stderr io.Writer, usageErr func(string, ...any) int) int {
	if o.format == "" {
		return usageErr("--format is required: md, csv or json")
	}
	format, err := report.ParseExportFormat(o.format)
	if err != nil {
		return usageErr("%v", err)
	}
	if format == report.FormatCSV && o.out == "" {
		return usageErr("--format csv writes one file per curve: give --out DIR")
	}
	doc, rev, err := st.Open(name, o.rev)
	if err != nil {
		fmt.Fprintf(stderr, "junco sessions export: %s\n", storeText(st, err.Error()))
		return exitFailure
	}
	warnSkipped(st, stderr, rev)
	files, err := report.Export(doc, format, report.ExportOptions{Session: name, Revision: rev.Number, Figures: o.out != "", ASCII: o.ascii, ToolVersion: Version})
	if err != nil {
		fmt.Fprintf(stderr, "junco sessions export: %v\n", err)
		return exitFailure
	}
	if o.out == "" {
		stdout.Write(files[0].Data)
		return exitOK
	}
	written, err := sessions.WriteNew(o.out, files)
	for _, p := range written {
		fmt.Fprintln(stdout, p)
	}
	if err != nil {
		fmt.Fprintf(stderr, "junco sessions export: %v\n", err)
		return exitFailure
	}
	return exitOK
}

// ---------------------------------------------------------------- calc

// calcSessionArgs are the session flags of `junco calc`: --session NAME|FILE
// loads a junction (flags given as well override its values), --save NAME
// stores the evaluated junction, --next-revision makes that save retry on
// top of whatever another save stored meanwhile, --data DIR selects the
// store and --author names who saves.
type calcSessionArgs struct {
	Session string
	Save    string
	DataDir string
	Author  string
	Next    bool
}

// calcSessionOptions takes the session flags out of calc's arguments and
// returns them with the remaining arguments, for calc's own flag set. Both
// "--flag value" and "--flag=value" are accepted; "--" ends the flags.
// Use: parse these first, load the Spec with loadSpecForCalc, then parse
// the rest into it so that explicit flags override the session's values.
//
// Deprecated: calc and solve parse these flags in the command tree
// (addCalcSessionFlags); this pre-pass is no longer called and stays only
// while its test (TestCalcSessionOptions) is pinned: remove both together.
func calcSessionOptions(args []string) (calcSessionArgs, []string, error) {
	var o calcSessionArgs
	targets := map[string]*string{"session": &o.Session, "save": &o.Save, "data": &o.DataDir, "author": &o.Author}
	var rest []string
	for i := 0; i < len(args); i++ {
		a := args[i]
		if a == "--" {
			rest = append(rest, args[i:]...)
			break
		}
		name := strings.TrimLeft(a, "-")
		if !strings.HasPrefix(a, "-") || len(a)-len(name) > 2 {
			rest = append(rest, a)
			continue
		}
		key, val, hasVal := strings.Cut(name, "=")
		if key == "next-revision" {
			b, err := strconv.ParseBool(val)
			if !hasVal {
				b, err = true, nil
			}
			if err != nil {
				return o, nil, fmt.Errorf("flag --next-revision=%q: allowed true or false", val)
			}
			o.Next = b
			continue
		}
		dst, ok := targets[key]
		if !ok {
			rest = append(rest, a)
			continue
		}
		if !hasVal {
			if i+1 >= len(args) {
				return o, nil, fmt.Errorf("flag --%s needs a value", key)
			}
			i++
			val = args[i]
		}
		if val == "" {
			return o, nil, fmt.Errorf("flag --%s needs a non-empty value", key)
		}
		*dst = val
	}
	return o, rest, nil
}

// looksLikePath tells a file argument from a session name: it has a path
// separator or ends in .json.
func looksLikePath(s string) bool {
	return strings.ContainsAny(s, `/\`) || strings.EqualFold(filepath.Ext(s), ".json")
}

// loadSpecForCalc returns the junction of a session (its newest revision)
// or of a session file: nameOrFile is a file when it contains a path
// separator or ends in .json, else a session name in the store at dataDir
// ("" for the default location). The document is decoded strictly and
// validated; errors name the file.
func loadSpecForCalc(dataDir, nameOrFile string) (model.Spec, error) {
	doc, err := loadSessionDoc(dataDir, nameOrFile)
	if err != nil {
		return model.Spec{}, err
	}
	return doc.Spec, nil
}

// loadSessionDoc reads a session document: a session file when the text
// looks like a path, else the newest readable revision of a stored
// session.
func loadSessionDoc(dataDir, nameOrFile string) (*sessions.Document, error) {
	if looksLikePath(nameOrFile) {
		data, err := readLimited(nameOrFile)
		if err != nil {
			return nil, err
		}
		doc, err := sessions.Decode(data)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", nameOrFile, err)
		}
		return doc, nil
	}
	st, err := openStore(dataDir, "", io.Discard) // the save or a later command tells
	if err != nil {
		return nil, err
	}
	doc, _, err := st.Open(nameOrFile, 0)
	return doc, err
}

// saveSpecFromCalc stores spec as the next revision of session name (its
// other contents kept from the newest readable revision), or as a new
// session when there is none, and returns the revision number. author is
// recorded as who saved it and, for a new session, as its author. With
// next, a save that another one overtook is made again on top of the new
// newest revision (sessions.Store.Update): scripts that save concurrently
// lose nothing and fail nothing. Without it, such a save stores nothing
// and fails with a *sessions.StaleError.
func saveSpecFromCalc(dataDir, name string, spec model.Spec, author string, next bool, stderr io.Writer) (rev int, err error) {
	if err := sessions.ValidateName(name); err != nil {
		return 0, err
	}
	if author == "" {
		author = currentUser()
	}
	st, err := openStore(dataDir, author, stderr)
	if err != nil {
		return 0, err
	}
	change := func(doc *sessions.Document, _ int) (*sessions.Document, error) {
		if doc == nil {
			return sessions.NewDocument(name, author, spec, time.Now()), nil
		}
		doc.Spec = spec
		return doc, nil
	}
	if next {
		r, err := st.Update(name, change)
		return r.Number, err
	}
	doc, r, err := st.Open(name, 0)
	var nf *sessions.NotFoundError
	switch {
	case errors.As(err, &nf):
		doc, r = nil, sessions.Revision{}
	case err != nil:
		return 0, err
	}
	warnSkipped(st, stderr, r)
	doc, _ = change(doc, r.Number)
	saved, err := st.Save(name, doc, r.Number)
	return saved.Number, err
}
