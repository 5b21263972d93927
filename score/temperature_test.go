package score

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
)

// overconfident draws m rows whose true class probabilities are
// softmax(a) (or sigmoid(a) per unit) for logits a = W·x, x ~ N(0, I₂),
// samples the targets from them, and returns the logits of a model that
// is right about the ranking but over-confident by a factor of scale:
// z = scale·a. The temperature that calibrates z is therefore scale.
func overconfident(m, k int, scale float64, out Output, seed uint64) (z, y *mat.Dense) {
	rng := rand.New(rand.NewPCG(seed, 7))
	w := [][2]float64{{1.2, -0.4}, {-0.8, 0.9}, {0.1, -0.7}, {0.5, 0.5}}
	z, y = mat.NewDense(m, k, nil), mat.NewDense(m, k, nil)
	a := make([]float64, k)
	for i := range m {
		x0, x1 := rng.NormFloat64(), rng.NormFloat64()
		var sum float64
		for j := range k {
			a[j] = w[j][0]*x0 + w[j][1]*x1
			z.Set(i, j, scale*a[j])
			sum += math.Exp(a[j])
		}
		if out == Sigmoid {
			for j := range k {
				if rng.Float64() < 1/(1+math.Exp(-a[j])) {
					y.Set(i, j, 1)
				}
			}
			continue
		}
		u, acc := rng.Float64()*sum, 0.0
		for j := range k {
			acc += math.Exp(a[j])
			if u < acc || j == k-1 {
				y.Set(i, j, 1)
				break
			}
		}
	}
	return z, y
}

// plainCost is the mean cross-entropy at temperature T written directly
// from its definition (probabilities first, then logs), as an independent
// reference for moderate logits.
func plainCost(z, y mat.Matrix, t float64, out Output) float64 {
	m, k := z.Dims()
	var f float64
	for i := range m {
		var sum float64
		for j := range k {
			sum += math.Exp(z.At(i, j) / t)
		}
		for j := range k {
			yj := y.At(i, j)
			if out == Sigmoid {
				p := 1 / (1 + math.Exp(-z.At(i, j)/t))
				f -= yj*math.Log(p) + (1-yj)*math.Log(1-p)
			} else if yj > 0 {
				f -= yj * math.Log(math.Exp(z.At(i, j)/t)/sum)
			}
		}
	}
	return f / float64(m)
}

// TestTemperatureOverconfident: on logits three times too confident, the
// fitted temperature is near 3, it is the minimiser that gonum's
// Nelder–Mead finds for the plainly written cost, and the expected
// calibration error falls.
func TestTemperatureOverconfident(t *testing.T) {
	for _, out := range []Output{Softmax, Sigmoid} {
		t.Run(out.String(), func(t *testing.T) {
			const m, k, scale = 4000, 3, 3.0
			z, y := overconfident(m, k, scale, out, 1)
			res, err := FitTemperature(z, y, out)
			require.NoError(t, err)
			assert.False(t, res.AtBound)
			// T̂ is a maximum-likelihood estimate: β̂ = 1/T̂ has standard
			// error 1/√(m·f''(β̂)) (the observed information; common
			// practice), so T̂ has T̂²/√(m·f''). Four standard errors.
			c := &tempCost{z: z, y: y, out: out, row: make([]float64, k)}
			_, _, h := c.eval(1 / res.T)
			se := res.T * res.T / math.Sqrt(m*h)
			t.Logf("standard error of T: %.3f", se)
			assert.InDelta(t, scale, res.T, 4*se)
			assert.Less(t, res.After, res.Before)
			assert.InDelta(t, plainCost(z, y, 1, out), res.Before, 1e-12) // same sums, other order
			assert.InDelta(t, plainCost(z, y, res.T, out), res.After, 1e-12)

			// Reference minimiser: gonum optimize's Nelder–Mead on log T of
			// the plainly written cost. Near the minimum f is quadratic, so
			// a cost converged to 1e-15 puts log T within about
			// √(1e-15/f'') ≈ 1e-7 of it; 1e-5 relative in T is ample.
			prob := optimize.Problem{Func: func(x []float64) float64 { return plainCost(z, y, math.Exp(x[0]), out) }}
			ref, err := optimize.Minimize(prob, []float64{0}, &optimize.Settings{
				Converger: &optimize.FunctionConverge{Absolute: 1e-15, Iterations: 100},
			}, &optimize.NelderMead{})
			require.NoError(t, err)
			assert.InEpsilon(t, math.Exp(ref.X[0]), res.T, 1e-5)

			// ECE before and after (single-label for softmax, per unit for
			// sigmoid). A factor 3 of over-confidence gives an ECE of
			// several percent; after scaling it is at the sampling noise.
			names := []string{"a", "b", "c"}
			var p0, p1, zs mat.Dense
			require.NoError(t, Probabilities(&p0, z, out))
			require.NoError(t, ApplyTemperature(&zs, z, res.T))
			require.NoError(t, Probabilities(&p1, &zs, out))
			before, err := ReliabilityDiagram(&p0, y, names, out == Sigmoid)
			require.NoError(t, err)
			after, err := ReliabilityDiagram(&p1, y, names, out == Sigmoid)
			require.NoError(t, err)
			t.Logf("T = %.4f, cross-entropy %.4f → %.4f, ECE %.4f → %.4f", res.T, res.Before, res.After, before.ECE, after.ECE)
			assert.Less(t, after.ECE, before.ECE/2)
		})
	}
}

// TestTemperatureOneIsIdentity: T = 1 leaves the logits and the
// probabilities made from them bit-identical (IEEE 754 division by 1 is
// exact).
func TestTemperatureOneIsIdentity(t *testing.T) {
	z, _ := overconfident(200, 3, 2.5, Softmax, 3)
	var zs mat.Dense
	require.NoError(t, ApplyTemperature(&zs, z, 1))
	for _, out := range []Output{Softmax, Sigmoid} {
		var p0, p1 mat.Dense
		require.NoError(t, Probabilities(&p0, z, out))
		require.NoError(t, Probabilities(&p1, &zs, out))
		for i := range 200 {
			for j := range 3 {
				require.Equal(t, math.Float64bits(z.At(i, j)), math.Float64bits(zs.At(i, j)))
				require.Equal(t, math.Float64bits(p0.At(i, j)), math.Float64bits(p1.At(i, j)))
			}
		}
	}
	// And a temperature other than 1 does change them (so the check above
	// can fail).
	require.NoError(t, ApplyTemperature(&zs, z, 1.5))
	assert.NotEqual(t, z.At(0, 0), zs.At(0, 0))
}

// TestTemperatureDerivatives checks the first and second derivatives in
// β = 1/T against gonum's diff/fd central differences. The step is 1e-5
// on values of order 1, so the truncation error (step² times the third derivative) and the
// rounding error (ε/step) are both below 1e-8; the tolerance is 1e-6.
func TestTemperatureDerivatives(t *testing.T) {
	for _, out := range []Output{Softmax, Sigmoid} {
		z, y := overconfident(300, 3, 2, out, 5)
		c := &tempCost{z: z, y: y, out: out, row: make([]float64, 3)}
		for _, beta := range []float64{0.1, 0.5, 1, 2} {
			_, g, h := c.eval(beta)
			fg := fd.Derivative(func(b float64) float64 { f, _, _ := c.eval(b); return f }, beta, &fd.Settings{Formula: fd.Central, Step: 1e-5})
			fh := fd.Derivative(func(b float64) float64 { _, g, _ := c.eval(b); return g }, beta, &fd.Settings{Formula: fd.Central, Step: 1e-5})
			assert.InDelta(t, fg, g, 1e-6, "%v β=%v", out, beta)
			assert.InDelta(t, fh, h, 1e-6, "%v β=%v", out, beta)
		}
	}
}

// Logits that rank every row perfectly keep lowering the cost as T → 0;
// logits that put the true class last, as T → ∞. Both stop at the
// bracket's end and say so. Values are huge but the cost is computed
// through log-sum-exp and softplus, so it stays finite.
func TestTemperatureBounds(t *testing.T) {
	y := mat.NewDense(2, 2, []float64{1, 0, 0, 1})
	res, err := FitTemperature(mat.NewDense(2, 2, []float64{3, -1, -2, 4}), y, Softmax)
	require.NoError(t, err)
	assert.True(t, res.AtBound)
	assert.Equal(t, MinTemperature, res.T)
	assert.False(t, math.IsNaN(res.After) || math.IsInf(res.After, 0))
	res, err = FitTemperature(mat.NewDense(2, 2, []float64{-3, 1, 2, -4}), y, Softmax)
	require.NoError(t, err)
	assert.True(t, res.AtBound)
	assert.Equal(t, MaxTemperature, res.T)
	res, err = FitTemperature(mat.NewDense(2, 1, []float64{300, -500}), mat.NewDense(2, 1, []float64{1, 0}), Sigmoid)
	require.NoError(t, err)
	assert.Equal(t, MinTemperature, res.T)
	assert.False(t, math.IsNaN(res.After) || math.IsInf(res.After, 0))
}

func TestTemperatureBadInput(t *testing.T) {
	y := mat.NewDense(1, 2, []float64{1, 0})
	_, err := FitTemperature(mat.NewDense(1, 2, []float64{1, math.Inf(1)}), y, Softmax)
	assert.ErrorIs(t, err, ErrValue)
	assert.ErrorContains(t, err, "row 1, column 2")
	_, err = FitTemperature(mat.NewDense(1, 2, []float64{1, 2}), mat.NewDense(1, 2, []float64{2, 0}), Sigmoid)
	assert.ErrorIs(t, err, ErrValue)
	_, err = FitTemperature(mat.NewDense(1, 1, []float64{1}), mat.NewDense(1, 1, []float64{1}), Softmax)
	assert.ErrorIs(t, err, ErrShape)
	_, err = FitTemperature(mat.NewDense(2, 2, nil), y, Softmax)
	assert.ErrorIs(t, err, ErrShape)
	_, err = FitTemperature(mat.NewDense(1, 2, nil), y, Output(5))
	assert.ErrorIs(t, err, ErrValue)
	var d mat.Dense
	for _, bad := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		assert.ErrorIs(t, ApplyTemperature(&d, y, bad), ErrValue, "T = %v", bad)
	}
	d2 := mat.NewDense(2, 2, nil)
	assert.ErrorIs(t, ApplyTemperature(d2, y, 2), ErrShape)
	assert.ErrorIs(t, Probabilities(d2, y, Softmax), ErrShape)
}
