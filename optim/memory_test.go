package optim

import (
	"context"
	"runtime"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/optimize"
)

// TestStateVectors measures what a run allocates, in vectors of length n,
// against StateVectors. The run is Minimize for one iteration on the
// diagonal quadratic of bench_test.go, whose Eval allocates nothing, so all
// that is counted is the runner and the method. runtime.MemStats.TotalAlloc
// counts every byte allocated, collected or not.
//
// Tolerance: at n = 2¹⁸ a vector is 2 MiB, a whole number of the
// allocator's 8 KiB pages (runtime/sizeclasses.go: objects above 32 KiB get
// whole pages), so each vector costs exactly 8n bytes. What else a run
// allocates is a few hundred bytes of structs, one Step and 2·Memory
// words (LBFGS's ρ and α), under 4 KiB in all: 0.002 vector. A
// tolerance of 0.01 vector above the figure and none below it catches any
// vector too many or too few.
func TestStateVectors(t *testing.T) {
	const n = 1 << 18
	q := newDiagQuad(n)
	x0 := make([]float64, n)
	for i := range x0 {
		x0[i] = 1
	}
	cases := []struct {
		name string
		m    Method
		want int
	}{
		// The figures of StateVectors' table, written out again.
		{"GD", &GradientDescent{}, 3 + 2},
		{"GD-fixed", &GradientDescent{Step: 1e-5}, 3 + 2},
		{"CG", &ConjugateGradient{}, 3 + 3},
		{"LBFGS", &LBFGS{}, 3 + 2*10 + 3},
		{"LBFGS-3", &LBFGS{Memory: 3}, 3 + 2*3 + 3},
		{"Momentum", &Momentum{Rate: 1e-5}, 3 + 4},
		{"Nesterov", &Momentum{Rate: 1e-5, Nesterov: true}, 3 + 4},
		{"Adam", &Adam{}, 3 + 4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			require.Equal(t, c.want, StateVectors(c.m), "StateVectors disagrees with its own table")
			got := allocatedVectors(t, q, x0, c.m)
			t.Logf("%.5f vectors allocated, StateVectors %d", got, c.want)
			assert.GreaterOrEqual(t, got, float64(c.want), "vectors allocated")
			assert.LessOrEqual(t, got, float64(c.want)+0.01, "vectors allocated")
		})
	}
	t.Run("Gonum", func(t *testing.T) {
		// The gonum method keeps vectors of its own (optimize.LBFGS: its
		// Store pairs and more), which StateVectors does not count: the
		// figure is a lower bound only.
		m := &Gonum{Method: &optimize.LBFGS{}}
		require.Equal(t, 3+3, StateVectors(m))
		assert.GreaterOrEqual(t, allocatedVectors(t, q, x0, m), float64(StateVectors(m)))
	})
	assert.Zero(t, StateVectors(nil))
	assert.Equal(t, 3+2*10+3, StateVectors((*LBFGS)(nil)), "a nil *LBFGS counts the default Memory")
}

// allocatedVectors returns the bytes that one iteration of Minimize with m
// allocates, in vectors of len(x0).
func allocatedVectors(t *testing.T, f Objective, x0 []float64, m Method) float64 {
	t.Helper()
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	res, err := Minimize(context.Background(), f, x0, m, Limits{Iterations: 1, GradTol: 1e-300})
	runtime.ReadMemStats(&after)
	require.NoError(t, err)
	require.Equal(t, IterationLimit, res.Status)
	return float64(after.TotalAlloc-before.TotalAlloc) / float64(8*len(x0))
}
