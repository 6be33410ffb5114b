package tui

import (
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"junco/model"
	"junco/sessions"
)

// maxChoices bounds the names a completion lists on screen.
const maxChoices = 12

// completePath completes the last element of the path text from the
// folder it names, read through files (nil: the local file system; the
// served workbench passes the user's inbox, so only its names are
// offered). It returns the completed text (a folder gains a trailing
// slash) and, when several names fit, them (sorted, at most maxChoices;
// more reports how many were left out). Hidden names are offered only
// when the text typed starts with a dot.
func completePath(files model.Files, text string) (out string, choices []string, more int, err error) {
	if files == nil {
		files = model.LocalFiles{}
	}
	dir, prefix := "", text
	if i := strings.LastIndex(text, "/"); i >= 0 {
		dir, prefix = text[:i+1], text[i+1:]
	}
	list := dir
	if list == "" {
		list = "."
	}
	ents, err := files.ReadDir(list)
	if err != nil {
		return text, nil, 0, err
	}
	var fit []string
	for _, e := range ents {
		n := e.Name()
		if !strings.HasPrefix(n, prefix) || (strings.HasPrefix(n, ".") && !strings.HasPrefix(prefix, ".")) {
			continue
		}
		if e.IsDir() {
			n += "/"
		}
		fit = append(fit, n)
	}
	sort.Strings(fit)
	switch len(fit) {
	case 0:
		return text, nil, 0, nil
	case 1:
		return dir + fit[0], nil, 0, nil
	}
	common := fit[0]
	for _, n := range fit[1:] {
		for !strings.HasPrefix(n, common) {
			common = common[:len(common)-1]
		}
	}
	if len(fit) > maxChoices {
		more = len(fit) - maxChoices
		fit = fit[:maxChoices]
	}
	return dir + common, fit, more, nil
}

// measurementID names an imported data set after its file ("d7-25C.csv"
// gives "d7-25C"), or after its kind when the file name makes no valid ID,
// with -2, -3, ... when the name is in use.
func measurementID(file, kind string, used func(string) bool) string {
	base := filepath.Base(file)
	stem := suggestName(strings.TrimSuffix(base, filepath.Ext(base)))
	if stem == "" {
		stem = kind
		if stem == "" {
			stem = "data"
		}
		if !used(stem + "-1") {
			return stem + "-1"
		}
	}
	if !used(stem) {
		return stem
	}
	for n := 2; ; n++ {
		sfx := "-" + strconv.Itoa(n)
		s := stem
		for sessions.ValidateName(s+sfx) != nil && len(s) > 1 {
			s = s[:len(s)-1]
		}
		if !used(s + sfx) {
			return s + sfx
		}
	}
}
