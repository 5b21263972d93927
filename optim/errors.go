package optim

import (
	"errors"
	"fmt"
)

// Sentinel errors. Errors returned by this package wrap one of these, so
// callers test them with errors.Is.
var (
	// ErrNilObjective: Minimize or CheckGradient was given a nil objective.
	ErrNilObjective = errors.New("optim: nil objective")
	// ErrNilMethod: Minimize was given a nil method.
	ErrNilMethod = errors.New("optim: nil method")
	// ErrEmptyStart: the starting point has length zero.
	ErrEmptyStart = errors.New("optim: empty starting point")
	// ErrNotFiniteStart: the starting point, or the cost or gradient there,
	// holds NaN or ±Inf.
	ErrNotFiniteStart = errors.New("optim: starting point not finite")
	// ErrBadLimits: a field of Limits is out of range.
	ErrBadLimits = errors.New("optim: bad limits")
	// ErrBadSetting: a setting of a method is out of range.
	ErrBadSetting = errors.New("optim: bad method setting")
	// ErrDiverged: the cost or the gradient became NaN or ±Inf during a
	// run, or the cost passed Blowup times the reference cost.
	ErrDiverged = errors.New("optim: diverged")
)

// FieldError reports a field of a settings struct that is out of range:
// where (Struct and Field), what was found (Value) and what was expected
// (Want). It wraps ErrBadLimits or ErrBadSetting.
type FieldError struct {
	Struct string // e.g. "Limits", "LBFGS"
	Field  string // e.g. "GradTol", "Memory"
	Value  any    // the value found
	Want   string // the valid range, e.g. "≥ 0"
	Err    error  // ErrBadLimits or ErrBadSetting
}

func (e *FieldError) Error() string {
	return fmt.Sprintf("%v: %s.%s = %v, want %s", e.Err, e.Struct, e.Field, e.Value, e.Want)
}

// Unwrap returns the sentinel, so errors.Is(err, ErrBadSetting) works.
func (e *FieldError) Unwrap() error { return e.Err }

func settingError(method, field string, v any, want string) error {
	return &FieldError{Struct: method, Field: field, Value: v, Want: want, Err: ErrBadSetting}
}

func limitsError(field string, v any, want string) error {
	return &FieldError{Struct: "Limits", Field: field, Value: v, Want: want, Err: ErrBadLimits}
}

// DivergedError says what diverged, and when: the error of a run that
// stopped with status Diverged. It unwraps to ErrDiverged, and its message
// is ErrDiverged's followed by Detail.
type DivergedError struct {
	Detail string // e.g. "cost 3.1e+05 at iteration 12 is more than 1000 times the starting cost 0.69"
}

func (e *DivergedError) Error() string { return ErrDiverged.Error() + ": " + e.Detail }

// Unwrap returns ErrDiverged.
func (e *DivergedError) Unwrap() error { return ErrDiverged }
