package strictjson

import "reflect"

// Reader walks the top level of one JSON object member by member, for
// callers that need a few members without decoding the rest (a document's
// schema version, the header a listing shows). It applies the same strict
// rules as Decode.
type Reader struct{ d decoder }

// NewReader starts reading data.
func NewReader(data []byte) *Reader {
	r := &Reader{d: decoder{data: data}}
	r.d.ws()
	return r
}

// Peek returns the next byte after white space, and false at the end.
func (r *Reader) Peek() (byte, bool) { return r.d.peek() }

// Syntax returns a *SyntaxError at the current position.
func (r *Reader) Syntax(why string) error { return r.d.syntax(why) }

// Members walks the members of the object that starts at the current
// position, calling fn for each key with the reader at its value; fn must
// consume the value (Value or Skip) or return an error, which stops the
// walk and is returned.
func (r *Reader) Members(fn func(key string) error) error { return r.d.members(nil, fn) }

// Value decodes the current value into the variable ptr points to; errors
// name the path $.key.
func (r *Reader) Value(key string, ptr any) error {
	return r.d.value(reflect.ValueOf(ptr).Elem(), (*jpath)(nil).key(key))
}

// Skip passes over the current value.
func (r *Reader) Skip() error { return r.d.skip() }

// Unknown lists, by path, the object keys Value met that match no field.
func (r *Reader) Unknown() []string { return r.d.unknown }
