package nn

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

// Gradient check tolerance. Source of the reference: gonum's diff/fd
// (fd.Gradient with fd.Central, default step h = 6e-6, read from its
// diff.go). Its error is about h²/6·|f‴| + ε·|f|/h ≈ 1e-11 + 4e-11 for
// costs of order 1 (common practice: central-difference error analysis), so
// ‖g − ĝ‖∞ is ~1e-10. We divide by max(1e-2, ‖ĝ‖∞): the gradients here are
// of order 0.1–1 (asserted), and the floor keeps a tiny ĝ from inflating
// the ratio. 1e-7 then leaves three orders of margin while any wrong term
// (a missed factor, a sign, a dropped penalty) gives errors ≥ 1e-3.
const (
	fdTol   = 1e-7
	fdFloor = 1e-2
)

var hiddenActs = []spec.Activation{spec.Sigmoid, spec.Tanh, spec.ReLU, spec.LeakyReLU, spec.Softplus, spec.Identity}

type penaltyCase struct {
	name string
	pen  spec.Penalty
}

var penaltyCases = []penaltyCase{
	{"none", spec.Penalty{}},
	{"l2", spec.Penalty{L2: 0.7}},
	{"l2-bias", spec.Penalty{L2: 0.7, Bias: true}},
	{"l1", spec.Penalty{L1: 0.3}},
	{"l1-l2-bias", spec.Penalty{L1: 0.3, L2: 0.5, Bias: true}},
}

type gradCase struct {
	g        spec.Activation
	k        outKind
	multiHot bool // softmax with multi-hot targets (Σ_k y_k ≠ 1)
	pen      penaltyCase
}

func gradCases() []gradCase {
	var cs []gradCase
	for _, g := range hiddenActs {
		for _, k := range []outKind{outSoftmax, outMulti, outBinary} {
			for _, p := range penaltyCases {
				cs = append(cs, gradCase{g: g, k: k, pen: p})
			}
		}
		cs = append(cs, gradCase{g: g, k: outSoftmax, multiHot: true, pen: penaltyCases[1]})
	}
	return cs
}

func (c gradCase) name() string {
	k := c.k.String()
	if c.multiHot {
		k += "-multihot"
	}
	return fmt.Sprintf("%v/%s/%s", c.g, k, c.pen.name)
}

// setup returns a random 4-5-4-K net, 7 rows, and params with |w| ≥ 0.1.
func (c gradCase) setup(t *testing.T, seed uint64, opt ObjectiveOptions) (*Objective, []float64) {
	rng := rand.New(rand.NewPCG(seed, 1))
	s := testSpec(4, []int{5, 4}, c.g, c.k)
	s.Penalty = c.pen.pen
	n := mustCompile(t, s)
	x, y := testData(rng, 7, 4, c.k, c.multiHot)
	o, err := NewObjective(n, x, y, opt)
	require.NoError(t, err)
	return o, awayFromZero(rng, n.NumParams())
}

func TestGradientFiniteDifference(t *testing.T) {
	for i, c := range gradCases() {
		t.Run(c.name(), func(t *testing.T) {
			// Chunk 3 splits the 7 rows into 3, 3, 1: the chunked sum is checked too.
			o, p := c.setup(t, uint64(i), ObjectiveOptions{Chunk: 3, Workers: 2})
			g := make([]float64, len(p))
			o.Eval(g, p)
			ref := fd.Gradient(nil, func(q []float64) float64 { return o.Eval(nil, q) }, p, &fd.Settings{Formula: fd.Central})
			require.GreaterOrEqual(t, maxAbs(ref), 1e-2, "reference gradient too small to test: ‖ĝ‖∞")
			assert.LessOrEqual(t, relErr(g, ref, fdFloor), fdTol, "relative error")
		})
	}
}

func TestGradientFiniteDifferenceBatch(t *testing.T) {
	for i, c := range gradCases() {
		t.Run(c.name(), func(t *testing.T) {
			o, p := c.setup(t, uint64(100+i), ObjectiveOptions{Batch: 3, Chunk: 2, Workers: 2})
			o.Shuffle(uint64(i))
			require.Equal(t, 3, o.Batches(), "Batches(), want ⌈7/3⌉ = 3")
			g := make([]float64, len(p))
			for k := 0; k < o.Batches(); k++ {
				o.EvalBatch(g, p, k)
				ref := fd.Gradient(nil, func(q []float64) float64 { return o.EvalBatch(nil, q, k) }, p, &fd.Settings{Formula: fd.Central})
				assert.LessOrEqual(t, relErr(g, ref, fdFloor), fdTol, "batch %d: relative error", k)
			}
		})
	}
}

// The class-weighted cost's gradient against gonum's diff/fd, for every
// hidden activation and output kind (softmax, multi-label sigmoid, binary
// sigmoid), with and without a penalty, in full and in mini-batches.
// Weights far from 1 (0.25 to 6) make a dropped or misplaced factor show.
func TestGradientFiniteDifferenceWeighted(t *testing.T) {
	for i, c := range gradCases() {
		if c.pen.name != "none" && c.pen.name != "l1-l2-bias" {
			continue
		}
		t.Run(c.name(), func(t *testing.T) {
			k := 3
			if c.k == outBinary {
				k = 2
			}
			w := []float64{0.25, 6, 1.5}[:k]
			for _, batch := range []int{0, 3} {
				o, p := c.setup(t, uint64(300+i), ObjectiveOptions{Chunk: 3, Workers: 2, Batch: batch, ClassWeights: w})
				g := make([]float64, len(p))
				o.EvalBatch(g, p, 0)
				ref := fd.Gradient(nil, func(q []float64) float64 { return o.EvalBatch(nil, q, 0) }, p, &fd.Settings{Formula: fd.Central})
				assert.LessOrEqual(t, relErr(g, ref, fdFloor), fdTol, "batch %d: relative error", batch)
			}
		})
	}
}

// Weights of 1 give the unweighted cost and gradient bit for bit, and a
// weight w_k on every class scales the cross-entropy of a softmax net by w
// (the penalty aside) for softmax and binary outputs, where every row's
// term carries one class's weight.
func TestClassWeightsIdentities(t *testing.T) {
	for _, k := range []outKind{outSoftmax, outMulti, outBinary} {
		t.Run(k.String(), func(t *testing.T) {
			c := gradCase{g: spec.Tanh, k: k, pen: penaltyCases[0]}
			nc := 3
			if k == outBinary {
				nc = 2
			}
			ones, threes := make([]float64, nc), make([]float64, nc)
			for i := range ones {
				ones[i], threes[i] = 1, 3
			}
			plain, p := c.setup(t, 7, ObjectiveOptions{Chunk: 3})
			one, _ := c.setup(t, 7, ObjectiveOptions{Chunk: 3, ClassWeights: ones})
			three, _ := c.setup(t, 7, ObjectiveOptions{Chunk: 3, ClassWeights: threes})
			g1, g2 := make([]float64, len(p)), make([]float64, len(p))
			f1, f2 := plain.Eval(g1, p), one.Eval(g2, p)
			assert.Equal(t, f1, f2, "weights of 1 change the cost")
			for i := range g1 {
				require.Equal(t, g1[i], g2[i], "weights of 1 change gradient %d", i)
			}
			// Multi-label weights apply to the positive side only, so there
			// the factor is not global.
			if k != outMulti {
				assert.InEpsilon(t, 3*f1, three.Eval(nil, p), 1e-13, "cost with weights of 3, want 3 × the cost with none")
			}
		})
	}
	_, err := NewObjective(mustCompile(t, testSpec(4, nil, spec.Tanh, outSoftmax)), mat.NewDense(1, 4, nil), mat.NewDense(1, 3, []float64{1, 0, 0}), ObjectiveOptions{ClassWeights: []float64{1, 0, 1}})
	assert.ErrorIs(t, err, ErrOption, "a zero weight")
}
