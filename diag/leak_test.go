package diag

import (
	"context"
	"testing"

	"github.com/stretchr/testify/require"
	"go.uber.org/goleak"

	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// Compare and SweepPenalty close every objective they make: when they return, no
// goroutine of their evaluations remains (issue 13; go.uber.org/goleak
// checks).
func TestDiagnosticsLeaveNoGoroutine(t *testing.T) {
	before := goleak.IgnoreCurrent()
	s := parseSpec(t, irisLogistic)
	set := readSet(t, "iris.csv")
	// Four copies of the rows: more than one chunk of 256, so the
	// evaluations start worker goroutines.
	idx := make([]int, 0, 4*set.Rows())
	for range 4 {
		for i := range set.Rows() {
			idx = append(idx, i)
		}
	}
	set = set.Subset(idx)
	_, err := Compare(context.Background(), s, set, CompareOptions{
		Optimizers: []spec.Optimizer{spec.LBFGS, spec.Adam}, Limits: optim.Limits{Iterations: 5}, Workers: 3, Holdout: 0.2,
	})
	require.NoError(t, err, "Compare")
	_, err = SweepPenalty(context.Background(), s, set, []float64{0.1, 1}, SweepOptions{Folds: 2, Limits: optim.Limits{Iterations: 5}, Workers: 3})
	require.NoError(t, err, "SweepPenalty")
	goleak.VerifyNone(t, before)
}
