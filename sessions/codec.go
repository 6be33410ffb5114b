package sessions

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
	"unicode/utf8"
)

// This file holds the JSON codec of session documents. It follows the
// struct tags like encoding/json but differs where a record needs it:
//
//   - Output is pretty-printed with two-space indentation, object keys in
//     struct field order (map keys sorted), one array element per line,
//     except that an array of numbers or booleans stays on one line. A
//     measured table ([][]float64) therefore prints one row per line, so
//     two revisions diff well in git.
//   - Decoding is strict: object keys must match a field's JSON name
//     exactly (no case folding); unknown keys are collected and all
//     reported, with their paths; a key given twice is an error; null is
//     accepted only for pointers, slices and maps; numbers must fit their
//     field (no fractions for integers, no overflow to infinity); strings
//     must be valid UTF-8; nothing may follow the top-level value.
//   - NaN and infinities cannot be written (JSON has no literal for them):
//     encoding fails with the path of the value.
//
// It is also fast enough for large measured tables: no allocation per
// number on decoding, no second pass on encoding.

// maxNesting bounds the nesting depth of values skipped as unknown, so
// that a hostile file cannot exhaust the stack or memory.
const maxNesting = 200

var (
	marshalerType   = reflect.TypeFor[json.Marshaler]()
	unmarshalerType = reflect.TypeFor[json.Unmarshaler]()
	textMarshType   = reflect.TypeFor[encoding.TextMarshaler]()
	textUnmarshType = reflect.TypeFor[encoding.TextUnmarshaler]()
)

// jpath is a JSON path built only when an error needs it: $ for the root,
// .key for a member, [i] for an element.
type jpath struct {
	parent *jpath
	name   string
	i      int // element index when name is ""
}

func (p *jpath) key(k string) *jpath { return &jpath{parent: p, name: k} }
func (p *jpath) index(i int) *jpath  { return &jpath{parent: p, i: i} }

func (p *jpath) String() string {
	if p == nil {
		return "$"
	}
	if p.name != "" {
		return p.parent.String() + "." + p.name
	}
	return p.parent.String() + "[" + strconv.Itoa(p.i) + "]"
}

// ---------------------------------------------------------------- encoding

// encodeJSON returns the pretty-printed JSON of v followed by a newline.
func encodeJSON(v any) ([]byte, error) { return encodeJSONSize(v, 4096) }

// encodeJSONSize is encodeJSON with a guess of the output size, which
// saves copying a growing buffer for large documents.
func encodeJSONSize(v any, size int) ([]byte, error) {
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
			if r == '\u2028' || r == '\u2029' {
				e.buf = append(e.buf, s[start:i]...)
				e.buf = fmt.Appendf(e.buf, `\u%04x`, r)
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
			out = append(out, field{name: name, index: idx, omitEmpty: strings.Contains(","+opts+",", ",omitempty,")})
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
		if !ok || (f.omitEmpty && isEmpty(fv)) {
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

// ---------------------------------------------------------------- decoding

// SyntaxError is malformed JSON at a line and column (both from 1).
type SyntaxError struct {
	Line, Column int
	Why          string
}

func (e *SyntaxError) Error() string {
	return fmt.Sprintf("line %d, column %d: %s", e.Line, e.Column, e.Why)
}

// UnknownFieldsError lists the object keys that match no field, by path.
type UnknownFieldsError struct {
	Fields []string // e.g. $.spec.temprature_K
}

func (e *UnknownFieldsError) Error() string {
	return fmt.Sprintf("unknown field%s %s (misspelt, or written by a newer junco)", plural(len(e.Fields)), strings.Join(e.Fields, ", "))
}

// TypeError is a JSON value of the wrong type or out of range for its
// field.
type TypeError struct {
	Path string
	Why  string
}

func (e *TypeError) Error() string { return e.Path + ": " + e.Why }

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

type decoder struct {
	data    []byte
	pos     int
	unknown []string
}

// decodeJSON decodes data strictly into the value v points to.
func decodeJSON(data []byte, v any) error {
	rv := reflect.ValueOf(v)
	if rv.Kind() != reflect.Pointer || rv.IsNil() {
		panic("sessions: decodeJSON needs a non-nil pointer")
	}
	d := decoder{data: data}
	d.ws()
	if err := d.value(rv.Elem(), nil); err != nil {
		return err
	}
	d.ws()
	if d.pos < len(d.data) {
		return d.syntax("unexpected text after the end of the document")
	}
	if len(d.unknown) > 0 {
		return &UnknownFieldsError{Fields: d.unknown}
	}
	return nil
}

func (d *decoder) syntax(why string) error {
	if d.pos >= len(d.data) && d.truncMsg() != why {
		why = d.truncMsg() + ": " + why
	}
	line, col := 1, 1
	end := min(d.pos, len(d.data))
	for _, c := range d.data[:end] {
		if c == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return &SyntaxError{Line: line, Column: col, Why: why}
}

func (d *decoder) truncMsg() string { return "unexpected end of data (the file is truncated)" }

func (d *decoder) eof() error { return d.syntax(d.truncMsg()) }

func (d *decoder) ws() {
	for d.pos < len(d.data) {
		switch d.data[d.pos] {
		case ' ', '\t', '\n', '\r':
			d.pos++
		default:
			return
		}
	}
}

func (d *decoder) peek() (byte, bool) {
	if d.pos >= len(d.data) {
		return 0, false
	}
	return d.data[d.pos], true
}

// literal consumes true, false or null.
func (d *decoder) literal(word string) bool {
	if len(d.data)-d.pos >= len(word) && string(d.data[d.pos:d.pos+len(word)]) == word {
		d.pos += len(word)
		return true
	}
	return false
}

// number scans a JSON number and returns its bytes.
func (d *decoder) number() ([]byte, error) {
	start := d.pos
	p := d.pos
	n := len(d.data)
	if p < n && d.data[p] == '-' {
		p++
	}
	digits := func() int {
		s := p
		for p < n && d.data[p] >= '0' && d.data[p] <= '9' {
			p++
		}
		return p - s
	}
	if p < n && d.data[p] == '0' {
		p++
	} else if digits() == 0 {
		d.pos = p
		return nil, d.syntax("invalid number")
	}
	if p < n && d.data[p] == '.' {
		p++
		if digits() == 0 {
			d.pos = p
			return nil, d.syntax("invalid number: digits must follow the decimal point")
		}
	}
	if p < n && (d.data[p] == 'e' || d.data[p] == 'E') {
		p++
		if p < n && (d.data[p] == '+' || d.data[p] == '-') {
			p++
		}
		if digits() == 0 {
			d.pos = p
			return nil, d.syntax("invalid number: digits must follow the exponent")
		}
	}
	d.pos = p
	return d.data[start:p], nil
}

// str scans a JSON string and returns its decoded value.
func (d *decoder) str() (string, error) {
	if d.pos >= len(d.data) || d.data[d.pos] != '"' {
		return "", d.syntax("expected a string")
	}
	start := d.pos
	p := d.pos + 1
	escaped := false
	for {
		if p >= len(d.data) {
			d.pos = p
			return "", d.eof()
		}
		c := d.data[p]
		if c == '"' {
			break
		}
		if c < 0x20 {
			d.pos = p
			return "", d.syntax("control character inside a string")
		}
		if c == '\\' {
			escaped = true
			p += 2
			continue
		}
		p++
	}
	raw := d.data[start : p+1]
	d.pos = p + 1
	if !utf8.Valid(raw) {
		d.pos = start
		return "", d.syntax("text is not valid UTF-8")
	}
	if !escaped {
		return string(raw[1 : len(raw)-1]), nil
	}
	var s string
	if err := json.Unmarshal(raw, &s); err != nil {
		d.pos = start
		return "", d.syntax("invalid escape in string")
	}
	return s, nil
}

// skip consumes one value of any type without storing it. It keeps an
// explicit stack of open containers, so deep nesting costs no recursion.
func (d *decoder) skip() error {
	var stack []byte // '{' or '[' per open container
	for {
		// At the start of a value.
		d.ws()
		c, ok := d.peek()
		if !ok {
			return d.eof()
		}
		switch {
		case c == '{' || c == '[':
			if len(stack) >= maxNesting {
				return d.syntax(fmt.Sprintf("nested deeper than %d levels", maxNesting))
			}
			d.pos++
			d.ws()
			if e, ok := d.peek(); ok && ((c == '{' && e == '}') || (c == '[' && e == ']')) {
				d.pos++
				break
			}
			stack = append(stack, c)
			if c == '{' {
				if err := d.key(); err != nil {
					return err
				}
			}
			continue
		case c == '"':
			if _, err := d.str(); err != nil {
				return err
			}
		case c == 't':
			if !d.literal("true") {
				return d.syntax("invalid literal")
			}
		case c == 'f':
			if !d.literal("false") {
				return d.syntax("invalid literal")
			}
		case c == 'n':
			if !d.literal("null") {
				return d.syntax("invalid literal")
			}
		case c == '-' || (c >= '0' && c <= '9'):
			if _, err := d.number(); err != nil {
				return err
			}
		default:
			return d.syntax(fmt.Sprintf("unexpected character %q", c))
		}
		// After a value: close containers or move to the next element.
		for {
			if len(stack) == 0 {
				return nil
			}
			top := stack[len(stack)-1]
			d.ws()
			c, ok := d.peek()
			if !ok {
				return d.eof()
			}
			if (top == '[' && c == ']') || (top == '{' && c == '}') {
				d.pos++
				stack = stack[:len(stack)-1]
				continue
			}
			if c != ',' {
				return d.syntax("expected ',' or the end of the array or object")
			}
			d.pos++
			if top == '{' {
				if err := d.key(); err != nil {
					return err
				}
			}
			break
		}
	}
}

// key consumes an object key and the colon after it.
func (d *decoder) key() error {
	d.ws()
	if _, err := d.str(); err != nil {
		return err
	}
	d.ws()
	if c, ok := d.peek(); !ok || c != ':' {
		return d.syntax("expected ':' after an object key")
	}
	d.pos++
	return nil
}

func (d *decoder) rawValue() ([]byte, error) {
	start := d.pos
	if err := d.skip(); err != nil {
		return nil, err
	}
	return d.data[start:d.pos], nil
}

func describe(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Bool:
		return "true or false"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return "a whole number"
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "a whole number, 0 or more"
	case reflect.Float32, reflect.Float64:
		return "a number"
	case reflect.String:
		return "text in quotes"
	case reflect.Slice, reflect.Array:
		return "an array"
	case reflect.Struct, reflect.Map:
		return "an object"
	}
	return t.String()
}

func (d *decoder) value(v reflect.Value, path *jpath) error {
	d.ws()
	c, ok := d.peek()
	if !ok {
		return d.eof()
	}
	t := v.Type()
	if c == 'n' {
		if !d.literal("null") {
			return d.syntax("invalid literal")
		}
		switch t.Kind() {
		case reflect.Pointer, reflect.Slice, reflect.Map, reflect.Interface:
			v.SetZero()
			return nil
		}
		return &TypeError{Path: path.String(), Why: "null is not allowed here; expected " + describe(t)}
	}
	if t.Kind() == reflect.Pointer {
		if v.IsNil() {
			v.Set(reflect.New(t.Elem()))
		}
		return d.value(v.Elem(), path)
	}
	if reflect.PointerTo(t).Implements(unmarshalerType) {
		raw, err := d.rawValue()
		if err != nil {
			return err
		}
		if err := v.Addr().Interface().(json.Unmarshaler).UnmarshalJSON(raw); err != nil {
			return &TypeError{Path: path.String(), Why: err.Error()}
		}
		return nil
	}
	if reflect.PointerTo(t).Implements(textUnmarshType) {
		if c != '"' {
			return &TypeError{Path: path.String(), Why: "expected text in quotes"}
		}
		s, err := d.str()
		if err != nil {
			return err
		}
		if err := v.Addr().Interface().(encoding.TextUnmarshaler).UnmarshalText([]byte(s)); err != nil {
			return &TypeError{Path: path.String(), Why: err.Error()}
		}
		return nil
	}
	mismatch := func() error {
		return &TypeError{Path: path.String(), Why: "expected " + describe(t)}
	}
	switch t.Kind() {
	case reflect.Interface:
		if t.NumMethod() != 0 {
			return &TypeError{Path: path.String(), Why: "values of type " + t.String() + " cannot be read"}
		}
		raw, err := d.rawValue()
		if err != nil {
			return err
		}
		dec := json.NewDecoder(bytes.NewReader(raw))
		dec.UseNumber()
		var x any
		if err := dec.Decode(&x); err != nil {
			return &TypeError{Path: path.String(), Why: err.Error()}
		}
		if x == nil {
			v.SetZero()
		} else {
			v.Set(reflect.ValueOf(x))
		}
	case reflect.Bool:
		switch {
		case d.literal("true"):
			v.SetBool(true)
		case d.literal("false"):
			v.SetBool(false)
		default:
			return mismatch()
		}
	case reflect.Float32, reflect.Float64:
		if c != '-' && (c < '0' || c > '9') {
			return mismatch()
		}
		b, err := d.number()
		if err != nil {
			return err
		}
		f, err := strconv.ParseFloat(string(b), t.Bits())
		if err != nil {
			return &TypeError{Path: path.String(), Why: fmt.Sprintf("%s is out of range for a %d-bit number", b, t.Bits())}
		}
		v.SetFloat(f)
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		if c != '-' && (c < '0' || c > '9') {
			return mismatch()
		}
		b, err := d.number()
		if err != nil {
			return err
		}
		n, err := strconv.ParseInt(string(b), 10, t.Bits())
		if err != nil {
			return &TypeError{Path: path.String(), Why: fmt.Sprintf("%s is not a whole number in range", b)}
		}
		v.SetInt(n)
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		if c < '0' || c > '9' {
			return mismatch()
		}
		b, err := d.number()
		if err != nil {
			return err
		}
		n, err := strconv.ParseUint(string(b), 10, t.Bits())
		if err != nil {
			return &TypeError{Path: path.String(), Why: fmt.Sprintf("%s is not a whole number 0 or more in range", b)}
		}
		v.SetUint(n)
	case reflect.String:
		if c != '"' {
			return mismatch()
		}
		s, err := d.str()
		if err != nil {
			return err
		}
		v.SetString(s)
	case reflect.Slice:
		if c != '[' {
			return mismatch()
		}
		return d.slice(v, path)
	case reflect.Struct:
		if c != '{' {
			return mismatch()
		}
		return d.object(v, path)
	case reflect.Map:
		if c != '{' {
			return mismatch()
		}
		return d.mapValue(v, path)
	default:
		return &TypeError{Path: path.String(), Why: "values of type " + t.String() + " cannot be read"}
	}
	return nil
}

func (d *decoder) slice(v reflect.Value, path *jpath) error {
	d.pos++ // [
	t := v.Type()
	switch t {
	case float64sType:
		out, err := d.floats(path)
		if err != nil {
			return err
		}
		v.Set(reflect.ValueOf(out))
		return nil
	case tableType:
		out := make([][]float64, 0, 16)
		d.ws()
		if c, ok := d.peek(); ok && c == ']' {
			d.pos++
			v.Set(reflect.ValueOf(out))
			return nil
		}
		for i := 0; ; i++ {
			d.ws()
			if c, ok := d.peek(); !ok {
				return d.eof()
			} else if c != '[' {
				if c == 'n' && d.literal("null") {
					out = append(out, nil)
				} else {
					return &TypeError{Path: path.index(i).String(), Why: "expected an array of numbers"}
				}
			} else {
				d.pos++
				row, err := d.floats(path.index(i))
				if err != nil {
					return err
				}
				out = append(out, row)
			}
			end, err := d.arrayNext()
			if err != nil {
				return err
			}
			if end {
				break
			}
		}
		v.Set(reflect.ValueOf(out))
		return nil
	}
	out := reflect.MakeSlice(t, 0, 4)
	d.ws()
	if c, ok := d.peek(); ok && c == ']' {
		d.pos++
		v.Set(out)
		return nil
	}
	for i := 0; ; i++ {
		out = reflect.Append(out, reflect.Zero(t.Elem()))
		if err := d.value(out.Index(i), path.index(i)); err != nil {
			return err
		}
		end, err := d.arrayNext()
		if err != nil {
			return err
		}
		if end {
			break
		}
	}
	v.Set(out)
	return nil
}

// floats decodes the rest of an array of numbers (after its '[')
// without reflection per element.
func (d *decoder) floats(path *jpath) ([]float64, error) {
	out := make([]float64, 0, 4)
	d.ws()
	if c, ok := d.peek(); ok && c == ']' {
		d.pos++
		return out, nil
	}
	for i := 0; ; i++ {
		d.ws()
		c, ok := d.peek()
		if !ok {
			return nil, d.eof()
		}
		if c != '-' && (c < '0' || c > '9') {
			return nil, &TypeError{Path: path.index(i).String(), Why: "expected a number"}
		}
		b, err := d.number()
		if err != nil {
			return nil, err
		}
		f, err := strconv.ParseFloat(string(b), 64)
		if err != nil {
			return nil, &TypeError{Path: path.index(i).String(), Why: fmt.Sprintf("%s is out of range for a 64-bit number", b)}
		}
		out = append(out, f)
		end, err := d.arrayNext()
		if err != nil {
			return nil, err
		}
		if end {
			return out, nil
		}
	}
}

// arrayNext reads what follows an array element: ',' (another element
// follows) or ']' (end reports true); anything else is a syntax error.
func (d *decoder) arrayNext() (end bool, err error) {
	d.ws()
	c, ok := d.peek()
	if !ok {
		return false, d.eof()
	}
	d.pos++
	switch c {
	case ']':
		return true, nil
	case ',':
		return false, nil
	}
	d.pos--
	return false, d.syntax("expected ',' or ']' in an array")
}

// members walks the members of an object, calling fn for each key with
// the decoder positioned at the value. fn must consume the value.
func (d *decoder) members(path *jpath, fn func(key string) error) error {
	d.pos++ // {
	d.ws()
	if c, ok := d.peek(); ok && c == '}' {
		d.pos++
		return nil
	}
	seen := make(map[string]bool)
	for {
		d.ws()
		keyPos := d.pos
		key, err := d.str()
		if err != nil {
			return err
		}
		if seen[key] {
			d.pos = keyPos
			return d.syntax(fmt.Sprintf("key %q appears twice in %s", key, path.String()))
		}
		seen[key] = true
		d.ws()
		if c, ok := d.peek(); !ok || c != ':' {
			return d.syntax("expected ':' after an object key")
		}
		d.pos++
		if err := fn(key); err != nil {
			return err
		}
		d.ws()
		c, ok := d.peek()
		if !ok {
			return d.eof()
		}
		d.pos++
		if c == '}' {
			return nil
		}
		if c != ',' {
			d.pos--
			return d.syntax("expected ',' or '}' in an object")
		}
	}
}

func (d *decoder) object(v reflect.Value, path *jpath) error {
	fields := fieldsOf(v.Type())
	return d.members(path, func(key string) error {
		for _, f := range fields {
			if f.name == key {
				fv := v
				for i, x := range f.index {
					if i > 0 && fv.Kind() == reflect.Pointer {
						if fv.IsNil() {
							fv.Set(reflect.New(fv.Type().Elem()))
						}
						fv = fv.Elem()
					}
					fv = fv.Field(x)
				}
				return d.value(fv, path.key(key))
			}
		}
		d.unknown = append(d.unknown, path.key(key).String())
		return d.skip()
	})
}

func (d *decoder) mapValue(v reflect.Value, path *jpath) error {
	t := v.Type()
	if t.Key().Kind() != reflect.String {
		return &TypeError{Path: path.String(), Why: "only maps with text keys can be read"}
	}
	m := reflect.MakeMap(t)
	err := d.members(path, func(key string) error {
		ev := reflect.New(t.Elem()).Elem()
		if err := d.value(ev, path.key(key)); err != nil {
			return err
		}
		m.SetMapIndex(reflect.ValueOf(key).Convert(t.Key()), ev)
		return nil
	})
	if err != nil {
		return err
	}
	v.Set(m)
	return nil
}
