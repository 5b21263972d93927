package nn

import (
	"math"
	"math/rand/v2"
	"testing"

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
			if r, c := h.Dims(); r != 9 || c != n.Outputs() {
				t.Fatalf("Forward is %d×%d, want 9×%d", r, c, n.Outputs())
			}
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
					if rowAloneExact && (v != h.At(i, j) || v != h2.At(i, j)) {
						t.Errorf("row %d unit %d: ForwardRow %.17g, Forward %.17g, %.17g", i, j, v, h.At(i, j), h2.At(i, j))
					}
					if !rowAloneExact && (math.Abs(v-h.At(i, j)) > 1e-14*v || h.At(i, j) != h2.At(i, j)) {
						t.Errorf("row %d unit %d: ForwardRow %.17g, Forward %.17g, %.17g", i, j, v, h.At(i, j), h2.At(i, j))
					}
					if !(v > 0 && v < 1) {
						t.Errorf("row %d: probability %g outside (0, 1)", i, v)
					}
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
				if k == outSoftmax && math.Abs(sum-1) > 4e-16 {
					t.Errorf("row %d: softmax sums to %.17g", i, sum)
				}
			}
			// Loss from the probabilities agrees with the objective's
			// stable formula (probabilities here are far from 0 and 1).
			o, err := NewObjective(n, x, y, ObjectiveOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if got := o.Loss(p); math.Abs(got-loss/9) > 1e-13 {
				t.Errorf("Loss %.17g, from Forward %.17g", got, loss/9)
			}
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
		if err != nil {
			t.Fatal(err)
		}
		o.Shuffle(1)
		cases := map[string]func(){
			"Eval":           func() { o.Eval(g, p) },
			"Eval-value":     func() { o.Eval(nil, p) },
			"EvalBatch":      func() { o.EvalBatch(g, p, 0) },
			"EvalBatch-last": func() { o.EvalBatch(g, p, 2) },
			"Loss":           func() { o.Loss(p) },
		}
		for name, f := range cases {
			if a := testing.AllocsPerRun(20, f); a != 0 {
				t.Errorf("workers %d: %s allocates %g times per call", workers, name, a)
			}
		}
	}
	ws := n.NewWorkspace(700)
	dst := make([]float64, n.Outputs())
	if a := testing.AllocsPerRun(20, func() { n.Forward(ws, p, x) }); a != 0 {
		t.Errorf("Forward allocates %g times per call", a)
	}
	if a := testing.AllocsPerRun(20, func() { n.ForwardRow(dst, ws, p, x.RawRowView(3)) }); a != 0 {
		t.Errorf("ForwardRow allocates %g times per call", a)
	}
}
