package serve

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"net"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	gossh "golang.org/x/crypto/ssh"

	"junco/tui/serve/servetest"
)

// probeApp is an App whose screen can be slow on resizes and can fill the
// whole terminal (to make large frames), and which reports the shutdown
// message (the drafts hook) per user.
type probeApp struct {
	slowResize time.Duration
	sizes      chan [2]int  // every size the model sees, if set
	shutdowns  chan string  // users whose program got probeShutdown
	count      atomic.Int64 // models built
}

type probeShutdown struct{}

type probeScreen struct {
	app  *probeApp
	user string
	w, h int
	keys int
	fill bool
}

func (a *probeApp) Model(ctx context.Context, c Conn) (tea.Model, error) {
	a.count.Add(1)
	if a.sizes != nil {
		a.sizes <- [2]int{c.Width, c.Height}
	}
	return &probeScreen{app: a, user: c.User, w: c.Width, h: c.Height}, nil
}

func (a *probeApp) Command(ctx context.Context, user string, args []string, stdout, stderr io.Writer) int {
	fmt.Fprintf(stdout, "ran %s for %s\n", strings.Join(args, " "), user)
	return 0
}

func (m *probeScreen) Init() tea.Cmd { return nil }
func (m *probeScreen) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		time.Sleep(m.app.slowResize)
		m.w, m.h = msg.Width, msg.Height
		if m.app.sizes != nil {
			select {
			case m.app.sizes <- [2]int{msg.Width, msg.Height}:
			default:
			}
		}
	case probeShutdown:
		if m.app.shutdowns != nil {
			m.app.shutdowns <- m.user
		}
		return m, tea.Quit
	case tea.KeyMsg:
		switch msg.String() {
		case "q":
			return m, tea.Quit
		case "f":
			m.fill = true
		}
		m.keys++
	}
	return m, nil
}

func (m *probeScreen) View() string {
	head := fmt.Sprintf("PROBE user=%s size=%dx%d keys=%d\n", m.user, m.w, m.h, m.keys)
	if !m.fill || m.w <= 0 || m.h <= 2 {
		return head
	}
	row := strings.Repeat(string(rune('a'+m.keys%26)), m.w) + "\n"
	return head + strings.Repeat(row, m.h-2)
}

func withApp(a App) func(*Config) { return func(c *Config) { c.App = a } }

// A client announcing a 10000x10000 terminal gets a workbench drawn at
// MaxColumns x MaxRows, at connect and on every resize.
func TestHugeTerminalIsClamped(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	app := &probeApp{sizes: make(chan [2]int, 16)}
	f := startServerWith(t, t.TempDir(), withApp(app), ada.Line)
	c := login(t, f.addr, "ada", ada)
	s, err := c.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	out := &servetest.Buffer{}
	s.Stdout = out
	if err := s.RequestPty("xterm", 10000, 10000, gossh.TerminalModes{}); err != nil {
		t.Fatal(err)
	}
	if err := s.Shell(); err != nil {
		t.Fatal(err)
	}
	want := fmt.Sprintf("size=%dx%d", MaxColumns, MaxRows)
	waitFor(t, out, want)
	if err := s.WindowChange(65535, 65535); err != nil {
		t.Fatal(err)
	}
	if err := s.WindowChange(20, 30); err != nil {
		t.Fatal(err)
	}
	waitFor(t, out, "size=30x20")
	for {
		select {
		case sz := <-app.sizes:
			if sz[0] > MaxColumns || sz[1] > MaxRows {
				t.Errorf("the model saw %dx%d, beyond %dx%d", sz[0], sz[1], MaxColumns, MaxRows)
			}
			continue
		default:
		}
		break
	}
}

// 2000 window changes while the program is slow and its frames are large,
// then `q`: the key is processed, the connection ends and its slot is free
// again (the request loop never waits on the program).
func TestResizeStormThenQuit(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	app := &probeApp{slowResize: 3 * time.Millisecond}
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.App = app; c.MaxConnections = 1 }, ada.Line)
	is := openInteractive(t, f.addr, "ada", ada)
	waitFor(t, is.out, "PROBE user=ada")
	fmt.Fprint(is.in, "f")
	waitFor(t, is.out, "keys=1")
	for i := range 2000 {
		if err := is.sess.WindowChange(50+i%50, 150+i%150); err != nil {
			t.Fatalf("window change %d: %v", i, err)
		}
	}
	fmt.Fprint(is.in, "q")
	done := make(chan error, 1)
	go func() { done <- is.sess.Wait() }()
	select {
	case <-done:
	case <-time.After(20 * time.Second):
		t.Fatal("after a resize storm, q was not processed within 20 s")
	}
	// The slot is free: a new workbench opens with a cap of 1.
	reopen(t, f, "ada", ada, "PROBE user=ada")
}

// A client that stops reading is cut off after the write timeout, with no
// idle timeout configured, and its slot is freed.
func TestStalledClientIsClosed(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	app := &probeApp{}
	f := startServerWith(t, t.TempDir(), func(c *Config) {
		c.App, c.MaxConnections, c.IdleTimeout, c.WriteTimeout = app, 1, 0, 300*time.Millisecond
	}, ada.Line)
	c := login(t, f.addr, "ada", ada)
	s, err := c.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.StdoutPipe(); err != nil { // never read
		t.Fatal(err)
	}
	in, err := s.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := s.RequestPty("xterm", MaxRows, MaxColumns, gossh.TerminalModes{}); err != nil {
		t.Fatal(err)
	}
	if err := s.Shell(); err != nil {
		t.Fatal(err)
	}
	// Each key redraws the whole screen (MaxColumns x MaxRows, 125 kB):
	// 40 of them overflow the client's 2 MB window.
	for range 40 {
		fmt.Fprint(in, "f")
		time.Sleep(20 * time.Millisecond)
	}
	done := make(chan error, 1)
	go func() { done <- s.Wait() }()
	select {
	case <-done:
	case <-time.After(15 * time.Second):
		t.Fatal("a client that reads nothing kept its connection 15 s with a 300 ms write timeout")
	}
	if !strings.Contains(f.logs.String(), "took no output") {
		t.Errorf("the write timeout is not logged:\n%s", f.logs.String())
	}
	reopen(t, f, "ada", ada, "PROBE user=ada")
}

// The idle watchdog closes a connection on which no byte moves, even when
// nothing reads or writes the socket (no deadline can fire then).
func TestIdleWatchdog(t *testing.T) {
	a, b := net.Pipe()
	defer b.Close()
	var fired atomic.Bool
	// A wide margin between the writes (60 ms) and the idle time (1 s):
	// a loaded machine (the race detector, other tests) delayed a write
	// past 150 ms once.
	c := watchIdle(a, time.Second, func() { fired.Store(true) })
	// Traffic keeps it open.
	go func() { _, _ = io.Copy(io.Discard, b) }()
	for range 25 {
		if _, err := c.Write([]byte("x")); err != nil {
			t.Fatalf("closed while busy: %v", err)
		}
		time.Sleep(60 * time.Millisecond)
	}
	if fired.Load() {
		t.Fatal("closed while busy")
	}
	deadline := time.Now().Add(5 * time.Second)
	for !fired.Load() && time.Now().Before(deadline) {
		time.Sleep(10 * time.Millisecond)
	}
	if !fired.Load() {
		t.Fatal("an idle connection was not closed")
	}
	if _, err := c.Write([]byte("x")); err == nil {
		t.Error("write on a closed idle connection succeeded")
	}
}

// The idle timeout frees a slot held by a connection that sends nothing.
func TestIdleTimeoutFreesSlot(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.MaxConnections, c.IdleTimeout = 1, 500*time.Millisecond }, ada.Line)
	first := openInteractive(t, f.addr, "ada", ada)
	waitFor(t, first.out, "WORKBENCH user=ada")
	done := make(chan error, 1)
	go func() { done <- first.sess.Wait() }()
	select {
	case <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("idle connection not closed")
	}
	reopen(t, f, "ada", ada, "WORKBENCH user=ada")
}

// reopen opens a workbench until it shows want (the slot of a connection
// that just ended is freed a moment after the client sees the end).
func reopen(t *testing.T, f *fixture, user string, k servetest.Key, want string) {
	t.Helper()
	deadline := time.Now().Add(5 * time.Second)
	for {
		is := openInteractive(t, f.addr, user, k)
		time.Sleep(300 * time.Millisecond)
		if strings.Contains(is.out.String(), want) {
			return
		}
		is.close()
		if time.Now().After(deadline) {
			t.Fatalf("no workbench within 5 s:\n%s", f.logs.String())
		}
	}
}

func TestAgentForwardingRefused(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServer(t, t.TempDir(), ada.Line)
	c := login(t, f.addr, "ada", ada)
	s := openSession(t, c)
	for _, req := range []string{"auth-agent-req@openssh.com", "x11-req"} {
		ok, err := s.SendRequest(req, true, nil)
		if err != nil {
			t.Fatal(err)
		}
		if ok {
			t.Errorf("%s accepted", req)
		}
	}
	if !strings.Contains(f.logs.String(), "request refused: agent forwarding") {
		t.Errorf("agent forwarding refusal not logged:\n%s", f.logs.String())
	}
	// Port forwarding, both ways.
	if _, err := c.Dial("tcp", "127.0.0.1:1"); err == nil {
		t.Error("local port forwarding accepted")
	}
	if l, err := c.Listen("tcp", "127.0.0.1:0"); err == nil {
		l.Close()
		t.Error("remote port forwarding accepted")
	}
}

func TestConnectionCapRefusalLogged(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.MaxConnections = 1 }, ada.Line)
	first := openInteractive(t, f.addr, "ada", ada)
	waitFor(t, first.out, "WORKBENCH user=ada")
	c := login(t, f.addr, "ada", ada)
	s, err := c.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	var errb bytes.Buffer
	s.Stderr = &errb
	if err := s.Run("sessions list"); err == nil {
		t.Error("a second connection beyond a cap of 1 ran")
	}
	if !strings.Contains(errb.String(), "limit of 1") {
		t.Errorf("refusal message %q", errb.String())
	}
	if !strings.Contains(f.logs.String(), "connection refused: at the connection cap") {
		t.Errorf("cap refusal not logged:\n%s", f.logs.String())
	}
}

// collect receives up to n values from ch within d.
func collect(ch <-chan string, n int, d time.Duration) []string {
	var out []string
	timeout := time.After(d)
	for len(out) < n {
		select {
		case u := <-ch:
			out = append(out, u)
		case <-timeout:
			return out
		}
	}
	return out
}
