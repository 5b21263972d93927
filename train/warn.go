package train

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// gradLarge is the factor over the gradient tolerance above which a run
// that reached its iteration limit is said to have stopped far from a
// minimum.
const gradLarge = 100

// fitWarnings says, in words, where a finished run or its data mislead: a
// class with no or fewer than score.MinClassRows training rows, holdout
// rows that lack a class, more params than training rows, an iteration
// limit reached with the gradient still large, and the holdout figures'
// own warnings (score.Warnings, which also name a class the holdout
// lacks).
func fitWarnings(m *nn.Model, set, hold *data.Set, hx *mat.Dense, run optim.Result, lim optim.Limits) []string {
	var out []string
	for k, n := range set.Counts() {
		switch {
		case n == 0:
			out = append(out, fmt.Sprintf("class %q has no training rows: the model cannot learn it", set.Classes[k]))
		case n < score.MinClassRows:
			out = append(out, fmt.Sprintf("class %q has only %d training rows", set.Classes[k], n))
		}
	}
	if p, r := len(m.Params), set.Rows(); p > r {
		out = append(out, fmt.Sprintf("the net has %d params for %d training rows: expect it to fit noise; raise the penalty (l2), shrink the net or add rows", p, r))
	}
	tol := lim.GradTol
	if tol == 0 {
		tol = 1e-6 // optim's default
	}
	if run.Status == optim.IterationLimit && run.GradNorm > gradLarge*tol*math.Max(1, math.Abs(run.Cost)) {
		out = append(out, fmt.Sprintf("stopped at the iteration limit (%d) with the gradient norm still %.3g, far above the tolerance %g: raise -iterations or the spec's train.iterations", run.Iterations, run.GradNorm, tol))
	}
	if hold == nil {
		return out
	}
	net := m.Net()
	r, _ := hx.Dims()
	p := net.Forward(net.NewWorkspace(r), m.Params, hx)
	probs := mat.DenseCopyOf(p)
	if _, c := p.Dims(); c == 1 && len(m.Classes) == 2 {
		probs = mat.NewDense(r, 2, nil)
		for i := range r {
			probs.Set(i, 0, 1-p.At(i, 0))
			probs.Set(i, 1, p.At(i, 0))
		}
	}
	var th []float64
	if m.Spec.Output.Activation == spec.Sigmoid {
		th = m.Decision.Thresholds
	}
	rep, err := score.Evaluate(probs, hold.Y, m.Classes, score.Options{Multilabel: m.Multilabel(), Thresholds: th})
	if err != nil {
		return out
	}
	return append(out, score.Warnings(rep, "holdout")...)
}
