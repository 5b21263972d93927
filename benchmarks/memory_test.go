package benchmarks

import (
	"fmt"
	"math/rand/v2"
	"runtime"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/nn"
	"github.com/seine-ml/seine/spec"
)

// TestTrainingBytes checks nn.Net.TrainingBytes against the bytes really
// allocated (runtime.MemStats.TotalAlloc) for the data matrices, NewObjective
// and the first Eval, which is where every buffer is made: within 25%.
// It then checks that further evaluations allocate nothing.
func TestTrainingBytes(t *testing.T) {
	cases := []struct {
		sz  size
		out spec.Activation
		opt nn.ObjectiveOptions
	}{
		{sizes[0], spec.Softmax, nn.ObjectiveOptions{}},
		{sizes[1], spec.Softmax, nn.ObjectiveOptions{Workers: 1}},
		{sizes[1], spec.Sigmoid, nn.ObjectiveOptions{Workers: 2, Batch: 500}},
		{size{"medium", 5000, 100, 64, 10}, spec.Softmax, nn.ObjectiveOptions{Workers: 2, Chunk: 512}},
		{size{"binary", 4000, 30, 16, 2}, spec.Sigmoid, nn.ObjectiveOptions{Workers: 2}},
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%v/%v/%+v", c.sz, c.out, c.opt), func(t *testing.T) {
			s := netSpec(c.sz, c.out)
			if c.sz.classes == 2 {
				s.Output.Multilabel = false // one unit
			}
			n, err := nn.Compile(s)
			require.NoError(t, err)
			p := n.NewParams()
			g := make([]float64, len(p))
			xd := make([]float64, c.sz.rows*c.sz.inputs)
			yd := make([]float64, c.sz.rows*c.sz.classes)
			rng := rand.New(rand.NewPCG(1, 1))
			for i := range xd {
				xd[i] = rng.NormFloat64()
			}
			for i := 0; i < c.sz.rows; i++ {
				yd[i*c.sz.classes+rng.IntN(c.sz.classes)] = 1
			}

			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			x := mat.NewDense(c.sz.rows, c.sz.inputs, append([]float64(nil), xd...))
			y := mat.NewDense(c.sz.rows, c.sz.classes, append([]float64(nil), yd...))
			o, err := nn.NewObjective(n, x, y, c.opt)
			require.NoError(t, err)
			o.Eval(g, p)
			if o.Batches() > 1 {
				o.EvalBatch(g, p, 0)
			}
			runtime.ReadMemStats(&after)
			got := int64(after.TotalAlloc - before.TotalAlloc)
			want := n.TrainingBytes(c.sz.rows, c.opt)
			t.Logf("TrainingBytes %d, allocated %d (%.1f%%)", want, got, 100*float64(got-want)/float64(want))
			assert.InEpsilon(t, want, got, 0.25, "TrainingBytes %d, allocated %d: off by %.0f%%, want within 25%%", want, got, 100*float64(got-want)/float64(want))

			// Warm up further first: with OpenBLAS a cgo call that blocks
			// can make the runtime start an OS thread, which allocates, until
			// every worker has one.
			for range 5 {
				o.Eval(g, p)
			}
			allocs := testing.AllocsPerRun(10, func() {
				o.Eval(g, p)
				if o.Batches() > 1 {
					o.EvalBatch(g, p, 1)
				}
			})
			assert.Zero(t, allocs, "allocations per evaluation after warm-up")
			runtime.KeepAlive(o)
		})
	}
}
