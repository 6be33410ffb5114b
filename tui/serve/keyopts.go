package serve

import (
	"errors"
	"fmt"
	"net/netip"
	"strings"
	"time"

	"github.com/anmitsu/go-shlex"
)

// keyOptions are the OpenSSH authorized_keys options of one line that the
// server honours (sshd(8), "AUTHORIZED_KEYS FILE FORMAT"). Any other option
// makes the whole line unusable: an option is never ignored.
type keyOptions struct {
	// from lists the address patterns of from="..." (nil: any address).
	from []addrPattern
	// expiry is the instant of expiry-time="..." (zero: none). The key
	// stops working at that instant.
	expiry time.Time
	// noPTY refuses terminal requests (no-pty, or restrict without pty).
	noPTY bool
	// command is the forced command of command="..." (nil: none): every
	// session of the key runs it, whatever the client asked for.
	command []string
}

// Limits of the options (one line, one pattern list).
const (
	maxFromPatterns = 256 // patterns in one from= list
	maxOptionValue  = 4096
)

// supportedOptions names the options parseKeyOptions accepts, for errors.
const supportedOptions = "from, expiry-time, command, no-pty, pty, restrict, no-agent-forwarding, no-port-forwarding, no-X11-forwarding, no-user-rc"

// parseKeyOptions reads the options of one authorized_keys line as returned
// by ssh.ParseAuthorizedKey (`name` or `name="value"`). Option names are
// case-insensitive and applied in order, as sshd does: `restrict,pty`
// allows a terminal, `pty,restrict` does not. The forwarding refusals
// (no-agent-forwarding, no-port-forwarding, no-X11-forwarding) and
// no-user-rc are honoured because the server never offers forwarding nor
// runs rc files. Expiry times without a trailing Z are read in loc, as
// sshd reads them in the server's time zone.
func parseKeyOptions(opts []string, loc *time.Location) (keyOptions, error) {
	var o keyOptions
	seenFrom, seenCommand := false, false
	for _, raw := range opts {
		name, value, hasValue := strings.Cut(raw, "=")
		name = strings.ToLower(name)
		if hasValue {
			v, err := dequote(value)
			if err != nil {
				return keyOptions{}, fmt.Errorf("option %s: %v", quoteName(name), err)
			}
			value = v
		}
		wantValue := name == "from" || name == "command" || name == "expiry-time"
		switch {
		case !isKnownOption(name):
			return keyOptions{}, fmt.Errorf("option %s is not supported (supported: %s)", quoteName(name), supportedOptions)
		case wantValue && !hasValue:
			return keyOptions{}, fmt.Errorf("option %s needs a quoted value", name)
		case !wantValue && hasValue:
			return keyOptions{}, fmt.Errorf("option %s takes no value", name)
		}
		switch name {
		case "from":
			if seenFrom {
				return keyOptions{}, errors.New("option from is given twice")
			}
			seenFrom = true
			p, err := parseAddrPatterns(value)
			if err != nil {
				return keyOptions{}, fmt.Errorf("option from=%q: %v", value, err)
			}
			o.from = p
		case "expiry-time":
			t, err := parseExpiry(value, loc)
			if err != nil {
				return keyOptions{}, fmt.Errorf("option expiry-time=%q: %v", value, err)
			}
			if o.expiry.IsZero() || t.Before(o.expiry) {
				o.expiry = t // the earliest of several wins, as in sshd
			}
		case "command":
			if seenCommand {
				return keyOptions{}, errors.New("option command is given twice")
			}
			seenCommand = true
			args, err := shlex.Split(value, true)
			if err != nil || !AllowedCommand(args) && !InteractiveCommand(args) {
				return keyOptions{}, fmt.Errorf("option command=%q: a forced command must be one the server runs: `sessions list`, `sessions show NAME`, `sessions export NAME ...`, `open NAME` or `review OWNER/NAME`", value)
			}
			o.command = args
		case "no-pty", "restrict":
			o.noPTY = true
		case "pty":
			o.noPTY = false
		}
	}
	return o, nil
}

func isKnownOption(name string) bool {
	switch name {
	case "from", "expiry-time", "command", "no-pty", "pty", "restrict",
		"no-agent-forwarding", "no-port-forwarding", "no-x11-forwarding", "no-user-rc":
		return true
	}
	return false
}

// quoteName prints an option name for a log line, cut and quoted so that a
// hostile file cannot forge log records.
func quoteName(name string) string {
	if len(name) > 64 {
		name = name[:64] + "..."
	}
	return fmt.Sprintf("%q", name)
}

// dequote removes the double quotes around an option value; inside, \"
// stands for a quote (the only escape sshd knows).
func dequote(v string) (string, error) {
	if len(v) < 2 || v[0] != '"' || v[len(v)-1] != '"' {
		return "", errors.New("the value must be in double quotes")
	}
	if len(v) > maxOptionValue {
		return "", fmt.Errorf("the value is longer than %d bytes", maxOptionValue)
	}
	return strings.ReplaceAll(v[1:len(v)-1], `\"`, `"`), nil
}

// parseExpiry reads YYYYMMDD[HHMM[SS]] with an optional Z for UTC.
func parseExpiry(v string, loc *time.Location) (time.Time, error) {
	if s, ok := strings.CutSuffix(v, "Z"); ok {
		v, loc = s, time.UTC
	}
	layouts := map[int]string{8: "20060102", 12: "200601021504", 14: "20060102150405"}
	layout, ok := layouts[len(v)]
	if !ok {
		return time.Time{}, errors.New("want YYYYMMDD, YYYYMMDDHHMM or YYYYMMDDHHMMSS, optionally followed by Z for UTC")
	}
	t, err := time.ParseInLocation(layout, v, loc)
	if err != nil {
		return time.Time{}, errors.New("not a valid date and time (YYYYMMDD[HHMM[SS]][Z])")
	}
	return t, nil
}

// addrPattern is one entry of a from= list: an address, a CIDR block or a
// wildcard pattern (* and ?) matched against the address text; negated
// with a leading '!'.
type addrPattern struct {
	negated bool
	prefix  netip.Prefix // valid for an address or a CIDR block
	glob    string       // otherwise, lower case
}

// parseAddrPatterns reads a comma-separated OpenSSH pattern list. A CIDR
// block with bits set beyond its mask is an error, as in sshd.
func parseAddrPatterns(list string) ([]addrPattern, error) {
	parts := strings.Split(list, ",")
	if len(parts) > maxFromPatterns {
		return nil, fmt.Errorf("%d patterns, at most %d", len(parts), maxFromPatterns)
	}
	out := make([]addrPattern, 0, len(parts))
	for _, p := range parts {
		var ap addrPattern
		p, ap.negated = strings.CutPrefix(strings.TrimSpace(p), "!")
		switch {
		case p == "":
			return nil, errors.New("empty pattern")
		case strings.Contains(p, "/"):
			pre, err := netip.ParsePrefix(p)
			if err != nil {
				return nil, fmt.Errorf("%q is not a CIDR block", p)
			}
			if pre.Masked() != pre {
				return nil, fmt.Errorf("%q has address bits beyond its mask (want %s)", p, pre.Masked())
			}
			ap.prefix = unmapPrefix(pre)
		default:
			if a, err := netip.ParseAddr(p); err == nil && a.Zone() == "" {
				a = a.Unmap()
				ap.prefix = netip.PrefixFrom(a, a.BitLen())
			} else {
				ap.glob = strings.ToLower(p)
			}
		}
		out = append(out, ap)
	}
	return out, nil
}

func unmapPrefix(p netip.Prefix) netip.Prefix {
	if a := p.Addr(); a.Is4In6() && p.Bits() >= 96 {
		return netip.PrefixFrom(a.Unmap(), p.Bits()-96)
	}
	return p
}

// permitsFrom applies the from= list to a client address the way sshd
// does without DNS (its default, UseDNS no): a matching negated pattern
// refuses, else a matching pattern admits, else the address is refused.
// Host-name patterns therefore match only address text.
func (o keyOptions) permitsFrom(a netip.Addr) bool {
	if o.from == nil {
		return true
	}
	if !a.IsValid() {
		return false
	}
	a = a.Unmap()
	text := strings.ToLower(a.String())
	matched := false
	for _, p := range o.from {
		var m bool
		if p.prefix.IsValid() {
			m = p.prefix.Contains(a)
		} else {
			m = globMatch(p.glob, text)
		}
		if m && p.negated {
			return false
		}
		matched = matched || m
	}
	return matched
}

// globMatch matches s against a pattern of literal bytes, '*' (any run)
// and '?' (any one byte), in time proportional to len(p)*len(s).
func globMatch(p, s string) bool {
	pi, si := 0, 0
	star, mark := -1, 0
	for si < len(s) {
		switch {
		case pi < len(p) && (p[pi] == '?' || p[pi] == s[si]):
			pi++
			si++
		case pi < len(p) && p[pi] == '*':
			star, mark = pi, si
			pi++
		case star >= 0:
			pi = star + 1
			mark++
			si = mark
		default:
			return false
		}
	}
	for pi < len(p) && p[pi] == '*' {
		pi++
	}
	return pi == len(p)
}
