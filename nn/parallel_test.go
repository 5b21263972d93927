package nn

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/spec"
)

// TestWorkersBitIdentical: cost and gradient are the same bits for any
// number of workers, at row counts on and around chunk boundaries.
func TestWorkersBitIdentical(t *testing.T) {
	const chunk = 4
	for _, k := range []outKind{outSoftmax, outMulti, outBinary} {
		for _, m := range []int{1, 3, 4, 5, 8, 9, 16, 17, 23} {
			for _, batch := range []int{0, 5} {
				t.Run(fmt.Sprintf("%v/m=%d/batch=%d", k, m, batch), func(t *testing.T) {
					rng := rand.New(rand.NewPCG(uint64(m), 9))
					n := mustCompile(t, testSpec(3, []int{6, 4}, spec.Softplus, k))
					x, y := testData(rng, m, 3, k, false)
					p := awayFromZero(rng, n.NumParams())
					var ref []float64
					var refCost float64
					for _, w := range []int{1, 2, 3, 7} {
						o, err := NewObjective(n, x, y, ObjectiveOptions{Batch: batch, Chunk: chunk, Workers: w})
						require.NoError(t, err)
						o.Shuffle(7)
						g := make([]float64, len(p))
						c := o.Eval(g, p)
						for b := 0; b < o.Batches(); b++ {
							gb := make([]float64, len(p))
							c += o.EvalBatch(gb, p, b)
							g = append(g, gb...)
						}
						c += o.Loss(p)
						if w == 1 {
							ref, refCost = g, c
							continue
						}
						assert.Equal(t, math.Float64bits(refCost), math.Float64bits(c), "workers %d: cost %.17g, workers 1: %.17g", w, c, refCost)
						for i := range g {
							require.Equal(t, math.Float64bits(ref[i]), math.Float64bits(g[i]), "workers %d: grad[%d] = %.17g, workers 1: %.17g", w, i, g[i], ref[i])
						}
					}
				})
			}
		}
	}
}

// TestGOMAXPROCSBitIdentical: Workers 0 follows GOMAXPROCS; the result
// does not.
func TestGOMAXPROCSBitIdentical(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	n := mustCompile(t, testSpec(5, []int{70, 200}, spec.Tanh, outSoftmax)) // wide enough to use several gemm tiles
	x, y := testData(rng, 300, 5, outSoftmax, false)
	p := awayFromZero(rng, n.NumParams())
	eval := func(t *testing.T, procs int) (float64, []float64) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		o, err := NewObjective(n, x, y, ObjectiveOptions{Chunk: 64})
		require.NoError(t, err)
		g := make([]float64, len(p))
		return o.Eval(g, p), g
	}
	c1, g1 := eval(t, 1)
	for _, procs := range []int{2, 5} {
		t.Run(fmt.Sprintf("GOMAXPROCS=%d", procs), func(t *testing.T) {
			c, g := eval(t, procs)
			assert.Equal(t, math.Float64bits(c1), math.Float64bits(c), "cost %.17g, GOMAXPROCS 1: %.17g", c, c1)
			for i := range g {
				require.Equal(t, math.Float64bits(g1[i]), math.Float64bits(g[i]), "grad[%d] differs", i)
			}
		})
	}
}

// TestChunkSize: the chunk size changes only the order of the sums, so
// results agree to rounding (1e-13 relative; values of order 1 summed over
// 50 rows).
func TestChunkSize(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	n := mustCompile(t, testSpec(3, []int{6}, spec.LeakyReLU, outMulti))
	x, y := testData(rng, 50, 3, outMulti, false)
	p := awayFromZero(rng, n.NumParams())
	var c0 float64
	var g0 []float64
	for _, chunk := range []int{50, 1, 7, 0} {
		o, err := NewObjective(n, x, y, ObjectiveOptions{Chunk: chunk, Workers: 2})
		require.NoError(t, err)
		g := make([]float64, len(p))
		c := o.Eval(g, p)
		if chunk == 50 {
			c0, g0 = c, g
			continue
		}
		assert.InEpsilon(t, c0, c, 1e-13, "chunk %d: cost against one chunk", chunk)
		assert.LessOrEqual(t, relErr(g, g0, 1e-2), 1e-13, "chunk %d: gradient's relative difference from one chunk", chunk)
	}
}

// TestBatchesAverage: Σ_k Share(k)·J_k = J (doc.go), and a shuffle is a
// permutation fixed by its seed alone.
func TestBatchesAverage(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 6))
	s := testSpec(3, []int{4}, spec.Sigmoid, outSoftmax)
	s.Penalty = spec.Penalty{L2: 0.4, L1: 0.1}
	n := mustCompile(t, s)
	x, y := testData(rng, 23, 3, outSoftmax, false)
	p := awayFromZero(rng, n.NumParams())
	o, err := NewObjective(n, x, y, ObjectiveOptions{Batch: 5, Chunk: 2})
	require.NoError(t, err)
	require.Equal(t, 5, o.Batches(), "Batches")
	require.Equal(t, 5.0/23, o.Share(0), "Share(0)")
	require.Equal(t, 3.0/23, o.Share(4), "Share(4)")
	o.Shuffle(3)
	full := o.Eval(nil, p)
	g := make([]float64, len(p))
	fullGrad := make([]float64, len(p))
	o.Eval(fullGrad, p)
	sum := 0.0
	sumGrad := make([]float64, len(p))
	for k := 0; k < o.Batches(); k++ {
		sum += o.Share(k) * o.EvalBatch(g, p, k)
		for i := range g {
			sumGrad[i] += o.Share(k) * g[i]
		}
	}
	assert.InEpsilon(t, full, sum, 1e-14, "Σ Share·J_k against J")
	assert.LessOrEqual(t, relErr(sumGrad, fullGrad, 1e-2), 1e-14, "Σ Share·∇J_k's relative difference from ∇J")

	perm := append([]int(nil), o.perm...)
	seen := make([]bool, len(perm))
	for _, r := range perm {
		seen[r] = true
	}
	for r, ok := range seen {
		require.True(t, ok, "row %d missing from the shuffle %v", r, perm)
	}
	o.Shuffle(99)
	o.Shuffle(3)
	for i := range perm {
		require.Equal(t, perm[i], o.perm[i], "Shuffle(3) twice gave %v and %v", perm, o.perm)
	}
	o.Shuffle(4)
	same := true
	for i := range perm {
		same = same && o.perm[i] == perm[i]
	}
	assert.False(t, same, "Shuffle(3) and Shuffle(4) gave the same order")
}

// TestWorkersStop: the worker goroutines of an Objective end once the
// Objective is garbage collected.
func TestWorkersStop(t *testing.T) {
	before := runtime.NumGoroutine()
	func() {
		rng := rand.New(rand.NewPCG(7, 7))
		n := mustCompile(t, testSpec(3, []int{4}, spec.Tanh, outSoftmax))
		x, y := testData(rng, 40, 3, outSoftmax, false)
		o, err := NewObjective(n, x, y, ObjectiveOptions{Chunk: 4, Workers: 4})
		require.NoError(t, err)
		o.Eval(nil, n.NewParams())
		require.GreaterOrEqual(t, runtime.NumGoroutine(), before+3, "goroutines after a parallel Eval")
	}()
	remain := 0
	for range 100 {
		runtime.GC()
		if remain = runtime.NumGoroutine(); remain <= before {
			return
		}
		time.Sleep(10 * time.Millisecond)
	}
	assert.LessOrEqual(t, remain, before, "goroutines remain, %d before", before)
}
