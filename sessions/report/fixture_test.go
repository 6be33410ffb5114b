package report

import (
	"os"
	"path/filepath"
	"testing"

	"junco/model"
	"junco/sessions"
)

// exampleDocument is the sessions package's golden document: a small
// hand-made document with every part present.
func exampleDocument() *sessions.Document {
	data, err := os.ReadFile(filepath.Join("..", "testdata", "golden-session.json"))
	if err != nil {
		panic(err)
	}
	doc, err := sessions.Decode(data)
	if err != nil {
		panic(err)
	}
	return doc
}

// exampleSpec is the junction of the golden document.
func exampleSpec() model.Spec { return exampleDocument().Spec }

func mustEncode(t *testing.T, doc *sessions.Document) []byte {
	t.Helper()
	b, err := sessions.Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
