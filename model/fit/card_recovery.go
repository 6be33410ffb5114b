package fit

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strings"

	"junco/model"
	"junco/physics"
)

// Recovery is a reverse-recovery (storage time) measurement: the diode
// carries ForwardA, is switched to a reverse current ReverseA (magnitude),
// and that current holds for StorageS before the junction recovers.
type Recovery struct {
	ForwardA, ReverseA float64 // A
	StorageS           float64 // s
	StdErrS            float64 // s; NaN when not given
}

// MaxRecoveryBytes bounds a recovery file (it holds a few lines).
const MaxRecoveryBytes = 64 << 10

// ParseRecovery reads a recovery file: lines "key: value" (or "key =
// value") with units, '#' comments and blank lines ignored:
//
//	forward current: 10 mA
//	reverse current: 10 mA
//	storage time: 42 ns
//	storage time error: 2 ns   (optional)
//
// The three values are required and positive. name is used in errors.
func ParseRecovery(r io.Reader, name string) (*Recovery, error) {
	rc := &Recovery{StdErrS: nan()}
	sc := bufio.NewScanner(io.LimitReader(r, MaxRecoveryBytes+1))
	line, total := 0, 0
	for sc.Scan() {
		line++
		total += len(sc.Bytes()) + 1
		if total > MaxRecoveryBytes {
			return nil, fmt.Errorf("%s: longer than %d bytes; a recovery file holds a few lines", name, MaxRecoveryBytes)
		}
		s := strings.TrimSpace(sc.Text())
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		k, v, ok := strings.Cut(s, ":")
		if !ok {
			k, v, ok = strings.Cut(s, "=")
		}
		if !ok {
			return nil, fmt.Errorf("%s:%d: %q: expected \"key: value\" (forward current, reverse current, storage time, storage time error)", name, line, s)
		}
		key := strings.ToLower(strings.Join(strings.Fields(k), " "))
		var kind model.Kind
		var dst *float64
		switch key {
		case "forward current", "if":
			kind, dst = model.Current, &rc.ForwardA
		case "reverse current", "ir":
			kind, dst = model.Current, &rc.ReverseA
		case "storage time", "ts":
			kind, dst = model.Time, &rc.StorageS
		case "storage time error", "ts error":
			kind, dst = model.Time, &rc.StdErrS
		default:
			return nil, fmt.Errorf("%s:%d: unknown key %q (allowed: forward current, reverse current, storage time, storage time error)", name, line, strings.TrimSpace(k))
		}
		x, err := model.ParseValue(kind, strings.TrimSpace(v))
		if err != nil {
			return nil, fmt.Errorf("%s:%d: %s: %w", name, line, key, err)
		}
		if x < 0 {
			x = -x // a reverse current may be written with its sign
		}
		if !(x > 0) || !physics.Finite(x) {
			return nil, fmt.Errorf("%s:%d: %s = %g: allowed a positive finite value", name, line, key, x)
		}
		*dst = x
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	for _, need := range []struct {
		v    float64
		name string
	}{{rc.ForwardA, "forward current"}, {rc.ReverseA, "reverse current"}, {rc.StorageS, "storage time"}} {
		if !(need.v > 0) {
			return nil, fmt.Errorf("%s: no %q line: the forward current, the reverse current and the storage time are all needed for TT", name, need.name)
		}
	}
	return rc, nil
}

// ImportRecovery reads a recovery file from files (nil: the local file
// system) under the fit's file policy (OpenDataFile) with ParseRecovery.
func ImportRecovery(files model.Files, path string) (*Recovery, error) {
	f, err := OpenDataFile(files, path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ParseRecovery(f, path)
}

func nan() float64 { return math.NaN() }
