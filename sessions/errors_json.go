package sessions

import "junco/sessions/internal/strictjson"

// The errors a document's JSON can give (see Decode).
type (
	// SyntaxError is malformed JSON at a line and column (both from 1).
	SyntaxError = strictjson.SyntaxError
	// UnknownFieldsError lists the object keys that match no field, by path.
	UnknownFieldsError = strictjson.UnknownFieldsError
	// TypeError is a JSON value of the wrong type or out of range for its field.
	TypeError = strictjson.TypeError
	// EncodeError reports a value that cannot be written as JSON.
	EncodeError = strictjson.EncodeError
)
