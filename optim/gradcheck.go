package optim

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/diff/fd"
)

// GradientCheck is the outcome of CheckGradient.
type GradientCheck struct {
	// Analytic is the gradient the objective returns; Numeric the finite
	// difference estimate.
	Analytic, Numeric []float64
	// MaxRelErr is the largest relative error over the coordinates,
	//
	//	e_i = |g_i − ĝ_i| / max(1, |g_i|, |ĝ_i|),
	//
	// with g the analytic and ĝ the numeric gradient: an absolute error for
	// components below 1 in size, a relative one above.
	MaxRelErr float64
	// Index is the coordinate i where MaxRelErr occurs.
	Index int
}

// CheckGradient compares the gradient of f at x with a finite-difference
// estimate from gonum's diff/fd (fd.Gradient). A nil settings means central
// differences, ĝ_i = (f(x + h·e_i) − f(x − h·e_i))/(2h), with fd's default
// step h; a settings with a zero Formula gets fd.Central. The cost of the
// check is 1 + 2n evaluations for central differences. With
// settings.Concurrent, f.Eval is called from several goroutines.
//
// For a smooth f of moderate scale a correct gradient gives MaxRelErr of
// order 1e-7 or less with central differences (common practice: error
// O(h²) ≈ 1e-10 plus rounding O(ε/h) ≈ 1e-10 at h ≈ 6e-6); a wrong
// component typically gives 1e-2 or more.
func CheckGradient(f Objective, x []float64, settings *fd.Settings) (GradientCheck, error) {
	if f == nil {
		return GradientCheck{}, ErrNilObjective
	}
	if len(x) == 0 {
		return GradientCheck{}, ErrEmptyStart
	}
	for i, v := range x {
		if !finite(v) {
			return GradientCheck{}, fmt.Errorf("%w: x[%d] = %v", ErrNotFiniteStart, i, v)
		}
	}
	var s fd.Settings
	if settings != nil {
		s = *settings
	}
	if s.Formula.Stencil == nil {
		s.Formula = fd.Central
	}
	g := make([]float64, len(x))
	if c := f.Eval(g, x); !finite(c) {
		return GradientCheck{}, fmt.Errorf("%w: cost at x is %v", ErrNotFiniteStart, c)
	}
	for i, v := range g {
		if !finite(v) {
			return GradientCheck{}, fmt.Errorf("%w: gradient[%d] at x is %v", ErrNotFiniteStart, i, v)
		}
	}
	num := fd.Gradient(nil, func(p []float64) float64 { return f.Eval(nil, p) }, x, &s)
	gc := GradientCheck{Analytic: g, Numeric: num}
	for i := range g {
		e := math.Abs(g[i]-num[i]) / math.Max(1, math.Max(math.Abs(g[i]), math.Abs(num[i])))
		if !(e <= gc.MaxRelErr) { // also catches NaN
			gc.MaxRelErr, gc.Index = e, i
		}
	}
	return gc, nil
}
