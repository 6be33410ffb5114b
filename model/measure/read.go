package measure

import (
	"bufio"
	"context"
	"io"
)

// MaxRows bounds the data rows (kept or left out) of one import: a million
// points is far beyond any bench sweep and keeps the columns of one data
// set under about 64 MB. A file with more is refused with ErrTooManyRows.
const MaxRows = 1_000_000

// MaxBytes bounds the bytes one import reads (256 MiB: a million rows of
// up to about 250 characters); a longer file is refused with ErrTooLarge.
const MaxBytes = 256 << 20

// capReader reads from r until more than max bytes have come, then
// returns ErrTooLarge; it returns ctx.Err() once ctx is cancelled.
type capReader struct {
	r      io.Reader
	n, max int64
	ctx    context.Context
}

// Read implements io.Reader.
func (c *capReader) Read(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, err
	}
	if c.n > c.max {
		return 0, ErrTooLarge
	}
	if rem := c.max + 1 - c.n; int64(len(p)) > rem {
		p = p[:rem]
	}
	k, err := c.r.Read(p)
	c.n += int64(k)
	return k, err
}

// lineReader yields lines without the line end.
type lineReader struct {
	br   *bufio.Reader
	long []byte
	line int
}

func (lr *lineReader) next() ([]byte, error) {
	lr.long = lr.long[:0]
	for {
		b, err := lr.br.ReadSlice('\n')
		if err == bufio.ErrBufferFull {
			lr.long = append(lr.long, b...)
			if len(lr.long) > MaxLineBytes {
				lr.line++
				return nil, ErrLineTooLong
			}
			continue
		}
		if len(lr.long) > 0 {
			lr.long = append(lr.long, b...)
			b = lr.long
		}
		if err == io.EOF && len(b) == 0 {
			return nil, io.EOF
		}
		if err != nil && err != io.EOF {
			return nil, err
		}
		lr.line++
		if len(b) > MaxLineBytes {
			return nil, ErrLineTooLong
		}
		if n := len(b); n > 0 && b[n-1] == '\n' {
			b = b[:n-1]
		}
		if n := len(b); n > 0 && b[n-1] == '\r' {
			b = b[:n-1]
		}
		return b, nil
	}
}
