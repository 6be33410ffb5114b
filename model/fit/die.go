package fit

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"path"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"

	"junco/model"
)

// Die is where a batch file's device sits: its column X and row Y on the
// wafer grid, the wafer and lot (from a manifest only), and where the
// position came from (DieFromManifest, DieFromName, or "" when unknown).
// Note says when a manifest and the file name disagree.
type Die struct {
	X, Y       int
	Wafer, Lot string
	Source     string
	Note       string
}

// Known reports whether the die has a position.
func (d Die) Known() bool { return d.Source != "" }

// Sources of a die position.
const (
	DieFromManifest = "manifest"
	DieFromName     = "name"
)

// ManifestName is the file, in a folder of batch files, that states the
// dies of its files (compared without case). It is never fitted itself.
const ManifestName = "dies.csv"

// Limits of die positions and manifests.
const (
	MaxDieCoord      = 9999    // |x| and |y| at most this
	MaxManifestBytes = 1 << 24 // 16 MiB: far above a manifest of MaxBatchFiles rows
	maxDieDigits     = 4
)

// The file-name forms of a die position, compared without case on the
// base name without its extension. A form matches only where the letter
// starts the name or follows a character that is not a letter, and where
// the last digit ends the name or is followed by a character that is not
// a digit:
//   - x/y: "x" and 1-4 digits (a minus sign allowed), an optional "_" or
//     "-", "y" and 1-4 digits: die_x03_y07, W12X3Y7, x-2y5.
//   - row/column: "r" and 1-4 digits, an optional "_" or "-", "c" and 1-4
//     digits: r07c03 is row 7 (y = 7), column 3 (x = 3).
//
// When both forms match, the x/y form wins; when one form matches twice
// with different positions the name is ambiguous and gives none.
//
// The patterns are compiled on first use, not at program start (their
// counted repetitions cost every junco command 0.06 ms and 150 allocations).
var (
	dieXY = sync.OnceValue(func() *regexp.Regexp {
		return regexp.MustCompile(`(?i)(?:^|[^a-z])x(-?\d{1,4})[_-]?y(-?\d{1,4})(?:$|[^0-9])`)
	})
	dieRC = sync.OnceValue(func() *regexp.Regexp {
		return regexp.MustCompile(`(?i)(?:^|[^a-z])r(\d{1,4})[_-]?c(\d{1,4})(?:$|[^0-9])`)
	})
)

// DieFromFileName reads a die position from a file name (any directory
// part is ignored): the x/y form, else the row/column form (see the
// package's forms above); ok is false when neither matches. An error says
// the name is ambiguous (one form twice with different positions).
func DieFromFileName(name string) (x, y int, ok bool, err error) {
	base := filepath.Base(filepath.ToSlash(name))
	base = path.Base(base)
	base = strings.TrimSuffix(base, path.Ext(base))
	for _, form := range []struct {
		re     *regexp.Regexp
		swap   bool
		format string
	}{{dieXY(), false, "x/y"}, {dieRC(), true, "row/column"}} {
		ms := findOverlapping(form.re, base)
		if len(ms) == 0 {
			continue
		}
		var px, py int
		for i, m := range ms {
			a, _ := strconv.Atoi(m[1]) // at most 4 digits: always parses
			b, _ := strconv.Atoi(m[2])
			if form.swap {
				a, b = b, a // r = y, c = x
			}
			if i > 0 && (a != px || b != py) {
				return 0, 0, false, fmt.Errorf("%s: the name gives two die positions in the %s form (x=%d y=%d and x=%d y=%d); state the die in %s", name, form.format, px, py, a, b, ManifestName)
			}
			px, py = a, b
		}
		return px, py, true, nil
	}
	return 0, 0, false, nil
}

// findOverlapping returns every submatch of re in s, allowing the
// boundary character of one match to start the next.
func findOverlapping(re *regexp.Regexp, s string) [][]string {
	var out [][]string
	for start := 0; start < len(s); {
		loc := re.FindStringSubmatchIndex(s[start:])
		if loc == nil {
			break
		}
		out = append(out, []string{s[start+loc[0] : start+loc[1]], s[start+loc[2] : start+loc[3]], s[start+loc[4] : start+loc[5]]})
		start += max(loc[5], loc[0]+1)
	}
	return out
}

// ManifestError is a manifest that cannot be used: the file, the line
// (0: the whole file) and what is wrong with what is allowed.
type ManifestError struct {
	Path string
	Line int
	Why  string
}

func (e *ManifestError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", e.Path, e.Line, e.Why)
	}
	return e.Path + ": " + e.Why
}

// manifest is one folder's manifest: dies by file name (lower case).
type manifest map[string]Die

// readManifest reads the manifest at p: a CSV file with a header naming
// the columns file, x and y (any order, any case; die_x and die_y accepted
// for x and y) and optionally wafer and lot; one row per file, the file
// named as in its folder (a base name; compared without case). x and y
// are whole numbers within +/-MaxDieCoord. A file named twice, a missing
// column or a bad number is an error naming the line.
func readManifest(r io.Reader, p string) (manifest, error) {
	cr := csv.NewReader(io.LimitReader(r, MaxManifestBytes+1))
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	cr.Comment = '#'
	head, err := cr.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return nil, &ManifestError{Path: p, Why: "is empty: a header naming the columns file, x and y is required (wafer and lot optional)"}
		}
		return nil, &ManifestError{Path: p, Line: 1, Why: err.Error()}
	}
	col := map[string]int{}
	for i, h := range head {
		h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		switch h {
		case "die_x":
			h = "x"
		case "die_y":
			h = "y"
		}
		if _, dup := col[h]; dup && h != "" {
			return nil, &ManifestError{Path: p, Line: 1, Why: fmt.Sprintf("column %q appears twice in the header", h)}
		}
		col[h] = i
	}
	for _, need := range []string{"file", "x", "y"} {
		if _, ok := col[need]; !ok {
			return nil, &ManifestError{Path: p, Line: 1, Why: fmt.Sprintf("no column %q: the header must name file, x and y (wafer and lot optional), got %q", need, strings.Join(head, ","))}
		}
	}
	field := func(rec []string, name string) string {
		if i, ok := col[name]; ok && i < len(rec) {
			return strings.TrimSpace(rec[i])
		}
		return ""
	}
	out := manifest{}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			line := 0
			if errors.As(err, &pe) {
				line, err = pe.Line, pe.Err
			}
			return nil, &ManifestError{Path: p, Line: line, Why: err.Error()}
		}
		line, _ := cr.FieldPos(0)
		if len(out) >= MaxBatchFiles {
			return nil, &ManifestError{Path: p, Line: line, Why: fmt.Sprintf("more than %d rows: at most %d files are fitted in one batch", MaxBatchFiles, MaxBatchFiles)}
		}
		name := field(rec, "file")
		if name == "" {
			return nil, &ManifestError{Path: p, Line: line, Why: "the file column is empty: name the data file (as in this folder)"}
		}
		if strings.ContainsAny(name, `/\`) {
			return nil, &ManifestError{Path: p, Line: line, Why: fmt.Sprintf("file %q has a directory part: a manifest names the files of its own folder only", name)}
		}
		d := Die{Wafer: field(rec, "wafer"), Lot: field(rec, "lot"), Source: DieFromManifest}
		for _, c := range []struct {
			name string
			to   *int
		}{{"x", &d.X}, {"y", &d.Y}} {
			s := field(rec, c.name)
			v, err := strconv.Atoi(s)
			if err != nil || v < -MaxDieCoord || v > MaxDieCoord {
				return nil, &ManifestError{Path: p, Line: line, Why: fmt.Sprintf("%s %q of %s: expected a whole number from %d to %d", c.name, s, name, -MaxDieCoord, MaxDieCoord)}
			}
			*c.to = v
		}
		key := strings.ToLower(name)
		if _, dup := out[key]; dup {
			return nil, &ManifestError{Path: p, Line: line, Why: fmt.Sprintf("file %s is named twice: one die per file", name)}
		}
		out[key] = d
	}
	return out, nil
}

// isManifest reports whether a file name is the manifest's (any case).
func isManifest(name string) bool { return strings.EqualFold(filepath.Base(name), ManifestName) }

// Dies finds the die of every batch file, in the order of files: from the
// manifest of the file's folder (ManifestName, read from files, nil: the
// local file system) when it names the file, else from the file name
// (DieFromFileName), else unknown (a name with two positions leaves the
// die unknown, its Note says why). The manifest wins over the name; when
// both give a position and they differ, the die's Note says so. A folder
// without a manifest is fine; a manifest that cannot be read or parsed is
// an error (*ManifestError, or the file system's).
func Dies(files model.Files, batch []string) ([]Die, error) {
	t, err := dieManifests(files, batch)
	if err != nil {
		return nil, err
	}
	out := make([]Die, len(batch))
	for k, f := range batch {
		out[k] = t.die(f)
	}
	return out, nil
}

// dieTable holds the manifests of the folders of a batch (nil: none).
type dieTable map[string]manifest

// dieManifests reads the manifest of every folder of the batch's files, in
// the order of the files; the first that cannot be used is the error.
func dieManifests(files model.Files, batch []string) (dieTable, error) {
	if files == nil {
		files = model.LocalFiles{}
	}
	t := dieTable{}
	for _, f := range batch {
		dir := filepath.Dir(f)
		if _, seen := t[dir]; seen {
			continue
		}
		man, err := loadManifest(files, dir)
		if err != nil {
			return nil, err
		}
		t[dir] = man
	}
	return t, nil
}

// die is the die of batch file f (see Dies); it only reads the table, so
// the workers of a batch call it at once.
func (t dieTable) die(f string) Die {
	x, y, named, nameErr := DieFromFileName(f)
	if d, ok := t[filepath.Dir(f)][strings.ToLower(filepath.Base(f))]; ok {
		if named && (x != d.X || y != d.Y) {
			d.Note = fmt.Sprintf("the manifest's x=%d y=%d differs from the name's x=%d y=%d; the manifest wins", d.X, d.Y, x, y)
		}
		return d
	}
	switch {
	case named:
		return Die{X: x, Y: y, Source: DieFromName}
	case nameErr != nil:
		return Die{Note: nameErr.Error()}
	}
	return Die{}
}

// loadManifest reads the manifest of dir, nil when there is none.
func loadManifest(files model.Files, dir string) (manifest, error) {
	ents, err := files.ReadDir(dir)
	if err != nil {
		return nil, nil // the folder cannot be listed: the files' own errors will say why
	}
	for _, e := range ents {
		if !isManifest(e.Name()) || e.IsDir() {
			continue
		}
		p := filepath.Join(dir, e.Name())
		f, err := files.Open(p)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		if fi, err := f.Stat(); err != nil {
			return nil, err
		} else if !fi.Mode().IsRegular() {
			return nil, &ManifestError{Path: p, Why: "is not a regular file; a manifest must be one"}
		} else if fi.Size() > MaxManifestBytes {
			return nil, &ManifestError{Path: p, Why: fmt.Sprintf("has %d bytes; a manifest may have at most %d (16 MiB)", fi.Size(), MaxManifestBytes)}
		}
		return readManifest(f, p)
	}
	return nil, nil
}
