package fit

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"junco/model"
	"junco/model/measure"
)

// MaxFileBytes bounds a measurement file imported for a fit (64 MiB: far
// above any instrument's sweep, and a bound on the memory one file takes).
const MaxFileBytes = 64 << 20

// FileError is a file a fit refuses before reading it: none named, a
// directory, a device or pipe (which could block), or one too large. Path names it and
// Why says what is wrong and what is allowed.
type FileError struct {
	Path, Why string
}

func (e *FileError) Error() string { return e.Path + ": " + e.Why }

// RowLimiter is a file access that caps the data rows of each import (a
// served user's inbox: the imports of every user share the server's
// memory).
type RowLimiter interface{ RowLimit() int }

// Import reads the measurement file at path from files (nil: the local
// file system) for a fit: only a regular file (no directory, device or
// pipe that could block) of at most MaxFileBytes is read, else a
// *FileError; kind "" detects I-V or C-V from the columns; now stamps the
// import (nil: time.Now). On error no data set is returned; measure's
// typed errors (file, line, column) and the errors of files (a missing
// file wraps fs.ErrNotExist) come through unchanged.
func Import(files model.Files, path string, kind measure.Kind, now func() time.Time) (*measure.DataSet, error) {
	return ImportContext(context.Background(), files, path, kind, now)
}

// ImportContext is Import that stops, with ctx's error, when ctx is done.
func ImportContext(ctx context.Context, files model.Files, path string, kind measure.Kind, now func() time.Time) (*measure.DataSet, error) {
	f, fi, err := openDataFile(files, path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	opt := measure.Options{Kind: kind, Now: now}
	if rl, ok := files.(RowLimiter); ok {
		opt.MaxRows = rl.RowLimit()
	}
	// The importer sizes its buffer from Stat: give it the one made here.
	return measure.ImportContext(ctx, io.LimitReader(statedFile{f, fi}, MaxFileBytes), path, opt)
}

// statedFile is an open file with the FileInfo already read for it.
type statedFile struct {
	fs.File
	fi fs.FileInfo
}

func (s statedFile) Stat() (fs.FileInfo, error) { return s.fi, nil }

// OpenDataFile opens the file at path in files (nil: the local file
// system) under the fit's file policy: a regular file (no directory,
// device or pipe that could block) of at most MaxFileBytes, else a
// *FileError. The caller closes it and reads at most MaxFileBytes.
func OpenDataFile(files model.Files, path string) (fs.File, error) {
	f, _, err := openDataFile(files, path)
	return f, err
}

// openDataFile is OpenDataFile, also giving the file's FileInfo.
func openDataFile(files model.Files, path string) (fs.File, fs.FileInfo, error) {
	if files == nil {
		files = model.LocalFiles{}
		if strings.TrimSpace(path) == "" {
			return nil, nil, &FileError{Path: `""`, Why: "no file named: give the path of a CSV or text file"}
		}
	}
	f, err := files.Open(path)
	if err != nil {
		return nil, nil, err
	}
	fi, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, nil, err
	}
	why := ""
	switch {
	case fi.IsDir():
		why = "is a directory, not a data file (fit batch takes directories)"
	case !fi.Mode().IsRegular():
		why = "is not a regular file (a device or pipe could block); only regular files are imported"
	case fi.Size() > MaxFileBytes:
		why = fmt.Sprintf("has %d bytes; at most %d (64 MiB) are imported for a fit", fi.Size(), MaxFileBytes)
	}
	if why != "" {
		f.Close()
		return nil, nil, &FileError{Path: path, Why: why}
	}
	return f, fi, nil
}

// IsDataFile reports whether name ends in one of the data extensions
// (.csv, .tsv, .txt, .dat, any case).
func IsDataFile(name string) bool {
	switch strings.ToLower(filepath.Ext(name)) {
	case ".csv", ".tsv", ".txt", ".dat":
		return true
	}
	return false
}

// Limits of BatchFiles: how deep directories are walked and how many files
// one batch takes (its rows are kept: a bound on the batch's memory).
const (
	MaxBatchDepth = 32
	MaxBatchFiles = 1000000
)

// BatchFiles lists the data files of a batch in files (nil: the local file
// system): each path that is a file is taken as given; each directory is
// walked recursively (entries whose name starts with "." skipped, at most
// MaxBatchDepth levels) for regular files with a data extension
// (IsDataFile), sorted by path; a folder's die manifest (ManifestName) and
// the batch tables the workbench wrote there (IsBatchExport) are not data
// files and are left out. A missing path, an empty result and more
// than MaxBatchFiles files are errors. With an inbox for files, "" names
// the inbox itself.
func BatchFiles(files model.Files, paths ...string) ([]string, error) {
	local := files == nil
	if local {
		files = model.LocalFiles{}
	}
	var out []string
	for _, p := range paths {
		p = strings.TrimSpace(p)
		if p == "" && local {
			return nil, errors.New("no directory named: give a directory of CSV, TSV, TXT or DAT files")
		}
		isDir, err := batchIsDir(files, p, local)
		if err != nil {
			return nil, err
		}
		if !isDir {
			out = append(out, p)
			continue
		}
		var found []string
		if err := batchWalk(files, p, p, 0, &found); err != nil {
			return nil, err
		}
		sort.Strings(found)
		out = append(out, found...)
		if len(out) > MaxBatchFiles {
			return nil, fmt.Errorf("more than %d data files under %s: at most %d are fitted in one batch; split it", MaxBatchFiles, strings.Join(paths, ", "), MaxBatchFiles)
		}
	}
	if len(out) == 0 {
		where := strings.Join(paths, ", ")
		if where == "" {
			where = "here"
		}
		return nil, fmt.Errorf("no .csv, .tsv, .txt or .dat files under %s", where)
	}
	return out, nil
}

// batchIsDir reports whether p is a directory of files: a file that opens
// and says so, or a name files can list but not open (an inbox's root).
// Only a local path is named in the error (an inbox's errors name no
// server path and are passed on as they are).
func batchIsDir(files model.Files, p string, local bool) (bool, error) {
	f, err := files.Open(p)
	if err == nil {
		fi, serr := f.Stat()
		f.Close()
		if serr != nil {
			return false, serr
		}
		return fi.IsDir(), nil
	}
	if _, lerr := files.ReadDir(p); lerr == nil {
		return true, nil
	}
	if local && errors.Is(err, fs.ErrNotExist) {
		return false, fmt.Errorf("no directory or file %s: %w", p, fs.ErrNotExist)
	}
	return false, err
}

// batchWalk appends the data files under dir to found.
func batchWalk(files model.Files, root, dir string, depth int, found *[]string) error {
	if depth > MaxBatchDepth {
		return fmt.Errorf("%s: directories nested more than %d levels under %s; at most %d are walked", dir, MaxBatchDepth, root, MaxBatchDepth)
	}
	ents, err := files.ReadDir(dir)
	if err != nil {
		return err
	}
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") {
			continue
		}
		q := filepath.Join(dir, e.Name())
		switch {
		case e.IsDir():
			if err := batchWalk(files, root, q, depth+1, found); err != nil {
				return err
			}
		case e.Type().IsRegular() && IsDataFile(q) && !isManifest(q) && !IsBatchExport(q):
			*found = append(*found, q)
			if len(*found) > MaxBatchFiles {
				return fmt.Errorf("more than %d data files under %s: at most %d are fitted in one batch; split it", MaxBatchFiles, root, MaxBatchFiles)
			}
		}
	}
	return nil
}
