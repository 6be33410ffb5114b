package tui

import (
	"fmt"
	"math/rand/v2"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
)

// TestRandomKeysNeverPanic feeds a fixed pseudo-random sequence of keys
// and window sizes (zero and tiny sizes included) and checks that the
// workbench neither panics nor draws an empty screen.
func TestRandomKeysNeverPanic(t *testing.T) {
	named := []tea.KeyType{tea.KeyEnter, tea.KeyTab, tea.KeyShiftTab, tea.KeyEsc, tea.KeyUp, tea.KeyDown,
		tea.KeyLeft, tea.KeyRight, tea.KeyBackspace, tea.KeyDelete, tea.KeyHome, tea.KeyEnd, tea.KeyPgUp,
		tea.KeyPgDown, tea.KeyCtrlU, tea.KeyCtrlK, tea.KeyCtrlW, tea.KeyCtrlA, tea.KeyCtrlE, tea.KeySpace,
		tea.KeyCtrlS, tea.KeyCtrlO, tea.KeyF1}
	const runes = "0123456789.-+eEkKmMuµ VvCcAa?qynpuxhjklr[]gG/^~éSndmcr "
	sizes := [][2]int{{0, 0}, {1, 1}, {5, 3}, {39, 11}, {40, 12}, {60, 16}, {80, 24}, {100, 30}, {120, 40}, {160, 44}, {200, 60}, {250, 80}}
	// Seeds 4 and 5 work with a session store (save dialogs, the browser,
	// history, diffs, restores, drafts); seed 6 reviews a session.
	st := goldenStore(t)
	screens := map[string]bool{}
	for _, seed := range []uint64{1, 2, 3, 4, 5, 6} {
		rng := rand.New(rand.NewPCG(seed, 2024))
		o := Options{Renderer: plainRenderer(), ASCII: seed == 3}
		switch seed {
		case 4, 5:
			o.Store, o.User, o.Now = st, "alice", ticking()
			if seed == 5 {
				o.Session = "d7-lot417"
			}
		case 6:
			var added, copies []string
			o = reviewOpts(&added, &copies, st)
			o.Renderer = plainRenderer()
		}
		var m tea.Model = New(o)
		step := 0
		defer func() {
			if r := recover(); r != nil {
				t.Fatalf("seed %d, step %d: panic: %v", seed, step, r)
			}
		}()
		for step = 0; step < 700; step++ {
			var msg tea.Msg
			switch p := rng.IntN(100); {
			case p < 3 && o.Store != nil:
				// A burst into the browser and the revisions, then a
				// random key there.
				for _, k := range []tea.KeyMsg{{Type: tea.KeyCtrlO}, {Type: tea.KeyCtrlU}, {Type: tea.KeyTab}} {
					m, _ = m.Update(k)
				}
				msg = tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{[]rune("dcrm dcrm")[rng.IntN(9)]}}
			case p < 4:
				s := sizes[rng.IntN(len(sizes))]
				msg = tea.WindowSizeMsg{Width: s[0], Height: s[1]}
			case p < 45:
				msg = tea.KeyMsg{Type: named[rng.IntN(len(named))]}
			case p < 47:
				rs := []rune(runes)
				n := 1 + rng.IntN(30)
				paste := make([]rune, n)
				for i := range paste {
					paste[i] = rs[rng.IntN(len(rs))]
				}
				msg = tea.KeyMsg{Type: tea.KeyRunes, Runes: paste, Paste: true}
			default:
				rs := []rune(runes)
				msg = tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{rs[rng.IntN(len(rs))]}}
			}
			m, _ = m.Update(msg)
			if v := m.View(); v == "" {
				t.Fatalf("seed %d, step %d (%v): empty view", seed, step, fmt.Sprint(msg))
			}
			screens[shown(m.(Model))] = true
		}
	}
	// The run must have reached the session screens, or it tested little.
	for _, s := range []string{"dialog", "browse", "history", "diff", "confirm", "quit", "help"} {
		if !screens[s] {
			t.Errorf("the random keys never reached screen %s", s)
		}
	}
}

// randomMsgs draws the messages of a random-keys test from a fixed seed:
// of 100 draws, 5 are a terminal size of sizes, those up to namedBelow a
// named key, the rest one rune of runes.
type randomMsgs struct {
	rng        *rand.Rand
	named      []tea.KeyType
	runes      string
	sizes      [][2]int
	namedBelow int
}

// next returns the draw p (0 to 99) and its message.
func (r randomMsgs) next() (int, tea.Msg) {
	p := r.rng.IntN(100)
	switch {
	case p < 5:
		s := r.sizes[r.rng.IntN(len(r.sizes))]
		return p, tea.WindowSizeMsg{Width: s[0], Height: s[1]}
	case p < r.namedBelow:
		return p, tea.KeyMsg{Type: r.named[r.rng.IntN(len(r.named))]}
	}
	rs := []rune(r.runes)
	return p, tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{rs[r.rng.IntN(len(rs))]}}
}

// Random keys on the batch screen (with a finished batch shown) never
// panic and always draw.
func TestBatchRandomKeys(t *testing.T) {
	dir := writeBatchDir(t, 2)
	m := newTest(t, 80, 24)
	m = press(m, "B")
	m = typeText(m, dir)
	m = press(m, "enter")
	r := randomMsgs{rng: rand.New(rand.NewPCG(3, 5)), named: []tea.KeyType{tea.KeyLeft, tea.KeyRight, tea.KeyBackspace, tea.KeyDelete, tea.KeyHome, tea.KeyEnd,
		tea.KeyCtrlU, tea.KeyCtrlW, tea.KeySpace, tea.KeyUp, tea.KeyDown, tea.KeyTab, tea.KeyPgDown},
		runes: "abcBf/.-_09 é", sizes: [][2]int{{0, 0}, {1, 1}, {20, 5}, {40, 12}, {80, 24}, {200, 60}}, namedBelow: 50}
	for step := 0; step < 400; step++ {
		_, msg := r.next()
		tm, _ := m.Update(msg)
		m = tm.(Model)
		if shown(m) != "batch" {
			t.Fatalf("step %d: left the screen", step)
		}
		if m.w > 0 && m.h > 0 && m.View() == "" {
			t.Fatalf("step %d: empty view", step)
		}
	}
}

// TestMeasureScreensRandomKeys feeds random keys and sizes to the import
// and fit screens: no panic, never an empty view.
func TestMeasureScreensRandomKeys(t *testing.T) {
	path := writeIV(t, "diode.csv")
	r := randomMsgs{rng: rand.New(rand.NewPCG(11, 5)), named: []tea.KeyType{tea.KeyEnter, tea.KeyTab, tea.KeyShiftTab, tea.KeyEsc, tea.KeyLeft, tea.KeyRight,
		tea.KeyBackspace, tea.KeyDelete, tea.KeyPgUp, tea.KeyPgDown, tea.KeyCtrlU, tea.KeySpace},
		runes: "0123456789.-:mVife ", sizes: [][2]int{{0, 0}, {5, 3}, {40, 12}, {60, 16}, {80, 24}, {99, 30}, {100, 30}, {160, 44}}, namedBelow: 45}
	m := newTest(t, 80, 24)
	m = importInto(t, m, path)
	m = press(m, "f")
	for step := 0; step < 400; step++ {
		// Now and then, from the panels, the import of the file again.
		p, msg := r.next()
		if p >= 5 && p < 10 && shown(m) == "main" {
			if m = press(m, "i"); shown(m) == "import" {
				importOf(m).ed.set(path)
				m = press(m, "enter")
			}
			continue
		}
		tm, _ := m.Update(msg)
		m = tm.(Model)
		if m.View() == "" {
			t.Fatalf("step %d: empty view", step)
		}
	}
}

// Random keys and sizes on the C-V screen do not panic and always draw.
func TestCVFitRandomKeys(t *testing.T) {
	m := withSpec(bare(newTest(t, 120, 40)), cvTestSpec())
	m = importInto(t, m, writeCV(t, "cv.csv"))
	m = press(m, "f")
	if shown(m) != "cvfit" {
		t.Fatalf("no C-V screen:\n%s", plain(m))
	}
	r := randomMsgs{rng: rand.New(rand.NewPCG(7, 7)), named: []tea.KeyType{tea.KeyEnter, tea.KeyTab, tea.KeyShiftTab, tea.KeyBackspace, tea.KeyLeft, tea.KeyRight,
		tea.KeyPgUp, tea.KeyPgDown, tea.KeyCtrlK, tea.KeyCtrlU, tea.KeyHome, tea.KeyEnd, tea.KeyDelete},
		runes: "-0123456789.eEmuVk xq", sizes: [][2]int{{120, 40}, {80, 24}, {40, 12}, {10, 5}, {200, 60}}, namedBelow: 40}
	for step := 0; step < 300; step++ {
		_, msg := r.next()
		tm, _ := m.Update(msg)
		m = tm.(Model)
		if m.View() == "" {
			t.Fatalf("step %d: empty view", step)
		}
		if shown(m) != "cvfit" {
			m = press(m, "f")
		}
	}
}

// Random keys on the map and in a die's fit (arrows, enter, [ ], w, tab,
// letters, sizes) never panic, keep the screen and always draw.
func TestBatchMapRandomKeys(t *testing.T) {
	m := newTest(t, 100, 30)
	m = press(m, "B")
	m = typeText(m, waferDir)
	m = press(m, "enter")
	rng := rand.New(rand.NewPCG(9, 4))
	keys := []string{"up", "down", "left", "right", "enter", "[", "]", "w", "tab", "h", "j", "k", "l", "x", "1"}
	sizes := [][2]int{{0, 0}, {1, 1}, {20, 5}, {40, 12}, {80, 24}, {200, 60}}
	for step := 0; step < 500; step++ {
		var msg tea.Msg = keyMsg(keys[rng.IntN(len(keys))])
		if rng.IntN(20) == 0 {
			s := sizes[rng.IntN(len(sizes))]
			msg = tea.WindowSizeMsg{Width: s[0], Height: s[1]}
		}
		tm, cmd := m.Update(msg)
		m = drain(tm.(Model), cmd)
		if shown(m) != "batch" {
			t.Fatalf("step %d: left the screen", step)
		}
		if m.w > 0 && m.h > 0 && m.View() == "" {
			t.Fatalf("step %d: empty view", step)
		}
	}
}
