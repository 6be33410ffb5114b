package strictjson

import (
	"bytes"
	"encoding"
	"encoding/json"
	"fmt"
	"reflect"
	"strconv"
	"strings"
	"unicode/utf8"
)

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

// Decode decodes data strictly into the value v points to.
func Decode(data []byte, v any) error {
	rv := reflect.ValueOf(v)
	if rv.Kind() != reflect.Pointer || rv.IsNil() {
		panic("strictjson: Decode needs a non-nil pointer")
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
