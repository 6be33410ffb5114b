package cli

import (
	"fmt"
	"io"
	"path/filepath"
	"time"

	"junco/sessions"
)

// fitBatchSaveFlags are the flags of fit batch that keep its table with a
// session.
func fitBatchSaveFlags() []fitFlag {
	return []fitFlag{
		{"save-to", "NAME", "keep the batch table (every file's parameters, dies, limits) as the next revision of session NAME"},
		{"data", "DIR", "session store (default $XDG_DATA_HOME/junco, else ~/.local/share/junco)"},
	}
}

// fitBatchSaveHelp tells what --save-to does for fit batch.
const fitBatchSaveHelp = `--save-to NAME keeps the batch table (each file's parameters with standard
errors, its die, the limits given, the diode model) as the next revision of
session NAME (ID batch-1, batch-2, ...), created with the default junction
when missing; sessions show, diff and export include it. At most 100,000
files a table and 20 tables a session. --data DIR selects the session store.`

// fitBatchFolder is the folder a kept batch names: the one directory or
// file given, "" for several.
func fitBatchFolder(pos []string) string {
	if len(pos) != 1 {
		return ""
	}
	return filepath.Clean(pos[0])
}

// fitBatchSave keeps the batch with session name (fitUpdateSession, the
// one save-with-retry) and reports on stderr; it returns the exit code of
// the save.
func fitBatchSave(dataDir, name string, b sessions.Batch, fitted int, stderr io.Writer) int {
	if fitted == 0 {
		fmt.Fprintf(stderr, "junco fit batch: --save-to %s: no file was fitted; nothing saved\n", name)
		return exitFailure
	}
	var id string
	res, err := fitUpdateSession(dataDir, name, time.Now(), stderr, func(doc *sessions.Document) error {
		var err error
		doc.Batches, id, err = sessions.AppendBatch(doc.Batches, b)
		return err
	})
	if err != nil {
		fmt.Fprintf(stderr, "junco fit batch: --save-to %s: %v; nothing saved\n", name, err)
		return exitFailure
	}
	if res.Created {
		fmt.Fprintf(stderr, "junco fit batch: session %s did not exist; created it with the default junction (%s)\n", name, fitDefaultJunction())
	}
	what := "batch table"
	if b.Interrupted {
		what = "batch table of the files done (interrupted)"
	}
	fmt.Fprintf(stderr, "saved as revision %d of session %s (%s %s, %d files)\n", res.Revision, name, what, id, len(b.Rows))
	return exitOK
}
