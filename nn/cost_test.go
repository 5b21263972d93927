package nn

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/spec"
)

// TestZeroWeights: with every param 0, z = 0 on the output, so each sigmoid
// unit gives h = σ(0) = 1/2 and loss ln 2 whatever its target, and a softmax
// over K classes gives h_k = 1/K and loss ln K (mathematical identities).
func TestZeroWeights(t *testing.T) {
	tests := []struct {
		k    outKind
		want float64
	}{
		{outSoftmax, math.Log(3)},
		{outMulti, 3 * math.Ln2},
		{outBinary, math.Ln2},
	}
	for _, tt := range tests {
		t.Run(tt.k.String(), func(t *testing.T) {
			n := mustCompile(t, testSpec(4, []int{5, 3}, spec.Tanh, tt.k))
			x, y := testData(rand.New(rand.NewPCG(1, 1)), 9, 4, tt.k, false)
			o, err := NewObjective(n, x, y, ObjectiveOptions{Chunk: 4})
			require.NoError(t, err)
			p := make([]float64, n.NumParams())
			// Relative 1e-15: nine equal terms summed and divided by 9.
			assert.InEpsilon(t, tt.want, o.Eval(nil, p), 1e-15, "cost")
		})
	}
}

// TestPenaltyRise: the same data and params with penalty λ cost exactly
// λ/(2m)·Σw² more (by the definition in doc.go), and with Bias the biases
// join the sum.
func TestPenaltyRise(t *testing.T) {
	for _, bias := range []bool{false, true} {
		for _, k := range []outKind{outSoftmax, outMulti, outBinary} {
			t.Run(fmt.Sprintf("bias=%v/%v", bias, k), func(t *testing.T) {
				rng := rand.New(rand.NewPCG(2, 2))
				s := testSpec(3, []int{4}, spec.Sigmoid, k)
				x, y := testData(rng, 11, 3, k, false)
				n0 := mustCompile(t, s)
				s.Penalty = spec.Penalty{L2: 0.8, Bias: bias}
				n1 := mustCompile(t, s)
				o0, err := NewObjective(n0, x, y, ObjectiveOptions{})
				require.NoError(t, err)
				o1, err := NewObjective(n1, x, y, ObjectiveOptions{})
				require.NoError(t, err)
				p := awayFromZero(rng, n0.NumParams())
				sq := 0.0
				for l := 0; l < n0.NumLayers(); l++ {
					w, b := n0.Block(l)
					end := b
					if bias {
						end = b + n0.sizes[l+1]
					}
					for _, v := range p[w:end] {
						sq += v * v
					}
				}
				want := 0.8 / (2 * 11) * sq
				rise := o1.Eval(nil, p) - o0.Eval(nil, p)
				// 1e-12 relative: the two costs (order 1) cancel in the
				// difference, leaving a few ulps of them against a rise of order 0.1.
				assert.InEpsilon(t, want, rise, 1e-12, "rise, want λ/(2m)Σw²")
				assert.InDelta(t, o0.Eval(nil, p), o1.Loss(p), 1e-15, "Loss includes the penalty")
			})
		}
	}
}

// TestSaturation: output pre-activations of ±1000 give a finite cost and
// gradient. With hidden weights 0 and hidden biases 0 the hidden units are
// fixed, and the output biases set z = ±1000 against the targets, so each
// wrong unit costs 1000 (softplus(1000) − 0 = 1000, or
// softplus(−1000) + 1000 = 1000) and the softmax row costs lse − z_y = 2000.
func TestSaturation(t *testing.T) {
	tests := []struct {
		name string
		k    outKind
		bias []float64 // output biases
		want float64   // cost per row
		gb   []float64 // ∂J/∂b on the output: mean of h − y per unit
	}{
		{"softmax wrong", outSoftmax, []float64{1000, -1000, 0}, 2000, []float64{1, -1, 0}},     // every row's class is 1
		{"multilabel wrong", outMulti, []float64{1000, -1000, 1000}, 2000, []float64{1, -1, 0}}, // targets (0, 1, 1): units 0 and 1 wrong
		{"binary wrong", outBinary, []float64{-1000}, 1000, []float64{-1}},                      // target 1
		{"softmax right", outSoftmax, []float64{-1000, 1000, 0}, 0, []float64{0, 0, 0}},         // right with certainty
		{"binary right", outBinary, []float64{1000}, 0, []float64{0}},                           // right with certainty
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n := mustCompile(t, testSpec(2, []int{3}, spec.ReLU, tt.k))
			x, y := testData(rand.New(rand.NewPCG(3, 3)), 5, 2, tt.k, false)
			y.Zero()
			for i := 0; i < 5; i++ {
				switch tt.k {
				case outMulti:
					y.Set(i, 1, 1)
					y.Set(i, 2, 1)
				default:
					y.Set(i, 1, 1)
				}
			}
			o, err := NewObjective(n, x, y, ObjectiveOptions{})
			require.NoError(t, err)
			p := make([]float64, n.NumParams())
			copy(p[n.bOff[1]:], tt.bias)
			g := make([]float64, len(p))
			got := o.Eval(g, p)
			assert.InDelta(t, tt.want, got, 1e-12*math.Max(1, tt.want), "cost with output biases %v", tt.bias)
			for i, v := range g {
				require.False(t, math.IsNaN(v) || math.IsInf(v, 0), "grad[%d] = %g", i, v)
			}
			// e^(−1000) underflows to 0 and e^(−2000) too, so h − y is exactly ±1 or 0.
			for k, want := range tt.gb {
				assert.Equal(t, want, g[n.bOff[1]+k], "∂J/∂b[%d]", k)
			}
		})
	}
}
