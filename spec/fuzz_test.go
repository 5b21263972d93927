package spec

import (
	"bytes"
	"errors"
	"reflect"
	"testing"
)

// FuzzSpec checks, for any input: Parse does not panic; a rejection is an
// *Error or an ErrorList whose every entry has a field or a line (or is
// an empty or oversized input) and wraps a sentinel; an accepted spec
// passes Validate and survives WriteYAML → Parse unchanged.
func FuzzSpec(f *testing.F) {
	for _, tt := range badTests {
		f.Add([]byte(tt.src))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		n, err := Parse(bytes.NewReader(data))
		if err != nil {
			var list []*Error
			switch e := err.(type) {
			case *Error:
				list = []*Error{e}
			case ErrorList:
				if len(e) < 2 {
					t.Fatalf("ErrorList of %d: %v", len(e), e)
				}
				list = e
			default:
				t.Fatalf("error %v of type %T", err, err)
			}
			for _, e := range list {
				if e.Field == "" && e.Line == 0 && !errors.Is(e, ErrEmpty) && !errors.Is(e, ErrTooLarge) {
					t.Errorf("problem without field or line: %v", e)
				}
				if !wrapsSentinel(e) {
					t.Errorf("problem wraps no sentinel: %v", e)
				}
			}
			return
		}
		if err := n.Validate(); err != nil {
			t.Fatalf("Validate of a parsed spec: %v", err)
		}
		var buf bytes.Buffer
		if err := n.WriteYAML(&buf); err != nil {
			t.Fatalf("WriteYAML: %v", err)
		}
		m, err := Parse(bytes.NewReader(buf.Bytes()))
		if err != nil {
			t.Fatalf("Parse of written spec: %v\n%s", err, buf.Bytes())
		}
		if !reflect.DeepEqual(n, m) {
			t.Fatalf("round trip changed the spec:\n got %#v\nwant %#v\n%s", m, n, buf.Bytes())
		}
	})
}

func wrapsSentinel(e *Error) bool {
	for _, s := range []error{ErrSyntax, ErrEmpty, ErrTooLarge, ErrType, ErrUnknownField, ErrMissingField,
		ErrDuplicate, ErrRange, ErrUnknownName, ErrVersion, ErrConflict} {
		if errors.Is(e, s) {
			return true
		}
	}
	return false
}
