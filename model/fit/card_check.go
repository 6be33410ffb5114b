package fit

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"junco/physics"
	"junco/physics/extract"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// SimulatorProgram is the circuit simulator the card check runs (batch
// mode, "-b"): the open-source SPICE engine Debian packages.
const SimulatorProgram = "ngspice"

// ErrNoSimulator means SimulatorProgram is not installed (not on PATH).
var ErrNoSimulator = errors.New(SimulatorProgram + " is not installed (not found on PATH): the card was not run in a simulator; install it (Debian: apt-get install ngspice) for --check")

// Pass thresholds of the card check.
const (
	CheckMaxRMSLog = 0.05 // rms of ln(I_sim/I_meas) over the fitted window
	CheckMaxCVRel  = 0.03 // largest |C_sim/(C_meas - Cpar) - 1| at reverse bias
	// checkTimeout bounds one simulator run.
	checkTimeout = 60 * time.Second
	// checkMaxOutput bounds the simulator output read (bytes).
	checkMaxOutput = 8 << 20
	// checkMaxPoints bounds the biases simulated per sweep: a longer
	// sweep is thinned to every k-th point (ends kept).
	checkMaxPoints = 500
)

// CardCheckIV is the simulated forward I-V of one sweep.
type CardCheckIV struct {
	File         string
	TemperatureK float64
	Reference    bool
	VoltageV     []float64
	MeasuredA    []float64
	SimulatedA   []float64
	RMSLog       float64 // rms of ln(I_sim/I_meas)
	Pass         bool    // RMSLog < CheckMaxRMSLog
}

// CardCheckCV is the simulated small-signal capacitance at the reverse
// biases of the C-V sweep (AC analysis at 1 MHz), against the measured
// capacitance less the fixture capacitance Cpar.
type CardCheckCV struct {
	VoltageV   []float64
	MeasuredF  []float64 // C_meas - Cpar
	SimulatedF []float64
	MaxRel     float64 // largest |C_sim/(C_meas - Cpar) - 1|
	RMSRel     float64
	Pass       bool // MaxRel <= CheckMaxCVRel
}

// CardCheckBV is the simulated reverse current at -BV against IBV.
type CardCheckBV struct {
	BiasV, IBV, SimulatedA float64
}

// CardCheckTT is the storage time of the card in a transient analysis:
// the diode driven by a current step from ForwardA to -ReverseA, storage
// ending when the junction voltage crosses 0 (the stored charge TT I is
// gone). Reported, not judged: the card's depletion charge lengthens it.
type CardCheckTT struct {
	ForwardA, ReverseA    float64
	MeasuredS, SimulatedS float64
}

// CardCheck is the result of running a card in the simulator.
type CardCheck struct {
	Deck string // the element checked: "model" or "subckt"
	IV   []CardCheckIV
	CV   *CardCheckCV
	BV   *CardCheckBV
	TT   *CardCheckTT
	Pass bool // every IV and the CV pass
}

// SimulatorInstalled reports whether SimulatorProgram is on PATH.
func SimulatorInstalled() bool {
	_, err := exec.LookPath(SimulatorProgram)
	return err == nil
}

// CheckCard runs the card (the subcircuit when there is one, else the
// .model line) in SimulatorProgram in batch mode: a DC operating point at
// every forward bias of each I-V sweep's fitted window (at most
// checkMaxPoints per sweep, evenly thinned), at that sweep's
// temperature (.options temp in degC), compared by the rms of
// ln(I_sim/I_meas); an AC analysis at 1 MHz at every reverse bias of the
// C-V sweep, the capacitance |Im(I)|/(2 pi f) compared with C_meas - Cpar;
// and the current at -BV when the card has BV. ErrNoSimulator when the
// program is not installed.
func CheckCard(ctx context.Context, r *CardResult) (*CardCheck, error) {
	if !SimulatorInstalled() {
		return nil, ErrNoSimulator
	}
	dir, err := os.MkdirTemp("", "junco-card-")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(dir)
	chk := &CardCheck{Deck: "model", Pass: true}
	element := "D1 a 0 " + r.Name
	netlist := r.Card
	if r.Subckt != "" {
		chk.Deck, element, netlist = "subckt", "X1 a 0 "+r.Name, r.Subckt
	}
	for k, c := range r.Curves {
		vs, is := forwardIn(c.DataSet, c.Window)
		vs, is = thin(vs, is)
		if len(vs) == 0 {
			continue
		}
		sim, err := runOps(ctx, dir, fmt.Sprintf("iv%d", k), netlist, element, c.Temperature.K, vs)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", c.File, err)
		}
		out := CardCheckIV{File: c.File, TemperatureK: c.Temperature.K, Reference: c.Reference, VoltageV: vs, MeasuredA: is, SimulatedA: sim}
		ss := 0.0
		for j := range vs {
			l := math.Log(sim[j] / is[j])
			if math.IsNaN(l) {
				l = math.Inf(1)
			}
			ss += l * l
		}
		out.RMSLog = math.Sqrt(ss / float64(len(vs)))
		out.Pass = out.RMSLog < CheckMaxRMSLog
		chk.Pass = chk.Pass && out.Pass
		chk.IV = append(chk.IV, out)
	}
	tnom := r.Diode.TNOMK
	if r.Junction != nil && r.CVData != nil {
		var vs, cs []float64
		for k, v := range r.CVData.VoltageV {
			if v <= 0 && physics.Finite(v) && r.CVData.CapacitanceF[k] > 0 {
				vs = append(vs, v)
				cs = append(cs, r.CVData.CapacitanceF[k]-r.Junction.ParasiticCapacitanceF)
			}
		}
		vs, cs = thin(vs, cs)
		if len(vs) > 0 {
			sim, err := runAC(ctx, dir, netlist, element, tnom, vs)
			if err != nil {
				return nil, fmt.Errorf("C-V: %w", err)
			}
			out := &CardCheckCV{VoltageV: vs, MeasuredF: cs, SimulatedF: sim}
			ss := 0.0
			for j := range vs {
				e := sim[j]/cs[j] - 1
				out.MaxRel = math.Max(out.MaxRel, math.Abs(e))
				ss += e * e
			}
			out.RMSRel = math.Sqrt(ss / float64(len(vs)))
			out.Pass = out.MaxRel <= CheckMaxCVRel
			chk.Pass = chk.Pass && out.Pass
			chk.CV = out
		}
	}
	if p, ok := r.Param("BV"); ok {
		ibv, _ := r.Param("IBV")
		sim, err := runOps(ctx, dir, "bv", netlist, element, tnom, []float64{-p.Value})
		if err != nil {
			return nil, fmt.Errorf("breakdown: %w", err)
		}
		chk.BV = &CardCheckBV{BiasV: -p.Value, IBV: ibv.Value, SimulatedA: -sim[0]}
	}
	if _, ok := r.Param("TT"); ok && r.Recovery != nil {
		rc := r.Recovery
		ts, err := runStorage(ctx, dir, netlist, element, tnom, rc.ForwardA, rc.ReverseA, rc.StorageS)
		if err != nil {
			return nil, fmt.Errorf("recovery: %w", err)
		}
		chk.TT = &CardCheckTT{ForwardA: rc.ForwardA, ReverseA: rc.ReverseA, MeasuredS: rc.StorageS, SimulatedS: ts}
	}
	return chk, nil
}

// runStorage returns the storage time (s) of the element driven from node
// a by a current step from iF to -iR at 10 ts0: the time from the step to
// the fall of V(a) through 0, by a transient with steps of ts0/500.
func runStorage(ctx context.Context, dir, netlist, element string, tempK, iF, iR, ts0 float64) (float64, error) {
	td := 10 * ts0
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 8, 64) }
	src := fmt.Sprintf("I1 0 a PULSE(%s %s %s %s %s 1 2)", g(iF), g(-iR), g(td), g(ts0/1000), g(ts0/1000))
	text := deck(netlist, element, tempK, []string{"tran " + g(ts0/500) + " " + g(td+10*ts0), "meas tran tz when v(a)=0 fall=1", "print tz"})
	// The source is a current step, not V1.
	text = strings.Replace(text, "V1 a 0 dc 0 ac 1", src, 1)
	out, err := runDeck(ctx, filepath.Join(dir, "tt.cir"), text, "tz =", 1, 1)
	if err != nil {
		return 0, err
	}
	return out[0] - td, nil
}

// thin keeps at most checkMaxPoints of the points, evenly spread, the
// first and last included.
func thin(x, y []float64) ([]float64, []float64) {
	n := len(x)
	if n <= checkMaxPoints {
		return x, y
	}
	var a, b []float64
	for k := 0; k < checkMaxPoints; k++ {
		j := k * (n - 1) / (checkMaxPoints - 1)
		a, b = append(a, x[j]), append(b, y[j])
	}
	return a, b
}

// deck writes a batch deck: the netlist, a source V1 from a to 0, the
// element, the temperature and the control lines.
func deck(netlist, element string, tempK float64, control []string) string {
	var b strings.Builder
	b.WriteString("* model-card check written by junco\n")
	b.WriteString(netlist)
	b.WriteString("\nV1 a 0 dc 0 ac 1\n")
	b.WriteString(element)
	// The card's own conversion: a sweep at the reference temperature runs at TNOM exactly.
	fmt.Fprintf(&b, "\n.options temp=%s\n.control\nset noaskquit\n", strconv.FormatFloat(extract.TNOMCelsius(tempK), 'f', 6, 64))
	for _, c := range control {
		b.WriteString(c)
		b.WriteByte('\n')
	}
	b.WriteString("quit 0\n.endc\n.end\n")
	return b.String()
}

// runOps returns the current into the element (A, forward positive) at
// each bias by an operating point per bias.
func runOps(ctx context.Context, dir, tag, netlist, element string, tempK float64, vs []float64) ([]float64, error) {
	var ctl []string
	for _, v := range vs {
		ctl = append(ctl, "alter V1 dc = "+strconv.FormatFloat(v, 'g', 10, 64), "op", "print -i(V1)")
	}
	return runDeck(ctx, filepath.Join(dir, tag+".cir"), deck(netlist, element, tempK, ctl), "-i(v1) =", len(vs), 1)
}

// runAC returns the small-signal capacitance (F) at each bias from an AC
// analysis at 1 MHz: C = |Im I(V1)|/(2 pi f).
func runAC(ctx context.Context, dir, netlist, element string, tempK float64, vs []float64) ([]float64, error) {
	const f = 1e6
	var ctl []string
	for _, v := range vs {
		ctl = append(ctl, "alter V1 dc = "+strconv.FormatFloat(v, 'g', 10, 64), "ac lin 1 1meg 1meg", "print imag(i(V1))")
	}
	out, err := runDeck(ctx, filepath.Join(dir, "cv.cir"), deck(netlist, element, tempK, ctl), "imag(i(v1)) =", len(vs), 1)
	if err != nil {
		return nil, err
	}
	for k := range out {
		out[k] = math.Abs(out[k]) / (2 * math.Pi * f)
	}
	return out, nil
}

// runDeck writes the deck to path, runs the simulator on it in batch mode
// and returns the number after each line starting with prefix (scaled by
// scale); exactly want of them are required.
func runDeck(ctx context.Context, path, text, prefix string, want int, scale float64) ([]float64, error) {
	if err := os.WriteFile(path, []byte(text), 0o600); err != nil {
		return nil, err
	}
	cctx, cancel := context.WithTimeout(ctx, checkTimeout)
	defer cancel()
	cmd := exec.CommandContext(cctx, SimulatorProgram, "-b", path)
	cmd.Dir = filepath.Dir(path)
	var out limitedBuffer
	out.max = checkMaxOutput
	cmd.Stdout, cmd.Stderr = &out, &out
	err := cmd.Run()
	if cctx.Err() != nil {
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		return nil, fmt.Errorf("%s did not finish within %s", SimulatorProgram, checkTimeout)
	}
	if err != nil {
		return nil, fmt.Errorf("%s failed: %v: %s", SimulatorProgram, err, lastLines(out.String(), 5))
	}
	var vals []float64
	for _, line := range strings.Split(out.String(), "\n") {
		line = strings.TrimSpace(line)
		if !strings.HasPrefix(strings.ToLower(line), prefix) {
			continue
		}
		x, err := strconv.ParseFloat(strings.TrimSpace(line[len(prefix):]), 64)
		if err != nil {
			return nil, fmt.Errorf("%s printed %q: %v", SimulatorProgram, line, err)
		}
		vals = append(vals, x*scale)
	}
	if len(vals) != want {
		return nil, fmt.Errorf("%s printed %d values, %d expected: %s", SimulatorProgram, len(vals), want, lastLines(out.String(), 5))
	}
	return vals, nil
}

func lastLines(s string, n int) string {
	ls := strings.Split(strings.TrimSpace(s), "\n")
	if len(ls) > n {
		ls = ls[len(ls)-n:]
	}
	return strings.Join(ls, " | ")
}

// limitedBuffer keeps at most max bytes and drops the rest.
type limitedBuffer struct {
	bytes.Buffer
	max int
}

func (b *limitedBuffer) Write(p []byte) (int, error) {
	if room := b.max - b.Len(); room < len(p) {
		if room > 0 {
			b.Buffer.Write(p[:room])
		}
		return len(p), nil
	}
	return b.Buffer.Write(p)
}
