package nn

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"

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
	if err != nil {
		t.Fatal(err)
	}
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
			if maxAbs(ref) < 1e-2 {
				t.Fatalf("reference gradient too small to test: ‖ĝ‖∞ = %g", maxAbs(ref))
			}
			if e := relErr(g, ref, fdFloor); e > fdTol {
				t.Errorf("relative error %.3g > %g", e, fdTol)
			}
		})
	}
}

func TestGradientFiniteDifferenceBatch(t *testing.T) {
	for i, c := range gradCases() {
		t.Run(c.name(), func(t *testing.T) {
			o, p := c.setup(t, uint64(100+i), ObjectiveOptions{Batch: 3, Chunk: 2, Workers: 2})
			o.Shuffle(uint64(i))
			if o.Batches() != 3 {
				t.Fatalf("Batches() = %d, want ⌈7/3⌉ = 3", o.Batches())
			}
			g := make([]float64, len(p))
			for k := 0; k < o.Batches(); k++ {
				o.EvalBatch(g, p, k)
				ref := fd.Gradient(nil, func(q []float64) float64 { return o.EvalBatch(nil, q, k) }, p, &fd.Settings{Formula: fd.Central})
				if e := relErr(g, ref, fdFloor); e > fdTol {
					t.Errorf("batch %d: relative error %.3g > %g", k, e, fdTol)
				}
			}
		})
	}
}
