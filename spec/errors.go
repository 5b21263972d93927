package spec

import (
	"errors"
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// Sentinel errors. Every *Error wraps exactly one of them, so callers can
// test the kind of a problem with errors.Is.
var (
	ErrSyntax       = errors.New("spec: syntax error")        // not well-formed YAML
	ErrEmpty        = errors.New("spec: empty document")      // no content at all
	ErrTooLarge     = errors.New("spec: too large")           // byte, class or param limit exceeded
	ErrType         = errors.New("spec: wrong type")          // e.g. a list where a number belongs
	ErrUnknownField = errors.New("spec: unknown field")       // a key the format does not have
	ErrMissingField = errors.New("spec: missing field")       // a required key is absent
	ErrDuplicate    = errors.New("spec: duplicate")           // a key, class name or feature name given twice
	ErrRange        = errors.New("spec: value out of range")  // a number or choice not allowed here
	ErrUnknownName  = errors.New("spec: unknown name")        // an activation, optimizer or scheme name not in the list
	ErrVersion      = errors.New("spec: unsupported version") // version other than 1
	ErrConflict     = errors.New("spec: conflicting fields")  // two settings that exclude each other
)

// Error is one problem in a spec, with its position.
type Error struct {
	Line   int    // 1-based line; 0 if unknown (e.g. a Network built in Go)
	Column int    // 1-based column in runes; 0 if unknown
	Field  string // key path such as "hidden[1].activation"; empty for syntax errors
	Err    error  // wraps one of the Err* sentinels
}

// Error formats e as "line:column: field: message", leaving out the parts
// that are unknown, e.g.
//
//	3:17: hidden[1].activation: unknown activation "tanhh" (want one of ...)
func (e *Error) Error() string {
	var b strings.Builder
	if e.Line > 0 {
		b.WriteString(strconv.Itoa(e.Line))
		if e.Column > 0 {
			b.WriteByte(':')
			b.WriteString(strconv.Itoa(e.Column))
		}
		b.WriteString(": ")
	}
	if e.Field != "" {
		b.WriteString(e.Field)
		b.WriteString(": ")
	}
	if e.Err != nil {
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap returns e.Err.
func (e *Error) Unwrap() error { return e.Err }

// ErrorList is several problems found in one spec, sorted by position.
type ErrorList []*Error

// MaxListed is the number of problems an ErrorList's message lists one by
// one; the rest are counted in a last line, so that a spec with fifty
// thousand duplicate names does not print fifty thousand lines.
const MaxListed = 20

// Error returns the first MaxListed problems one per line, then a line
// counting the rest.
func (l ErrorList) Error() string {
	n := min(len(l), MaxListed)
	s := make([]string, n, n+1)
	for i, e := range l[:n] {
		s[i] = e.Error()
	}
	if len(l) > n {
		s = append(s, fmt.Sprintf("and %d more problems", len(l)-n))
	}
	return strings.Join(s, "\n")
}

// Unwrap returns the problems, so errors.Is and errors.As look at each.
func (l ErrorList) Unwrap() []error {
	errs := make([]error, len(l))
	for i, e := range l {
		errs[i] = e
	}
	return errs
}

// sortList orders l by line, then column; entries without a position keep
// their relative order.
func sortList(l []*Error) {
	sort.SliceStable(l, func(i, j int) bool {
		if l[i].Line != l[j].Line {
			return l[i].Line < l[j].Line
		}
		return l[i].Column < l[j].Column
	})
}

// asError returns nil for no problems, the *Error for one, else an ErrorList.
func asError(l []*Error) error {
	switch len(l) {
	case 0:
		return nil
	case 1:
		return l[0]
	}
	sortList(l)
	return ErrorList(l)
}

// detail is the message of one problem; it prints only msg and unwraps to
// its sentinel.
type detail struct {
	msg  string
	kind error
}

func (d *detail) Error() string { return d.msg }
func (d *detail) Unwrap() error { return d.kind }

func newDetail(kind error, format string, args ...any) error {
	return &detail{msg: fmt.Sprintf(format, args...), kind: kind}
}
