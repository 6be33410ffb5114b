package sessions

import (
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

// FuzzDecode: no input makes Decode or the header reader panic, and every
// document Decode accepts encodes again and decodes to the same value.
// Seeds live in testdata/fuzz/FuzzDecode; `go test` runs them, and
// `go test -fuzz=FuzzDecode ./sessions/` explores further.
func FuzzDecode(f *testing.F) {
	if data, err := Encode(exampleDocument()); err == nil {
		f.Add(data)
	}
	// A schema 2 document with a kept batch table (TestBatchRoundTrip's
	// golden file), so that the fuzzer starts from the batch records too.
	if data, err := os.ReadFile(filepath.Join("testdata", "golden-session-batch.json")); err == nil {
		f.Add(data)
	} else {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		_, _ = decodeHeader(data, false)
		_, _ = decodeHeader(data, true)
		doc, err := Decode(data)
		if err != nil {
			if doc != nil {
				t.Fatal("a document returned with an error")
			}
			return
		}
		again, err := Encode(doc)
		if err != nil {
			t.Fatalf("accepted document does not encode: %v", err)
		}
		doc2, err := Decode(again)
		if err != nil {
			t.Fatalf("re-encoded document does not decode: %v\n%s", err, again)
		}
		if !reflect.DeepEqual(normalise(doc), normalise(doc2)) {
			t.Fatalf("round trip differs")
		}
	})
}
