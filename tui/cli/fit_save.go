package cli

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"junco/model"
	"junco/model/measure"
	"junco/physics/extract"
	"junco/sessions"
)

// fitSaveItem is one fitted data set to store in a session (--save-to):
// the imported data set, its kind prefix for the measurement ID ("iv",
// "cv") and the extractions made from it. The extractions' IDs and
// measurement IDs are filled in when the item is appended to a document.
type fitSaveItem struct {
	prefix      string
	ds          *measure.DataSet
	extractions []sessions.Extraction
}

// fitSaveCheckName checks the --save-to session name before any fitting,
// so that a bad name fails at once and nothing is fitted for nothing.
func fitSaveCheckName(cmd, name string) error {
	if err := sessions.ValidateName(name); err != nil {
		return fitBad("junco fit %s: --save-to %q: %v", cmd, name, err)
	}
	return nil
}

// fitSaveParam returns a parameter for a finite value (ok false
// otherwise); a standard error that is not finite or negative is stored
// as null (not estimated).
func fitSaveParam(name, unit string, v, se float64) (sessions.Parameter, bool) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return sessions.Parameter{}, false
	}
	p := sessions.Parameter{Name: name, Unit: unit, Value: v}
	if !math.IsNaN(se) && !math.IsInf(se, 0) && se >= 0 {
		p.StdError = &se
	}
	return p, true
}

// fitSaveParams builds parameters from (name, unit, value, stderr) rows;
// values that are not finite (an infinite shunt resistance: no shunt
// path) are left out with a note saying so.
func fitSaveParams(rows []fitSaveRow) ([]sessions.Parameter, []string) {
	var ps []sessions.Parameter
	var notes []string
	for _, r := range rows {
		p, ok := fitSaveParam(r.name, r.unit, r.v, r.se)
		if !ok {
			why := "not determined"
			if math.IsInf(r.v, 1) {
				why = "infinite (no measurable path)"
			}
			notes = append(notes, fmt.Sprintf("%s not stored: %s", r.name, why))
			continue
		}
		ps = append(ps, p)
	}
	return ps, notes
}

type fitSaveRow struct {
	name, unit string
	v, se      float64
}

// fitIVSaveItem turns a successful I-V fit into a session item.
func fitIVSaveItem(r *fitIVReport, now time.Time) fitSaveItem {
	f := r.fit
	var rows []fitSaveRow
	method := "iv-single-diode"
	if f.Model == extract.ModelDouble {
		method = "iv-double-diode"
		d, s := f.Double, f.DoubleStdErr
		rows = []fitSaveRow{
			{"Is1", "A", d.DiffusionCurrentA, s.DiffusionCurrentA},
			{"Is2", "A", d.RecombinationCurrentA, s.RecombinationCurrentA},
			{"Rs", "ohm", d.SeriesResistanceOhm, s.SeriesResistanceOhm},
			{"Rsh", "ohm", d.ShuntResistanceOhm, s.ShuntResistanceOhm},
		}
	} else {
		d, s := f.Single, f.SingleStdErr
		rows = []fitSaveRow{
			{"Is", "A", d.SaturationCurrentA, s.SaturationCurrentA},
			{"n", "", d.IdealityFactor, s.IdealityFactor},
			{"Rs", "ohm", d.SeriesResistanceOhm, s.SeriesResistanceOhm},
			{"Rsh", "ohm", d.ShuntResistanceOhm, s.ShuntResistanceOhm},
		}
	}
	ps, skipped := fitSaveParams(rows)
	notes := []string{
		fmt.Sprintf("window %g V to %g V, %d points used (%d skipped)", f.UsedWindow.MinV, f.UsedWindow.MaxV, f.Points, f.Skipped),
		fmt.Sprintf("rms log residual %.4g", f.RMSLogResidual),
		fmt.Sprintf("temperature %g K (%s)", f.TemperatureK, r.TemperatureSource),
	}
	if f.Model == extract.ModelDouble {
		notes = append(notes, "ideality factors fixed: 1 for Is1, 2 for Is2")
	}
	notes = append(notes, skipped...)
	notes = append(notes, fitSaveLines(r.Notes)...)
	return fitSaveItem{prefix: "iv", ds: r.ds, extractions: []sessions.Extraction{
		{Method: method, Performed: now.UTC(), Parameters: ps, Notes: notes},
	}}
}

// fitCVSaveItem turns a successful C-V analysis into a session item: the
// Mott-Schottky line, and the junction-capacitance fit when it succeeded.
func fitCVSaveItem(ds *measure.DataSet, r *fitCVReport, ms *extract.MottSchottkyResult, jf *extract.CVFit, now time.Time) fitSaveItem {
	common := []string{
		fmt.Sprintf("area %g m^2, material %s (permittivity %.4g F/m)", r.AreaM2, r.Material, r.PermittivityFPerM),
	}
	ps, skipped := fitSaveParams([]fitSaveRow{
		{"Vbi", "V", ms.BuiltInV, ms.StdErrV},
		{"N", "m^-3", ms.DopingM3, ms.StdErrM3},
	})
	notes := append([]string{
		fmt.Sprintf("window %g V to %g V, %d points used", ms.UsedWindow.MinV, ms.UsedWindow.MaxV, ms.Points),
		fmt.Sprintf("rms relative residual %.4g (of 1/C^2)", ms.RMSRelResidual),
	}, common...)
	notes = append(notes, skipped...)
	notes = append(notes, fitSaveLines(r.Notes)...)
	it := fitSaveItem{prefix: "cv", ds: ds, extractions: []sessions.Extraction{
		{Method: "mott-schottky", Performed: now.UTC(), Parameters: ps, Notes: notes},
	}}
	if jf != nil {
		p, s := jf.Params, jf.StdErr
		ps, skipped := fitSaveParams([]fitSaveRow{
			{"Cj0", "F", p.ZeroBiasCapacitanceF, s.ZeroBiasCapacitanceF},
			{"Vbi", "V", p.BuiltInPotentialV, s.BuiltInPotentialV},
			{"m", "", p.GradingCoefficient, s.GradingCoefficient},
			{"Cpar", "F", p.ParasiticCapacitanceF, s.ParasiticCapacitanceF},
		})
		notes := append([]string{
			"C = Cj0/(1 - V/Vbi)^m + Cpar",
			fmt.Sprintf("window %g V to %g V, %d points used", jf.UsedWindow.MinV, jf.UsedWindow.MaxV, jf.Points),
			fmt.Sprintf("rms relative residual %.4g", jf.RMSRelResidual),
		}, common...)
		notes = append(notes, skipped...)
		it.extractions = append(it.extractions, sessions.Extraction{Method: "cv-junction-capacitance", Performed: now.UTC(), Parameters: ps, Notes: notes})
	}
	return it
}

// fitSaveLines keeps notes on one line each (a session note is one line).
func fitSaveLines(in []string) []string {
	var out []string
	for _, n := range in {
		if n = strings.Join(strings.Fields(n), " "); n != "" {
			out = append(out, n)
		}
	}
	return out
}

// fitFreeID returns prefix-K for the smallest K >= 1 not in used, and
// marks it used.
func fitFreeID(prefix string, used map[string]bool) string {
	for k := 1; ; k++ {
		id := prefix + "-" + strconv.Itoa(k)
		if !used[id] {
			used[id] = true
			return id
		}
	}
}

// fitAppendItems adds the items to doc: each data set as a measurement
// under a free ID ("iv-1", "iv-2", ...) and its extractions under free
// IDs derived from it ("iv-1-fit-1", ...).
func fitAppendItems(doc *sessions.Document, items []fitSaveItem) []string {
	mids := map[string]bool{}
	for _, m := range doc.Measurements {
		mids[m.ID] = true
	}
	xids := map[string]bool{}
	for _, x := range doc.Extractions {
		xids[x.ID] = true
	}
	var added []string
	for _, it := range items {
		id := fitFreeID(it.prefix, mids)
		doc.Measurements = append(doc.Measurements, sessions.Measurement{ID: id, DataSet: *it.ds})
		for _, x := range it.extractions {
			x.ID = fitFreeID(id+"-fit", xids)
			x.Measurement = id
			doc.Extractions = append(doc.Extractions, x)
		}
		added = append(added, id)
	}
	return added
}

// fitSaveResult says what a --save-to stored.
type fitSaveResult struct {
	Revision     int
	Created      bool
	Measurements []string
}

// fitSaveToSession stores the items as the next revision of session name
// in the store at dataDir (default location when empty): the items are
// appended to the newest readable revision and saved on top of it; when
// another save came first, they are appended again to the new newest
// revision (sessions.Store.Update, the one save-with-retry of every front
// end). A session that does not exist is created with the default
// junction. Either the whole revision is stored or nothing.
func fitSaveToSession(dataDir, name string, items []fitSaveItem, now time.Time, stderr io.Writer) (fitSaveResult, error) {
	if err := sessions.ValidateName(name); err != nil {
		return fitSaveResult{}, err
	}
	if len(items) == 0 {
		return fitSaveResult{}, errors.New("no successful fit to store")
	}
	author := currentUser()
	st, err := openStore(dataDir, author, stderr)
	if err != nil {
		return fitSaveResult{}, err
	}
	var res fitSaveResult
	r, err := st.Update(name, func(doc *sessions.Document, rev int) (*sessions.Document, error) {
		if doc == nil {
			doc = sessions.NewDocument(name, author, model.DefaultSpec(), now)
		}
		res = fitSaveResult{Created: rev == 0, Measurements: fitAppendItems(doc, items)}
		return doc, nil
	})
	if err != nil {
		return fitSaveResult{}, err
	}
	res.Revision = r.Number
	return res, nil
}

// fitSaveReport runs fitSaveToSession for a fit subcommand and reports on
// stderr; it returns the exit code of the save (exitOK when stored).
func fitSaveReport(cmd, dataDir, name string, items []fitSaveItem, stderr io.Writer) int {
	if len(items) == 0 {
		fmt.Fprintf(stderr, "junco fit %s: --save-to %s: no fit succeeded; nothing saved\n", cmd, name)
		return exitFailure
	}
	res, err := fitSaveToSession(dataDir, name, items, time.Now(), stderr)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit %s: --save-to %s: %v; nothing saved\n", cmd, name, err)
		return exitFailure
	}
	if res.Created {
		fmt.Fprintf(stderr, "junco fit %s: session %s did not exist; created it with the default junction (%s)\n", cmd, name, fitDefaultJunction())
	}
	fmt.Fprintf(stderr, "saved as revision %d of session %s (data sets %s)\n", res.Revision, name, strings.Join(res.Measurements, ", "))
	return exitOK
}

// fitDefaultJunction describes model.DefaultSpec briefly.
func fitDefaultJunction() string {
	s := model.DefaultSpec()
	return fmt.Sprintf("%s %s, Na %g cm^-3, Nd %g cm^-3, %g K", s.Material, s.Profile, s.AcceptorDensity/1e6, s.DonorDensity/1e6, s.Temperature)
}
