package nn

import (
	"errors"
	"fmt"
)

// Sentinel errors. Callers test for them with errors.Is; the returned errors
// wrap them with the layer, matrix or option at fault.
var (
	// ErrSpec reports a network description that cannot be compiled.
	ErrSpec = errors.New("nn: invalid spec")
	// ErrShape reports matrices whose dimensions do not fit the net or each other.
	ErrShape = errors.New("nn: shape mismatch")
	// ErrNoRows reports a data matrix without rows.
	ErrNoRows = errors.New("nn: no rows")
	// ErrNotFinite reports a NaN or infinite value in the data.
	ErrNotFinite = errors.New("nn: value not finite")
	// ErrTarget reports a target outside [0, 1].
	ErrTarget = errors.New("nn: target outside [0, 1]")
	// ErrOption reports an invalid ObjectiveOptions field.
	ErrOption = errors.New("nn: invalid option")
)

// ValueError locates a bad value in a data matrix given to NewObjective.
type ValueError struct {
	Matrix string  // "x" or "y"
	Row    int     // 0-based row index
	Col    int     // 0-based column index
	Value  float64 // the offending value
	Err    error   // ErrNotFinite or ErrTarget
}

func (e *ValueError) Error() string {
	return fmt.Sprintf("%v: %s[%d, %d] = %g", e.Err, e.Matrix, e.Row, e.Col, e.Value)
}

// Unwrap returns e.Err, so that errors.Is(err, ErrNotFinite) works.
func (e *ValueError) Unwrap() error { return e.Err }
