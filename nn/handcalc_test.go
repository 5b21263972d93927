package nn

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/spec"
)

// TestWorkedExample checks a 2-3-2 net (sigmoid hidden, softmax output) on
// two rows against arithmetic done by hand, independent of the engine:
// plain loops below, and the numbers written out here (12 significant
// digits, computed separately in double precision from the formulas in
// doc.go, outside this package).
//
//	W0 = [0.1 0.2; −0.3 0.4; 0.5 −0.6], b0 = (0.01, 0.02, 0.03)
//	W1 = [0.7 −0.8 0.9; −1.0 1.1 −1.2],  b1 = (0.05, −0.05)
//	row 1: x = (1, 2),    class 0
//	  z1 = (0.1+0.4+0.01, −0.3+0.8+0.02, 0.5−1.2+0.03) = (0.51, 0.52, −0.67)
//	  a1 = σ(z1) = (0.624806474468, 0.627147766313, 0.338496840797)
//	  z2 = W1·a1 + b1 = (0.290293475795, −0.391140140480)
//	  h  = softmax(z2) = (0.664058590557, 0.335941409443)
//	  loss = −ln 0.664058590557 = 0.409384894608
//	  δ2 = h − y = (−0.335941409443, 0.335941409443)
//	  δ1 = (W1ᵀδ2) ⊙ a1(1−a1) = (−0.133879264563, 0.149253240800, −0.157968093630)
//	row 2: x = (−1, 0.5), class 1
//	  z1 = (−0.1+0.1+0.01, 0.3+0.2+0.02, −0.5−0.3+0.03) = (0.01, 0.52, −0.77)
//	  a1 = (0.502499979167, 0.627147766313, 0.316479106264)
//	  z2 = (0.184862968004, −0.242412363739)
//	  h  = (0.605222855473, 0.394777144527)
//	  loss = −ln 0.394777144527 = 0.929433864367
//	  δ2 = (0.605222855473, −0.605222855473)
//	  δ1 = (0.257213283190, −0.268890556647, 0.274935900664)
//	J = (0.409384894608 + 0.929433864367)/2 = 0.669409379487
//	∂J/∂b1[0] = (−0.335941409443 + 0.605222855473)/2 = 0.134640723015
//	∂J/∂W1[0,0] = (−0.335941409443·0.624806474468 + 0.605222855473·0.502499979167)/2 = 0.0471130523022
//	∂J/∂W0[0,0] = (−0.133879264563·1 + 0.257213283190·(−1))/2 = −0.195546273877
//	∂J/∂W0[2,1] = (−0.157968093630·2 + 0.274935900664·0.5)/2 = −0.0892341184642
//	∂J/∂b0[1] = (0.149253240800 − 0.268890556647)/2 = −0.0598186579232
func TestWorkedExample(t *testing.T) {
	s := &spec.Network{
		Version: 1, Inputs: 2,
		Hidden: []spec.Layer{{Units: 3, Activation: spec.Sigmoid}},
		Output: spec.Output{Classes: []string{"a", "b"}, Activation: spec.Softmax},
		Init:   spec.Init{Scheme: spec.GlorotUniform},
	}
	n := mustCompile(t, s)
	w0 := [][]float64{{0.1, 0.2}, {-0.3, 0.4}, {0.5, -0.6}}
	b0 := []float64{0.01, 0.02, 0.03}
	w1 := [][]float64{{0.7, -0.8, 0.9}, {-1.0, 1.1, -1.2}}
	b1 := []float64{0.05, -0.05}
	xs := [][]float64{{1, 2}, {-1, 0.5}}
	ys := [][]float64{{1, 0}, {0, 1}}

	// Layout from doc.go: W0 row-major, b0, W1 row-major, b1.
	p := []float64{0.1, 0.2, -0.3, 0.4, 0.5, -0.6, 0.01, 0.02, 0.03, 0.7, -0.8, 0.9, -1.0, 1.1, -1.2, 0.05, -0.05}
	require.Equal(t, len(p), n.NumParams(), "NumParams, want (2+1)·3 + (3+1)·2 = 17")

	// Plain loops, no BLAS.
	sig := func(z float64) float64 { return 1 / (1 + math.Exp(-z)) }
	var J float64
	gW0 := make([][]float64, 3)
	for j := range gW0 {
		gW0[j] = make([]float64, 2)
	}
	gb0 := make([]float64, 3)
	gW1 := [][]float64{make([]float64, 3), make([]float64, 3)}
	gb1 := make([]float64, 2)
	for r, x := range xs {
		a1 := make([]float64, 3)
		for j := 0; j < 3; j++ {
			a1[j] = sig(w0[j][0]*x[0] + w0[j][1]*x[1] + b0[j])
		}
		z2 := make([]float64, 2)
		for k := 0; k < 2; k++ {
			z2[k] = w1[k][0]*a1[0] + w1[k][1]*a1[1] + w1[k][2]*a1[2] + b1[k]
		}
		den := math.Exp(z2[0]) + math.Exp(z2[1])
		d2 := make([]float64, 2)
		for k := 0; k < 2; k++ {
			h := math.Exp(z2[k]) / den
			J -= ys[r][k] * math.Log(h) / 2
			d2[k] = h - ys[r][k]
			gb1[k] += d2[k] / 2
			for j := 0; j < 3; j++ {
				gW1[k][j] += d2[k] * a1[j] / 2
			}
		}
		for j := 0; j < 3; j++ {
			d1 := (w1[0][j]*d2[0] + w1[1][j]*d2[1]) * a1[j] * (1 - a1[j])
			gb0[j] += d1 / 2
			gW0[j][0] += d1 * x[0] / 2
			gW0[j][1] += d1 * x[1] / 2
		}
	}
	loopGrad := []float64{gW0[0][0], gW0[0][1], gW0[1][0], gW0[1][1], gW0[2][0], gW0[2][1], gb0[0], gb0[1], gb0[2],
		gW1[0][0], gW1[0][1], gW1[0][2], gW1[1][0], gW1[1][1], gW1[1][2], gb1[0], gb1[1]}

	// The loops agree with the hand-written numbers to their 12 digits.
	hand := []struct {
		name      string
		got, want float64
	}{
		{"J", J, 0.669409379487},
		{"∂b1[0]", gb1[0], 0.134640723015},
		{"∂W1[0,0]", gW1[0][0], 0.0471130523022},
		{"∂W0[0,0]", gW0[0][0], -0.195546273877},
		{"∂W0[2,1]", gW0[2][1], -0.0892341184642},
		{"∂b0[1]", gb0[1], -0.0598186579232},
	}
	for _, h := range hand {
		t.Run(h.name, func(t *testing.T) {
			assert.InDelta(t, h.want, h.got, 1e-11, "plain loops against the hand-written number")
		})
	}

	x := mat.NewDense(2, 2, []float64{1, 2, -1, 0.5})
	y := mat.NewDense(2, 2, []float64{1, 0, 0, 1})
	o, err := NewObjective(n, x, y, ObjectiveOptions{})
	require.NoError(t, err)
	g := make([]float64, len(p))
	got := o.Eval(g, p)
	// The engine sums in another order than the loops: allow a few ulps
	// of values of order 1 (1e-14 absolute).
	assert.InDelta(t, J, got, 1e-14, "Eval against the loops")
	for i := range g {
		assert.InDelta(t, loopGrad[i], g[i], 1e-14, "grad[%d] against the loops", i)
	}
}
