package nn

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"go.uber.org/goleak"

	"github.com/seine-ml/seine/spec"
)

// An Objective's workers live only until Close (issue 13): after Close no
// goroutine of it remains (go.uber.org/goleak checks), and Close twice is
// fine.
func TestObjectiveCloseLeavesNoGoroutine(t *testing.T) {
	before := goleak.IgnoreCurrent()
	rng := rand.New(rand.NewPCG(1, 2))
	n := mustCompile(t, testSpec(4, []int{5}, spec.Tanh, outSoftmax))
	x, y := testData(rng, 600, 4, outSoftmax, false)
	o, err := NewObjective(n, x, y, ObjectiveOptions{Workers: 3, Chunk: 64})
	require.NoError(t, err)
	p := n.NewParams()
	o.Eval(make([]float64, len(p)), p) // starts the workers
	require.NoError(t, o.Close())
	assert.NoError(t, o.Close(), "Close twice")
	goleak.VerifyNone(t, before)
}
