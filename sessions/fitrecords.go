package sessions

import (
	"time"

	"junco/model/fit"
	"junco/physics"
)

// AppendFitRecords appends the records of one fit of measurement to extr
// as extractions performed at now, each under a new ID from fit.RecordID
// (MEASUREMENT-fit-K, never one in extr), and returns the longer slice and
// the IDs given. The record's finite parameters are stored; a standard
// error that is not finite or negative is stored as null.
func AppendFitRecords(extr []Extraction, measurement string, now time.Time, recs ...fit.Record) ([]Extraction, []string) {
	used := make(map[string]bool, len(extr)+len(recs))
	for _, x := range extr {
		used[x.ID] = true
	}
	var ids []string
	for _, r := range recs {
		id := fit.RecordID(measurement, func(s string) bool { return used[s] })
		used[id] = true
		x := Extraction{ID: id, Method: r.Method, Measurement: measurement, Performed: now.UTC(), Notes: r.Notes}
		for _, p := range r.Params {
			q := Parameter{Name: p.Name, Unit: p.Unit, Value: p.Value}
			if se := p.StdErr; physics.Finite(se) && se >= 0 {
				q.StdError = &se
			}
			x.Parameters = append(x.Parameters, q)
		}
		extr = append(extr, x)
		ids = append(ids, id)
	}
	return extr, ids
}

// migrateCVRecords rewrites the C-V records that older workbenches kept in
// one "mott-schottky" extraction holding both the line (Vbi, N) and the
// junction-capacitance fit (Cj0, Vj, m, Cpar): the line stays under its ID
// and the junction fit becomes a "cv-junction-capacitance" extraction
// (Vj stored as Vbi) under a new ID, as fits store them now. Documents
// without such records are not changed.
func migrateCVRecords(doc *Document) {
	var out []Extraction
	changed := false
	for _, x := range doc.Extractions {
		if x.Method != fit.MethodMottSchottky || !hasParameter(x, "Vj") {
			out = append(out, x)
			continue
		}
		changed = true
		line, junction := x, Extraction{Method: fit.MethodCVJunction, Measurement: x.Measurement, Performed: x.Performed,
			Notes: append([]string{"C = Cj0/(1 - V/Vbi)^m + Cpar (split from " + x.ID + " when read)"}, x.Notes...)}
		line.Parameters = nil
		for _, p := range x.Parameters {
			switch p.Name {
			case "Cj0", "m", "Cpar":
				junction.Parameters = append(junction.Parameters, p)
			case "Vj":
				p.Name = "Vbi"
				junction.Parameters = append(junction.Parameters, p)
			default:
				line.Parameters = append(line.Parameters, p)
			}
		}
		out = append(out, line)
		out = append(out, junction) // its ID is given below, once every old ID is known
	}
	if !changed {
		return
	}
	used := map[string]bool{}
	for _, x := range out {
		if x.ID != "" {
			used[x.ID] = true
		}
	}
	for k := range out {
		if out[k].ID == "" {
			out[k].ID = fit.RecordID(out[k].Measurement, func(s string) bool { return used[s] })
			used[out[k].ID] = true
		}
	}
	doc.Extractions = out
}

func hasParameter(x Extraction, name string) bool {
	for _, p := range x.Parameters {
		if p.Name == name {
			return true
		}
	}
	return false
}
