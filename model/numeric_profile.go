package model

// This file reads and writes depth-profile files.

import (
	"bytes"
	"fmt"
	"io"
	"junco/model/units"
	"junco/physics"
	"math"
	"strconv"
	"strings"
)

// ---------------------------------------------------------------------
// Depth-profile files.

// Limits of a depth-profile file.
const (
	maxProfileRows     = 100000
	maxProfileLine     = 1024
	maxProfileDensity  = 1e23 * 1e6 // m^-3 (1e23 cm^-3, above the atomic density of any host)
	profileColumnRoles = "depth, and net or donors and/or acceptors (or conc with a species)"
)

// DepthProfileError reports a problem in a depth-profile file: the file,
// the line (1-based) and, when one column is at fault, its number
// (1-based) and header name.
type DepthProfileError struct {
	File       string // the file name given to ParseDepthProfile
	Line       int    // 1-based line number
	Column     int    // 1-based column (field) number; 0 when the whole line is at fault
	ColumnName string // the column's header cell, "" when unknown
	Msg        string // what is wrong
}

// Error implements error: "FILE: line L, column C (NAME): message".
func (e *DepthProfileError) Error() string {
	s := fmt.Sprintf("%s: line %d", e.File, e.Line)
	if e.Column > 0 {
		s += fmt.Sprintf(", column %d", e.Column)
		if e.ColumnName != "" {
			s += fmt.Sprintf(" (%s)", e.ColumnName)
		}
	}
	return s + ": " + e.Msg
}

// column roles of a depth-profile header.
const (
	roleDepth = iota + 1
	roleNet
	roleDonors
	roleAcceptors
	roleConc
)

// profileRole maps a normalised column name to its role.
func profileRole(name string) int {
	switch name {
	case "depth", "x":
		return roleDepth
	case "net", "netdoping":
		return roleNet
	case "donor", "donors", "nd":
		return roleDonors
	case "acceptor", "acceptors", "na":
		return roleAcceptors
	case "conc", "concentration":
		return roleConc
	}
	return 0
}

// splitHeaderCell splits "name_unit", "name (unit)" or "name [unit]" into
// a normalised name (lower case, without spaces and underscores) and the
// unit text ("" when none is written).
func splitHeaderCell(cell string) (name, unit string) {
	c := strings.TrimSpace(cell)
	norm := func(s string) string {
		s = strings.ToLower(strings.TrimSpace(s))
		return strings.NewReplacer(" ", "", "_", "").Replace(s)
	}
	if n := len(c); n > 0 && (c[n-1] == ')' || c[n-1] == ']') {
		open := byte('(')
		if c[n-1] == ']' {
			open = '['
		}
		if k := strings.LastIndexByte(c, open); k >= 0 {
			return norm(c[:k]), strings.TrimSpace(c[k+1 : n-1])
		}
	}
	if k := strings.LastIndexByte(c, '_'); k > 0 {
		return norm(c[:k]), strings.TrimSpace(c[k+1:])
	}
	return norm(c), ""
}

// ParseDepthProfile reads a doping depth profile from r; name is the file
// name used in errors (and kept as Source).
//
// Format (strict): blank lines and lines starting with # are skipped; the
// first other line is the header, and every later line a row with as many
// fields. The separator is ';' if the header contains one, else a tab if
// it contains one, else ','. Each header cell is a name and a unit,
// written name_unit, "name (unit)" or "name [unit]", e.g. depth_um,
// conc_cm-3 or "depth (nm);net (cm^-3)". Names: depth (or x) once, then
// net (signed Nd - Na), or donors (nd) and/or acceptors (na), or one conc
// column whose species is given by species (SpeciesDonor,
// SpeciesAcceptor or SpeciesNet). Units: any length unit of ParseValue
// for the depth, any density unit for the concentrations. Numbers are
// plain decimals (no NaN, no infinities, a decimal point, not a comma);
// depths are >= 0, at most 1 cm, strictly increasing; donor and acceptor
// concentrations are >= 0; every magnitude is at most 1e23 cm^-3; 2 to
// 100000 rows of at most 1024 bytes.
//
// Errors are *DepthProfileError values naming the file, line and column.
func ParseDepthProfile(name string, r io.Reader, species string) (*DepthProfile, error) {
	fail := func(line, col int, colName, msg string, a ...any) error {
		return &DepthProfileError{File: name, Line: line, Column: col, ColumnName: colName, Msg: fmt.Sprintf(msg, a...)}
	}
	const maxBytes = int64(maxProfileRows+100) * maxProfileLine
	data, err := io.ReadAll(io.LimitReader(r, maxBytes+1))
	if err != nil {
		return nil, fail(0, 0, "", "%v", err)
	}
	if int64(len(data)) > maxBytes {
		return nil, fail(0, 0, "", "larger than %d bytes", maxBytes)
	}
	lines := strings.Split(string(data), "\n")
	if len(lines) > 0 && strings.HasPrefix(lines[0], "\ufeff") {
		lines[0] = strings.TrimPrefix(lines[0], "\ufeff")
	}
	type col struct {
		role   int
		factor float64
		header string
	}
	var cols []col
	sep := ","
	out := &DepthProfile{Source: name}
	var values [6][]float64 // by role
	rows := 0
	headerLine := 0
	for i, raw := range lines {
		ln := i + 1
		if len(raw) > maxProfileLine {
			return nil, fail(ln, 0, "", "line longer than %d bytes", maxProfileLine)
		}
		line := strings.TrimRight(raw, "\r")
		trimmed := strings.TrimSpace(line)
		if trimmed == "" || strings.HasPrefix(trimmed, "#") {
			continue
		}
		if cols == nil {
			headerLine = ln
			switch {
			case strings.Contains(line, ";"):
				sep = ";"
			case strings.Contains(line, "\t"):
				sep = "\t"
			}
			cells := strings.Split(line, sep)
			seen := map[int]int{}
			for c, cell := range cells {
				cn := strings.TrimSpace(cell)
				nm, unit := splitHeaderCell(cell)
				role := profileRole(nm)
				if role == 0 {
					return nil, fail(ln, c+1, cn, "unknown column name %q: the columns are %s", nm, profileColumnRoles)
				}
				if prev, dup := seen[role]; dup {
					return nil, fail(ln, c+1, cn, "a second %s column (the first is column %d)", nm, prev)
				}
				seen[role] = c + 1
				if role == roleConc {
					switch species {
					case SpeciesDonor:
						role = roleDonors
					case SpeciesAcceptor:
						role = roleAcceptors
					case SpeciesNet:
						role = roleNet
					default:
						return nil, fail(ln, c+1, cn, "a conc column does not say of what: name it net, donors or acceptors, or give the species (donor, acceptor or net)")
					}
					if prev, dup := seen[role]; dup {
						return nil, fail(ln, c+1, cn, "the species of the conc column already has column %d", prev)
					}
					seen[role] = c + 1
				}
				if unit == "" {
					return nil, fail(ln, c+1, cn, "no unit: write it as name_unit, \"name (unit)\" or \"name [unit]\", e.g. depth_um or conc (cm^-3)")
				}
				k := Density
				if role == roleDepth {
					k = Length
				}
				f, uerr := ParseValue(k, "1 "+unit)
				if uerr != nil || !(f > 0) {
					return nil, fail(ln, c+1, cn, "unit %q is not a %s unit (for example %s)", unit, KindName(k), DefaultUnit(k))
				}
				cols = append(cols, col{role: role, factor: f, header: cn})
			}
			if _, ok := seen[roleDepth]; !ok {
				return nil, fail(ln, 0, "", "no depth column: the columns are %s", profileColumnRoles)
			}
			if len(cols) < 2 {
				return nil, fail(ln, 0, "", "no concentration column: the columns are %s", profileColumnRoles)
			}
			if _, ok := seen[roleNet]; ok {
				if _, d := seen[roleDonors]; d {
					return nil, fail(ln, 0, "", "net together with donors: give net alone, or donors and/or acceptors")
				}
				if _, a := seen[roleAcceptors]; a {
					return nil, fail(ln, 0, "", "net together with acceptors: give net alone, or donors and/or acceptors")
				}
			}
			continue
		}
		cells := strings.Split(line, sep)
		if len(cells) != len(cols) {
			return nil, fail(ln, 0, "", "%d fields, the header (line %d) has %d", len(cells), headerLine, len(cols))
		}
		if rows >= maxProfileRows {
			return nil, fail(ln, 0, "", "more than %d rows", maxProfileRows)
		}
		for c, cell := range cells {
			cl := cols[c]
			s := strings.TrimSpace(cell)
			if s == "" {
				return nil, fail(ln, c+1, cl.header, "empty field")
			}
			if units.NumberPrefix(s) != len(s) {
				hint := ""
				if strings.Contains(s, ",") {
					hint = " (use a decimal point, not a comma)"
				}
				return nil, fail(ln, c+1, cl.header, "%q is not a plain decimal number%s", s, hint)
			}
			v, perr := strconv.ParseFloat(s, 64)
			if perr != nil {
				return nil, fail(ln, c+1, cl.header, "%q is out of the floating-point range", s)
			}
			v *= cl.factor
			if !physics.Finite(v) {
				return nil, fail(ln, c+1, cl.header, "%q is out of the floating-point range", s)
			}
			switch cl.role {
			case roleDepth:
				d := values[roleDepth]
				switch {
				case v < 0 || v > maxWidth:
					return nil, fail(ln, c+1, cl.header, "depth %s is outside 0 to 1 cm", Format(Length, v, 4, true))
				case len(d) > 0 && !(v > d[len(d)-1]):
					return nil, fail(ln, c+1, cl.header, "depth %s does not increase (the previous row has %s)", Format(Length, v, 6, true), Format(Length, d[len(d)-1], 6, true))
				}
			case roleNet:
				if math.Abs(v) > maxProfileDensity {
					return nil, fail(ln, c+1, cl.header, "net doping %s exceeds %s in magnitude", Format(Density, v, 3, true), Format(Density, maxProfileDensity, 3, true))
				}
			default:
				if v < 0 || v > maxProfileDensity {
					return nil, fail(ln, c+1, cl.header, "concentration %s is outside 0 to %s", Format(Density, v, 3, true), Format(Density, maxProfileDensity, 3, true))
				}
			}
			values[cl.role] = append(values[cl.role], v)
		}
		rows++
	}
	if cols == nil {
		return nil, fail(len(lines), 0, "", "no header: the first line must name the columns with units, e.g. depth_um,conc_cm-3")
	}
	if rows < 2 {
		return nil, fail(len(lines), 0, "", "%d data rows: a profile needs at least 2", rows)
	}
	out.Depth = values[roleDepth]
	out.Net, out.Donors, out.Acceptors = values[roleNet], values[roleDonors], values[roleAcceptors]
	return out, nil
}

// WriteCSV writes the profile in the file format ParseDepthProfile reads,
// in SI units (depth_m and the concentration columns in m-3), so that
// reading it back gives the same numbers.
func (p *DepthProfile) WriteCSV(w io.Writer) error {
	var b bytes.Buffer
	b.WriteString("depth_m")
	var cols [][]float64
	for _, c := range []struct {
		name string
		v    []float64
	}{{"net", p.Net}, {"donors", p.Donors}, {"acceptors", p.Acceptors}} {
		if c.v != nil {
			b.WriteString("," + c.name + "_m-3")
			cols = append(cols, c.v)
		}
	}
	b.WriteByte('\n')
	for i, d := range p.Depth {
		b.WriteString(strconv.FormatFloat(d, 'g', -1, 64))
		for _, c := range cols {
			b.WriteByte(',')
			if i < len(c) {
				b.WriteString(strconv.FormatFloat(c[i], 'g', -1, 64))
			}
		}
		b.WriteByte('\n')
	}
	_, err := w.Write(b.Bytes())
	return err
}
