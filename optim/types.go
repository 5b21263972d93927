package optim

import (
	"math"
	"strconv"
	"time"
)

// Limits says when a run must stop. Its zero value is usable: 10,000
// iterations, gradient tolerance 1e-6, no other limit.
type Limits struct {
	// Iterations is the largest number of iterations (for Momentum and Adam:
	// epochs). 0 means 10,000; negative is an error.
	Iterations int
	// Evaluations is the largest number of evaluations, counted as in
	// Minimize. No evaluation is started once the count has reached it, so a
	// run ends with at most Evaluations + 1 (one Eval) or Evaluations + one
	// batch share. 0 means no limit; negative is an error.
	Evaluations float64
	// GradTol stops a run with GradConverged when
	//
	//	‖∇f(x_k)‖₂ ≤ GradTol · max(1, min(|f(x_k)|, |f_best|)),
	//
	// a test relative to the cost that becomes absolute when |f| < 1;
	// f_best, the lowest cost so far, keeps an exploding cost from
	// passing it.
	// 0 means 1e-6; negative or NaN is an error.
	GradTol float64
	// CostTol stops a run with CostConverged when
	//
	//	|f_{k−1} − f_k| ≤ CostTol · max(1, |f_k|).
	//
	// 0 turns the test off; negative or NaN is an error.
	CostTol float64
	// Time is the wall-time limit, checked before every evaluation.
	// 0 means none; negative is an error.
	Time time.Duration
	// Observer, when not nil, is called after every iteration with the
	// step just recorded and the current point x. x is read-only and valid
	// only during the call. Returning true stops the run with status Stopped.
	Observer func(s Step, x []float64) (stop bool)
}

const (
	defaultIterations = 10000
	defaultGradTol    = 1e-6
)

// check validates l and returns a copy with defaults applied.
func (l Limits) check() (Limits, error) {
	switch {
	case l.Iterations < 0:
		return l, limitsError("Iterations", l.Iterations, "≥ 0")
	case !(l.Evaluations >= 0) || math.IsInf(l.Evaluations, 1):
		return l, limitsError("Evaluations", l.Evaluations, "finite and ≥ 0")
	case !(l.GradTol >= 0) || math.IsInf(l.GradTol, 1):
		return l, limitsError("GradTol", l.GradTol, "finite and ≥ 0")
	case !(l.CostTol >= 0) || math.IsInf(l.CostTol, 1):
		return l, limitsError("CostTol", l.CostTol, "finite and ≥ 0")
	case l.Time < 0:
		return l, limitsError("Time", l.Time, "≥ 0")
	}
	if l.Iterations == 0 {
		l.Iterations = defaultIterations
	}
	if l.GradTol == 0 {
		l.GradTol = defaultGradTol
	}
	return l, nil
}

// Step is the record of one iteration.
type Step struct {
	Iter        int     // iteration (epoch) index, 1 for the first iteration
	Evaluations float64 // evaluations so far, counted as in Minimize
	// Cost is f(x_k). For Momentum and Adam it is the share-weighted mean
	// of the batch costs met during the epoch, Σ_k Share(k)·f_k, each taken
	// before that batch's update.
	Cost float64
	// GradNorm is ‖∇f(x_k)‖₂. For Momentum and Adam it is the norm of the
	// share-weighted mean of the batch gradients of the epoch,
	// ‖Σ_k Share(k)·∇f_k‖₂; the full-data gradient is not computed.
	GradNorm float64
	// StepLen is ‖x_k − x_{k−1}‖₂, the distance moved in this iteration
	// (for Momentum and Adam, over the whole epoch).
	StepLen float64
	Elapsed time.Duration // wall time since the run started
}

// Result is the outcome of Minimize.
type Result struct {
	// X is the best point found, a new slice (x0 is never modified). For
	// GradientDescent, ConjugateGradient, LBFGS and Gonum it is the iterate
	// of lowest cost; for Momentum and Adam, whose costs are batch
	// estimates, it is the point at the end of the last finite epoch (x0 if
	// no epoch finished).
	X []float64
	// Cost and GradNorm belong to X, with the meaning given in Step. For
	// Momentum and Adam before any epoch finished they are NaN.
	Cost     float64
	GradNorm float64
	// Iterations completed (epochs for Momentum and Adam).
	Iterations  int
	Evaluations float64
	Elapsed     time.Duration
	Status      Status
	Trace       []Step // one Step per completed iteration
}

// Status says why a run stopped.
type Status int

const (
	running          Status = iota // not stopped; never in a Result
	GradConverged                  // gradient test of Limits.GradTol met, or a Gonum method stopped on optimize.GradientThreshold
	CostConverged                  // cost test of Limits.CostTol met, or a Gonum method converged on its own test
	IterationLimit                 // Limits.Iterations reached
	EvaluationLimit                // Limits.Evaluations reached
	TimeLimit                      // Limits.Time reached
	Cancelled                      // the context was cancelled
	Diverged                       // cost or gradient became NaN or ±Inf, or the cost passed the Blowup bound
	LineSearchFailed               // no step met the line-search conditions (GradientDescent: none in 60 halvings), or a Gonum method failed
	Stopped                        // the observer asked to stop
)

var statusNames = [...]string{
	running:          "Running",
	GradConverged:    "GradConverged",
	CostConverged:    "CostConverged",
	IterationLimit:   "IterationLimit",
	EvaluationLimit:  "EvaluationLimit",
	TimeLimit:        "TimeLimit",
	Cancelled:        "Cancelled",
	Diverged:         "Diverged",
	LineSearchFailed: "LineSearchFailed",
	Stopped:          "Stopped",
}

// Running is the status of a run that has not stopped: never in a Result,
// but the status of a model saved as a checkpoint during a run.
const Running = running

// ParseStatus returns the status with the given name (as String writes
// it); "Checkpoint", which model files of earlier versions wrote for
// checkpoints, and "" read as Running.
func ParseStatus(name string) (Status, bool) {
	switch name {
	case "", "Checkpoint":
		return Running, true
	}
	for i, n := range statusNames {
		if n == name {
			return Status(i), true
		}
	}
	return 0, false
}

// String returns the name of the status, e.g. "GradConverged".
func (s Status) String() string {
	if s < 0 || int(s) >= len(statusNames) {
		return "Status(" + strconv.Itoa(int(s)) + ")"
	}
	return statusNames[s]
}
