package nn

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

func TestForward(t *testing.T) {
	for _, k := range []outKind{outSoftmax, outMulti, outBinary} {
		t.Run(k.String(), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(8, 8))
			n := mustCompile(t, testSpec(4, []int{70, 3}, spec.Sigmoid, k))
			x, y := testData(rng, 9, 4, k, false)
			p := awayFromZero(rng, n.NumParams())
			ws := n.NewWorkspace(2) // grows to 9 rows
			h := n.Forward(ws, p, x)
			r, c := h.Dims()
			require.Equal(t, [2]int{9, n.Outputs()}, [2]int{r, c}, "Forward's rows × columns")
			// Via a mat.Matrix without raw data: the same bits.
			h2 := mat.DenseCopyOf(n.Forward(n.NewWorkspace(9), p, x.T().T()))
			row := make([]float64, n.Outputs())
			rws := n.NewWorkspace(1)
			loss := 0.0
			for i := 0; i < 9; i++ {
				n.ForwardRow(row, rws, p, x.RawRowView(i))
				sum := 0.0
				for j, v := range row {
					// Each row is computed by the same kernels in the same
					// order, so ForwardRow equals Forward to the bit; under
					// OpenBLAS, to a few units of rounding (1e-14 relative
					// for sums of 70 terms of order 1: common practice).
					if rowAloneExact {
						assert.Equal(t, h.At(i, j), v, "row %d unit %d: ForwardRow against Forward", i, j)
						assert.Equal(t, h2.At(i, j), v, "row %d unit %d: ForwardRow against Forward via mat.Matrix", i, j)
					} else {
						assert.InEpsilon(t, v, h.At(i, j), 1e-14, "row %d unit %d: Forward against ForwardRow", i, j)
						assert.Equal(t, h.At(i, j), h2.At(i, j), "row %d unit %d: Forward via mat.Matrix against Forward", i, j)
					}
					assert.Greater(t, v, 0.0, "row %d: probability outside (0, 1)", i)
					assert.Less(t, v, 1.0, "row %d: probability outside (0, 1)", i)
					sum += v
					yv := y.At(i, j)
					if k == outBinary {
						yv = y.At(i, 1)
					}
					if k == outSoftmax {
						loss -= yv * math.Log(v)
					} else {
						loss -= yv*math.Log(v) + (1-yv)*math.Log(1-v)
					}
				}
				// Softmax rows sum to 1 up to rounding of three terms.
				if k == outSoftmax {
					assert.InDelta(t, 1.0, sum, 4e-16, "row %d: softmax sum", i)
				}
			}
			// Loss from the probabilities agrees with the objective's
			// stable formula (probabilities here are far from 0 and 1).
			o, err := NewObjective(n, x, y, ObjectiveOptions{})
			require.NoError(t, err)
			assert.InDelta(t, loss/9, o.Loss(p), 1e-13, "Loss against the loss from Forward")
		})
	}
}

func TestNoAllocs(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	s := testSpec(6, []int{80, 10}, spec.ReLU, outSoftmax)
	s.Penalty = spec.Penalty{L2: 0.1, L1: 0.01}
	n := mustCompile(t, s)
	x, y := testData(rng, 700, 6, outSoftmax, false)
	p := awayFromZero(rng, n.NumParams())
	g := make([]float64, len(p))
	for _, workers := range []int{1, 2} {
		o, err := NewObjective(n, x, y, ObjectiveOptions{Batch: 300, Chunk: 128, Workers: workers})
		require.NoError(t, err)
		o.Shuffle(1)
		cases := []struct {
			name string
			f    func()
		}{
			{"Eval", func() { o.Eval(g, p) }},
			{"Eval-value", func() { o.Eval(nil, p) }},
			{"EvalBatch", func() { o.EvalBatch(g, p, 0) }},
			{"EvalBatch-last", func() { o.EvalBatch(g, p, 2) }},
			{"Loss", func() { o.Loss(p) }},
		}
		for _, tc := range cases {
			t.Run(fmt.Sprintf("workers=%d/%s", workers, tc.name), func(t *testing.T) {
				assert.Zero(t, testing.AllocsPerRun(20, tc.f), "allocations per call")
			})
		}
	}
	ws := n.NewWorkspace(700)
	dst := make([]float64, n.Outputs())
	assert.Zero(t, testing.AllocsPerRun(20, func() { n.Forward(ws, p, x) }), "Forward: allocations per call")
	assert.Zero(t, testing.AllocsPerRun(20, func() { n.ForwardRow(dst, ws, p, x.RawRowView(3)) }), "ForwardRow: allocations per call")
}
