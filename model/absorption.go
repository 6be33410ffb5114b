package model

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"junco/model/units"
)

// Limits of an absorption table file.
const (
	MaxAbsorptionRows  = 10000   // data rows
	MaxAbsorptionBytes = 4 << 20 // bytes read
)

// AbsorptionTable is a user's table of the absorption coefficient against
// wavelength (SI: m and 1/m), sorted by wavelength. junco ships no table:
// absorption data come from the user, with their source.
type AbsorptionTable struct {
	WavelengthM []float64
	AlphaPerM   []float64
}

// ParseAbsorption reads an absorption table: CSV (comma, semicolon or tab),
// '#' comments, a header row naming the two columns with their units in
// brackets or parentheses, e.g. "wavelength (nm), alpha (1/cm)", then one
// row per wavelength. Units go through the one unit system (Length and
// Absorption kinds); a header without units is refused, since a bare
// number could be nm or um, 1/cm or 1/m. Rows are sorted by wavelength; a
// wavelength given twice, a negative or non-finite value, more than
// MaxAbsorptionRows rows or MaxAbsorptionBytes bytes is an error naming
// the line. Errors never repeat the file's text beyond the header cell.
func ParseAbsorption(r io.Reader, name string) (*AbsorptionTable, error) {
	sc := bufio.NewScanner(io.LimitReader(r, MaxAbsorptionBytes+1))
	sc.Buffer(make([]byte, 0, 4096), 1<<16)
	var (
		t       AbsorptionTable
		header  bool
		fw, fa  float64
		line    int
		readLen int
	)
	bad := func(why string) error { return fmt.Errorf("%s: line %d: %s", name, line, why) }
	for sc.Scan() {
		line++
		readLen += len(sc.Bytes()) + 1
		if readLen > MaxAbsorptionBytes {
			return nil, bad(fmt.Sprintf("the file is longer than %d bytes, the limit of an absorption table", MaxAbsorptionBytes))
		}
		s := strings.TrimSpace(strings.TrimPrefix(sc.Text(), "\ufeff"))
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		cells := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ';' || r == '\t' })
		if len(cells) != 2 {
			return nil, bad(fmt.Sprintf("%d fields; an absorption table has two columns (wavelength, absorption coefficient)", len(cells)))
		}
		if !header {
			var ok bool
			if fw, ok = headerUnit(cells[0], units.Length); !ok {
				return nil, bad("the first header cell must name the wavelength with its unit, e.g. \"wavelength (nm)\"")
			}
			if fa, ok = headerUnit(cells[1], units.Absorption); !ok {
				return nil, bad("the second header cell must name the absorption coefficient with its unit, e.g. \"alpha (1/cm)\"")
			}
			header = true
			continue
		}
		if len(t.WavelengthM) >= MaxAbsorptionRows {
			return nil, bad(fmt.Sprintf("more than %d rows, the limit of an absorption table", MaxAbsorptionRows))
		}
		w, err1 := strconv.ParseFloat(strings.TrimSpace(cells[0]), 64)
		a, err2 := strconv.ParseFloat(strings.TrimSpace(cells[1]), 64)
		w, a = w*fw, a*fa
		if err1 != nil || err2 != nil || !(w > 0) || !(a >= 0) || math.IsInf(w, 0) || math.IsInf(a, 0) {
			return nil, bad("expected a positive wavelength and an absorption coefficient of 0 or more")
		}
		t.WavelengthM = append(t.WavelengthM, w)
		t.AlphaPerM = append(t.AlphaPerM, a)
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s: line %d: %w", name, line+1, err)
	}
	if len(t.WavelengthM) < 1 {
		return nil, fmt.Errorf("%s: no data rows (a header naming the units, then wavelength and absorption rows)", name)
	}
	idx := make([]int, len(t.WavelengthM))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(i, j int) int { return cmpFloat(t.WavelengthM[i], t.WavelengthM[j]) })
	var out AbsorptionTable
	for k, i := range idx {
		if k > 0 && t.WavelengthM[i] == out.WavelengthM[len(out.WavelengthM)-1] {
			return nil, fmt.Errorf("%s: the wavelength %s is given twice", name, Format(Length, t.WavelengthM[i], 4, true))
		}
		out.WavelengthM = append(out.WavelengthM, t.WavelengthM[i])
		out.AlphaPerM = append(out.AlphaPerM, t.AlphaPerM[i])
	}
	return &out, nil
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// headerUnit reads the unit in brackets or parentheses at the end of a
// header cell as a unit of kind k, returning its factor to SI.
func headerUnit(cell string, k units.Kind) (float64, bool) {
	c := strings.TrimSpace(strings.Trim(strings.TrimSpace(cell), "\""))
	open := strings.LastIndexAny(c, "([")
	if open < 0 || !strings.HasSuffix(c, ")") && !strings.HasSuffix(c, "]") {
		return 0, false
	}
	f, off, ok := units.Symbol(k, c[open+1:len(c)-1])
	return f, ok && off == 0 && f > 0
}

// errOutsideTable reports a wavelength outside a table.
var errOutsideTable = errors.New("outside the table")

// At returns the absorption coefficient at wavelength lambda (m),
// interpolated linearly in log(alpha) between the neighbouring rows
// (linearly where a neighbour is 0); an error outside the table's range
// (no extrapolation).
func (t *AbsorptionTable) At(lambda float64) (float64, error) {
	n := len(t.WavelengthM)
	if n == 0 || !(lambda >= t.WavelengthM[0]) || !(lambda <= t.WavelengthM[n-1]) {
		return 0, fmt.Errorf("wavelength %s: %w (%s to %s)", Format(Length, lambda, 4, true), errOutsideTable,
			Format(Length, t.WavelengthM[0], 4, true), Format(Length, t.WavelengthM[n-1], 4, true))
	}
	i, found := slices.BinarySearch(t.WavelengthM, lambda)
	if found {
		return t.AlphaPerM[i], nil
	}
	x0, x1 := t.WavelengthM[i-1], t.WavelengthM[i]
	a0, a1 := t.AlphaPerM[i-1], t.AlphaPerM[i]
	f := (lambda - x0) / (x1 - x0)
	if a0 > 0 && a1 > 0 {
		return math.Exp(math.Log(a0) + f*(math.Log(a1)-math.Log(a0))), nil
	}
	return a0 + f*(a1-a0), nil
}
