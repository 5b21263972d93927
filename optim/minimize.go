package optim

import (
	"context"
	"fmt"
	"math"
	"slices"
	"time"

	"gonum.org/v1/gonum/floats"
)

// Method is an optimizer. It is implemented by *GradientDescent,
// *ConjugateGradient, *LBFGS, *Momentum, *Adam and *Gonum; its methods are
// unexported, so the set is closed. A Method value holds the workspaces of
// its run: do not pass one value to two concurrent calls of Minimize.
type Method interface {
	// init validates the settings, sizes the workspaces for len(r.x) and
	// prepares a run. Methods that work on the full objective evaluate at
	// r.x and set r.f, r.g and r.gnorm. init returns running, or the status
	// that stopped the first evaluation; a non-nil error is a bad setting.
	init(r *runner) (Status, error)
	// iterate performs one iteration. On running it has moved r.x and set
	// r.f, r.g, r.gnorm and r.stepLen for the new point; on any other status
	// r.x, r.f, r.g and r.gnorm still describe the last completed iteration.
	iterate(r *runner) Status
	// vectors returns the number of vectors of length n that init
	// allocates for the method's own workspace (see StateVectors). It must
	// not read anything but the settings, and must accept a nil receiver.
	vectors() int
}

// finisher is implemented by methods that must release something when a
// run ends (the Gonum method stops its goroutine).
type finisher interface {
	finish(r *runner)
}

// runner holds the state shared by all methods during one run and does the
// accounting: evaluations, limits, divergence, best point and trace.
type runner struct {
	ctx   context.Context
	obj   Objective
	lim   Limits
	start time.Time

	x, g     []float64 // current point and its gradient
	f, gnorm float64   // cost and ‖g‖₂ at x
	stepLen  float64   // ‖x_k − x_{k−1}‖₂ of the last iteration

	best      []float64
	bestF     float64
	bestGNorm float64
	haveBest  bool
	keepLast  bool // best = last completed iteration (Momentum, Adam)

	refF    float64 // reference cost of the Blowup rule
	haveRef bool
	evals   float64
	iter    int
	atStart bool  // evaluating at x0: non-finite values are ErrNotFiniteStart
	err     error // detail for Cancelled and Diverged
	trace   []Step
}

// Minimize minimises f from x0 with method m within the limits lim.
//
// Evaluations are counted the same way for every method: one call of
// f.Eval is one evaluation, with or without the gradient, and one call of
// EvalBatch(…, k) of a Batched objective is Share(k) evaluations. No method
// evaluates f in any way the count does not see.
//
// Before every evaluation Minimize checks ctx, the evaluation limit and the
// time limit, so a cancelled context stops the run within one evaluation,
// also inside a line search.
//
// Errors: bad input (nil f or m, empty or non-finite x0, bad limits or
// method settings) returns an error wrapping the sentinels of this package
// and an empty Result. A cost or gradient at x0 that is not finite returns
// an error wrapping ErrNotFiniteStart. Otherwise the Result is always
// filled, and the error is non-nil only for two statuses: Cancelled (the
// error wraps ctx.Err()) and Diverged (the error wraps ErrDiverged). All
// other statuses, LineSearchFailed included, come with a nil error; read
// Result.Status to tell them apart.
func Minimize(ctx context.Context, f Objective, x0 []float64, m Method, lim Limits) (Result, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	switch {
	case f == nil:
		return Result{}, ErrNilObjective
	case m == nil:
		return Result{}, ErrNilMethod
	case len(x0) == 0:
		return Result{}, ErrEmptyStart
	}
	for i, v := range x0 {
		if !finite(v) {
			return Result{}, fmt.Errorf("%w: x0[%d] = %v", ErrNotFiniteStart, i, v)
		}
	}
	lim, err := lim.check()
	if err != nil {
		return Result{}, err
	}
	r := newRunner(ctx, f, x0, lim)
	if fin, ok := m.(finisher); ok {
		defer fin.finish(r)
	}
	st, err := m.init(r)
	if err != nil {
		return Result{}, err
	}
	r.atStart = false
	if st == Diverged && r.iter == 0 && !r.keepLast {
		// The cost or gradient at x0 is not finite.
		return Result{X: slices.Clone(x0), Cost: r.f, GradNorm: math.NaN(), Evaluations: r.evals,
			Elapsed: time.Since(r.start), Status: Diverged}, r.err
	}
	if st == running && !r.keepLast {
		r.refF, r.haveRef = r.f, true
		r.updateBest()
		if r.gradConverged() {
			st = GradConverged
		}
	}
	for st == running {
		if r.iter >= lim.Iterations {
			st = IterationLimit
			break
		}
		prevF := r.f
		if st = m.iterate(r); st != running {
			break
		}
		r.iter++
		s := Step{
			Iter:        r.iter,
			Evaluations: r.evals,
			Cost:        r.f,
			GradNorm:    r.gnorm,
			StepLen:     r.stepLen,
			Elapsed:     time.Since(r.start),
		}
		r.trace = append(r.trace, s)
		blown := r.blownUp()
		if !blown {
			r.updateBest()
		}
		stop := lim.Observer != nil && lim.Observer(s, r.x)
		if blown {
			st = Diverged
			break
		}
		if stop {
			st = Stopped
			break
		}
		st = r.checkAfter(prevF)
	}
	res := Result{
		X:           r.best,
		Cost:        r.bestF,
		GradNorm:    r.bestGNorm,
		Iterations:  r.iter,
		Evaluations: r.evals,
		Elapsed:     time.Since(r.start),
		Status:      st,
		Trace:       r.trace,
	}
	if !r.haveBest {
		copy(res.X, x0)
	}
	if st == Cancelled || st == Diverged {
		return res, r.err
	}
	return res, nil
}

// newRunner sets up the state of a run from checked input.
func newRunner(ctx context.Context, f Objective, x0 []float64, lim Limits) *runner {
	n := len(x0)
	return &runner{
		ctx:       ctx,
		obj:       f,
		lim:       lim,
		start:     time.Now(),
		x:         slices.Clone(x0),
		g:         make([]float64, n),
		f:         math.NaN(),
		gnorm:     math.NaN(),
		best:      make([]float64, n),
		bestF:     math.NaN(),
		bestGNorm: math.NaN(),
		atStart:   true,
		trace:     make([]Step, 0, min(lim.Iterations, 1024)),
	}
}

// Blowup is the factor over the reference cost beyond which a run counts as
// diverged: a cost above Blowup·max(1, |f_ref|) stops the run with status
// Diverged, where f_ref is f(x0) for the full-batch methods and the first
// epoch's cost for Momentum and Adam. A step far too long can first jump to
// huge but finite costs, where units saturate and the gradient is tiny; that
// must read as divergence, not convergence. Line-search methods never
// accept a cost above f(x0), so the rule only ever stops fixed-step and
// mini-batch runs.
const Blowup = 1e3

// blownUp applies the Blowup rule to the iteration just recorded.
func (r *runner) blownUp() bool {
	if !r.haveRef {
		r.refF, r.haveRef = r.f, true
		return false
	}
	if r.f > Blowup*math.Max(1, math.Abs(r.refF)) {
		r.err = &DivergedError{Detail: fmt.Sprintf("cost %.4g at iteration %d is more than %g times the starting cost %.4g", r.f, r.iter, Blowup, r.refF)}
		return true
	}
	return false
}

// updateBest records the current point as the best one when it is.
func (r *runner) updateBest() {
	if r.keepLast || !r.haveBest || r.f < r.bestF {
		copy(r.best, r.x)
		r.bestF, r.bestGNorm, r.haveBest = r.f, r.gnorm, true
	}
}

// gradConverged applies the gradient test ‖g‖ ≤ GradTol·max(1, |f|), with
// |f| no larger than the best cost's magnitude: a cost that explodes (a step
// far too long) must not pass a test made relative to it.
func (r *runner) gradConverged() bool {
	scale := math.Abs(r.f)
	if r.haveBest {
		scale = math.Min(scale, math.Abs(r.bestF))
	}
	return r.gnorm <= r.lim.GradTol*math.Max(1, scale)
}

// checkAfter applies the tests made after every iteration.
func (r *runner) checkAfter(prevF float64) Status {
	switch {
	case r.gradConverged():
		return GradConverged
	case r.lim.CostTol > 0 && math.Abs(prevF-r.f) <= r.lim.CostTol*math.Max(1, math.Abs(r.f)):
		return CostConverged
	}
	return r.stopBeforeEval()
}

// stopBeforeEval returns the status that forbids another evaluation, or
// running.
func (r *runner) stopBeforeEval() Status {
	if err := r.ctx.Err(); err != nil {
		r.err = fmt.Errorf("optim: cancelled after %d iterations and %g evaluations: %w", r.iter, r.evals, err)
		return Cancelled
	}
	if r.lim.Evaluations > 0 && r.evals >= r.lim.Evaluations {
		return EvaluationLimit
	}
	if r.lim.Time > 0 && time.Since(r.start) >= r.lim.Time {
		return TimeLimit
	}
	return running
}

// eval evaluates the full objective at x, and its gradient into grad when
// grad is not nil. It counts one evaluation.
func (r *runner) eval(grad, x []float64) (float64, Status) {
	if st := r.stopBeforeEval(); st != running {
		return 0, st
	}
	f := r.obj.Eval(grad, x)
	r.evals++
	return f, r.checkFinite(f, grad)
}

// evalBatch evaluates batch k of b and counts Share(k) evaluations.
func (r *runner) evalBatch(b Batched, grad, x []float64, k int) (float64, Status) {
	if st := r.stopBeforeEval(); st != running {
		return 0, st
	}
	f := b.EvalBatch(grad, x, k)
	r.evals += b.Share(k)
	return f, r.checkFinite(f, grad)
}

func (r *runner) checkFinite(f float64, grad []float64) Status {
	if !finite(f) {
		r.diverge("cost", -1, f)
		return Diverged
	}
	for i, v := range grad {
		if !finite(v) {
			r.diverge("gradient", i, v)
			return Diverged
		}
	}
	return running
}

func (r *runner) diverge(what string, i int, v float64) {
	if i >= 0 {
		what = fmt.Sprintf("%s[%d]", what, i)
	}
	if r.atStart {
		r.err = fmt.Errorf("%w: %s at x0 is %v", ErrNotFiniteStart, what, v)
		return
	}
	r.err = &DivergedError{Detail: fmt.Sprintf("%s is %v at evaluation %g (iteration %d)", what, v, r.evals, r.iter+1)}
}

// evalStart evaluates the cost and gradient at r.x for methods that work on
// the full objective.
func (r *runner) evalStart() Status {
	f, st := r.eval(r.g, r.x)
	r.f = f
	if st == running {
		r.gnorm = floats.Norm(r.g, 2)
	}
	return st
}

func finite(v float64) bool { return v-v == 0 }

// grow returns s resliced to n, or a new slice when cap(s) < n.
func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}
