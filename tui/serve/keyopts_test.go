package serve

import (
	"net/netip"
	"strings"
	"testing"
	"time"

	"junco/tui/serve/servetest"
)

// The pattern semantics follow ssh_config(5), PATTERNS, and sshd(8),
// AUTHORIZED_KEYS FILE FORMAT: '*' and '?' wildcards, '!' negation that
// overrides any positive match, CIDR blocks, no match means refusal.
func TestFromPatterns(t *testing.T) {
	cases := []struct {
		list string
		addr string
		want bool
	}{
		{"127.0.0.1", "127.0.0.1", true},
		{"10.9.9.9", "127.0.0.1", false},
		{"127.0.0.0/8", "127.200.1.1", true},
		{"10.0.0.0/8,192.168.0.0/16", "192.168.4.2", true},
		{"10.0.0.0/8,192.168.0.0/16", "172.16.0.1", false},
		{"192.168.1.*", "192.168.1.77", true},
		{"192.168.1.?", "192.168.1.77", false},
		{"192.168.1.??", "192.168.1.77", true},
		{"*,!192.168.1.77", "192.168.1.77", false},
		{"!192.168.1.77,*", "192.168.1.77", false},
		{"!192.168.1.77,*", "192.168.1.78", true},
		{"!10.0.0.0/8", "10.1.2.3", false},
		{"!10.0.0.0/8", "11.1.2.3", false}, // only a negation: nothing admits
		{"::1", "::1", true},
		{"2001:db8::/32", "2001:db8:1::5", true},
		{"2001:db8::/32", "2001:db9::5", false},
		{"127.0.0.1", "::ffff:127.0.0.1", true}, // IPv4-mapped is the IPv4 address
		{"*.example.net", "10.1.1.1", false},    // host names never match without DNS
		{"*", "10.1.1.1", true},
	}
	for _, c := range cases {
		o, err := parseKeyOptions([]string{`from="` + c.list + `"`}, time.UTC)
		if err != nil {
			t.Errorf("from=%q: %v", c.list, err)
			continue
		}
		if got := o.permitsFrom(netip.MustParseAddr(c.addr)); got != c.want {
			t.Errorf("from=%q admits %s: %v, want %v", c.list, c.addr, got, c.want)
		}
	}
	if (keyOptions{}).permitsFrom(netip.Addr{}) != true {
		t.Error("no from= must admit any address")
	}
	o, _ := parseKeyOptions([]string{`from="*"`}, time.UTC)
	if o.permitsFrom(netip.Addr{}) {
		t.Error("an unknown client address passed a from= list")
	}
}

func TestParseKeyOptions(t *testing.T) {
	ok := []struct {
		opts    []string
		noPTY   bool
		command string
	}{
		{nil, false, ""},
		{[]string{"no-pty"}, true, ""},
		{[]string{"NO-PTY"}, true, ""},
		{[]string{"restrict"}, true, ""},
		{[]string{"restrict", "pty"}, false, ""},
		{[]string{"pty", "restrict"}, true, ""},
		{[]string{"no-agent-forwarding", "no-port-forwarding", "no-X11-forwarding", "no-user-rc"}, false, ""},
		{[]string{`command="sessions list"`}, false, "sessions list"},
		{[]string{`command="sessions  show  'my run'"`}, false, "sessions show my run"},
		{[]string{`command="open d7"`, "restrict"}, true, "open d7"},
	}
	for _, c := range ok {
		o, err := parseKeyOptions(c.opts, time.UTC)
		if err != nil {
			t.Errorf("%q: %v", c.opts, err)
			continue
		}
		if o.noPTY != c.noPTY || strings.Join(o.command, " ") != c.command {
			t.Errorf("%q: noPTY %v command %q", c.opts, o.noPTY, o.command)
		}
	}
	bad := []struct {
		opts []string
		want string // in the error
	}{
		{[]string{`permitopen="host:22"`}, `"permitopen" is not supported`},
		{[]string{"cert-authority"}, `"cert-authority" is not supported`},
		{[]string{`environment="A=b"`}, `"environment" is not supported`},
		{[]string{"agent-forwarding"}, "not supported"},
		{[]string{"port-forwarding"}, "not supported"},
		{[]string{`principals="a"`}, "not supported"},
		{[]string{"no-touch-required"}, "not supported"},
		{[]string{`command="/bin/false"`}, "forced command must be one the server runs"},
		{[]string{`command="sessions trash x"`}, "forced command"},
		{[]string{`command=""`}, "forced command"},
		{[]string{`command="sessions list"`, `command="sessions list"`}, "given twice"},
		{[]string{`from="10.0.0.1/8"`}, "bits beyond its mask"},
		{[]string{`from="10.0.0.0/33"`}, "not a CIDR block"},
		{[]string{`from="a,,b"`}, "empty pattern"},
		{[]string{`from="1.2.3.4"`, `from="1.2.3.4"`}, "given twice"},
		{[]string{`from=1.2.3.4`}, "double quotes"},
		{[]string{"from"}, "needs a quoted value"},
		{[]string{`no-pty="x"`}, "takes no value"},
		{[]string{`expiry-time="2026"`}, "YYYYMMDD"},
		{[]string{`expiry-time="20261345"`}, "not a valid date"},
		{[]string{`from="` + strings.Repeat("1.1.1.1,", maxFromPatterns) + `1.1.1.1"`}, "at most"},
	}
	for _, c := range bad {
		_, err := parseKeyOptions(c.opts, time.UTC)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want it to contain %q", c.opts, err, c.want)
		}
	}
}

func TestExpiryTime(t *testing.T) {
	paris := time.FixedZone("UTC+1", 3600)
	cases := []struct {
		v    string
		loc  *time.Location
		want time.Time
	}{
		{"20270101", time.UTC, time.Date(2027, 1, 1, 0, 0, 0, 0, time.UTC)},
		{"202701011230", time.UTC, time.Date(2027, 1, 1, 12, 30, 0, 0, time.UTC)},
		{"20270101123045Z", paris, time.Date(2027, 1, 1, 12, 30, 45, 0, time.UTC)},
		{"202701011230", paris, time.Date(2027, 1, 1, 11, 30, 0, 0, time.UTC)}, // local time of the server
	}
	for _, c := range cases {
		o, err := parseKeyOptions([]string{`expiry-time="` + c.v + `"`}, c.loc)
		if err != nil || !o.expiry.Equal(c.want) {
			t.Errorf("%s: %v %v, want %v", c.v, o.expiry, err, c.want)
		}
	}
	// The earliest of two wins (sshd does the same).
	o, err := parseKeyOptions([]string{`expiry-time="20300101Z"`, `expiry-time="20280101Z"`}, time.UTC)
	if err != nil || o.expiry.Year() != 2028 {
		t.Errorf("two expiry times: %v %v", o.expiry, err)
	}
}

func TestGlobMatch(t *testing.T) {
	cases := []struct {
		p, s string
		want bool
	}{
		{"", "", true}, {"*", "", true}, {"?", "", false}, {"a*b", "ab", true},
		{"a*b", "axxb", true}, {"a*b", "axxbc", false}, {"*b*", "abc", true},
		{"a?c", "abc", true}, {"**", "x", true}, {"*a*a*a*a*b", strings.Repeat("a", 40), false},
	}
	for _, c := range cases {
		if got := globMatch(c.p, c.s); got != c.want {
			t.Errorf("globMatch(%q, %q) = %v", c.p, c.s, got)
		}
	}
}

// A refused line is reported with its number and never admits its key;
// the other lines still work.
func TestKeysFileRefusesUnknownOptions(t *testing.T) {
	ada, bob, carol := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob"), servetest.NewKey(t, "carol")
	data := strings.Join([]string{
		"# lab keys",
		ada.Line,
		`permitopen="host:22" ` + bob.Line,
		`from="10.9.9.9",command="/bin/false",no-pty ` + carol.Line,
	}, "\n")
	keys, problems := parseAuthorizedKeys([]byte(data), time.UTC)
	if len(keys) != 1 || keys[0].user != "ada" {
		t.Fatalf("keys %v", keys)
	}
	all := strings.Join(problems, "\n")
	for _, want := range []string{`line 3 (bob) refused: option "permitopen" is not supported`, "line 4 (carol) refused: option command=\"/bin/false\""} {
		if !strings.Contains(all, want) {
			t.Errorf("problems do not say %q:\n%s", want, all)
		}
	}
}

// FuzzParseAuthorizedKeys feeds arbitrary files (seeds under
// testdata/fuzz/FuzzParseAuthorizedKeys): the parser never panics, every
// accepted line has a valid user and options the server implements, and
// every other non-comment line is reported.
func FuzzParseAuthorizedKeys(f *testing.F) {
	const key = "ssh-ed25519 AAAAC3NzaC1lZDI1NTE5AAAAIKgGVjtRXEtRxANpBXAUs540mPNaNe2jPJb4UwEWKR2v"
	for _, seed := range []string{
		key + " ada",
		`from="10.0.0.0/8,!10.1.2.3",no-pty ` + key + " bob",
		`restrict,pty,command="sessions list",expiry-time="20301231Z" ` + key + " carol",
		`permitopen="x:1" ` + key + " eve",
		`from="a\"b" ` + key + " dan",
	} {
		f.Add([]byte(seed))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		keys, problems := parseAuthorizedKeys(data, time.UTC)
		for _, k := range keys {
			if !ValidUserName(k.user) || k.line < 1 || k.key == nil {
				t.Fatalf("accepted a bad line: %+v", k)
			}
			if k.opts.command != nil && !AllowedCommand(k.opts.command) && !InteractiveCommand(k.opts.command) {
				t.Fatalf("accepted forced command %q", k.opts.command)
			}
			_ = k.opts.permitsFrom(netip.MustParseAddr("127.0.0.1"))
		}
		for _, p := range problems {
			if !strings.HasPrefix(p, "line ") && !strings.HasPrefix(p, "after line ") {
				t.Fatalf("problem without a line number: %q", p)
			}
		}
		// Each line is either accepted or reported, unless the scanner
		// stopped at an over-long line.
		lines := 0
		for l := range strings.SplitSeq(string(data), "\n") {
			l = strings.TrimSpace(l)
			if l != "" && !strings.HasPrefix(l, "#") {
				lines++
			}
		}
		stopped := false
		for _, p := range problems {
			stopped = stopped || strings.HasPrefix(p, "after line ")
		}
		if !stopped && len(keys)+len(problems) != lines {
			t.Fatalf("%d lines, %d keys, %d problems", lines, len(keys), len(problems))
		}
	})
}

// FuzzKeyOptions feeds arbitrary option lists.
func FuzzKeyOptions(f *testing.F) {
	for _, seed := range []string{`from="127.0.0.1"`, `expiry-time="20270101"`, `command="open x"`, "restrict", `from="*,!1.2.3.4/32"`} {
		f.Add(seed)
	}
	f.Fuzz(func(t *testing.T, opt string) {
		o, err := parseKeyOptions(strings.Split(opt, "\x00"), time.UTC)
		if err != nil {
			return
		}
		for _, a := range []string{"127.0.0.1", "::1", "10.1.2.3"} {
			_ = o.permitsFrom(netip.MustParseAddr(a))
		}
	})
}
