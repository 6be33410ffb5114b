package sessions

import "strings"

// UnnamedDraft is the session name under which the workbench keeps the
// crash-recovery draft of a junction that has no session name yet (the
// demo, or a file opened but not saved). ValidateName refuses it as the
// name of a session, so that the draft of a named session never lands on
// it.
const UnnamedDraft = "_unsaved"

// IsReservedName reports whether name is kept for the store's own use
// (UnnamedDraft, in any letter case).
func IsReservedName(name string) bool { return strings.EqualFold(name, UnnamedDraft) }

// EditorID turns a user name into a name the store accepts for an editor
// of drafts (see ValidateName): characters other than ASCII letters,
// digits, '-', '_' and '.' become '_', a leading '.' or '-' and a trailing
// '.' become '_', and the result is cut to 64 bytes. An empty user, or one
// that still is no valid name (a reserved device name), gives "unknown".
func EditorID(user string) string {
	var b strings.Builder
	for _, r := range user {
		if b.Len() >= maxNameLen {
			break
		}
		if r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.' {
			b.WriteRune(r)
		} else {
			b.WriteByte('_')
		}
	}
	id := b.String()
	if id == "" {
		return "unknown"
	}
	if id[0] == '.' || id[0] == '-' {
		id = "_" + id[1:]
	}
	if strings.HasSuffix(id, ".") {
		id = id[:len(id)-1] + "_"
	}
	if ValidateName(id) != nil {
		return "unknown"
	}
	return id
}
