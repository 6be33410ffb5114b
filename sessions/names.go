package sessions

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// nameRule states what a valid name is, for messages.
const nameRule = "1 to 64 letters, digits, '-', '_' or '.', not starting with '.' or '-'"

// maxNameLen is the longest session name, in bytes (all allowed
// characters are ASCII).
const maxNameLen = 64

// NameError is a rejected session, editor or data-set name.
type NameError struct {
	Name string
	Why  string
}

func (e *NameError) Error() string {
	return fmt.Sprintf("name %q: %s; allowed %s", e.Name, e.Why, nameRule)
}

// ValidateName checks a session name (also used for editor names and IDs
// inside a document). A valid name is 1 to 64 ASCII letters, digits, '-',
// '_' or '.', does not start with '.' or '-', does not end with '.', and is
// not a device name that some file systems reserve (con, nul, com1, ...)
// nor the name the store keeps for itself (UnnamedDraft).
// Anything that could escape the store — "..", slashes, backslashes,
// control characters, NUL, an absolute path, a drive letter — is refused
// with a message saying which. No path is built from a name that has not
// passed this check.
func ValidateName(name string) error {
	bad := func(why string) error { return &NameError{Name: name, Why: why} }
	switch {
	case name == "":
		return bad("empty")
	case !utf8.ValidString(name):
		return bad("not valid UTF-8 text")
	case strings.ContainsRune(name, 0):
		return bad("contains a NUL character")
	case strings.ContainsFunc(name, unicode.IsControl):
		return bad("contains a control character")
	case name == "." || name == "..":
		return bad("refers to a directory, not a session")
	case strings.HasPrefix(name, "/") || strings.HasPrefix(name, `\`):
		return bad("is an absolute path; give a name, not a path")
	case strings.ContainsAny(name, `/\`):
		return bad("contains a path separator ('/' or '\\'); give a name, not a path")
	case len(name) >= 2 && name[1] == ':':
		return bad("looks like a drive letter; give a name, not a path")
	case len(name) > maxNameLen:
		return bad(fmt.Sprintf("is %d characters long", len(name)))
	case name[0] == '.':
		return bad("starts with '.' (hidden files and '..' are not sessions)")
	case name[0] == '-':
		return bad("starts with '-' (it would read as an option)")
	case strings.HasSuffix(name, "."):
		return bad("ends with '.' (some file systems drop it)")
	}
	for _, r := range name {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.') {
			return bad(fmt.Sprintf("contains %q", r))
		}
	}
	if IsReservedName(name) {
		return bad("is kept for the recovery drafts of unsaved junctions")
	}
	base, _, _ := strings.Cut(strings.ToLower(name), ".")
	switch base {
	case "con", "prn", "aux", "nul",
		"com1", "com2", "com3", "com4", "com5", "com6", "com7", "com8", "com9",
		"lpt1", "lpt2", "lpt3", "lpt4", "lpt5", "lpt6", "lpt7", "lpt8", "lpt9":
		return bad("is a device name that some file systems reserve")
	}
	return nil
}

// validateDraftSession checks the session name of a draft: a session
// name, or UnnamedDraft.
func validateDraftSession(name string) error {
	if name == UnnamedDraft {
		return nil
	}
	return ValidateName(name)
}
