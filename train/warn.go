package train

import (
	"fmt"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/score"
	"github.com/seine-ml/seine/spec"
)

// gradLarge is the share of its first gradient norm above which the
// gradient of a run that reached its iteration limit is said to be still
// large: it fell less than a hundredfold, so the run stopped far from a
// minimum (common practice; a tighter test would warn on every run that
// stops at a modest limit on purpose).
const gradLarge = 1e-2

// fitWarnings says, in words, where a finished run or its data mislead: a
// class with no or fewer than score.MinClassRows training rows, holdout
// rows that lack a class, more params than training rows, an iteration
// limit reached with the gradient still large, and the holdout figures'
// own warnings (score.Warnings, which also name a class the holdout
// lacks).
func fitWarnings(m *nn.Model, set, hold *data.Set, run optim.Result) []string {
	var out []string
	for k, n := range set.Counts() {
		switch {
		case n == 0:
			out = append(out, fmt.Sprintf("class %q has no training rows: the model cannot learn it", set.Classes[k]))
		case n < score.MinClassRows:
			out = append(out, fmt.Sprintf("class %q has only %d training rows", set.Classes[k], n))
		}
	}
	if p, r := m.Net().NumParams(), set.Rows(); p > r {
		out = append(out, fmt.Sprintf("the net has %d params for %d training rows: expect it to fit noise; raise the penalty (l2), shrink the net or add rows", p, r))
	}
	if run.Status == optim.IterationLimit && len(run.Trace) > 0 {
		if g0 := run.Trace[0].GradNorm; run.GradNorm > gradLarge*g0 {
			out = append(out, fmt.Sprintf("stopped at the iteration limit (%d) with the gradient norm still %.3g, %.2g%% of where it started: the run is far from a minimum; raise -iterations or the spec's train.iterations", run.Iterations, run.GradNorm, 100*run.GradNorm/g0))
		}
	}
	if hold == nil {
		return out
	}
	// The model's own probabilities (with its temperature), on which its
	// thresholds were chosen.
	probs, err := m.ProbabilitiesSet(hold)
	if err != nil {
		return out
	}
	var th []float64
	if m.Spec().Output.Activation == spec.Sigmoid {
		th = m.Decision().Thresholds
	}
	rep, err := score.Evaluate(probs, hold.Y, m.Classes(), score.Options{Multilabel: m.Multilabel(), Thresholds: th})
	if err != nil {
		return out
	}
	return append(out, score.Warnings(rep, "holdout", m.Summary().ClassWeights != nil || m.Decision().Thresholds != nil)...)
}
