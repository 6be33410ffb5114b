package strictjson

import (
	"bytes"
	"encoding"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf16"
	"unicode/utf8"
)

// ---------------------------------------------------------------- encoding

// Encode returns the pretty-printed JSON of v followed by a newline.
func Encode(v any) ([]byte, error) { return EncodeSize(v, 4096) }

// EncodeSize is Encode with a guess of the output size, which
// saves copying a growing buffer for large documents.
func EncodeSize(v any, size int) ([]byte, error) {
	e := encoder{buf: make([]byte, 0, size)}
	if err := e.value(reflect.ValueOf(v), 0, nil); err != nil {
		return nil, err
	}
	e.buf = append(e.buf, '\n')
	return e.buf, nil
}

type encoder struct{ buf []byte }

// EncodeError reports a value that cannot be written as JSON.
type EncodeError struct {
	Path string // JSON path of the value, e.g. $.measurements[0].rows[3][1]
	Why  string
}

func (e *EncodeError) Error() string { return e.Path + ": " + e.Why }

func (e *encoder) newline(indent int) {
	const spaces = "                                                                "
	e.buf = append(e.buf, '\n')
	for n := 2 * indent; n > 0; n -= len(spaces) {
		e.buf = append(e.buf, spaces[:min(n, len(spaces))]...)
	}
}

func (e *encoder) value(v reflect.Value, indent int, path *jpath) error {
	if !v.IsValid() {
		e.buf = append(e.buf, "null"...)
		return nil
	}
	t := v.Type()
	if t.Kind() != reflect.Pointer && t.Kind() != reflect.Interface {
		if t.Implements(marshalerType) || reflect.PointerTo(t).Implements(marshalerType) || t.Implements(textMarshType) {
			return e.marshaler(v, path)
		}
	}
	switch t.Kind() {
	case reflect.Bool:
		e.buf = strconv.AppendBool(e.buf, v.Bool())
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		e.buf = strconv.AppendInt(e.buf, v.Int(), 10)
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		e.buf = strconv.AppendUint(e.buf, v.Uint(), 10)
	case reflect.Float32, reflect.Float64:
		return e.float(v.Float(), t.Bits(), path)
	case reflect.String:
		return e.str(v.String(), path)
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			e.buf = append(e.buf, "null"...)
			return nil
		}
		return e.value(v.Elem(), indent, path)
	case reflect.Struct:
		return e.object(v, indent, path)
	case reflect.Map:
		return e.mapValue(v, indent, path)
	case reflect.Slice, reflect.Array:
		if t.Kind() == reflect.Slice && v.IsNil() {
			e.buf = append(e.buf, "[]"...)
			return nil
		}
		return e.array(v, indent, path)
	default:
		return &EncodeError{Path: path.String(), Why: "values of type " + t.String() + " cannot be stored"}
	}
	return nil
}

func (e *encoder) marshaler(v reflect.Value, path *jpath) error {
	if v.CanAddr() {
		v = v.Addr()
	} else {
		p := reflect.New(v.Type())
		p.Elem().Set(v)
		v = p
	}
	var raw []byte
	var err error
	switch m := v.Interface().(type) {
	case json.Marshaler:
		raw, err = m.MarshalJSON()
	case encoding.TextMarshaler:
		var text []byte
		text, err = m.MarshalText()
		if err == nil {
			return e.str(string(text), path)
		}
	}
	if err != nil {
		return &EncodeError{Path: path.String(), Why: err.Error()}
	}
	var c bytes.Buffer
	if err := json.Compact(&c, raw); err != nil {
		return &EncodeError{Path: path.String(), Why: err.Error()}
	}
	e.buf = append(e.buf, c.Bytes()...)
	return nil
}

func (e *encoder) float(f float64, bits int, path *jpath) error {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return &EncodeError{Path: path.String(), Why: fmt.Sprintf("%v cannot be stored (JSON has no NaN or infinity; leave the value out or use null where the format allows)", f)}
	}
	// The same shortest form as encoding/json: plain decimals between 1e-6
	// and 1e21, exponent notation otherwise, without exponent padding.
	a := math.Abs(f)
	format := byte('f')
	if a != 0 && (a < 1e-6 || a >= 1e21) {
		format = 'e'
	}
	n := len(e.buf)
	e.buf = strconv.AppendFloat(e.buf, f, format, -1, bits)
	if format == 'e' {
		// clean up e-09 to e-9
		b := e.buf[n:]
		if m := len(b); m >= 4 && b[m-4] == 'e' && b[m-3] == '-' && b[m-2] == '0' {
			b[m-2] = b[m-1]
			e.buf = e.buf[:len(e.buf)-1]
		}
	}
	return nil
}

func (e *encoder) str(s string, path *jpath) error {
	if !utf8.ValidString(s) {
		return &EncodeError{Path: path.String(), Why: "text is not valid UTF-8"}
	}
	e.buf = append(e.buf, '"')
	start := 0
	for i := 0; i < len(s); {
		c := s[i]
		if c >= 0x20 && c != '"' && c != '\\' && c < utf8.RuneSelf {
			i++
			continue
		}
		if c >= utf8.RuneSelf {
			r, size := utf8.DecodeRuneInString(s[i:])
			// Line and paragraph separators, and the invisible format
			// characters (bidirectional overrides such as U+202E, zero
			// widths), are written escaped: a document printed to a
			// terminal (sessions export --format json) cannot reorder or
			// hide what it shows. Decoding gives the same text back.
			if r == '\u2028' || r == '\u2029' || unicode.Is(unicode.Cf, r) {
				e.buf = append(e.buf, s[start:i]...)
				if r > 0xffff { // beyond the BMP: a UTF-16 surrogate pair (RFC 8259 sec. 7)
					hi, lo := utf16.EncodeRune(r)
					e.buf = fmt.Appendf(e.buf, `\u%04x\u%04x`, hi, lo)
				} else {
					e.buf = fmt.Appendf(e.buf, `\u%04x`, r)
				}
				i += size
				start = i
				continue
			}
			i += size
			continue
		}
		e.buf = append(e.buf, s[start:i]...)
		switch c {
		case '"', '\\':
			e.buf = append(e.buf, '\\', c)
		case '\n':
			e.buf = append(e.buf, '\\', 'n')
		case '\r':
			e.buf = append(e.buf, '\\', 'r')
		case '\t':
			e.buf = append(e.buf, '\\', 't')
		default:
			e.buf = fmt.Appendf(e.buf, `\u%04x`, c)
		}
		i++
		start = i
	}
	e.buf = append(e.buf, s[start:]...)
	e.buf = append(e.buf, '"')
	return nil
}

// field is one JSON member of a struct type.
type field struct {
	name      string
	index     []int
	omitEmpty bool
	omitZero  bool // omitzero: left out when it is its type's zero value (as encoding/json, Go 1.24)
}

// fieldsOf lists the JSON members of struct type t in declaration order,
// flattening untagged embedded structs as encoding/json does.
func fieldsOf(t reflect.Type) []field {
	var out []field
	var walk func(t reflect.Type, index []int)
	walk = func(t reflect.Type, index []int) {
		for i := range t.NumField() {
			sf := t.Field(i)
			tag := sf.Tag.Get("json")
			if tag == "-" {
				continue
			}
			name, opts, _ := strings.Cut(tag, ",")
			idx := append(slices.Clone(index), i)
			if sf.Anonymous && name == "" {
				ft := sf.Type
				if ft.Kind() == reflect.Pointer {
					ft = ft.Elem()
				}
				if ft.Kind() == reflect.Struct {
					walk(ft, idx)
					continue
				}
			}
			if !sf.IsExported() {
				continue
			}
			if name == "" {
				name = sf.Name
			}
			out = append(out, field{name: name, index: idx, omitEmpty: strings.Contains(","+opts+",", ",omitempty,"),
				omitZero: strings.Contains(","+opts+",", ",omitzero,")})
		}
	}
	walk(t, nil)
	// As in Go's embedding rules, a shallower field hides deeper ones of
	// the same name.
	depth := map[string]int{}
	for _, f := range out {
		if d, ok := depth[f.name]; !ok || len(f.index) < d {
			depth[f.name] = len(f.index)
		}
	}
	kept := out[:0]
	seen := map[string]bool{}
	for _, f := range out {
		if len(f.index) == depth[f.name] && !seen[f.name] {
			seen[f.name] = true
			kept = append(kept, f)
		}
	}
	return kept
}

func isEmpty(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Array, reflect.Map, reflect.Slice, reflect.String:
		return v.Len() == 0
	case reflect.Bool, reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64,
		reflect.Float32, reflect.Float64, reflect.Interface, reflect.Pointer:
		return v.IsZero()
	}
	return false
}

// fieldByIndex is v.FieldByIndex that reports false through a nil
// embedded pointer instead of panicking.
func fieldByIndex(v reflect.Value, index []int) (reflect.Value, bool) {
	for i, x := range index {
		if i > 0 && v.Kind() == reflect.Pointer {
			if v.IsNil() {
				return reflect.Value{}, false
			}
			v = v.Elem()
		}
		v = v.Field(x)
	}
	return v, true
}

func (e *encoder) object(v reflect.Value, indent int, path *jpath) error {
	first := true
	for _, f := range fieldsOf(v.Type()) {
		fv, ok := fieldByIndex(v, f.index)
		if !ok || (f.omitEmpty && isEmpty(fv)) || (f.omitZero && fv.IsZero()) {
			continue
		}
		if first {
			e.buf = append(e.buf, '{')
			first = false
		} else {
			e.buf = append(e.buf, ',')
		}
		e.newline(indent + 1)
		_ = e.str(f.name, path)
		e.buf = append(e.buf, ':', ' ')
		if err := e.value(fv, indent+1, path.key(f.name)); err != nil {
			return err
		}
	}
	if first {
		e.buf = append(e.buf, "{}"...)
		return nil
	}
	e.newline(indent)
	e.buf = append(e.buf, '}')
	return nil
}

func (e *encoder) mapValue(v reflect.Value, indent int, path *jpath) error {
	if v.Type().Key().Kind() != reflect.String {
		return &EncodeError{Path: path.String(), Why: "only maps with text keys can be stored"}
	}
	if v.Len() == 0 {
		e.buf = append(e.buf, "{}"...)
		return nil
	}
	keys := v.MapKeys()
	slices.SortFunc(keys, func(a, b reflect.Value) int { return strings.Compare(a.String(), b.String()) })
	e.buf = append(e.buf, '{')
	for i, k := range keys {
		if i > 0 {
			e.buf = append(e.buf, ',')
		}
		e.newline(indent + 1)
		if err := e.str(k.String(), path); err != nil {
			return err
		}
		e.buf = append(e.buf, ':', ' ')
		if err := e.value(v.MapIndex(k), indent+1, path.key(k.String())); err != nil {
			return err
		}
	}
	e.newline(indent)
	e.buf = append(e.buf, '}')
	return nil
}

// inlineKind reports element kinds whose arrays are printed on one line.
func inlineKind(t reflect.Type) bool {
	switch t.Kind() {
	case reflect.Bool, reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64,
		reflect.Float32, reflect.Float64:
		return !t.Implements(marshalerType)
	}
	return false
}

var (
	float64sType = reflect.TypeFor[[]float64]()
	tableType    = reflect.TypeFor[[][]float64]()
)

// floats writes a row of numbers on one line.
func (e *encoder) floats(fs []float64, path *jpath) error {
	if fs == nil {
		e.buf = append(e.buf, "[]"...)
		return nil
	}
	e.buf = append(e.buf, '[')
	for i, f := range fs {
		if i > 0 {
			e.buf = append(e.buf, ',', ' ')
		}
		if err := e.float(f, 64, nil); err != nil {
			return &EncodeError{Path: path.index(i).String(), Why: err.(*EncodeError).Why}
		}
	}
	e.buf = append(e.buf, ']')
	return nil
}

func (e *encoder) array(v reflect.Value, indent int, path *jpath) error {
	n := v.Len()
	if n == 0 {
		e.buf = append(e.buf, "[]"...)
		return nil
	}
	et := v.Type().Elem()
	// Fast paths for numeric rows and tables: no reflection per element.
	switch v.Type() {
	case float64sType:
		return e.floats(v.Interface().([]float64), path)
	case tableType:
		rows := v.Interface().([][]float64)
		e.buf = append(e.buf, '[')
		for i, r := range rows {
			if i > 0 {
				e.buf = append(e.buf, ',')
			}
			e.newline(indent + 1)
			if err := e.floats(r, path.index(i)); err != nil {
				return err
			}
		}
		e.newline(indent)
		e.buf = append(e.buf, ']')
		return nil
	}
	if inlineKind(et) {
		e.buf = append(e.buf, '[')
		for i := range n {
			if i > 0 {
				e.buf = append(e.buf, ',', ' ')
			}
			if err := e.value(v.Index(i), indent, path.index(i)); err != nil {
				return err
			}
		}
		e.buf = append(e.buf, ']')
		return nil
	}
	e.buf = append(e.buf, '[')
	for i := range n {
		if i > 0 {
			e.buf = append(e.buf, ',')
		}
		e.newline(indent + 1)
		if err := e.value(v.Index(i), indent+1, path.index(i)); err != nil {
			return err
		}
	}
	e.newline(indent)
	e.buf = append(e.buf, ']')
	return nil
}
