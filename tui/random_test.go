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
