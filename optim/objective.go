package optim

// Objective is a differentiable function of a point x in ℝⁿ.
//
// Eval returns f(x). When grad is non-nil it must have len(x) and Eval
// writes ∇f(x) into it. One call of Eval counts as one evaluation,
// whether or not the gradient is asked for. Eval must not modify x and
// must not keep x or grad after it returns.
type Objective interface {
	Eval(grad, x []float64) float64
}

// Func adapts an ordinary function to the Objective interface.
type Func func(grad, x []float64) float64

// Eval calls f(grad, x).
func (f Func) Eval(grad, x []float64) float64 { return f(grad, x) }

var _ Objective = Func(nil)

// Batched is an objective that is a mean over m rows which are dealt into
// mini-batches. Its Eval (from Objective) evaluates the full objective over
// all rows; EvalBatch evaluates one batch.
//
// The cost of batch k is the mean over the batch's rows plus the full
// penalty term, so that the batch cost is an unbiased estimate of the full
// cost when the batch is drawn uniformly (Robbins & Monro 1951).
type Batched interface {
	Objective
	// Batches returns the number of mini-batches in one epoch (≥ 1).
	Batches() int
	// EvalBatch returns the cost of batch k, 0 ≤ k < Batches(), and writes
	// its gradient into grad when grad is non-nil.
	EvalBatch(grad, x []float64, k int) float64
	// Share returns the fraction of all rows that batch k holds (b/m). A
	// call of EvalBatch(…, k) counts as Share(k) evaluations.
	Share(k int) float64
	// Shuffle deals the rows into new batches, deterministically from seed.
	Shuffle(seed uint64)
}
