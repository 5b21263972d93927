package encode

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
)

// Value is one raw value of a record: a number, a text, or missing (the
// zero Value). Build one with Number or Text.
type Value struct {
	kind valueKind
	num  float64
	text string
}

type valueKind byte

const (
	kindMissing valueKind = iota // the zero Value
	kindNumber
	kindText
)

// Number returns a number value. NaN counts as missing.
func Number(v float64) Value {
	if math.IsNaN(v) {
		return Value{}
	}
	return Value{kind: kindNumber, num: v}
}

// Text returns a text value: a category's level, or a number's text (which
// is parsed). A missing token (e.g. "" or "NA") counts as missing.
func Text(s string) Value { return Value{kind: kindText, text: s} }

// Missing is the missing value, the zero Value.
var Missing = Value{}

// IsMissing reports whether v is the missing value.
func (v Value) IsMissing() bool { return v.kind == kindMissing }

// String formats v for messages.
func (v Value) String() string {
	switch v.kind {
	case kindNumber:
		return strconv.FormatFloat(v.num, 'g', -1, 64)
	case kindText:
		return strconv.Quote(v.text)
	}
	return "missing"
}

// FieldError is a problem with one input's value in a record or row.
type FieldError struct {
	Field string // the input's name
	Err   error  // wraps ErrMissingField, ErrMissingValue, ErrUnknownLevel, ErrType or ErrNotFinite
}

func (e *FieldError) Error() string { return fmt.Sprintf("field %q: %v", e.Field, e.Err) }

// Unwrap returns the problem.
func (e *FieldError) Unwrap() error { return e.Err }

// code codes the value v of input i.
func (e *Encoder) code(i int, v Value) (float64, error) {
	switch v.kind {
	case kindNumber:
		return e.codeNumber(i, v.num)
	case kindText:
		return e.codeText(i, v.text)
	}
	return e.codeMissing(i)
}

// Layout is a fixed order of named columns bound to an encoder once, so
// that rows in that order are coded without looking names up: the
// zero-allocation path for a caller whose columns do not change. It is
// safe for concurrent use.
type Layout struct {
	e   *Encoder
	pos []int // pos[i] = column of input i in the caller's rows
	n   int   // columns in a row
}

// Layout binds the column names of the caller's rows. Every input must be
// among names; other names are allowed and ignored. A name given twice is
// an error.
func (e *Encoder) Layout(names []string) (*Layout, error) {
	col := make(map[string]int, len(names))
	for j, n := range names {
		if k, dup := col[n]; dup {
			return nil, fmt.Errorf("%w: column %q given at %d and %d", ErrColumns, n, k+1, j+1)
		}
		col[n] = j
	}
	l := &Layout{e: e, pos: make([]int, len(e.inputs)), n: len(names)}
	var missing []string
	for i := range e.inputs {
		j, ok := col[e.inputs[i].Name]
		if !ok {
			missing = append(missing, strconv.Quote(e.inputs[i].Name))
			continue
		}
		l.pos[i] = j
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("%w: the model's inputs %v are not among the columns", ErrColumns, missing)
	}
	return l, nil
}

// Code codes row (one value per bound column) into dst, one value per
// input (len NumInputs), ready for Expand or a model's prediction methods.
// It returns the first problem as a *FieldError. It allocates nothing
// unless it fails.
func (l *Layout) Code(dst []float64, row []Value) error {
	if len(row) != l.n {
		return fmt.Errorf("%w: row has %d values, the layout %d columns", ErrColumns, len(row), l.n)
	}
	if len(dst) != len(l.pos) {
		panic(fmt.Sprintf("encode: Code into %d values, want %d", len(dst), len(l.pos)))
	}
	for i, j := range l.pos {
		v, err := l.e.code(i, row[j])
		if err != nil {
			return &FieldError{Field: l.e.inputs[i].Name, Err: err}
		}
		dst[i] = v
	}
	return nil
}

// Encoder returns the encoder l is bound to.
func (l *Layout) Encoder() *Encoder { return l.e }

// CodeRecord codes the record rec, a value per input name, into dst (sized
// to NumInputs when too short) and returns it. Values may be nil (missing),
// float64, float32, int, int64, json.Number, string (a category's level,
// or a number's text) or Value; names that are not inputs are ignored. An
// absent input, a missing value under refuse, an unknown level under
// refuse or a value of the wrong type is a *FieldError.
func (e *Encoder) CodeRecord(dst []float64, rec map[string]any) ([]float64, error) {
	if cap(dst) < len(e.inputs) {
		dst = make([]float64, len(e.inputs))
	}
	dst = dst[:len(e.inputs)]
	for i := range e.inputs {
		name := e.inputs[i].Name
		raw, ok := rec[name]
		if !ok {
			return nil, &FieldError{Field: name, Err: describe(ErrMissingField, "the record has no field of that name; send null for a missing value")}
		}
		var v Value
		switch t := raw.(type) {
		case nil:
		case Value:
			v = t
		case float64:
			v = Number(t)
		case float32:
			v = Number(float64(t))
		case int:
			v = Number(float64(t))
		case int64:
			v = Number(float64(t))
		case json.Number:
			f, err := t.Float64()
			if err != nil {
				return nil, &FieldError{Field: name, Err: describe(ErrType, "%s is not a number", t)}
			}
			v = Number(f)
		case string:
			v = Text(t)
		default:
			return nil, &FieldError{Field: name, Err: describe(ErrType, "got a %T, want a number, a text or null", raw)}
		}
		c, err := e.code(i, v)
		if err != nil {
			return nil, &FieldError{Field: name, Err: err}
		}
		dst[i] = c
	}
	return dst, nil
}
