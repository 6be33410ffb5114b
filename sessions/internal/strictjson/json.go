// Package strictjson is the JSON codec of junco's stored documents. It
// follows the struct tags like encoding/json but differs where a record
// needs it:
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
package strictjson

import (
	"encoding"
	"encoding/json"
	"reflect"
	"strconv"
)

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
