package measure

import (
	"context"
	"errors"
	"io"
	"strings"
	"testing"
)

// endless is a reader of a header followed by one line repeated up to n
// times (invented data), counting the bytes it hands out.
type endless struct {
	head, line string
	n, given   int
	pos        int // position in the current line
	headDone   bool
	read       int64
}

func (e *endless) Read(p []byte) (int, error) {
	k := 0
	for k < len(p) {
		if !e.headDone {
			c := copy(p[k:], e.head[e.pos:])
			k += c
			e.pos += c
			if e.pos == len(e.head) {
				e.headDone, e.pos = true, 0
			}
			continue
		}
		if e.given >= e.n {
			break
		}
		c := copy(p[k:], e.line[e.pos:])
		k += c
		e.pos += c
		if e.pos == len(e.line) {
			e.given++
			e.pos = 0
		}
	}
	e.read += int64(k)
	if k == 0 {
		return 0, io.EOF
	}
	return k, nil
}

// Ten million rows (the size that used to hold 890 MB) are refused after
// MaxRows rows with a named error, having read only those rows: memory and
// time stay bounded whatever the file.
func TestImportRowCap(t *testing.T) {
	const row = "0.5,1e-3\n"
	r := &endless{head: "V,I\n", line: row, n: 10_000_000}
	ds, err := Import(r, "huge.csv", Options{})
	var pe *ParseError
	if ds != nil || !errors.Is(err, ErrTooManyRows) || !errors.As(err, &pe) {
		t.Fatalf("err %v, want ErrTooManyRows", err)
	}
	if !strings.Contains(err.Error(), "1000000") || !strings.Contains(err.Error(), "MaxRows") || pe.Line != MaxRows+2 {
		t.Errorf("message %q (line %d) does not name the cap and the line", err, pe.Line)
	}
	// Read: the header, MaxRows + 1 rows and at most one buffer beyond.
	if limit := int64(4+(MaxRows+1)*len(row)) + 64<<10; r.read > limit {
		t.Errorf("read %d bytes, more than %d", r.read, limit)
	}
	// Exactly MaxRows rows are accepted.
	ds, err = Import(&endless{head: "V,I\n", line: row, n: MaxRows}, "max.csv", Options{})
	if err != nil || ds.Len() != MaxRows {
		t.Fatalf("a file of MaxRows rows: %v", err)
	}
}

// A file longer than MaxBytes is refused with a named error after reading
// at most MaxBytes and one buffer, whatever it holds (here comment lines
// with no data row, which the row cap would never stop).
func TestImportByteCap(t *testing.T) {
	line := "#" + strings.Repeat(" padding", 8000) + "\n"
	r := &endless{head: "# invented padding\n", line: line, n: 1 << 30}
	_, err := Import(r, "padded.csv", Options{})
	if !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), "MaxBytes") || !strings.Contains(err.Error(), "268435456") {
		t.Fatalf("err %v, want ErrTooLarge naming MaxBytes", err)
	}
	if r.read > MaxBytes+1+64<<10 {
		t.Errorf("read %d bytes past the cap of %d", r.read, MaxBytes)
	}
}

// A cancelled import stops at its next read and says why (errors.Is
// context.Canceled), however long the file.
func TestImportContextCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := &endless{head: "V,I\n", line: "0.5,1e-3\n", n: 10_000_000}
	ds, err := ImportContext(ctx, r, "huge.csv", Options{})
	if ds != nil || !errors.Is(err, context.Canceled) || r.read != 0 {
		t.Fatalf("cancelled import: %v after %d bytes; want context.Canceled before any read", err, r.read)
	}
}
