package sessions

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// Stores written by older versions of junco followed the umask: folders
// 0755 and revisions 0444, readable by every account of the host. A store
// is made private when it is opened (New) and a server's data folder when
// the server starts (PrepareDataRoot): group and other permission bits
// are taken off every folder and file under the root, and the store says
// so in its notices. Symbolic links are neither followed nor changed.

// looseBits are the permission bits that let other accounts in.
const looseBits fs.FileMode = 0o077

// isLoose reports whether path exists and grants other accounts access.
func isLoose(path string) bool {
	info, err := os.Lstat(path)
	return err == nil && info.Mode().Type()&fs.ModeSymlink == 0 && info.Mode().Perm()&looseBits != 0
}

// tightenModes takes group and other permission bits off root and every
// folder and regular file under it. It returns how many it changed and a
// problem for each one it could not change (a file of another account,
// say); the walk goes on after a problem.
func tightenModes(root string) (int, []error) {
	changed := 0
	var probs []error
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			probs = append(probs, err)
			if d != nil && d.IsDir() {
				return fs.SkipDir
			}
			return nil
		}
		if !d.IsDir() && !d.Type().IsRegular() {
			return nil // symbolic links and the like are left alone
		}
		info, err := d.Info()
		if err != nil {
			probs = append(probs, err)
			return nil
		}
		perm := info.Mode().Perm()
		if perm&looseBits == 0 {
			return nil
		}
		if err := os.Chmod(path, perm&^looseBits); err != nil {
			probs = append(probs, err)
			return nil
		}
		changed++
		return nil
	})
	if err != nil && !errors.Is(err, fs.ErrNotExist) {
		probs = append(probs, err)
	}
	return changed, probs
}

// tightenNotices tightens root when it or one of its direct entries is
// loose, and returns what was done, for the user or the server log.
// Checking the top is enough to find a store of an older version (all
// its folders were loose); a private root folder keeps other accounts
// out of everything below it.
func tightenNotices(root string) []string {
	loose := isLoose(root)
	if !loose {
		if ents, err := os.ReadDir(root); err == nil {
			for _, e := range ents {
				if isLoose(filepath.Join(root, e.Name())) {
					loose = true
					break
				}
			}
		}
	}
	if !loose {
		return nil
	}
	n, probs := tightenModes(root)
	return modeNotices(root, n, probs)
}

// maxModeNotices bounds the problems listed one by one.
const maxModeNotices = 5

// modeNotices words the outcome of tightenModes.
func modeNotices(root string, n int, probs []error) []string {
	var out []string
	if n > 0 {
		out = append(out, fmt.Sprintf("%s was readable by other accounts of this computer: %d folders and files under it were made private to their owner (folders 0700, files 0600 or 0400)", root, n))
	}
	for i, p := range probs {
		if i == maxModeNotices {
			out = append(out, fmt.Sprintf("and %d more could not be made private", len(probs)-i))
			break
		}
		out = append(out, fmt.Sprintf("could not make a file private (other accounts may read it): %v", p))
	}
	return out
}

// PrepareDataRoot makes a server's data folder ready: the folder and its
// users/ folder are created private to the server's account (0700,
// whatever the umask), and everything already under it is made private
// (see tightenModes). It returns notices for the server's log: what was
// tightened and what could not be.
func PrepareDataRoot(dataRoot string) ([]string, error) {
	abs, err := filepath.Abs(dataRoot)
	if err != nil {
		return nil, fmt.Errorf("data folder %q: %w", dataRoot, err)
	}
	if err := mkdirPrivate(filepath.Join(abs, "users")); err != nil {
		return nil, fmt.Errorf("creating the data folder: %w", err)
	}
	n, probs := tightenModes(abs)
	return modeNotices(abs, n, probs), nil
}
