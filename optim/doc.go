// Package optim minimises a smooth function f: ℝⁿ → ℝ given as an
// Objective (cost and gradient at a point) or a Batched objective (a mean
// over rows dealt into mini-batches). It imports nothing else of seine, so
// it serves anyone minimising their own function, and it is the engine for
// comparing methods on one objective: every method is run by Minimize under
// the same Limits, counts evaluations the same way (one Eval = 1,
// EvalBatch(k) = Share(k)) and reports the same Result and trace.
//
// Methods (the zero value of each struct is a documented default):
//
//	GradientDescent    x_{k+1} = x_k − α_k∇f(x_k), fixed α or Armijo backtracking
//	ConjugateGradient  d_{k+1} = −∇f(x_{k+1}) + β_k d_k, β by Polak–Ribière+ (default),
//	                   Fletcher–Reeves, Hestenes–Stiefel or Dai–Yuan; strong Wolfe steps
//	LBFGS              d_k = −H_k∇f(x_k), H_k from the last m pairs (s, y) by the
//	                   two-loop recursion; strong Wolfe steps
//	Momentum           v ← βv − η∇f_k(x or x + βv), x ← x + v, per mini-batch
//	Adam               bias-corrected first and second moment estimates, per mini-batch
//	Gonum              any gonum optimize.Method under the same accounting
//
// The strong Wolfe line search (Nocedal & Wright 2006, algorithms 3.5 and
// 3.6) is shared by CG and L-BFGS with c₁ = 1e-4 and c₂ = 0.1 (CG) or 0.9
// (L-BFGS), settable as Decrease and Curvature on the method structs.
//
// When to choose which method:
//
//	problem                                         method
//	full batch, smooth, n up to ~10⁷                LBFGS (the default choice; 2m+6 vectors of n)
//	full batch, smooth, memory tight                ConjugateGradient (6 vectors of n)
//	full batch, teaching or a baseline              GradientDescent (slow on ill-conditioned f)
//	many rows, mini-batches, noisy gradients        Adam (robust to scaling), Momentum (tuned rate)
//	non-smooth or no gradient                       Gonum with optimize.NelderMead (small n only)
//
// CG and L-BFGS need a deterministic full-data gradient: the line search
// compares costs, which batch noise would upset. Momentum and Adam do one
// pass over the batches per iteration (an epoch) and never evaluate the
// full objective, so their Step.Cost and Step.GradNorm are batch estimates
// (see Step).
//
// Memory: StateVectors gives, for each method, the number of vectors of
// length n that a run keeps (m is LBFGS's Memory above); a test measures
// it against the bytes a run allocates.
//
// Stopping: Limits.GradTol tests ‖∇f‖₂ ≤ GradTol·max(1, |f|) after every
// iteration (with |f| no larger than the lowest cost's magnitude); the
// context, the evaluation limit and the time limit are checked before
// every evaluation. A cost or gradient that is NaN or ±Inf, or a cost above
// Blowup times the reference cost, stops the run with status Diverged and
// the best finite point; Minimize then returns an error wrapping
// ErrDiverged. Cancellation returns the best
// point so far, status Cancelled and an error wrapping ctx.Err().
//
// Workspaces live in the method values and are reused: after the first
// iteration no method of this package but Gonum allocates (see
// BenchmarkIteration), and the same inputs give bit-identical results.
package optim
