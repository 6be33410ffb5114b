package tui

import (
	"fmt"
	"strings"
	"testing"

	"github.com/charmbracelet/x/exp/golden"

	"junco/model/fit"
)

// waferDir is the invented wafer of the command line's tests (files
// named by die position; see its README).
const waferDir = "cli/testdata/fit/wafermap"

// The batch screen with the wafer map beside the table, at 80x24, 120x40
// and 200x60: after the run, after walking two dies right and one down, and
// with a die's fit open; with the cursor on the failed die (its error
// whole; off the cursor it takes one line).
func TestGoldenBatchMap(t *testing.T) {
	cases := []struct {
		name string
		keys []string
	}{
		{"map", nil},
		{"walked", []string{"right", "down", "]"}},
		{"die", []string{"right", "down", "enter"}},
		{"failed", []string{"down", "down", "down"}},
	}
	for _, size := range goldenSizes {
		for _, c := range cases {
			t.Run(fmt.Sprintf("batch-%s-%dx%d", c.name, size[0], size[1]), func(t *testing.T) {
				m := newTest(t, size[0], size[1])
				m = press(m, "B")
				m = typeText(m, waferDir)
				m = press(m, "enter")
				m = press(m, c.keys...)
				golden.RequireEqual(t, []byte(plain(m)))
			})
		}
	}
}

// Arrows walk the dies of the map, enter opens the die's fit (the same
// values as its batch row), esc returns to the map, tab gives the keys
// back to the directory field.
func TestBatchMapWalk(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "B")
	m = typeText(m, waferDir)
	m = press(m, "enter")
	wm := batchOf(m).wm
	rows := batchOf(m).view.Rows
	if !wm.hasDies || !wm.focus {
		t.Fatalf("the map must take the keys after a run with die positions: %+v", wm)
	}
	die := func(m Model) fit.Die { return batchOf(m).view.Rows[batchOf(m).wm.cursor].Die }
	if d := die(m); d.X != 1 || d.Y != 0 {
		t.Fatalf("first die %+v, want x1 y0 (reading order)", d)
	}
	m = press(m, "right")
	if d := die(m); d.X != 2 || d.Y != 0 {
		t.Errorf("right: %+v, want x2 y0", d)
	}
	m = press(m, "down", "down", "right")
	if d := die(m); d.X != 3 || d.Y != 2 {
		t.Errorf("down down right: %+v, want x3 y2", d)
	}
	m = press(m, "right") // nothing further right: stays
	if d := die(m); d.X != 3 || d.Y != 2 {
		t.Errorf("right at the edge: %+v, want x3 y2", d)
	}
	m = press(m, "enter")
	d := batchOf(m).wm.die
	if d == nil || d.view == nil {
		t.Fatalf("enter must open the die's fit: %+v", d)
	}
	row := rows[batchOf(m).wm.cursor]
	// The die's fit is the batch's fit of the same file (one fit layer).
	if got, want := d.view.Fit.Single.SaturationCurrentA, row.Values[0]; got != want {
		t.Errorf("die fit Is %g, batch row %g", got, want)
	}
	if !strings.Contains(plain(m), "Die x3 y2") {
		t.Errorf("die view lacks its title:\n%s", plain(m))
	}
	m = press(m, "left")
	if d := batchOf(m).wm.die; d == nil || rows[d.row].Die.X != 2 {
		t.Errorf("left in the die's fit must follow to x2: %+v", d)
	}
	m = press(m, "esc")
	if batchOf(m).wm.die != nil || shown(m) != "batch" {
		t.Error("esc must close the die's fit, not the screen")
	}
	m = press(m, "tab")
	if batchOf(m).wm.focus {
		t.Error("tab must give the keys to the directory")
	}
	m = press(m, "tab")
	if !batchOf(m).wm.focus {
		t.Error("tab must give the keys back to the map")
	}
	m = press(m, "down", "down", "down", "enter") // x2 y3: die_x02_y03
	before := len(m.sess.meas)
	m = press(m, "f")
	if shown(m) != "fit" || len(m.sess.meas) != before+1 {
		t.Errorf("f must add the die to the session and open the fit: screen %v, %d data sets (before %d)", shown(m), len(m.sess.meas), before)
	}
	if !strings.Contains(plain(m), "esc returns to the batch") {
		t.Errorf("the note must say how to come back:\n%s", plain(m))
	}
	m = press(m, "esc")
	if shown(m) != "batch" || batchOf(m).wm.die != nil || batchOf(m).view == nil {
		t.Error("esc on the die's fit must come back to the batch's map below it")
	}
	m = press(m, "esc", "esc", "B")
	if shown(m) != "batch" || batchOf(m).view == nil {
		t.Error("B must show the last run again after the batch was closed")
	}
}

// ? on the wafer map opens the help over the batch (whose keys it lists),
// and esc comes back to the map; in the folder field ? is text.
func TestBatchMapHelpKey(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "B")
	m = typeText(m, waferDir)
	m = press(m, "enter", "?")
	if shown(m) != "help" {
		t.Fatalf("? on the map did not open the help: %s", shown(m))
	}
	m = press(m, "esc")
	if shown(m) != "batch" {
		t.Fatalf("esc from the help did not return to the batch: %s", shown(m))
	}
	m = press(m, "tab", "?")
	if shown(m) != "batch" || !strings.HasSuffix(batchOf(m).ed.value(), "?") {
		t.Errorf("? in the folder field: screen %s, field %q", shown(m), batchOf(m).ed.value())
	}
}
