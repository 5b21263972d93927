package train

import (
	"context"
	"testing"

	"github.com/stretchr/testify/require"
	"go.uber.org/goleak"

	"github.com/seine-ml/seine/optim"
)

// Train closes every objective it makes: when it returns, no goroutine of
// its evaluations remains (issue 13; go.uber.org/goleak checks).
func TestTrainLeavesNoGoroutine(t *testing.T) {
	before := goleak.IgnoreCurrent()
	s := parseSpec(t, irisSpec)
	set := readSet(t, "testdata/iris.csv", s.Output.Classes)
	// Four copies of the rows: more than one chunk of 256, so the
	// evaluations start worker goroutines.
	idx := make([]int, 0, 4*set.Rows())
	for range 4 {
		for i := range set.Rows() {
			idx = append(idx, i)
		}
	}
	set = set.Subset(idx)
	_, err := Train(context.Background(), s, set, Options{Workers: 3, Limits: optim.Limits{Iterations: 5}})
	require.NoError(t, err)
	goleak.VerifyNone(t, before)
}
